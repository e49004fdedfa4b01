/**
 * Rule tolerance.fluid-overload: percent fluid overload = cumulative (in − out) in L / admission weight in
 * kg × 100 (Goldstein SL et al., Pediatrics 2001); ≥ 10 % moderate, ≥ 20 % severe (Sutherland SM et al.,
 * Am J Kidney Dis 2010 — from memory).
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { fluidOverloadBand, percentFluidOverloadFromBalance } from '../../physiology/fluid-overload.js';
import type { Finding } from '../types.js';
import { balanceOver, cumulativeStartMs } from './balance-data.js';
import { signedMl } from './balance.js';
import { assessed, notAssessed } from './finding.js';
import { evidenceOf, fmt, round } from './select.js';
import type { ToleranceThresholds } from './thresholds.js';
import { admissionWeight } from './weights.js';

export const FLUID_OVERLOAD = 'tolerance.fluid-overload';
const SOURCE = '%FO = (in − out, L) / admission weight (kg) × 100: Goldstein SL et al., Pediatrics 2001;107:1309; bands 10 % and 20 %: Sutherland SM et al., Am J Kidney Dis 2010 (from memory)';

export function fluidOverloadRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): Finding[] {
  const title = 'Percent fluid overload not assessed';
  const start = cumulativeStartMs(snapshot, now, t.balanceFallbackLookbackHours);
  if (!start) return [notAssessed(FLUID_OVERLOAD, 'balance', title, 'no admission time and no intake/output records', SOURCE)];
  const out = balanceOver(snapshot, now, start.ms, now.getTime(), t.balanceRecencyMinutes);
  if (!out.ok) return [notAssessed(FLUID_OVERLOAD, 'balance', title, `cumulative balance unknown: ${out.reason}`, SOURCE)];
  const weight = admissionWeight(snapshot, now, t);
  if (!weight) return [notAssessed(FLUID_OVERLOAD, 'balance', title, 'no admission weight recorded', SOURCE, [], { balanceMl: round(out.result.balanceMl, 0) })];

  const r = out.result;
  const percent = percentFluidOverloadFromBalance(r.balanceMl, weight.m.value);
  const band = fluidOverloadBand(percent, t.fluidOverloadModeratePercent, t.fluidOverloadSeverePercent);
  const limit = band === 'severe' ? 'severe' : band === 'moderate' ? 'moderate' : 'none';
  const bandText = band === 'severe' ? ` (≥ ${t.fluidOverloadSeverePercent} %)` : band === 'moderate' ? ` (≥ ${t.fluidOverloadModeratePercent} %)` : '';
  const weightText = weight.basis === 'admission' ? 'admission weight' : 'earliest recorded weight';
  return [assessed({
    ruleId: FLUID_OVERLOAD, domain: 'balance', limit,
    text: `Fluid overload ${fmt(percent, 1)} % of ${weightText} ${fmt(weight.m.value, 1)} kg${bandText}; balance ${signedMl(r.balanceMl)}`,
    values: {
      fluidOverloadPercent: round(percent, 2), balanceMl: round(r.balanceMl, 0), admissionWeightKg: weight.m.value,
      weightBasis: weight.basis, startBasis: start.basis, band, source: r.source, urineOnly: r.urineOnly,
    },
    evidence: [...r.evidence, evidenceOf(weight.m, now)], source: SOURCE,
  })];
}
