/**
 * (a) A clear responder with good tolerance: septic shock from pneumonia, a few hours into the ICU stay, on
 * controlled ventilation without breathing effort, sinus rhythm, Vt above 8 mL/kg PBW, closed chest, normal
 * abdominal pressure: every validity condition of PPV is met, and PPV is 17 %. MAP is low and lactate high;
 * balance, albumin, lungs and kidneys leave room for volume.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, CONDITIONS, every, wobble } from './chart.js';
import type { Scenario } from './types.js';

const P = 'hg-kestrel-04';
const E = 'hg-kestrel-04-stay';

export const scenario: Scenario = {
  id: 'clear-responder',
  title: 'Septic shock on controlled ventilation, valid PPV 17 %',
  ward: 'Kestrel ICU, bed 4',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-amberley',
  expect: { responsiveness: 'likely', tolerance: 'adequate', indicator: 'info', action: 'proceed-and-reassess' },
  conclusion:
    'Valid PPV of 17 % under controlled ventilation without effort, sinus rhythm and Vt 8.2 mL/kg PBW says this patient is very likely to raise ' +
    'cardiac output with volume, and nothing limits tolerance yet: give the 500 mL and reassess MAP, lactate and PPV straight after.',
  build(now) {
    const c = new Chart('cr', P, now);
    c.patient('male', '1967-05-21', 'Marchbank', 'Oswin').encounter(E, 14 * 60, 'Kestrel ICU, bed 4');
    c.condition(CONDITIONS.pneumonia, 20 * 60);
    c.condition(CONDITIONS.sepsis, 16 * 60);
    c.num('bodyWeight', 84, 14 * 60).num('bodyHeight', 178, 14 * 60);
    // MAP sagging over four hours despite the first litre: 66 → 58.
    c.vitals(
      every(240, 0, 15).map((at, i) => ({
        at: at + 2,
        hr: 104 + Math.round(i / 2) + wobble(i, 2),
        sbp: 98 - i + wobble(i, 2),
        dbp: 50 - Math.round(i / 2),
        map: 66 - Math.round(i / 2) + wobble(i, 1),
        rr: 18,
        spo2: 96,
      })),
    );
    c.series(
      'cvp',
      every(240, 0, 60).map((at) => [at + 3, 6] as const),
    );
    c.series('lactate', [
      [300, 3.1],
      [40, 4.1],
    ]);
    c.series('albumin', [[10 * 60, 36]]).series('creatinine', [
      [10 * 60, 1.0],
      [40, 1.1],
    ]);
    // Ventilator: volume control, no triggering; Vt 600 mL = 8.2 mL/kg of a 73.3 kg PBW.
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
    c.series(
      'tidalVolume',
      every(240, 0, 60).map((m) => [m + 5, 600] as const),
    );
    c.series(
      'peep',
      every(240, 0, 60).map((m) => [m + 5, 8] as const),
    );
    c.series(
      'fio2',
      every(240, 0, 60).map((m) => [m + 5, 35] as const),
    );
    c.coded('chestStatus', 'closed', 6 * 60);
    c.num('intraAbdominalPressure', 8, 90);
    c.series('ppv', [
      [95, 15],
      [35, 16],
      [6, 17],
    ]);
    // Tolerance: modest balance, lungs dry on ultrasound, no oedema, urine flowing.
    // A first litre in the emergency department before transfer (outside the look-back for a bolus response).
    c.fluidGiven(b.FLUIDS.lactatedRinger, 1000, 15 * 60, 14 * 60 + 20);
    c.shifts([
      [14 * 60, 6 * 60, 1400, 520],
      [6 * 60, 0, 650, 480],
    ]);
    c.hourlyUrine(8 * 60, 0, (i) => 58 + wobble(i, 6));
    c.num('bLineRegions', 1, 70).num('edemaGrade', 0, 4 * 60);
    const draft = Chart.bolusDraft('cr-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 20);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/cr-order-bolus'], hook: 'order-select' };
  },
};

export default scenario;
