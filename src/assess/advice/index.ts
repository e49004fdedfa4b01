/**
 * Advice for an ordered bolus: the verdicts → codes (action, headline key, alternatives, next test). Pure.
 * May import: ../common, ../types.
 */
export { adviseOrder, matrixRow, type AdviseInput } from './advise-order.js';
export { ADVICE_MATRIX, type MatrixEntry } from './matrix.js';
export {
  ADVICE_ACTIONS,
  ALTERNATIVES,
  HEADLINE_KEYS,
  MATRIX_ROWS,
  SPECIAL_HEADLINES,
  TOLERANCE_COLUMNS,
  type AdviceAction,
  type AdviceIndicator,
  type AlternativeCode,
  type HeadlineKey,
  type MatrixCell,
  type MatrixRow,
  type OrderRecommendation,
} from './types.js';
