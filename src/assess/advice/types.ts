/**
 * The recommendation for one ordered bolus: codes from closed sets, no prose. All wording lives in
 * cards/catalogue.json and is checked against these sets when the catalogue loads (src/cards/catalogue.ts).
 */
import type { Confidence, Need, NextTestKind, PhaseValue, Responsiveness, Tolerance } from '../common/verdicts.js';

/**
 * proceed-and-reassess     — give the bolus as ordered, then reassess response and tolerance;
 * smaller-aliquot          — give less at a time, reassessing before any more;
 * resuscitate-and-reassess — early resuscitation of shock: give, in steps, reassess after each; never withdraw;
 * question-need            — responsive (or untested) but no current sign of hypoperfusion: is there anything to treat?
 * question-bolus           — a response is unlikely: reconsider the bolus and take a better next step;
 * test-first               — responsiveness is uncertain (or only probable): the named test settles it before volume.
 */
export const ADVICE_ACTIONS = [
  'proceed-and-reassess',
  'smaller-aliquot',
  'resuscitate-and-reassess',
  'question-need',
  'question-bolus',
  'test-first',
] as const;
export type AdviceAction = (typeof ADVICE_ACTIONS)[number];
export type AdviceIndicator = 'info' | 'warning' | 'critical';

/** Matrix rows: the responsiveness verdict, split by confidence (low = statics only). */
export const MATRIX_ROWS = ['likely', 'likely-low', 'unlikely', 'unlikely-low', 'indeterminate'] as const;
export type MatrixRow = (typeof MATRIX_ROWS)[number];
export const TOLERANCE_COLUMNS = ['adequate', 'limited', 'poor', 'not-known'] as const satisfies readonly Tolerance[];
export type MatrixCell = `${MatrixRow}/${Tolerance}`;

/** Headlines outside the matrix cells. */
export const SPECIAL_HEADLINES = [
  'congestion/likely',
  'congestion/unlikely',
  'congestion/indeterminate',
  'early/any',
  'early/unlikely',
  'early/congestion',
  'no-need/responsive',
  'no-need/untested',
  'need-unknown/responsive',
  'stale-data/any',
] as const;
export type SpecialHeadline = (typeof SPECIAL_HEADLINES)[number];
export type HeadlineKey = MatrixCell | SpecialHeadline;

export const HEADLINE_KEYS: readonly HeadlineKey[] = [
  ...MATRIX_ROWS.flatMap((r) => TOLERANCE_COLUMNS.map((t) => `${r}/${t}` as MatrixCell)),
  ...SPECIAL_HEADLINES,
];

/** Options to weigh instead of, or before, the bolus (named, never dosed). */
export const ALTERNATIVES = [
  'smaller-aliquot',
  'vasopressor',
  'vasoactive-by-picture',
  'albumin',
  'echo',
  'cause',
  'fluid-removal',
  'bolus-if-positive',
  'perfusion-check',
] as const;
export type AlternativeCode = (typeof ALTERNATIVES)[number];

export interface OrderRecommendation {
  action: AdviceAction;
  indicator: AdviceIndicator;
  headline: HeadlineKey;
  /** Why: verdict rationales, limiting findings, the order's figures (finding texts). */
  reasons: string[];
  alternatives: AlternativeCode[];
  /** The test to offer: recommended for test-first, an option beside a low- or moderate-confidence verdict. */
  nextTest?: NextTestKind;
  /** The matrix cell used. */
  cell: MatrixCell;
  confidence?: Confidence;
  need: Need;
  phase: PhaseValue;
  /** False when tolerance is not known. */
  toleranceAssessed: boolean;
  /** Rule ids of findings showing pulmonary oedema, severe congestion or falling oxygenation. */
  harmSigns: string[];
  /** Rule ids behind the recommendation (the verdicts' deciding rules and the harm signs). */
  decidingRules: string[];
}

export type { Responsiveness };
