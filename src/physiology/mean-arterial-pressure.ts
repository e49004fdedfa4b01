/**
 * Mean arterial pressure estimated from systolic and diastolic pressure: `DBP + (SBP − DBP) / 3`.
 *
 * Source: the conventional bedside approximation (common practice; from memory, no single paper).
 * A measured MAP from an arterial line is better; use this only when no measured MAP exists.
 *
 * @param systolicMmHg systolic pressure, mmHg
 * @param diastolicMmHg diastolic pressure, mmHg
 * @returns mean arterial pressure, mmHg
 * @throws RangeError when a value is not finite, negative, or the systolic is below the diastolic
 */
export function meanArterialPressureMmHg(systolicMmHg: number, diastolicMmHg: number): number {
  if (!Number.isFinite(systolicMmHg) || !Number.isFinite(diastolicMmHg)) throw new RangeError('blood pressure must be finite');
  if (diastolicMmHg < 0) throw new RangeError('diastolic pressure must not be negative');
  if (systolicMmHg < diastolicMmHg) throw new RangeError('systolic pressure must not be below diastolic pressure');
  return diastolicMmHg + (systolicMmHg - diastolicMmHg) / 3;
}
