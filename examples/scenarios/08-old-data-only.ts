/**
 * (h) Stale data only: the feed from the bedside monitor to the record stopped seven hours ago; the newest
 * vitals, PPV, CVP and ventilator settings are 7–8 h old, the lactate 9 h, the last intake/output 13 h, the
 * albumin two days. Everything looks reassuring, but none of it is current.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, every, wobble } from './chart.js';
import type { Scenario } from './types.js';

const P = 'hg-tern-08';
const E = 'hg-tern-08-stay';
const H = 60;

export const scenario: Scenario = {
  id: 'old-data-only',
  title: 'Every value 7 h old or more (monitor feed stopped)',
  ward: 'Tern ICU, bed 8',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-fenwright',
  expect: { responsiveness: 'indeterminate', tolerance: 'not-known', indicator: 'info' },
  conclusion:
    'Nothing on the chart is current, so neither responsiveness nor tolerance can be judged from it: examine the patient and re-measure ' +
    '(blood pressure, lactate, a dynamic test) before deciding on the bolus; old reassuring values are no basis for advice.',
  build(now) {
    const c = new Chart('odo', P, now);
    c.patient('male', '1985-12-04', 'Kittering', 'Anselm').encounter(E, 48 * H, 'Tern ICU, bed 8');
    c.num('bodyWeight', 77, 49 * H).num('bodyHeight', 183, 49 * H);
    c.vitals(
      every(14 * H, 7 * H, 30).map((at, i) => ({
        at,
        hr: 92 + wobble(i, 3),
        sbp: 112 + wobble(i, 3),
        dbp: 60,
        map: 76 + wobble(i, 2),
        rr: 16,
        spo2: 97,
      })),
    );
    c.series(
      'cvp',
      every(14 * H, 7 * H, 60).map((at) => [at, 7] as const),
    );
    c.series('lactate', [[9 * H, 1.6]])
      .series('albumin', [[50 * H, 35]])
      .series('creatinine', [[26 * H, 0.9]]);
    c.codedSeries('ventilationMode', 'controlled-no-effort', every(14 * H, 7 * H, 60));
    c.codedSeries('heartRhythm', 'sinus', every(14 * H, 7 * H, 60));
    c.series(
      'tidalVolume',
      every(14 * H, 7 * H, 60).map((at) => [at, 620] as const),
    );
    c.series(
      'fio2',
      every(14 * H, 7 * H, 60).map((at) => [at, 30] as const),
    );
    c.series('ppv', [[8 * H, 6]]);
    c.shifts([
      [48 * H, 37 * H, 2600, 1900],
      [37 * H, 25 * H, 1900, 1700],
      [25 * H, 13 * H, 1700, 1600],
    ]);
    c.hourlyUrine(21 * H, 13 * H, () => 80);
    c.num('edemaGrade', 0, 26 * H).num('bLineRegions', 0, 8 * H);
    const draft = Chart.bolusDraft('odo-order-bolus', P, now, b.FLUIDS.lactatedRinger, 250, 15);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/odo-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
