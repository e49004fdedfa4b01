/**
 * (b) A responder with poor tolerance: decompensated alcohol-related cirrhosis with spontaneous bacterial
 * peritonitis, day 3 in the ICU, ventilated without effort, sinus rhythm, Vt 8.4 mL/kg PBW, IAP below 12 mmHg:
 * PPV 15 % is valid. But albumin is 21 g/L, the stay has run +8.6 L, weight is up 12 %, there is grade 3
 * oedema and a B-pattern in 5 of 8 lung regions, on both sides: 2 of 4 on the left, 3 of 4 on the right, charted
 * per side. Asked on order-sign.
 *
 * Assessment v2 (docs/clinical-logic) first lowered this card to a warning, because the B-pattern was charted
 * without its side and could not show diffuse lung water. Charted per side, ≥ 2 positive regions on each side is
 * diffuse interstitial syndrome (Volpicelli G et al., Intensive Care Med 2012;38:577): a severe lung finding and a
 * sign that volume is likely to harm. With +8.6 L (12.6 % of the admission weight, ≥ 10 % in an adult: Bouchard
 * 2009) tolerance is poor, and the bilateral lung finding makes the card critical. Albumin 21 g/L is context only.
 */
import * as b from '../lib/fhir-builders.js';
import { Chart, CONDITIONS, every, wobble } from './chart.js';
import type { Scenario } from './types.js';

const P = 'hg-tern-11';
const E = 'hg-tern-11-stay';

export const scenario: Scenario = {
  id: 'responder-poor-tolerance',
  title: 'Cirrhosis, valid PPV 15 %, but +8.6 L, albumin 21 g/L, oedema and lung water',
  ward: 'Tern ICU, bed 11',
  patientId: P,
  encounterId: E,
  userId: 'Practitioner/hg-dr-okonjo',
  expect: { responsiveness: 'likely', tolerance: 'poor', indicator: 'critical' },
  conclusion:
    'She would probably raise her cardiac output with volume, but with cirrhosis, albumin 21 g/L, +8.6 L, grade 3 oedema and diffuse B-lines ' +
    'more crystalloid will mostly go to the lungs and tissues: support pressure with a vasopressor and, if volume is given at all, a small aliquot ' +
    '(albumin rather than crystalloid) with close reassessment. The B-pattern is on both sides (2 and 3 of 4 regions): diffuse ' +
    'interstitial syndrome, a sign that volume is likely to harm, so the card is critical.',
  build(now) {
    const c = new Chart('rpt', P, now);
    c.patient('female', '1971-09-02', 'Vell', 'Perpetua').encounter(E, 70 * 60, 'Tern ICU, bed 11');
    c.condition(CONDITIONS.cirrhosis, 4 * 365 * 24 * 60).condition(CONDITIONS.sepsis, 72 * 60);
    c.num('bodyWeight', 68, 70 * 60)
      .num('bodyWeight', 76.2, 5 * 60)
      .num('bodyHeight', 165, 70 * 60);
    c.vitals(
      every(240, 0, 15).map((at, i) => ({
        at: at + 2,
        hr: 102 + wobble(i, 3),
        sbp: 92 + wobble(i, 3),
        dbp: 46,
        map: 60 + wobble(i, 1),
        rr: 16,
        spo2: 94,
      })),
    );
    c.series(
      'cvp',
      every(240, 0, 60).map((at) => [at + 3, 9] as const),
    );
    c.series('lactate', [
      [6 * 60, 3.6],
      [50, 3.2],
    ])
      .series('albumin', [[16 * 60, 21]])
      .series('creatinine', [
        [30 * 60, 1.6],
        [60, 1.7],
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
    // Female 165 cm: PBW 57.0 kg; Vt 480 mL = 8.4 mL/kg.
    c.series(
      'tidalVolume',
      every(240, 0, 60).map((m) => [m + 5, 480] as const),
    );
    c.series(
      'peep',
      every(240, 0, 60).map((m) => [m + 5, 10] as const),
    );
    c.series(
      'fio2',
      every(240, 0, 60).map((m) => [m + 5, 40] as const),
    );
    c.coded('chestStatus', 'closed', 32 * 60).coded('chestStatus', 'closed', 8 * 60);
    c.num('intraAbdominalPressure', 10, 3 * 60);
    c.series('ppv', [
      [65, 14],
      [8, 15],
    ]);
    c.norepinephrineRunning(20 * 60, 0.12);
    // Three days of intake far above output (8.6 L net), most recent shift still positive.
    c.shifts([
      [70 * 60, 58 * 60, 4200, 900],
      [58 * 60, 46 * 60, 3100, 1000],
      [46 * 60, 34 * 60, 2400, 1100],
      [34 * 60, 22 * 60, 2100, 1200],
      [22 * 60, 10 * 60, 1600, 1100],
      [10 * 60, 0, 1400, 900],
    ]);
    c.hourlyUrine(8 * 60, 0, (i) => 44 + wobble(i, 5));
    // The 8-region lung ultrasound, charted per side: 2 of 4 regions on the left, 3 of 4 on the right.
    c.num('edemaGrade', 3, 3 * 60)
      .num('bLineRegionsLeft', 2, 50)
      .num('bLineRegionsRight', 3, 50);
    const draft = Chart.bolusDraft('rpt-order-bolus', P, now, b.FLUIDS.lactatedRinger, 500, 30);
    return { resources: c.resources, draftOrders: [draft], selections: ['MedicationRequest/rpt-order-bolus'], hook: 'order-sign' };
  },
};

export default scenario;
