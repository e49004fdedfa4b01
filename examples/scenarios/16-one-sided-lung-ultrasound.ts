/**
 * A one-sided lung-ultrasound pattern: right lower lobe pneumonia, ventilated without effort, sinus rhythm, Vt 8.3
 * mL/kg PBW. The sonographer found a B-pattern in 4 regions, all on the right, and none on the left; the unit's
 * charting records the whole-chest count per lung, with the lung as the Observation's bodySite (SNOMED CT 44029006
 * left lung, 3341006 right lung). Valid PPV 15 %. MAP 59, lactate 3.5. Asked on order-select.
 */
import * as b from '../lib/fhir-builders.js';
import { SNOMED } from '../../src/fhir/codes.js';
import { Chart, CONDITIONS } from './chart.js';
import { chartOrdinary } from './ordinary.js';
import type { Scenario } from './types.js';

const P = 'hg-avocet-10';
const E = 'hg-avocet-10-stay';

export const scenario: Scenario = {
  id: 'one-sided-lung-ultrasound',
  title: 'B-pattern in 4 regions of the pneumonic lung, valid PPV 15 %, MAP 59',
  ward: 'Avocet ICU, bed 10',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-amberley',
  expect: { responsiveness: 'likely', tolerance: 'limited', indicator: 'warning', action: 'smaller-aliquot' },
  conclusion:
    'Four B-line regions on the right and none on the left are the pneumonia, not diffuse lung water (that needs two or more on each side): ' +
    'a one-sided pattern limits tolerance moderately, and is no sign that volume will harm. Responsive and hypotensive: give a smaller ' +
    'aliquot and reassess oxygenation.',
  build(now) {
    const c = new Chart('lus', P, now);
    c.patient('female', '1957-07-14', 'Brannock', 'Hester').encounter(E, 26 * 60, 'Avocet ICU, bed 10');
    c.condition(CONDITIONS.pneumonia, 30 * 60);
    // Female 168 cm: PBW 59.7 kg; Vt 500 mL = 8.4 mL/kg.
    c.num('bodyWeight', 72, 26 * 60).num('bodyHeight', 168, 26 * 60);
    chartOrdinary(c, {
      map: 59,
      hr: 102,
      rr: 20,
      spo2: 95,
      cvp: 8,
      ventilation: 'controlled-no-effort',
      tidalVolumeMl: 500,
      peep: 8,
      fio2: 35,
      urineMlPerHour: 38,
    });
    c.coded('chestStatus', 'closed', 20 * 60).num('intraAbdominalPressure', 8, 5 * 60);
    c.series('ppv', [
      [80, 14],
      [20, 15],
    ]);
    c.num('bLineRegions', 0, 45, { bodySite: { system: SNOMED, code: '44029006', display: 'Left lung structure' } }).num(
      'bLineRegions',
      4,
      45,
      { bodySite: { system: SNOMED, code: '3341006', display: 'Right lung structure' } },
    );
    c.series('lactate', [
      [9 * 60, 3.8],
      [2 * 60, 3.5],
    ]).series('creatinine', [
      [24 * 60, 0.9],
      [6 * 60, 1.0],
    ]);
    c.shifts([
      [26 * 60, 14 * 60, 2300, 1200],
      [14 * 60, 2 * 60, 1700, 1100],
    ]);
    const draft = Chart.bolusDraft('lus-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/lus-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
