/**
 * Inferior vena cava respiratory indices from the largest and smallest diameter over one breath, measured at
 * the same time. Which index applies depends on the breathing state: collapsibility while breathing
 * spontaneously, distensibility under controlled ventilation without spontaneous effort.
 */

function checkDiameters(diameterMaxCm: number, diameterMinCm: number): void {
  if (!Number.isFinite(diameterMaxCm) || !Number.isFinite(diameterMinCm)) throw new RangeError('diameters must be finite');
  if (diameterMinCm < 0) throw new RangeError('diameters must not be negative');
  if (diameterMaxCm <= 0) throw new RangeError('maximum diameter must be positive');
  if (diameterMinCm > diameterMaxCm) throw new RangeError('minimum diameter must not exceed maximum diameter');
}

/**
 * IVC collapsibility index (spontaneous breathing): `100 × (Dmax − Dmin) / Dmax`.
 *
 * Source: formula as used by Muller L et al., Crit Care 2012;16:R188 (cIVC > 40 % usually responsive); the same
 * ratio with a sniff is the ASE collapse index (Rudski LG et al., J Am Soc Echocardiogr 2010;23:685–713).
 *
 * @param diameterMaxCm largest diameter (expiration), cm
 * @param diameterMinCm smallest diameter (inspiration), cm
 * @returns percent
 */
export function ivcCollapsibilityIndexPercent(diameterMaxCm: number, diameterMinCm: number): number {
  checkDiameters(diameterMaxCm, diameterMinCm);
  return (100 * (diameterMaxCm - diameterMinCm)) / diameterMaxCm;
}

/**
 * IVC distensibility index (controlled ventilation without effort), Barbier variant: `100 × (Dmax − Dmin) / Dmin`
 * (Dmax at end-inspiration, Dmin at end-expiration). Threshold 18 % in the original study.
 *
 * Source: Barbier C et al., Intensive Care Med 2004;30:1740–1746.
 *
 * @param diameterMaxCm cm
 * @param diameterMinCm cm, must be positive
 * @returns percent
 */
export function ivcDistensibilityIndexBarbierPercent(diameterMaxCm: number, diameterMinCm: number): number {
  checkDiameters(diameterMaxCm, diameterMinCm);
  if (diameterMinCm === 0) throw new RangeError('minimum diameter must be positive for the Barbier index');
  return (100 * (diameterMaxCm - diameterMinCm)) / diameterMinCm;
}

/**
 * IVC respiratory variation (controlled ventilation without effort), Feissel variant:
 * `100 × (Dmax − Dmin) / ((Dmax + Dmin) / 2)`. Threshold 12 % in the original study.
 *
 * Source: Feissel M et al., Intensive Care Med 2004;30:1834–1837 (threshold from memory).
 *
 * @param diameterMaxCm cm
 * @param diameterMinCm cm
 * @returns percent
 */
export function ivcDistensibilityIndexFeisselPercent(diameterMaxCm: number, diameterMinCm: number): number {
  checkDiameters(diameterMaxCm, diameterMinCm);
  return (100 * (diameterMaxCm - diameterMinCm)) / ((diameterMaxCm + diameterMinCm) / 2);
}
