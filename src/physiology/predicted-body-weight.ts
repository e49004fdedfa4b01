/** Sex used by the ARDSNet predicted-body-weight formula. */
export type PbwSex = 'male' | 'female';

/**
 * Predicted body weight (ARDSNet): male `50 + 0.91 × (heightCm − 152.4)`, female `45.5 + 0.91 × (heightCm − 152.4)`.
 *
 * Source: The Acute Respiratory Distress Syndrome Network, N Engl J Med 2000;342:1301–1308 (citation from memory;
 * formula seen in public protocol text). Made for adults; tidal volumes are set and judged per kg of this weight.
 *
 * @param heightCm body height, cm
 * @param sex 'male' or 'female'
 * @returns predicted body weight, kg
 * @throws RangeError when the height is not finite or the result is not positive (height far outside the adult range)
 */
export function predictedBodyWeightKg(heightCm: number, sex: PbwSex): number {
  if (!Number.isFinite(heightCm) || heightCm <= 0) throw new RangeError('height must be a positive number of cm');
  const base = sex === 'male' ? 50 : 45.5;
  const kg = base + 0.91 * (heightCm - 152.4);
  if (kg <= 0) throw new RangeError(`height ${heightCm} cm gives no usable predicted body weight`);
  return kg;
}

/**
 * Tidal volume per kg of (predicted) body weight.
 *
 * Source: arithmetic; the per-kg-PBW convention is from the ARDSNet trial (N Engl J Med 2000;342:1301).
 *
 * @param tidalVolumeMl tidal volume, mL
 * @param bodyWeightKg body weight, kg (normally predicted body weight)
 * @returns mL/kg
 * @throws RangeError when the weight is not positive or the volume is negative
 */
export function tidalVolumeMlPerKg(tidalVolumeMl: number, bodyWeightKg: number): number {
  if (!Number.isFinite(tidalVolumeMl) || tidalVolumeMl < 0) throw new RangeError('tidal volume must be a non-negative number of mL');
  if (!Number.isFinite(bodyWeightKg) || bodyWeightKg <= 0) throw new RangeError('body weight must be a positive number of kg');
  return tidalVolumeMl / bodyWeightKg;
}
