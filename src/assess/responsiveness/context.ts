/** What every responsiveness rule receives: the snapshot, the injected clock and the thresholds. */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { Finding } from '../types.js';
import type { ResponsivenessThresholds } from './thresholds.js';

export interface RuleContext {
  snapshot: PatientSnapshot;
  now: Date;
  t: ResponsivenessThresholds;
}

/** One marker rule: a pure function returning exactly one finding (assessed, or not-assessed with the reason). */
export interface ResponsivenessRule {
  id: string;
  run: (ctx: RuleContext) => Finding;
}
