/**
 * (f) A prior bolus followed by a response: day 2 of a pyelonephritis with sepsis, breathing on her own. A
 * 500 mL balanced crystalloid bolus an hour ago raised MAP by about 8 mmHg and lowered heart rate by about 11/min,
 * with lactate and capillary refill improving; since then MAP is drifting down again. A new IVC look shows a
 * small IVC collapsing by 45 % with breathing.
 *
 * Expectation changed with assessment v2 (docs/clinical-logic): an hourly pressure change after a bolus and an
 * IVC in spontaneous breathing are static markers; two agreeing give "likely" with LOW confidence, and the advice
 * is to confirm with a test before more volume rather than to give.
 */
import * as b from '../lib/fhir-builders.js';
import type { VitalsRow } from './chart.js';
import { Chart, CONDITIONS } from './chart.js';
import type { Scenario } from './types.js';

const P = 'hg-tern-03';
const E = 'hg-tern-03-stay';

const ROWS: Array<[at: number, map: number, hr: number]> = [
  [240, 63, 113],
  [225, 62, 114],
  [210, 62, 114],
  [195, 61, 115],
  [180, 61, 116],
  [165, 60, 116],
  [150, 60, 117],
  [135, 59, 118],
  [120, 59, 118],
  // the 30 min before the bolus (started 80 min ago)
  [105, 58, 119],
  [95, 57, 120],
  [85, 58, 118],
  // the 30 min after it ended (60 min ago)
  [55, 65, 109],
  [45, 66, 108],
  [35, 67, 107],
  // drifting back
  [20, 64, 109],
  [10, 63, 110],
  [2, 62, 111],
];

export const scenario: Scenario = {
  id: 'bolus-answered',
  title: 'Last 500 mL raised MAP by 8 mmHg and slowed the heart; small IVC collapsing 45 %',
  ward: 'Tern ICU, bed 3',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-okonjo',
  expect: { responsiveness: 'likely', tolerance: 'adequate', indicator: 'info', action: 'test-first', nextTest: 'mini-fluid-challenge' },
  conclusion:
    'She answered the last bolus (MAP up 8 mmHg, heart rate down 11/min, lactate and capillary refill better) and her small IVC still collapses ' +
    'by 45 %, so she is probably still on the steep part of the curve. Both are weak static signs (hourly pressures, an IVC in a breathing ' +
    'patient): a quick test (mini fluid challenge with VTI) would confirm before the next 500 mL.',
  build(now) {
    const c = new Chart('ba', P, now);
    c.patient('female', '1978-03-26', 'Stroud', 'Mirela').encounter(E, 26 * 60, 'Tern ICU, bed 3');
    c.condition(CONDITIONS.sepsis, 28 * 60);
    c.num('bodyWeight', 70, 26 * 60)
      .num('bodyWeight', 71.2, 3 * 60)
      .num('bodyHeight', 168, 26 * 60);
    const rows: VitalsRow[] = ROWS.map(([at, map, hr]) => ({ at, hr, sbp: map + 32, dbp: map - 14, map, rr: 20, spo2: 97 }));
    c.vitals(rows);
    c.series('lactate', [
      [100, 3.4],
      [30, 2.9],
    ]).series('capillaryRefill', [
      [100, 4],
      [30, 3],
    ]);
    c.series('albumin', [[20 * 60, 32]]).series('creatinine', [
      [20 * 60, 1.2],
      [90, 1.1],
    ]);
    c.codedSeries('ventilationMode', 'spontaneous', [245, 185, 125, 65, 5]);
    c.codedSeries('heartRhythm', 'sinus', [245, 185, 125, 65, 5]);
    c.fluidGiven(b.FLUIDS.lactatedRinger, 500, 80, 60);
    c.ivc(1.9, 1.05, 8);
    c.shifts([
      [26 * 60, 14 * 60, 2300, 1100],
      [14 * 60, 2 * 60, 1500, 900],
      [2 * 60, 0, 560, 90],
    ]);
    c.hourlyUrine(8 * 60, 0, (i) => (i < 6 ? 40 : 55));
    c.num('edemaGrade', 0, 4 * 60).num('bLineRegions', 0, 8);
    const draft = Chart.bolusDraft('ba-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 20);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/ba-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
