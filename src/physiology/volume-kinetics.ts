/**
 * Plain estimates of how much of an infused volume stays in the vessels. These are population
 * approximations for a prescriber's orientation, not a prediction for one patient.
 */

/**
 * Crystalloid (balanced or saline) left in the vessels once it has distributed: about a quarter of the
 * volume (saline distributes plasma : interstitium ≈ 1 : 3, Ernest D et al., Crit Care Med 1999;27:46–50;
 * 9 % after cardiac surgery, Ernest 2001). The bedside rule of thumb says a third (common practice): pass
 * 1/3 to show it beside the published figure. Most has left the circulation within about 4–6 h (common practice).
 */
export function crystalloidIntravascularAfterDistributionMl(volumeMl: number, retainedFraction = 0.25): number {
  return volumeMl * retainedFraction;
}

/**
 * Crystalloid plasma-volume expansion as a range [low, high] in mL: about 50–60 % of the volume while it
 * runs, 15–20 % within 30 min after the end (Hahn RG, Acta Anaesthesiol Scand 2020, "Understanding volume
 * kinetics", doi 10.1111/aas.13533).
 */
export function crystalloidPlasmaExpansionRangeMl(
  volumeMl: number,
  phase: 'during-infusion' | 'thirty-minutes-after',
  fractions: { duringInfusion: readonly [number, number]; thirtyMinutesAfter: readonly [number, number] } = {
    duringInfusion: [0.5, 0.6],
    thirtyMinutesAfter: [0.15, 0.2],
  },
): [number, number] {
  const [lo, hi] = phase === 'during-infusion' ? fractions.duringInfusion : fractions.thirtyMinutesAfter;
  return [volumeMl * lo, volumeMl * hi];
}

/**
 * Iso-oncotic albumin (4–5 %): plasma expansion about equal to the volume infused; colloids have no
 * distribution phase (Hahn 2020; Ernest D et al., Crit Care Med 1999;27:46–50).
 */
export function isoOncoticAlbuminExpansionMl(volumeMl: number, factor = 1): number {
  return volumeMl * factor;
}

/**
 * Hyper-oncotic albumin (20–25 %): plasma expansion about twice the volume infused, the extra drawn from
 * the interstitial space (Crit Care 2020, doi 10.1186/s13054-020-02855-0).
 */
export function hyperOncoticAlbuminExpansionMl(volumeMl: number, factor = 2): number {
  return volumeMl * factor;
}

/** Rounds to the nearest step (e.g. 10 mL) so that an estimate does not look more precise than it is. */
export function roundToStep(value: number, step: number): number {
  return Math.round(value / step) * step;
}
