/** Right atrial pressure estimated from the IVC, with the range the guideline gives. */
export interface RightAtrialPressureEstimate {
  /** Point estimate, mmHg. */
  estimateMmHg: 3 | 8 | 15;
  /** Range the guideline gives for this pattern, mmHg. */
  rangeMmHg: readonly [number, number];
  pattern: 'normal' | 'intermediate' | 'high';
}

/**
 * Right atrial pressure estimated from IVC size and its collapse with a sniff (American Society of Echocardiography):
 * - IVC ≤ 2.1 cm and collapse > 50 %: 3 mmHg (0–5)
 * - IVC > 2.1 cm and collapse < 50 %: 15 mmHg (10–20)
 * - otherwise: 8 mmHg (5–10); the guideline lets secondary indices move it up or down.
 *
 * Source: Rudski LG et al., J Am Soc Echocardiogr 2010;23:685–713 (citation from memory; table seen in secondary
 * sources). Spontaneous breathing only: not valid under positive-pressure ventilation, where the IVC is distended
 * by the ventilator.
 *
 * @param ivcDiameterMaxCm largest IVC diameter, cm
 * @param sniffCollapsePercent collapse with a sniff, percent (see ivcCollapsibilityIndexPercent)
 */
export function estimateRightAtrialPressureFromIvc(ivcDiameterMaxCm: number, sniffCollapsePercent: number): RightAtrialPressureEstimate {
  if (!Number.isFinite(ivcDiameterMaxCm) || ivcDiameterMaxCm <= 0) throw new RangeError('IVC diameter must be a positive number of cm');
  if (!Number.isFinite(sniffCollapsePercent) || sniffCollapsePercent < 0 || sniffCollapsePercent > 100) {
    throw new RangeError('collapse must be a percentage between 0 and 100');
  }
  const small = ivcDiameterMaxCm <= 2.1;
  if (small && sniffCollapsePercent > 50) return { estimateMmHg: 3, rangeMmHg: [0, 5], pattern: 'normal' };
  if (!small && sniffCollapsePercent < 50) return { estimateMmHg: 15, rangeMmHg: [10, 20], pattern: 'high' };
  return { estimateMmHg: 8, rangeMmHg: [5, 10], pattern: 'intermediate' };
}
