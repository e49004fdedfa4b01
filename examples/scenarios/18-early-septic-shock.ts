/**
 * Early septic shock in the first hour: admitted from the emergency department 50 min ago with a urinary source,
 * MAP 58, heart rate 122, lactate 4.8, breathing on his own. 500 mL of Ringer's lactate given so far; admission
 * weight 80 kg (30 mL/kg = 2,400 mL, SSC 2021). No dynamic test, no central line yet. Asked on order-select.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, CONDITIONS } from './chart.js';
import { chartOrdinary } from './ordinary.js';
import type { Scenario } from './types.js';

const P = 'hg-sanderling-01';
const E = 'hg-sanderling-01-stay';

export const scenario: Scenario = {
  id: 'early-septic-shock',
  title: 'First hour of septic shock: MAP 58, lactate 4.8, 500 of 2,400 mL given',
  ward: 'Sanderling ICU, bed 1',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-penhallow',
  expect: { responsiveness: 'indeterminate', tolerance: 'not-known', indicator: 'info', action: 'resuscitate-and-reassess' },
  conclusion:
    'First hour of septic shock with MAP 58 and lactate 4.8 and only 500 of 2,400 mL (30 mL/kg admission weight) given: continue ' +
    'resuscitation in steps with reassessment after each, and start a vasopressor early if MAP stays low; do not withhold the bolus ' +
    'for want of a dynamic test. Too little is charted yet to judge tolerance.',
  build(now) {
    const c = new Chart('ess', P, now);
    c.patient('male', '1960-05-27', 'Quennell', 'Barnaby').encounter(E, 50, 'Sanderling ICU, bed 1');
    c.condition(CONDITIONS.sepsis, 3 * 60);
    c.num('bodyWeight', 80, 55).num('bodyHeight', 179, 55);
    chartOrdinary(c, { hours: 1, map: 58, hr: 122, rr: 26, spo2: 95, ventilation: 'spontaneous', fio2: 28 });
    c.num('meanBp', 57, 45).num('heartRate', 124, 45);
    c.series('lactate', [[40, 4.8]]).series('creatinine', [[40, 1.6]]);
    c.fluidGiven(b.FLUIDS.lactatedRinger, 500, 40, 10);
    const draft = Chart.bolusDraft('ess-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/ess-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
