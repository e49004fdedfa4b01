/** Largest and smallest beat-to-beat pulse pressure (SBP − DBP) within one respiratory cycle. */
export interface PulsePressureCycle {
  pulsePressureMaxMmHg: number;
  pulsePressureMinMmHg: number;
}

/**
 * Pulse pressure of one beat: systolic minus diastolic pressure.
 *
 * Source: definition (Michard F et al., Am J Respir Crit Care Med 2000;162:134–138; citation from memory).
 *
 * @param systolicMmHg mmHg
 * @param diastolicMmHg mmHg
 * @returns mmHg
 */
export function pulsePressureMmHg(systolicMmHg: number, diastolicMmHg: number): number {
  if (!Number.isFinite(systolicMmHg) || !Number.isFinite(diastolicMmHg)) throw new RangeError('blood pressure must be finite');
  return systolicMmHg - diastolicMmHg;
}

/**
 * Respiratory variation of a beat-to-beat quantity within one breath, as a percentage of its mean:
 * `100 × (max − min) / ((max + min) / 2)`. Used for pulse pressure (PPV) and stroke volume (SVV).
 *
 * Source: Michard F et al., Am J Respir Crit Care Med 2000;162:134–138 (citation from memory); the same formula
 * over three breaths is in Michard F, Anesthesiology 2005;103:419–428.
 *
 * @param maxValue largest value in the breath (any unit, same as minValue)
 * @param minValue smallest value in the breath
 * @returns percent
 * @throws RangeError when the values are not finite, negative, min > max, or both zero
 */
export function respiratoryVariationPercent(maxValue: number, minValue: number): number {
  if (!Number.isFinite(maxValue) || !Number.isFinite(minValue)) throw new RangeError('values must be finite');
  if (minValue < 0) throw new RangeError('values must not be negative');
  if (minValue > maxValue) throw new RangeError('minimum must not exceed maximum');
  const mean = (maxValue + minValue) / 2;
  if (mean === 0) throw new RangeError('mean of maximum and minimum must be positive');
  return (100 * (maxValue - minValue)) / mean;
}

/**
 * Pulse pressure variation (PPV) over several respiratory cycles: the per-cycle
 * `100 × (PPmax − PPmin) / ((PPmax + PPmin) / 2)`, averaged over the cycles.
 * Average at least three consecutive cycles (Michard 2000 practice, from memory; three breaths in a canine study,
 * Intensive Care Med, PMC3818902).
 *
 * Source: Michard F et al., Am J Respir Crit Care Med 2000;162:134–138 (citation from memory).
 *
 * @param cycles one entry per respiratory cycle, pulse pressures in mmHg
 * @returns PPV, percent
 * @throws RangeError when there is no cycle or a cycle is invalid
 */
export function pulsePressureVariationPercent(cycles: readonly PulsePressureCycle[]): number {
  if (cycles.length === 0) throw new RangeError('at least one respiratory cycle is needed');
  let sum = 0;
  for (const c of cycles) sum += respiratoryVariationPercent(c.pulsePressureMaxMmHg, c.pulsePressureMinMmHg);
  return sum / cycles.length;
}
