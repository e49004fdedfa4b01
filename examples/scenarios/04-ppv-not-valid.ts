/**
 * (d) PPV recorded but not valid: after an emergency laparotomy, ventilated but triggering the ventilator
 * (spontaneous effort) and in new atrial fibrillation. The monitor shows PPV 19 %, which both conditions
 * inflate; nothing else dynamic is recorded and CVP is mid-range.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, CONDITIONS, every, wobble } from './chart.js';
import type { Scenario } from './types.js';

const P = 'hg-kestrel-07';
const E = 'hg-kestrel-07-stay';

export const scenario: Scenario = {
  id: 'ppv-not-valid',
  title: 'PPV 19 % on the monitor, but triggering breaths and atrial fibrillation',
  ward: 'Kestrel ICU, bed 7',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-amberley',
  expect: { responsiveness: 'indeterminate', tolerance: 'adequate', indicator: 'info' },
  conclusion:
    'The PPV of 19 % cannot be used: spontaneous breaths and atrial fibrillation both make it read high, and a mid-range CVP says nothing, so ' +
    'responsiveness is unknown; a passive leg raise with cardiac output monitoring would settle it before volume is given.',
  build(now) {
    const c = new Chart('pnv', P, now);
    c.patient('male', '1959-11-30', 'Penhallow', 'Cassius').encounter(E, 9 * 60, 'Kestrel ICU, bed 7');
    c.condition(CONDITIONS.sepsis, 11 * 60);
    c.num('bodyWeight', 79, 9 * 60).num('bodyHeight', 174, 9 * 60);
    c.vitals(
      every(240, 0, 15).map((at, i) => ({
        at: at + 2,
        hr: 124 + wobble(i, 9),
        sbp: 100 + wobble(i, 4),
        dbp: 50,
        map: 64 + wobble(i, 2),
        rr: 24,
        spo2: 95,
      })),
    );
    c.series(
      'cvp',
      every(240, 0, 60).map((at) => [at + 3, 9] as const),
    );
    c.series('lactate', [
      [4 * 60, 3.0],
      [30, 2.8],
    ])
      .series('albumin', [[8 * 60, 31]])
      .series('creatinine', [[8 * 60, 0.9]]);
    c.codedSeries(
      'ventilationMode',
      'controlled-with-effort',
      every(240, 0, 60).map((m) => m + 5),
    );
    c.codedSeries(
      'heartRhythm',
      'atrial-fibrillation',
      every(240, 0, 60).map((m) => m + 5),
    );
    // Male 174 cm: PBW 69.7 kg; Vt 560 mL = 8.0 mL/kg (the tidal volume itself is not the problem).
    c.series(
      'tidalVolume',
      every(240, 0, 60).map((m) => [m + 5, 560] as const),
    );
    c.series(
      'peep',
      every(240, 0, 60).map((m) => [m + 5, 6] as const),
    );
    c.series(
      'fio2',
      every(240, 0, 60).map((m) => [m + 5, 35] as const),
    );
    c.coded('chestStatus', 'closed', 9 * 60);
    c.num('intraAbdominalPressure', 9, 2 * 60);
    c.series('ppv', [
      [70, 21],
      [12, 19],
    ]);
    c.shifts([
      [9 * 60, 3 * 60, 2100, 800],
      [3 * 60, 0, 700, 300],
    ]);
    c.hourlyUrine(8 * 60, 0, (i) => 62 + wobble(i, 7));
    c.num('edemaGrade', 1, 3 * 60).num('bLineRegions', 1, 2 * 60);
    const draft = Chart.bolusDraft('pnv-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 15);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/pnv-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
