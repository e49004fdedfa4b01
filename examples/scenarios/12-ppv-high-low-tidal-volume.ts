/**
 * PPV high at low tidal volume: pneumonia with hypoxaemia, ventilated lung-protectively at 6 mL/kg PBW (male
 * 178 cm, PBW 73.2 kg, Vt 440 mL), controlled without effort, sinus rhythm. PPV 16 %. MAP 60 on a steady
 * norepinephrine infusion, lactate 2.8. SpO2 92 % on FiO2 50 %. Asked on order-sign.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, CONDITIONS } from './chart.js';
import { chartOrdinary } from './ordinary.js';
import type { Scenario } from './types.js';

const P = 'hg-plover-06';
const E = 'hg-plover-06-stay';

export const scenario: Scenario = {
  id: 'ppv-high-low-tidal-volume',
  title: 'PPV 16 % at Vt 6 mL/kg, MAP 60, SpO2/FiO2 184',
  ward: 'Plover ICU, bed 6',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-amberley',
  expect: {
    responsiveness: 'likely',
    tolerance: 'limited',
    indicator: 'warning',
    action: 'smaller-aliquot',
    nextTest: 'tidal-volume-challenge',
  },
  conclusion:
    'Low tidal volume makes PPV read low, not high, so 16 % still argues for responsiveness; MAP 60 and lactate 2.8 show a need. Oxygenation ' +
    '(SpO2/FiO2 184) limits tolerance: give a smaller aliquot and reassess; a tidal volume challenge (6 → 8 mL/kg) would confirm.',
  build(now) {
    const c = new Chart('pht', P, now);
    c.patient('male', '1963-10-05', 'Caddow', 'Fergus').encounter(E, 30 * 60, 'Plover ICU, bed 6');
    c.condition(CONDITIONS.pneumonia, 34 * 60).condition(CONDITIONS.sepsis, 32 * 60);
    c.num('bodyWeight', 84, 30 * 60).num('bodyHeight', 178, 30 * 60);
    chartOrdinary(c, {
      map: 60,
      hr: 104,
      rr: 24,
      spo2: 92,
      cvp: 9,
      ventilation: 'controlled-no-effort',
      tidalVolumeMl: 440,
      peep: 10,
      fio2: 50,
      urineMlPerHour: 45,
    });
    c.coded('chestStatus', 'closed', 30 * 60);
    c.series('ppv', [
      [80, 15],
      [20, 16],
    ]);
    c.norepinephrineRunning(10 * 60, 0.1);
    c.series('lactate', [
      [8 * 60, 3.1],
      [2 * 60, 2.8],
    ]).series('creatinine', [
      [26 * 60, 1.0],
      [6 * 60, 1.1],
    ]);
    c.shifts([
      [30 * 60, 18 * 60, 2600, 1300],
      [18 * 60, 6 * 60, 1900, 1200],
      [6 * 60, 20, 700, 300],
    ]);
    const draft = Chart.bolusDraft('pht-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/pht-order-bolus'], hook: 'order-sign' };
  },
};

export default scenario;
