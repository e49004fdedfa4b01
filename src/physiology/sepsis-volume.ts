/**
 * Initial crystalloid volume in sepsis-induced hypoperfusion or septic shock: at least 30 mL/kg within
 * the first 3 h (Surviving Sepsis Campaign 2021, Evans L et al., Intensive Care Med 2021;47:1181–1247;
 * weak recommendation, low-quality evidence). Context for the prescriber, not a target for every patient.
 */
export function sepsisInitialCrystalloidMl(weightKg: number, mlPerKg = 30): number {
  if (!(weightKg > 0)) throw new RangeError('weightKg must be > 0');
  return weightKg * mlPerKg;
}
