/**
 * CVP 13 on PEEP 12 as the only static marker: ventilated after an aspiration pneumonia, no arterial PPV (the
 * arterial line trace is damped and PPV is not charted), no echo. MAP 62 on norepinephrine, lactate 2.5.
 * Hourly CVP 13 mmHg with PEEP 12 cmH2O. Asked on order-select.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, CONDITIONS } from './chart.js';
import { chartOrdinary } from './ordinary.js';
import type { Scenario } from './types.js';

const P = 'hg-dunlin-08';
const E = 'hg-dunlin-08-stay';

export const scenario: Scenario = {
  id: 'cvp-on-peep',
  title: 'CVP 13 mmHg on PEEP 12 the only marker, MAP 62',
  ward: 'Dunlin ICU, bed 8',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-saltash',
  expect: {
    responsiveness: 'indeterminate',
    tolerance: 'limited',
    indicator: 'warning',
    action: 'test-first',
    nextTest: 'mini-fluid-challenge',
  },
  conclusion:
    'One CVP decides nothing about responsiveness (no CVP value predicts it well, and PEEP 12 raises it); it does mark raised venous pressure ' +
    'for tolerance. With MAP 62 there is a need: test first (a mini fluid challenge with VTI by echo, no flow monitor) before giving 500 mL.',
  build(now) {
    const c = new Chart('cvp', P, now);
    c.patient('male', '1955-06-30', 'Rook', 'Gideon').encounter(E, 40 * 60, 'Dunlin ICU, bed 8');
    c.condition(CONDITIONS.pneumonia, 44 * 60);
    c.num('bodyWeight', 78, 40 * 60).num('bodyHeight', 175, 40 * 60);
    chartOrdinary(c, {
      map: 62,
      hr: 98,
      rr: 18,
      spo2: 95,
      cvp: 13,
      ventilation: 'controlled-no-effort',
      tidalVolumeMl: 520,
      peep: 12,
      fio2: 40,
      urineMlPerHour: 50,
    });
    c.norepinephrineRunning(16 * 60, 0.08);
    c.series('lactate', [
      [9 * 60, 2.7],
      [3 * 60, 2.5],
    ]).series('creatinine', [
      [30 * 60, 1.0],
      [8 * 60, 1.0],
    ]);
    c.shifts([
      [40 * 60, 28 * 60, 2500, 1500],
      [28 * 60, 16 * 60, 2000, 1600],
      [16 * 60, 4 * 60, 1800, 1500],
    ]);
    const draft = Chart.bolusDraft('cvp-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/cvp-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
