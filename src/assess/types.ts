/** Findings and advice: what the pure rules return. Plain JSON, stored in the audit record. */
import type { FhirRef } from '../snapshot/types.js';
import type { OrderRecommendation } from './advice/types.js';

export type Freshness = 'fresh' | 'stale' | 'missing';

/** One piece of evidence a finding used: which resource, which value, when. */
export interface Evidence {
  ref: FhirRef;
  /** Measurement kind or a description (e.g. 'heartRate', 'plr'). */
  kind: string;
  value: number | string;
  unit?: string;
  effective: string;
  ageMinutes: number;
}

export type FindingTopic = 'responsiveness' | 'tolerance' | 'perfusion' | 'order' | 'data';

export interface Finding {
  /** Stable id of the rule that made it, e.g. 'perfusion.map'. */
  ruleId: string;
  topic: FindingTopic;
  /** assessed: the rule had what it needed; not-assessed: it did not (reason says why). */
  status: 'assessed' | 'not-assessed';
  /** For responsiveness/tolerance findings: which way the evidence points. */
  direction?: 'for' | 'against' | 'neutral';
  /** Strength of the evidence this finding gives, for the combination scheme. */
  weight?: 'dynamic' | 'static-extreme' | 'static' | 'context';
  /** Short plain sentence for a prescriber, e.g. "MAP 58 mmHg, below target 65 mmHg". */
  text: string;
  /** Why it could not be assessed, or which validity condition failed. */
  reason?: string;
  /** Derived values with units in the key name (e.g. { mapMmHg: 58 }). */
  values?: Record<string, number | string | boolean>;
  evidence: Evidence[];
  /** The published source (or "common practice") of the threshold or formula used. */
  source?: string;
}

export interface Verdict<V extends string> {
  value: V;
  /** One sentence: why this verdict. */
  rationale: string;
  /** Rule ids of the findings that decided it. */
  decidingRules: string[];
  /** For indeterminate responsiveness: the test that would settle it. */
  nextTest?: string;
}

export type Responsiveness = 'likely' | 'unlikely' | 'indeterminate';
export type Tolerance = 'adequate' | 'limited' | 'poor';

export interface Advice {
  rulesVersion: string;
  now: string;
  findings: Finding[];
  responsiveness?: Verdict<Responsiveness>;
  tolerance?: Verdict<Tolerance>;
  /** For order hooks with a fluid bolus selected: what the advice matrix recommends. */
  recommendation?: OrderRecommendation;
  /** Errors raised by single rules; the other findings still count (conventions §6). */
  ruleErrors: Array<{ ruleId: string; message: string }>;
}
