/**
 * An extra case: ARDS on lung-protective ventilation (Vt 6.1 mL/kg PBW), so PPV 8 % is not valid (low tidal
 * volume makes it read low). A tidal volume challenge (6 → 8 mL/kg for one minute) raised PPV from 8 to
 * 12.5 %. Oxygenation is poor (SpO2 92 % on FiO2 60 %) with B-lines in 3 regions.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, CONDITIONS, every, wobble } from './chart.js';
import type { Scenario } from './types.js';

const P = 'hg-lantern-06';
const E = 'hg-lantern-06-stay';

export const scenario: Scenario = {
  id: 'tidal-volume-challenge',
  title: 'ARDS at Vt 6 mL/kg: PPV not valid, but a positive tidal volume challenge',
  ward: 'Lantern Cardiac ICU, bed 6',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-saltash',
  expect: { responsiveness: 'likely', tolerance: 'limited', indicator: 'warning' },
  conclusion:
    'The tidal volume challenge (PPV +4.5 points) shows she is likely to respond, but ARDS with poor oxygenation narrows the margin: ' +
    'give a smaller aliquot (250 mL) and reassess oxygenation and response before any more.',
  build(now) {
    const c = new Chart('tvc', P, now);
    c.patient('female', '1969-10-10', 'Wrenfield', 'Theodora').encounter(E, 40 * 60, 'Lantern Cardiac ICU, bed 6');
    c.condition(CONDITIONS.ards, 40 * 60).condition(CONDITIONS.pneumonia, 60 * 60);
    c.num('bodyWeight', 64, 40 * 60)
      .num('bodyWeight', 65.5, 6 * 60)
      .num('bodyHeight', 160, 40 * 60);
    c.vitals(
      every(240, 0, 15).map((at, i) => ({
        at: at + 2,
        hr: 108 + wobble(i, 3),
        sbp: 94 + wobble(i, 3),
        dbp: 50,
        map: 63 + wobble(i, 1),
        rr: 26,
        spo2: 92,
      })),
    );
    c.series(
      'cvp',
      every(240, 0, 60).map((at) => [at + 3, 10] as const),
    );
    c.series('lactate', [
      [5 * 60, 2.8],
      [40, 2.7],
    ])
      .series('albumin', [[20 * 60, 30]])
      .series('creatinine', [
        [20 * 60, 0.9],
        [60, 1.0],
      ]);
    c.codedSeries(
      'ventilationMode',
      'controlled-no-effort',
      every(240, 0, 60).map((m) => m + 5),
    );
    c.codedSeries(
      'heartRhythm',
      'sinus',
      every(240, 0, 60).map((m) => m + 5),
    );
    // Female 160 cm: PBW 52.4 kg; Vt 320 mL = 6.1 mL/kg.
    c.series(
      'tidalVolume',
      every(240, 0, 60).map((m) => [m + 5, 320] as const),
    );
    c.series(
      'peep',
      every(240, 0, 60).map((m) => [m + 5, 12] as const),
    );
    c.series(
      'fio2',
      every(240, 0, 60).map((m) => [m + 5, 60] as const),
    );
    c.coded('chestStatus', 'closed', 30 * 60).coded('chestStatus', 'closed', 6 * 60);
    c.num('intraAbdominalPressure', 8, 3 * 60);
    c.series('ppv', [
      [40, 8],
      [12, 8],
    ]);
    c.dynamic('tidalVolumeChallenge', 'ppv', 8, 12.5, 10);
    c.shifts([
      [40 * 60, 28 * 60, 2200, 1500],
      [28 * 60, 16 * 60, 1800, 1400],
      [16 * 60, 4 * 60, 1500, 1200],
      [4 * 60, 0, 450, 380],
    ]);
    c.hourlyUrine(8 * 60, 0, (i) => 48 + wobble(i, 6));
    c.num('edemaGrade', 1, 4 * 60).num('bLineRegions', 3, 30);
    const draft = Chart.bolusDraft('tvc-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/tvc-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
