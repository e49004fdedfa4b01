/**
 * Tolerance findings. Each assessed finding carries in `values`:
 *   limit  — 'none' | 'moderate' | 'severe': how much it limits tolerance of more volume;
 *   domain — the organ domain (for the verdict's domain count);
 *   congestionSign — true for signs that harm from volume is likely (pulmonary oedema, severe venous
 *                    congestion, falling oxygenation); the advice uses it for the critical indicator.
 * direction: 'against' = the finding argues against more volume; 'for' = no limit found by this marker;
 * 'neutral' = context only (e.g. the balance in mL).
 */
import type { Evidence, Finding } from '../types.js';

export type ToleranceLimit = 'none' | 'moderate' | 'severe';
export type ToleranceDomain = 'balance' | 'oncotic' | 'lungs' | 'venous' | 'abdomen' | 'kidneys' | 'conditions';

export interface AssessedArgs {
  ruleId: string;
  domain: ToleranceDomain;
  limit: ToleranceLimit;
  text: string;
  evidence: Evidence[];
  source: string;
  values?: Record<string, number | string | boolean>;
  congestionSign?: boolean;
  /** Context only: never limits, direction neutral. */
  context?: boolean;
}

export function assessed(a: AssessedArgs): Finding {
  const limit: ToleranceLimit = a.context ? 'none' : a.limit;
  return {
    ruleId: a.ruleId,
    topic: 'tolerance',
    status: 'assessed',
    direction: a.context ? 'neutral' : limit === 'none' ? 'for' : 'against',
    text: a.text,
    values: { ...a.values, limit, domain: a.domain, ...(a.congestionSign ? { congestionSign: true } : {}) },
    evidence: a.evidence,
    source: a.source,
  };
}

export function notAssessed(
  ruleId: string,
  domain: ToleranceDomain,
  text: string,
  reason: string,
  source: string,
  evidence: Evidence[] = [],
  values?: Record<string, number | string | boolean>,
): Finding {
  return {
    ruleId,
    topic: 'tolerance',
    status: 'not-assessed',
    text,
    reason,
    values: { ...values, domain },
    evidence,
    source,
  };
}

/** Limit of a tolerance finding; not-assessed and non-tolerance findings limit nothing. */
export function limitOf(f: Finding): ToleranceLimit {
  if (f.topic !== 'tolerance' || f.status !== 'assessed') return 'none';
  const v = f.values?.['limit'];
  return v === 'moderate' || v === 'severe' ? v : 'none';
}

export function domainOf(f: Finding): string | undefined {
  const d = f.values?.['domain'];
  return typeof d === 'string' ? d : undefined;
}

/** True for an assessed tolerance finding that marks pulmonary oedema, severe congestion or falling oxygenation. */
export function isCongestionSign(f: Finding): boolean {
  return f.topic === 'tolerance' && f.status === 'assessed' && f.values?.['congestionSign'] === true;
}

/** True when the finding is context only (it can never limit tolerance). */
export function isContextOnly(f: Finding): boolean {
  return f.topic === 'tolerance' && f.direction === 'neutral';
}
