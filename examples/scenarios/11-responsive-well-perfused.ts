/**
 * Responsive but well perfused: day 1 after a hip fracture repair, breathing on her own, a pulse-contour cardiac
 * output monitor left on from theatre. A passive leg raise raised cardiac output by 14 %, so she is preload
 * responsive. But MAP 78, lactate 1.1, capillary refill 2 s, urine 0.9 mL/kg/h: nothing shows hypoperfusion.
 * A bolus was ordered "for a soft blood pressure" on the night round. Asked on order-select.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart } from './chart.js';
import { chartOrdinary } from './ordinary.js';
import type { Scenario } from './types.js';

const P = 'hg-heron-02';
const E = 'hg-heron-02-stay';

export const scenario: Scenario = {
  id: 'responsive-well-perfused',
  title: 'Leg raise positive, but MAP 78, lactate 1.1, capillary refill 2 s, urine flowing',
  ward: 'Heron HDU, bed 2',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-penhallow',
  expect: { responsiveness: 'likely', tolerance: 'adequate', indicator: 'warning', action: 'question-need', nextTest: null },
  conclusion:
    'She is preload responsive, as most people are, but nothing shows a need for more cardiac output: MAP 78, lactate 1.1, capillary ' +
    'refill 2 s, urine 0.9 mL/kg/h. Responsiveness is not an indication; the bolus should be questioned, not given.',
  build(now) {
    const c = new Chart('rwp', P, now);
    c.patient('female', '1946-02-19', 'Marwood', 'Edith').encounter(E, 20 * 60, 'Heron HDU, bed 2');
    c.num('bodyWeight', 64, 20 * 60).num('bodyHeight', 160, 20 * 60);
    chartOrdinary(c, { map: 78, hr: 84, rr: 16, spo2: 96, cvp: 6, ventilation: 'spontaneous', fio2: 28, urineMlPerHour: 58 });
    c.series('cardiacOutput', [
      [80, 4.6],
      [20, 4.7],
    ]);
    c.dynamic('plr', 'cardiacOutput', 4.6, 5.25, 25);
    c.series('lactate', [
      [9 * 60, 1.3],
      [3 * 60, 1.1],
    ]).series('capillaryRefill', [
      [80, 2],
      [20, 2],
    ]);
    c.series('creatinine', [
      [18 * 60, 0.8],
      [5 * 60, 0.8],
    ]);
    c.shifts([
      [20 * 60, 8 * 60, 2100, 1500],
      [8 * 60, 20, 900, 800],
    ]);
    const draft = Chart.bolusDraft('rwp-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/rwp-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
