/**
 * Ratio of heart rate to respiratory rate. PPV and SVV lose their predictive value when it is low
 * (≤ 3.6: too few beats per breath, false negatives).
 *
 * Source: De Backer D et al., Anesthesiology 2009;110:1092–1097 (citation from memory); listed as a validity
 * condition in Monnet X, Marik PE, Teboul JL, Ann Intensive Care 2016;6:111, Table 2.
 *
 * @param heartRatePerMin heart rate, /min
 * @param respiratoryRatePerMin respiratory (ventilator) rate, /min
 * @returns beats per breath (dimensionless)
 * @throws RangeError when the respiratory rate is not positive or the heart rate is negative
 */
export function heartRateRespiratoryRateRatio(heartRatePerMin: number, respiratoryRatePerMin: number): number {
  if (!Number.isFinite(heartRatePerMin) || heartRatePerMin < 0) throw new RangeError('heart rate must be a non-negative number');
  if (!Number.isFinite(respiratoryRatePerMin) || respiratoryRatePerMin <= 0) throw new RangeError('respiratory rate must be positive');
  return heartRatePerMin / respiratoryRatePerMin;
}
