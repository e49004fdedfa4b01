/**
 * Arithmetic of before/after tests (passive leg raising, mini fluid challenge, end-expiratory occlusion,
 * tidal volume challenge). Thresholds live with the rules, not here.
 */

/**
 * Relative change from before to after, percent: `100 × (after − before) / before`.
 * Used for PLR (CO/SV rise ≥ 10 %, Monnet X et al., Intensive Care Med 2016;42:1935–1947), mini fluid challenge
 * (ΔVTI ≥ 10 %, Muller L et al., Anesthesiology 2011;115:541–547) and end-expiratory occlusion (CI rise > 5 %,
 * Monnet X et al., Crit Care Med 2009;37:951–956, from memory).
 *
 * @param before baseline value (positive)
 * @param after value during or after the test, same unit
 * @returns percent (negative for a fall)
 * @throws RangeError when the baseline is not positive or a value is not finite
 */
export function relativeChangePercent(before: number, after: number): number {
  if (!Number.isFinite(before) || !Number.isFinite(after)) throw new RangeError('values must be finite');
  if (before <= 0) throw new RangeError('baseline must be positive');
  return (100 * (after - before)) / before;
}

/**
 * Absolute change from before to after, in the unit of the values (for percentages: percentage points).
 * Used for the tidal volume challenge (absolute ΔPPV ≥ 3.5 points, Myatra SN et al., Crit Care Med 2017;45:415–421).
 *
 * @param before baseline value
 * @param after value after the manoeuvre
 */
export function absoluteChange(before: number, after: number): number {
  if (!Number.isFinite(before) || !Number.isFinite(after)) throw new RangeError('values must be finite');
  return after - before;
}
