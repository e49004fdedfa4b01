/**
 * Rule tolerance.fluid-overload: percent fluid overload = cumulative (in − out) in L / admission weight in
 * kg × 100 (Goldstein SL et al., Pediatrics 2001). Adults: ≥ 10 % a severe limit (Bouchard J et al., Kidney Int
 * 2009;76:422 [M], adults with AKI). Children: ≥ 10 % moderate, ≥ 20 % severe (Goldstein 2001; Sutherland SM et al.,
 * Am J Kidney Dis 2010 [M]) — bands from children on CRRT, applied only below `paediatricBelowAgeYears`.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { fluidOverloadBand, percentFluidOverloadFromBalance, type FluidOverloadBand } from '../../physiology/fluid-overload.js';
import type { ToleranceFinding, ToleranceLimit } from '../common/finding.js';
import { balanceOver, cumulativeStartMs } from './balance-data.js';
import { assessed, notAssessed } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { admissionWeight } from './weights.js';
import { evidenceOfMeasurement } from '../common/select.js';
import { fmt, round, signedMl } from '../common/text.js';

export const FLUID_OVERLOAD = 'tolerance.fluid-overload';
const SOURCE =
  '%FO = (in − out, L) / admission weight (kg) × 100: Goldstein SL et al., Pediatrics 2001;107:1309; adults ≥ 10 %: Bouchard J et al., Kidney Int 2009;76:422 (from memory); children 10 % / 20 %: Sutherland SM et al., Am J Kidney Dis 2010 (from memory)';

export function fluidOverloadRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): ToleranceFinding[] {
  const title = 'Percent fluid overload not assessed';
  const start = cumulativeStartMs(snapshot, now, t.balanceFallbackLookbackHours);
  if (!start) return [notAssessed(FLUID_OVERLOAD, 'balance', title, 'no admission time and no intake/output records', SOURCE)];
  const out = balanceOver(snapshot, now, start.ms, now.getTime(), t.balanceRecencyMinutes);
  if (!out.ok) return [notAssessed(FLUID_OVERLOAD, 'balance', title, `cumulative balance unknown: ${out.reason}`, SOURCE)];
  const weight = admissionWeight(snapshot, now, t);
  if (!weight)
    return [
      notAssessed(FLUID_OVERLOAD, 'balance', title, 'no admission weight recorded', SOURCE, [], {
        balanceMl: round(out.result.balanceMl, 0),
      }),
    ];

  const r = out.result;
  const percent = percentFluidOverloadFromBalance(r.balanceMl, weight.m.value);
  const child = snapshot.patient.ageYears !== undefined && snapshot.patient.ageYears < t.paediatricBelowAgeYears;
  const adultOver = fluidOverloadBand(percent, t.adultFluidOverloadPercent, t.adultFluidOverloadPercent) !== 'below';
  let band: FluidOverloadBand = adultOver ? 'severe' : 'below';
  if (child) band = fluidOverloadBand(percent, t.fluidOverloadModeratePercent, t.fluidOverloadSeverePercent);
  const limit: ToleranceLimit = band === 'below' ? 'none' : band;
  const from: Record<FluidOverloadBand, number | undefined> = child
    ? { severe: t.fluidOverloadSeverePercent, moderate: t.fluidOverloadModeratePercent, below: undefined }
    : { severe: t.adultFluidOverloadPercent, moderate: undefined, below: undefined };
  const bandFrom = from[band];
  const bandText = bandFrom === undefined ? '' : ` (≥ ${bandFrom} %, ${child ? 'paediatric' : 'adult'} band)`;
  const weightText = weight.basis === 'admission' ? 'admission weight' : 'earliest recorded weight';
  return [
    assessed({
      ruleId: FLUID_OVERLOAD,
      domain: 'balance',
      limit,
      text: `Fluid overload ${fmt(percent, 1)} % of ${weightText} ${fmt(weight.m.value, 1)} kg${bandText}; balance ${signedMl(r.balanceMl)}`,
      values: {
        fluidOverloadPercent: round(percent, 2),
        balanceMl: round(r.balanceMl, 0),
        admissionWeightKg: weight.m.value,
        weightBasis: weight.basis,
        startBasis: start.basis,
        band,
        source: r.source,
        urineOnly: r.urineOnly,
        paediatric: child,
      },
      quantity: { kind: 'fluid-overload-percent', value: round(percent, 2) },
      evidence: [...r.evidence, evidenceOfMeasurement(weight.m, now)],
      source: SOURCE,
    }),
  ];
}
