/**
 * A hepatic patient with a real lung finding: alcohol-related cirrhosis with variceal bleeding controlled, day 2,
 * ventilated without effort, transpulmonary thermodilution in place. A leg raise 20 min ago raised cardiac output
 * by 12 %; EVLWI is 13 mL/kg and SpO2/FiO2 has fallen from 245 to 163 over 5 h. MAP 62, lactate 2.6. Asked on
 * order-sign.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, CONDITIONS } from './chart.js';
import { chartOrdinary } from './ordinary.js';
import type { Scenario } from './types.js';

const P = 'hg-stint-07';
const E = 'hg-stint-07-stay';

export const scenario: Scenario = {
  id: 'cirrhosis-lung-water',
  title: 'Cirrhosis, positive leg raise, EVLWI 13 mL/kg and falling SpO2/FiO2',
  ward: 'Stint ICU, bed 7',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-okonjo',
  expect: { responsiveness: 'likely', tolerance: 'poor', indicator: 'critical', action: 'smaller-aliquot' },
  conclusion:
    'He would raise his cardiac output with volume, but EVLWI 13 mL/kg and a falling SpO2/FiO2 show lung water in a cirrhotic patient: more ' +
    'crystalloid is likely to harm. Support pressure with a vasopressor, weigh albumin, and do not give this bolus as ordered.',
  build(now) {
    const c = new Chart('clw', P, now);
    c.patient('male', '1966-11-03', 'Gorran', 'Isaac').encounter(E, 40 * 60, 'Stint ICU, bed 7');
    c.condition(CONDITIONS.cirrhosis, 5 * 365 * 24 * 60);
    c.num('bodyWeight', 74, 40 * 60).num('bodyHeight', 174, 40 * 60);
    chartOrdinary(c, {
      hours: 5,
      map: 62,
      hr: 100,
      rr: 18,
      spo2: 98,
      cvp: 10,
      ventilation: 'controlled-no-effort',
      tidalVolumeMl: 500,
      peep: 10,
      urineMlPerHour: 35,
    });
    // SpO2/FiO2 245 (98 % on 40 %) five hours ago, 163 (93 % on 57 %) now.
    c.num('fio2', 40, 5 * 60 + 30)
      .num('spo2', 98, 5 * 60 + 20)
      .num('fio2', 57, 40)
      .num('spo2', 93, 15);
    c.series('cardiacOutput', [
      [80, 5.8],
      [20, 5.9],
    ]);
    c.dynamic('plr', 'cardiacOutput', 5.8, 6.5, 20);
    c.num('evlwi', 13, 25);
    c.norepinephrineRunning(12 * 60, 0.08);
    c.series('lactate', [
      [9 * 60, 2.9],
      [3 * 60, 2.6],
    ])
      .series('albumin', [[20 * 60, 24]])
      .series('creatinine', [
        [30 * 60, 1.3],
        [6 * 60, 1.4],
      ]);
    c.shifts([
      [40 * 60, 28 * 60, 3200, 1400],
      [28 * 60, 16 * 60, 2600, 1300],
      [16 * 60, 4 * 60, 2200, 1200],
    ]);
    const draft = Chart.bolusDraft('clw-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: [], hook: 'order-sign' };
  },
};

export default scenario;
