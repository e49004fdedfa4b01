/**
 * (e) Indeterminate, a passive leg raise is the useful next step: the evening after a bowel resection,
 * breathing on her own on the high-dependency unit, no arterial waveform index, CVP 8 mmHg (mid-range), blood
 * pressure soft, lactate mildly raised, capillary refill a little slow.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, every, wobble } from './chart.js';
import type { Scenario } from './types.js';

const P = 'hg-harbour-hdu-05';
const E = 'hg-harbour-hdu-05-stay';

export const scenario: Scenario = {
  id: 'leg-raise-first',
  title: 'After bowel surgery, breathing spontaneously, CVP 8, no dynamic index',
  ward: 'Harbour High Dependency Unit, bed 5',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-fenwright',
  expect: { responsiveness: 'indeterminate', tolerance: 'adequate', indicator: 'info' },
  conclusion:
    'Nothing here says whether she will respond: CVP 8 mmHg is uninformative and there is no valid dynamic index, while tolerance looks fine; ' +
    'a passive leg raise with real-time cardiac output (or a 100 mL mini fluid challenge with VTI) is quick and would decide the bolus.',
  build(now) {
    const c = new Chart('lrf', P, now);
    c.patient('female', '1963-06-08', 'Brannagh', 'Ilse').encounter(E, 10 * 60, 'Harbour High Dependency Unit, bed 5');
    c.num('bodyWeight', 66, 10 * 60).num('bodyHeight', 162, 10 * 60);
    c.vitals(
      every(240, 0, 15).map((at, i) => ({
        at: at + 2,
        hr: 106 + wobble(i, 3),
        sbp: 98 + wobble(i, 3),
        dbp: 52,
        map: 66 + wobble(i, 1),
        rr: 20,
        spo2: 96,
      })),
    );
    c.series(
      'cvp',
      every(240, 0, 60).map((at) => [at + 3, 8] as const),
    );
    c.series('lactate', [
      [5 * 60, 2.9],
      [35, 2.6],
    ])
      .series('albumin', [[9 * 60, 33]])
      .series('creatinine', [[9 * 60, 0.8]]);
    c.series('capillaryRefill', [
      [90, 3.5],
      [20, 3.5],
    ]);
    c.codedSeries(
      'ventilationMode',
      'spontaneous',
      every(240, 0, 60).map((m) => m + 5),
    );
    c.codedSeries(
      'heartRhythm',
      'sinus',
      every(240, 0, 60).map((m) => m + 5),
    );
    c.shifts([
      [10 * 60, 4 * 60, 1800, 700],
      [4 * 60, 0, 600, 260],
    ]);
    c.hourlyUrine(8 * 60, 0, (i) => 45 + wobble(i, 5));
    c.num('edemaGrade', 0, 3 * 60);
    const draft = Chart.bolusDraft('lrf-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/lrf-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
