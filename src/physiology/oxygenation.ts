/**
 * SpO2/FiO2 ratio, a non-invasive surrogate of PaO2/FiO2 (Rice TW et al., Chest 2007;132:410–417 —
 * from memory: S/F 235 ≈ P/F 200 and S/F 315 ≈ P/F 300, valid for SpO2 ≤ 97 %).
 */

/** SpO2/FiO2 with SpO2 in % and FiO2 in % (used as a fraction): 95 % on 40 % → 237.5. */
export function spo2Fio2Ratio(spo2Percent: number, fio2Percent: number): number {
  if (!(fio2Percent > 0)) throw new RangeError('fio2Percent must be > 0');
  return spo2Percent / (fio2Percent / 100);
}

/** Fall of a ratio from an earlier to a later value, in % of the earlier one (positive = fell). */
export function relativeFallPercent(earlier: number, later: number): number {
  if (!(earlier > 0)) throw new RangeError('earlier must be > 0');
  return ((earlier - later) / earlier) * 100;
}
