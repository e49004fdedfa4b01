/** Building responsiveness findings on the common Finding union: assessed, not assessed, unusable data. */
import type { Direction, Evidence, Figures, GapKind, Marker, ResponsivenessFinding, SharedNumber, Tier } from '../common/finding.js';
import { unusableParts } from '../common/finding.js';
import { sortEvidence, type Unusable } from '../common/select.js';

export interface AssessedArgs {
  ruleId: string;
  marker: Marker;
  direction: Direction;
  tier: Tier;
  text: string;
  evidence: Evidence[];
  source: string;
  values?: Figures;
  assumptions?: string[];
  uses?: SharedNumber[];
}

export function assessed(a: AssessedArgs): ResponsivenessFinding {
  return {
    ruleId: a.ruleId,
    topic: 'responsiveness',
    marker: a.marker,
    status: 'assessed',
    direction: a.direction,
    tier: a.tier,
    text: a.text,
    values: { freshness: 'fresh', ...a.values },
    evidence: sortEvidence(a.evidence),
    source: a.source,
    ...(a.assumptions?.length ? { assumptions: a.assumptions } : {}),
    ...(a.uses ? { uses: a.uses } : {}),
  };
}

export interface NotAssessedArgs {
  ruleId: string;
  marker: Marker;
  text: string;
  reason: string;
  gap: GapKind;
  evidence?: Evidence[];
  source: string;
  values?: Figures;
}

export function notAssessed(a: NotAssessedArgs): ResponsivenessFinding {
  return {
    ruleId: a.ruleId,
    topic: 'responsiveness',
    marker: a.marker,
    status: 'not-assessed',
    text: a.text,
    reason: a.reason,
    gap: a.gap,
    ...(a.values ? { values: a.values } : {}),
    evidence: sortEvidence(a.evidence ?? []),
    source: a.source,
  };
}

/** The not-assessed finding for a selection that is missing, stale, set aside or invalid. */
export function unusableFinding<T>(
  sel: Unusable<T>,
  args: { ruleId: string; marker: Marker; label: string; source: string; evidenceOf: (item: T) => Evidence },
): ResponsivenessFinding {
  const p = unusableParts(sel, args.label, args.evidenceOf);
  return {
    ruleId: args.ruleId,
    topic: 'responsiveness',
    marker: args.marker,
    ...p,
    evidence: sortEvidence(p.evidence),
    source: args.source,
  };
}

export function ruleErrorFinding(ruleId: string, marker: Marker): (message: string) => ResponsivenessFinding {
  return (message) =>
    notAssessed({
      ruleId,
      marker,
      text: `${ruleId}: not assessed (rule error)`,
      reason: `rule error: ${message}`,
      gap: 'rule-error',
      source: 'internal',
      values: { ruleError: true },
    });
}
