/**
 * Building tolerance findings on the common Finding union. Each assessed finding states its organ domain and
 * limit ('none' | 'moderate' | 'severe'), whether it is a harm sign (pulmonary oedema, severe venous congestion,
 * falling oxygenation: the advice uses it for the critical indicator), and whether it is context only.
 */
import type { Evidence, Figures, GapKind, SharedNumber, ToleranceDomain, ToleranceFinding, ToleranceLimit } from '../common/finding.js';
import { unusableParts } from '../common/finding.js';
import { evidenceOfCoded, evidenceOfMeasurement, type Unusable } from '../common/select.js';
import type { CodedMeasurement, Measurement } from '../../snapshot/types.js';

export type { ToleranceDomain, ToleranceLimit } from '../common/finding.js';

/** A graded value as a limit: severe from `severeFrom`, moderate from `moderateFrom` (both ≥), else none. */
export function limitFrom(value: number, severeFrom: number, moderateFrom: number): ToleranceLimit {
  if (value >= severeFrom) return 'severe';
  return value >= moderateFrom ? 'moderate' : 'none';
}

export interface AssessedArgs {
  ruleId: string;
  domain: ToleranceDomain;
  limit: ToleranceLimit;
  text: string;
  evidence: Evidence[];
  source: string;
  values?: Figures;
  congestionSign?: boolean;
  /** Context only: never limits. */
  context?: boolean;
  quantity?: ToleranceFinding['quantity'];
  uses?: SharedNumber[];
}

export function assessed(a: AssessedArgs): ToleranceFinding {
  return {
    ruleId: a.ruleId,
    topic: 'tolerance',
    status: 'assessed',
    domain: a.domain,
    limit: a.context ? 'none' : a.limit,
    harmSign: a.congestionSign === true,
    contextOnly: a.context === true,
    text: a.text,
    ...(a.values ? { values: a.values } : {}),
    evidence: a.evidence,
    source: a.source,
    ...(a.quantity ? { quantity: a.quantity } : {}),
    ...(a.uses ? { uses: a.uses } : {}),
  };
}

export function notAssessed(
  ruleId: string,
  domain: ToleranceDomain,
  text: string,
  reason: string,
  source: string,
  evidence: Evidence[] = [],
  values?: Figures,
  gap: GapKind = 'missing',
): ToleranceFinding {
  return {
    ruleId,
    topic: 'tolerance',
    status: 'not-assessed',
    domain,
    limit: 'none',
    harmSign: false,
    contextOnly: false,
    text,
    reason,
    gap,
    ...(values ? { values } : {}),
    evidence,
    source,
  };
}

/** The not-assessed finding for a measurement or coded selection that is missing, stale or invalid. */
export function unusableTolerance<T extends Measurement | CodedMeasurement>(
  sel: Unusable<T>,
  a: { ruleId: string; domain: ToleranceDomain; label: string; source: string; now: Date },
): ToleranceFinding {
  const ev = (x: T): Evidence => ('answer' in x ? evidenceOfCoded(x, a.now) : evidenceOfMeasurement(x, a.now));
  const p = unusableParts(sel, a.label, ev);
  return {
    ruleId: a.ruleId,
    topic: 'tolerance',
    domain: a.domain,
    limit: 'none',
    harmSign: false,
    contextOnly: false,
    ...p,
    source: a.source,
  };
}

/** Limit of a finding; not-assessed, context-only and non-tolerance findings limit nothing. */
export function limitOf(f: { topic: string; status: string } & Partial<Pick<ToleranceFinding, 'limit' | 'contextOnly'>>): ToleranceLimit {
  if (f.topic !== 'tolerance' || f.status !== 'assessed' || f.contextOnly) return 'none';
  return f.limit ?? 'none';
}
