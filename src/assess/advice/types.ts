/** The recommendation for one ordered bolus: what the advice matrix returns. Plain JSON. */
import type { Responsiveness, Tolerance } from '../types.js';

/**
 * proceed-and-reassess — give the bolus as ordered, then reassess response and tolerance;
 * smaller-aliquot      — give less at a time, reassessing before any more;
 * question-bolus       — a response is unlikely: reconsider the bolus and take a better next step;
 * test-first           — responsiveness is uncertain: the named test would settle it before volume.
 */
export type AdviceAction = 'proceed-and-reassess' | 'smaller-aliquot' | 'question-bolus' | 'test-first';
export type AdviceIndicator = 'info' | 'warning' | 'critical';
export type MatrixCell = `${Responsiveness}/${Tolerance}`;

export interface OrderRecommendation {
  action: AdviceAction;
  indicator: AdviceIndicator;
  /** One line under 100 characters. */
  headline: string;
  /** Why: verdict rationales, limiting findings, the order's figures. */
  reasons: string[];
  /** Options to consider instead of, or before, the bolus (named, never dosed). */
  alternatives: string[];
  /** For test-first: the test that would settle responsiveness. */
  nextTest?: string;
  /** The matrix cell used. */
  cell: MatrixCell;
  /** False when no tolerance marker could be assessed (the 'adequate' verdict then means "unknown"). */
  toleranceAssessed: boolean;
  /** Rule ids of findings showing pulmonary oedema, severe congestion or falling oxygenation. */
  harmSigns: string[];
  /** Rule ids behind the recommendation (the verdicts' deciding rules and the harm signs). */
  decidingRules: string[];
}
