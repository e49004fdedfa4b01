/**
 * Raised intra-abdominal pressure: day 1 after a laparotomy for small-bowel obstruction, ventilated without effort,
 * sinus rhythm, Vt 8.5 mL/kg PBW. Bladder pressure 18 mmHg (IAH grade II). PPV 17 %. MAP 61, lactate 3.2.
 * Asked on order-sign.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart } from './chart.js';
import { chartOrdinary } from './ordinary.js';
import type { Scenario } from './types.js';

const P = 'hg-godwit-03';
const E = 'hg-godwit-03-stay';

export const scenario: Scenario = {
  id: 'raised-abdominal-pressure',
  title: 'IAP 18 mmHg after laparotomy, PPV 17 %, MAP 61',
  ward: 'Godwit ICU, bed 3',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-okonjo',
  expect: {
    responsiveness: 'indeterminate',
    tolerance: 'limited',
    indicator: 'warning',
    action: 'test-first',
    nextTest: 'mini-fluid-challenge',
  },
  conclusion:
    'With IAP 18 mmHg a high PPV may be a false positive and a leg raise may be falsely negative: test with a mini fluid challenge and VTI ' +
    'before more volume. The intra-abdominal hypertension itself limits tolerance, since volume raises it further.',
  build(now) {
    const c = new Chart('iah', P, now);
    c.patient('male', '1968-04-22', 'Pellow', 'Arthur').encounter(E, 22 * 60, 'Godwit ICU, bed 3');
    // Male 180 cm: PBW 75.1 kg; Vt 640 mL = 8.5 mL/kg.
    c.num('bodyWeight', 88, 22 * 60).num('bodyHeight', 180, 22 * 60);
    chartOrdinary(c, {
      map: 61,
      hr: 106,
      rr: 18,
      spo2: 96,
      cvp: 11,
      ventilation: 'controlled-no-effort',
      tidalVolumeMl: 640,
      peep: 8,
      fio2: 35,
      urineMlPerHour: 40,
    });
    c.coded('chestStatus', 'closed', 22 * 60);
    c.series('intraAbdominalPressure', [
      [7 * 60, 16],
      [60, 18],
    ]);
    c.series('ppv', [
      [80, 16],
      [20, 17],
    ]);
    c.series('lactate', [
      [10 * 60, 3.5],
      [3 * 60, 3.2],
    ]).series('creatinine', [
      [20 * 60, 1.0],
      [5 * 60, 1.1],
    ]);
    c.shifts([
      [22 * 60, 10 * 60, 3600, 1400],
      [10 * 60, 20, 1500, 800],
    ]);
    const draft = Chart.bolusDraft('iah-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: [], hook: 'order-sign' };
  },
};

export default scenario;
