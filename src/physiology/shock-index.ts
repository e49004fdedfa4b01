/**
 * Shock index: heart rate divided by systolic blood pressure. Normal about 0.5–0.7; above 1.0 goes with higher
 * mortality and transfusion need.
 *
 * Source: Allgöwer M, Burri C, 1967 (citation from memory); threshold > 1.0 as reviewed by Koch E et al.,
 * Open Access Emerg Med 2019;11:179–199.
 *
 * @param heartRatePerMin heart rate, /min
 * @param systolicMmHg systolic blood pressure, mmHg (positive)
 * @returns dimensionless ratio
 * @throws RangeError when the systolic pressure is not positive or the heart rate is negative
 */
export function shockIndex(heartRatePerMin: number, systolicMmHg: number): number {
  if (!Number.isFinite(heartRatePerMin) || heartRatePerMin < 0) throw new RangeError('heart rate must be a non-negative number');
  if (!Number.isFinite(systolicMmHg) || systolicMmHg <= 0) throw new RangeError('systolic pressure must be positive');
  return heartRatePerMin / systolicMmHg;
}
