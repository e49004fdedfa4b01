/**
 * Rule tolerance.weight-gain: weight change since admission as a % of the admission weight (the
 * weight-based form of %FO; Selewski DT et al., Intensive Care Med 2011 — from memory). Same bands as %FO: adults
 * ≥ 10 % severe (Bouchard J et al., Kidney Int 2009;76:422 [M]); children 10 % moderate, 20 % severe.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { weightGainPercent } from '../../physiology/fluid-overload.js';
import type { ToleranceFinding } from '../common/finding.js';
import { assessed, notAssessed, limitFrom } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { admissionWeight, latestWeight } from './weights.js';
import { evidenceOfMeasurement, timeMs } from '../common/select.js';
import { fmt, round } from '../common/text.js';

export const WEIGHT_GAIN = 'tolerance.weight-gain';
const SOURCE =
  'Weight-based fluid overload, (current − admission weight) / admission weight × 100: Selewski DT et al., Intensive Care Med 2011;37:1166 (from memory); bands as %FO (Goldstein 2001; Sutherland 2010, from memory)';

export function weightGainRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): ToleranceFinding[] {
  const title = 'Weight gain since admission not assessed';
  const first = admissionWeight(snapshot, now, t);
  if (!first) return [notAssessed(WEIGHT_GAIN, 'balance', title, 'no admission weight recorded', SOURCE)];
  const last = latestWeight(snapshot, now, t.latestWeightMaxAgeHours);
  if (!last) {
    return [
      notAssessed(WEIGHT_GAIN, 'balance', title, `no weight in the last ${fmt(t.latestWeightMaxAgeHours)} h`, SOURCE, [
        evidenceOfMeasurement(first.m, now),
      ]),
    ];
  }
  const spanHours = (timeMs(last.effective) - timeMs(first.m.effective)) / 3_600_000;
  if (last.ref === first.m.ref || spanHours < t.weightGainMinIntervalHours) {
    return [
      notAssessed(
        WEIGHT_GAIN,
        'balance',
        title,
        `only one weight, or weights less than ${fmt(t.weightGainMinIntervalHours)} h apart`,
        SOURCE,
        [evidenceOfMeasurement(first.m, now)],
      ),
    ];
  }
  const percent = weightGainPercent(first.m.value, last.value);
  // Adults: the adult fluid-overload band (Bouchard 2009); children: the paediatric bands (Selewski 2011).
  const child = snapshot.patient.ageYears !== undefined && snapshot.patient.ageYears < t.paediatricBelowAgeYears;
  const limit = child
    ? limitFrom(percent, t.weightGainSeverePercent, t.weightGainModeratePercent)
    : limitFrom(percent, t.adultFluidOverloadPercent, Infinity);
  const change = last.value - first.m.value;
  return [
    assessed({
      ruleId: WEIGHT_GAIN,
      domain: 'balance',
      limit,
      text: `Weight ${fmt(last.value, 1)} kg, ${change >= 0 ? '+' : '−'}${fmt(Math.abs(change), 1)} kg (${fmt(percent, 1)} %) since ${first.basis === 'admission' ? 'admission' : 'the earliest recorded weight'}`,
      values: {
        weightGainPercent: round(percent, 2),
        weightChangeKg: round(change, 2),
        admissionWeightKg: first.m.value,
        latestWeightKg: last.value,
        spanHours: round(spanHours, 1),
        weightBasis: first.basis,
      },
      evidence: [evidenceOfMeasurement(first.m, now), evidenceOfMeasurement(last, now)],
      source: SOURCE,
    }),
  ];
}
