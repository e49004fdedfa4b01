/**
 * Advice for an ordered bolus: the responsiveness × tolerance matrix. Pure.
 * May import: ../types, ../tolerance (finding helpers, coverage).
 */
export { adviseOrder } from './advise-order.js';
export { ADVICE_MATRIX, ALTERNATIVE, CRITICAL_HEADLINE, DEFAULT_NEXT_TEST, UNKNOWN_TOLERANCE_HEADLINE, type MatrixEntry } from './matrix.js';
export type { AdviceAction, AdviceIndicator, MatrixCell, OrderRecommendation } from './types.js';
