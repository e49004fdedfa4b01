/**
 * A perfused patient in atrial fibrillation with only an IVC: day 3 after a colectomy, breathing on his own, new
 * fast AF (rate 112) overnight, a bedside IVC 1.6 cm collapsing to 0.6 cm (62 %) with breathing. MAP 74, lactate
 * 1.3, capillary refill 2.5 s, urine 0.8 mL/kg/h. A bolus is ordered "for the AF". Asked on order-select.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart } from './chart.js';
import { chartOrdinary } from './ordinary.js';
import type { Scenario } from './types.js';

const P = 'hg-whimbrel-12';
const E = 'hg-whimbrel-12-stay';

export const scenario: Scenario = {
  id: 'perfused-af-ivc-only',
  title: 'New AF, a collapsing IVC, MAP 74, lactate 1.3, capillary refill 2.5 s',
  ward: 'Whimbrel HDU, bed 12',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-saltash',
  expect: { responsiveness: 'indeterminate', tolerance: 'adequate', indicator: 'warning', action: 'question-need', nextTest: null },
  conclusion:
    'A collapsing IVC in a breathing patient is one static marker and decides nothing; AF voids pulse pressure variation anyway. He is well ' +
    'perfused (MAP 74, lactate 1.3, capillary refill 2.5 s, urine 0.8 mL/kg/h), so there is nothing for a bolus to treat: treat the AF.',
  build(now) {
    const c = new Chart('afi', P, now);
    c.patient('male', '1951-01-09', 'Trevanion', 'Silas').encounter(E, 60 * 60, 'Whimbrel HDU, bed 12');
    c.num('bodyWeight', 76, 60 * 60).num('bodyHeight', 176, 60 * 60);
    chartOrdinary(c, {
      map: 74,
      hr: 112,
      rr: 18,
      spo2: 95,
      ventilation: 'spontaneous',
      rhythm: 'atrial-fibrillation',
      fio2: 24,
      urineMlPerHour: 61,
    });
    c.ivc(1.6, 0.6, 30);
    c.series('lactate', [
      [11 * 60, 1.4],
      [4 * 60, 1.3],
    ]).series('capillaryRefill', [
      [80, 2.5],
      [20, 2.5],
    ]);
    c.series('creatinine', [
      [30 * 60, 0.9],
      [8 * 60, 0.9],
    ]);
    c.shifts([
      [36 * 60, 24 * 60, 2000, 1800],
      [24 * 60, 12 * 60, 1800, 1900],
      [12 * 60, 20, 1200, 1300],
    ]);
    const draft = Chart.bolusDraft('afi-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/afi-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
