/**
 * Percent fluid overload and weight gain since admission.
 * Pure arithmetic; units are in the parameter names.
 */

/**
 * Percent fluid overload: (fluid in − fluid out, in litres) / ICU-admission weight in kg × 100.
 * Goldstein SL et al., Pediatrics 2001;107:1309–1312 (formula as restated by Selewski DT et al.,
 * Intensive Care Med 2011;37:1166). A negative result is a net negative balance.
 */
export function percentFluidOverload(inLitres: number, outLitres: number, admissionWeightKg: number): number {
  if (!(admissionWeightKg > 0)) throw new RangeError('admissionWeightKg must be > 0');
  return ((inLitres - outLitres) / admissionWeightKg) * 100;
}

/** Same as percentFluidOverload, from a net balance in mL (balanceMl = in − out). */
export function percentFluidOverloadFromBalance(balanceMl: number, admissionWeightKg: number): number {
  return percentFluidOverload(balanceMl / 1000, 0, admissionWeightKg);
}

export type FluidOverloadBand = 'below' | 'moderate' | 'severe';

/**
 * Bands of percent fluid overload: < 10 %, 10–< 20 %, ≥ 20 % (≥ 20 % with higher mortality:
 * Goldstein 2001; Sutherland SM et al., Am J Kidney Dis 2010 — from memory).
 */
export function fluidOverloadBand(percent: number, moderatePercent = 10, severePercent = 20): FluidOverloadBand {
  if (percent >= severePercent) return 'severe';
  if (percent >= moderatePercent) return 'moderate';
  return 'below';
}

/**
 * Weight change since admission as a percentage of the admission weight: the weight-based form of
 * percent fluid overload (Selewski DT et al., Intensive Care Med 2011;37:1166 — from memory).
 */
export function weightGainPercent(admissionWeightKg: number, currentWeightKg: number): number {
  if (!(admissionWeightKg > 0)) throw new RangeError('admissionWeightKg must be > 0');
  return ((currentWeightKg - admissionWeightKg) / admissionWeightKg) * 100;
}
