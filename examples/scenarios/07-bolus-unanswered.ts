/**
 * (g) A prior bolus that was not answered: faecal peritonitis, ventilated without effort (Vt 8.1 mL/kg PBW),
 * on a steady norepinephrine infusion. 500 mL of sodium chloride 0.9 % an hour ago left MAP (+1) and heart
 * rate unchanged; the IVC barely distends with the ventilator (Barbier index 4.5 %). Asked on order-sign.
 *
 * With assessment v2 (docs/clinical-logic) both are static markers charted hourly: they agree, so responsiveness is "unlikely" with
 * LOW confidence, and the card asks for a test before more volume rather than treating the question as settled.
 */
import * as b from '../lib/fhir-builders.js';
import type { VitalsRow } from './chart.js';
import { Chart, CONDITIONS } from './chart.js';
import type { Scenario } from './types.js';

const P = 'hg-kestrel-09';
const E = 'hg-kestrel-09-stay';

const ROWS: Array<[at: number, map: number, hr: number]> = [
  [240, 62, 110],
  [225, 61, 111],
  [210, 62, 111],
  [195, 61, 110],
  [180, 60, 112],
  [165, 61, 112],
  [150, 60, 111],
  [135, 61, 112],
  [120, 60, 112],
  // the 30 min before the bolus (started 75 min ago)
  [100, 60, 112],
  [90, 61, 113],
  [80, 60, 112],
  // the 30 min after it ended (55 min ago)
  [50, 61, 112],
  [40, 62, 113],
  [30, 61, 113],
  [20, 60, 113],
  [10, 60, 114],
  [2, 59, 114],
];

export const scenario: Scenario = {
  id: 'bolus-unanswered',
  title: 'Last 500 mL changed nothing; IVC barely distends on the ventilator',
  ward: 'Kestrel ICU, bed 9',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-saltash',
  expect: {
    responsiveness: 'unlikely',
    tolerance: 'adequate',
    indicator: 'warning',
    action: 'test-first',
    nextTest: 'mini-fluid-challenge',
  },
  conclusion:
    'The last 500 mL moved neither MAP nor heart rate and the IVC hardly distends under controlled ventilation, so another bolus is unlikely to ' +
    'help: raise the vasopressor to the MAP target and look for a cause (echo, source control) rather than give more volume; both signs are ' +
    'weak (hourly pressures, IVC), so if volume is still considered, test first (mini fluid challenge with VTI).',
  build(now) {
    const c = new Chart('bu', P, now);
    c.patient('male', '1949-08-12', 'Ashgrove', 'Lionel').encounter(E, 20 * 60, 'Kestrel ICU, bed 9');
    c.condition(CONDITIONS.sepsis, 22 * 60);
    c.num('bodyWeight', 82, 20 * 60).num('bodyHeight', 180, 20 * 60);
    const rows: VitalsRow[] = ROWS.map(([at, map, hr]) => ({ at, hr, sbp: map + 36, dbp: map - 15, map, rr: 16, spo2: 96 }));
    c.vitals(rows);
    c.series('cvp', [
      [230, 10],
      [170, 10],
      [110, 10],
      [50, 11],
      [5, 11],
    ]);
    c.series('lactate', [
      [110, 3.8],
      [25, 4.0],
    ])
      .series('albumin', [[18 * 60, 32]])
      .series('creatinine', [
        [18 * 60, 1.1],
        [60, 1.2],
      ]);
    c.codedSeries('ventilationMode', 'controlled-no-effort', [245, 185, 125, 65, 5]);
    c.codedSeries('heartRhythm', 'sinus', [245, 185, 125, 65, 5]);
    // Male 180 cm: PBW 75.1 kg; Vt 610 mL = 8.1 mL/kg.
    c.series('tidalVolume', [
      [245, 610],
      [185, 610],
      [125, 610],
      [65, 610],
      [5, 610],
    ]);
    c.series('peep', [
      [245, 8],
      [125, 8],
      [5, 8],
    ]).series('fio2', [
      [245, 40],
      [125, 40],
      [5, 40],
    ]);
    c.coded('chestStatus', 'closed', 20 * 60);
    c.norepinephrineRunning(6 * 60, 0.15).order(b.FLUIDS.norepinephrine, 6 * 60 + 5, 'active', { value: 0.15, unit: 'ug/kg/min' });
    c.order(b.FLUIDS.saline, 80, 'completed');
    c.fluidGiven(b.FLUIDS.saline, 500, 75, 55);
    c.ivc(2.3, 2.2, 15);
    c.shifts([
      [20 * 60, 8 * 60, 3100, 1300],
      [8 * 60, 0, 1500, 700],
    ]);
    c.hourlyUrine(8 * 60, 0, (i) => 52 + (i % 2) * 6);
    c.num('edemaGrade', 1, 4 * 60).num('bLineRegions', 1, 15);
    const draft = Chart.bolusDraft('bu-order-bolus', P, now, b.FLUIDS.saline, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/bu-order-bolus'], hook: 'order-sign' };
  },
};

export default scenario;
