/**
 * (i) A non-fluid order: the same kind of ICU patient, but the order being selected is intravenous
 * paracetamol for fever. Tidemark should stay silent: no fluid card.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, CONDITIONS, every, wobble } from './chart.js';
import type { Scenario } from './types.js';

const P = 'hg-kestrel-12';
const E = 'hg-kestrel-12-stay';

export const scenario: Scenario = {
  id: 'not-a-fluid-order',
  title: 'Intravenous paracetamol ordered: not a fluid bolus',
  ward: 'Kestrel ICU, bed 12',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-amberley',
  expect: { responsiveness: null, tolerance: null, indicator: 'no-card' },
  conclusion: 'An antipyretic order raises no fluid question: no fluid advice should appear.',
  build(now) {
    const c = new Chart('naf', P, now);
    c.patient('female', '1990-01-19', 'Oakhurst', 'Delphine').encounter(E, 30 * 60, 'Kestrel ICU, bed 12');
    c.condition(CONDITIONS.pneumonia, 40 * 60);
    c.num('bodyWeight', 61, 30 * 60).num('bodyHeight', 166, 30 * 60);
    c.vitals(
      every(180, 0, 30).map((at, i) => ({
        at: at + 2,
        hr: 98 + wobble(i, 3),
        sbp: 118 + wobble(i, 3),
        dbp: 64,
        map: 82 + wobble(i, 2),
        rr: 19,
        spo2: 96,
      })),
    );
    c.series('lactate', [[3 * 60, 1.3]]);
    c.codedSeries(
      'ventilationMode',
      'spontaneous',
      every(180, 0, 60).map((m) => m + 5),
    );
    c.shifts([
      [30 * 60, 18 * 60, 1800, 1500],
      [18 * 60, 6 * 60, 1600, 1400],
      [6 * 60, 0, 700, 600],
    ]);
    const order = b.otherOrder('naf-order-paracetamol', P, 'Paracetamol 1 g intravenous infusion over 15 min', b.minutesAgo(now, 1));
    return { resources: c.resources, draftOrders: [order], selections: ['MedicationRequest/naf-order-paracetamol'], hook: 'order-select' };
  },
};

export default scenario;
