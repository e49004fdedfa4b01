/**
 * (c) A non-responder: known heart failure with a dilated, poorly contracting right ventricle, admitted with a
 * chest infection and low blood pressure; breathing on his own, CVP 15 mmHg,
 * IVC 2.5 cm that barely moves with breathing (4 %), and a passive leg raise that moved cardiac output by only
 * 2 % on the non-invasive monitor.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, CONDITIONS, every, wobble } from './chart.js';
import type { Scenario } from './types.js';

const P = 'hg-lantern-02';
const E = 'hg-lantern-02-stay';

export const scenario: Scenario = {
  id: 'fixed-full-ivc',
  title: 'Spontaneous breathing, CVP 15, wide fixed IVC, negative leg raise',
  ward: 'Lantern Cardiac ICU, bed 2',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-saltash',
  expect: { responsiveness: 'unlikely', tolerance: 'limited', indicator: 'warning' },
  conclusion:
    'A negative passive leg raise by cardiac output, a CVP of 15 mmHg and a wide IVC with no respiratory variation all say the heart will not use ' +
    'more preload: do not give the bolus; look for the cause of the low pressure with echo and treat it (inotrope or vasopressor as the picture shows).',
  build(now) {
    const c = new Chart('ffi', P, now);
    c.patient('male', '1954-02-17', 'Quarrie', 'Tobiah').encounter(E, 30 * 60, 'Lantern Cardiac ICU, bed 2');
    c.condition(CONDITIONS.heartFailure, 3 * 365 * 24 * 60)
      .condition(CONDITIONS.pneumonia, 400 * 24 * 60, 'resolved')
      .condition(CONDITIONS.pneumonia, 34 * 60);
    c.num('bodyWeight', 88, 30 * 60).num('bodyHeight', 181, 30 * 60);
    c.vitals(
      every(240, 0, 15).map((at, i) => ({
        at: at + 2,
        hr: 96 + wobble(i, 3),
        sbp: 94 + wobble(i, 2),
        dbp: 54,
        map: 62 + wobble(i, 1),
        rr: 22,
        spo2: 95,
      })),
    );
    c.series(
      'cvp',
      every(240, 0, 30).map((at, i) => [at + 3, 15 + (i % 3 === 0 ? 1 : 0)] as const),
    );
    c.series('lactate', [
      [5 * 60, 2.6],
      [45, 2.4],
    ])
      .series('albumin', [[20 * 60, 34]])
      .series('creatinine', [
        [20 * 60, 1.3],
        [60, 1.4],
      ]);
    c.codedSeries(
      'ventilationMode',
      'spontaneous',
      every(240, 0, 60).map((m) => m + 5),
    );
    c.codedSeries(
      'heartRhythm',
      'sinus',
      every(240, 0, 60).map((m) => m + 5),
    );
    c.ivc(2.5, 2.4, 40);
    c.coded('hepaticVeinPattern', 'mild', 40).coded('renalVeinPattern', 'biphasic', 40).num('portalPulsatility', 22, 40);
    c.dynamic('plr', 'cardiacOutput', 4.6, 4.7, 25);
    c.shifts([
      [30 * 60, 18 * 60, 1900, 1300],
      [18 * 60, 6 * 60, 1700, 1200],
      [6 * 60, 0, 800, 500],
    ]);
    c.hourlyUrine(8 * 60, 0, (i) => 70 + wobble(i, 8));
    c.num('edemaGrade', 1, 4 * 60).num('bLineRegions', 1, 40);
    const draft = Chart.bolusDraft('ffi-order-bolus', P, now, b.FLUIDS.saline, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/ffi-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
