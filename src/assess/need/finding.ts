/** Building perfusion (need) findings on the common Finding union. */
import type { Evidence, Figures, GapKind, NeedSign, PerfusionFinding } from '../common/finding.js';
import { unusableParts } from '../common/finding.js';
import { sortEvidence, type Unusable } from '../common/select.js';

export function sign(a: {
  ruleId: string;
  sign: NeedSign;
  hypoperfusion: boolean;
  text: string;
  evidence: Evidence[];
  source: string;
  values?: Figures;
  contextOnly?: boolean;
}): PerfusionFinding {
  return {
    ruleId: a.ruleId,
    topic: 'perfusion',
    sign: a.sign,
    status: 'assessed',
    hypoperfusion: a.hypoperfusion,
    contextOnly: a.contextOnly ?? false,
    text: a.text,
    evidence: sortEvidence(a.evidence),
    source: a.source,
    values: { freshness: 'fresh', ...a.values },
  };
}

export function notAssessedParts(
  ruleId: string,
  s: NeedSign,
  text: string,
  reason: string,
  gap: GapKind,
  source: string,
  evidence: Evidence[] = [],
  contextOnly = false,
): PerfusionFinding {
  return {
    ruleId,
    topic: 'perfusion',
    sign: s,
    status: 'not-assessed',
    contextOnly,
    text,
    reason,
    gap,
    evidence: sortEvidence(evidence),
    source,
  };
}

export function unusableSign<T>(
  sel: Unusable<T>,
  a: { ruleId: string; sign: NeedSign; label: string; source: string; evidenceOf: (x: T) => Evidence; contextOnly?: boolean },
): PerfusionFinding {
  const p = unusableParts(sel, a.label, a.evidenceOf);
  return {
    ruleId: a.ruleId,
    topic: 'perfusion',
    sign: a.sign,
    contextOnly: a.contextOnly ?? false,
    ...p,
    evidence: sortEvidence(p.evidence),
    source: a.source,
  };
}

export function errorSign(ruleId: string, s: NeedSign, contextOnly = false): (message: string) => PerfusionFinding {
  return (message) =>
    notAssessedParts(
      ruleId,
      s,
      `${ruleId}: not assessed (rule error)`,
      `rule error: ${message}`,
      'rule-error',
      'internal',
      [],
      contextOnly,
    );
}
