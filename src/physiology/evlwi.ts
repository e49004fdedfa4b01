/**
 * Extravascular lung water index by transpulmonary thermodilution, indexed to predicted body weight.
 * Normal ≈ 7.4 ± 3.3 mL/kg; ≥ 10 mL/kg defines pulmonary oedema (Tagami T et al., Crit Care 2010,
 * doi 10.1186/cc9250; Jozwiak M et al., Ann Intensive Care 2015, doi 10.1186/s13613-015-0081-9).
 */

/** EVLWI in mL/kg from extravascular lung water (mL) and predicted body weight (kg). */
export function evlwiMlPerKg(evlwMl: number, predictedBodyWeightKg: number): number {
  if (!(predictedBodyWeightKg > 0)) throw new RangeError('predictedBodyWeightKg must be > 0');
  return evlwMl / predictedBodyWeightKg;
}

/** True when EVLWI is at or above the pulmonary-oedema threshold (default 10 mL/kg). */
export function isPulmonaryOedema(evlwiMlPerKgValue: number, thresholdMlPerKg = 10): boolean {
  return evlwiMlPerKgValue >= thresholdMlPerKg;
}
