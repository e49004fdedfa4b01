/**
 * A leg raise older than the last bolus: septic shock from cholangitis, day 2, breathing on her own, a pulse-contour
 * monitor in place. A leg raise 55 min ago raised cardiac output by 15 %; 500 mL of Ringer's lactate then ran from
 * 45 to 15 min ago. A second 500 mL is now ordered. MAP 63, lactate 3.0. Asked on order-select.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, CONDITIONS } from './chart.js';
import { chartOrdinary } from './ordinary.js';
import type { Scenario } from './types.js';

const P = 'hg-curlew-05';
const E = 'hg-curlew-05-stay';

export const scenario: Scenario = {
  id: 'leg-raise-before-bolus',
  title: 'Positive leg raise 55 min ago, then 500 mL: does she still respond?',
  ward: 'Curlew ICU, bed 5',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-penhallow',
  expect: {
    responsiveness: 'indeterminate',
    tolerance: 'adequate',
    indicator: 'info',
    action: 'test-first',
    nextTest: 'passive-leg-raise',
  },
  conclusion:
    'The positive leg raise was taken before the last 500 mL, so it no longer says whether she still responds; the hourly pressures after ' +
    'that bolus are too few to judge. She is still hypotensive: repeat the leg raise with the cardiac output monitor before the next 500 mL.',
  build(now) {
    const c = new Chart('lrb', P, now);
    c.patient('female', '1959-12-01', 'Tamsin', 'Orla').encounter(E, 28 * 60, 'Curlew ICU, bed 5');
    c.condition(CONDITIONS.sepsis, 30 * 60);
    c.num('bodyWeight', 70, 28 * 60).num('bodyHeight', 166, 28 * 60);
    chartOrdinary(c, { map: 63, hr: 108, rr: 20, spo2: 96, cvp: 8, ventilation: 'spontaneous', fio2: 30, urineMlPerHour: 40 });
    c.series('cardiacOutput', [
      [140, 4.2],
      [80, 4.1],
      [20, 4.4],
    ]);
    c.dynamic('plr', 'cardiacOutput', 4.1, 4.72, 55);
    c.fluidGiven(b.FLUIDS.lactatedRinger, 500, 45, 15);
    c.series('lactate', [
      [10 * 60, 3.6],
      [4 * 60, 3.0],
    ]).series('creatinine', [
      [26 * 60, 0.9],
      [6 * 60, 1.0],
    ]);
    c.shifts([
      [28 * 60, 16 * 60, 2400, 1200],
      [16 * 60, 4 * 60, 1600, 1000],
    ]);
    const draft = Chart.bolusDraft('lrb-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/lrb-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
