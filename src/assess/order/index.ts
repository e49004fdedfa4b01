/**
 * The ordered bolus: pure reading of a DraftOrder against the snapshot (no I/O, no clock).
 * May import: ../types, ../../snapshot/types, ../../physiology, ../tolerance (weights, select), zod.
 */
export { describeOrder, intravascularEstimate, ORDER_INTRAVASCULAR, ORDER_VOLUME, ORDER_VOLUME_PER_KG } from './describe-order.js';
export { fluidGivenWithin, sepsisContext, sepsisReferenceVolumeMl, SEPSIS_CONTEXT } from './sepsis-context.js';
export { DEFAULT_ORDER_THRESHOLDS, orderThresholdsSchema, type OrderThresholds } from './thresholds.js';
