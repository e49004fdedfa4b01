/** Building responsiveness findings: assessed ones, and not-assessed ones for missing, stale or invalid data. */
import type { Evidence, Finding, FindingTopic } from '../types.js';
import { sortEvidence, type Selection } from './select.js';

export type Values = Record<string, number | string | boolean>;

/** A number for a sentence: at most `digits` decimals, no trailing zeros ("16.9", "3", "-2.5"). */
export function fmt(v: number, digits = 1): string {
  const f = 10 ** digits;
  const r = Math.round(v * f) / f;
  return String(Object.is(r, -0) ? 0 : r);
}

/** "+12.5 %" / "-3 %" */
export function signed(v: number, digits = 1): string {
  const s = fmt(v, digits);
  return v > 0 && s !== '0' ? `+${s}` : s;
}

/** UCUM unit as a prescriber reads it ("mm[Hg]" → "mmHg"). */
export function displayUnit(ucum: string): string {
  return ucum.replace('mm[Hg]', 'mmHg').replace('cm[H2O]', 'cmH2O').replace(/m2$/, 'm²');
}

/** A label inside a sentence: "Mini fluid challenge" → "mini fluid challenge"; acronyms stay ("PPV"). */
export function inSentence(label: string): string {
  return label.length > 1 && label[1] === label[1]?.toLowerCase() ? `${label[0]?.toLowerCase()}${label.slice(1)}` : label;
}

export function staleText(ageMin: number, windowMin: number): string {
  return `stale (age ${Math.round(ageMin)} min, window ${windowMin} min)`;
}

export interface AssessedArgs {
  ruleId: string;
  topic?: FindingTopic;
  /** Omitted for perfusion context, which says nothing about responsiveness by itself. */
  direction?: 'for' | 'against' | 'neutral';
  weight: 'dynamic' | 'static-extreme' | 'static' | 'context';
  text: string;
  evidence: Evidence[];
  source: string;
  values?: Values;
}

export function assessed(a: AssessedArgs): Finding {
  return {
    ruleId: a.ruleId, topic: a.topic ?? 'responsiveness', status: 'assessed', ...(a.direction ? { direction: a.direction } : {}), weight: a.weight,
    text: a.text, values: { freshness: 'fresh', ...a.values }, evidence: sortEvidence(a.evidence), source: a.source,
  };
}

export interface NotAssessedArgs {
  ruleId: string;
  topic?: FindingTopic;
  text: string;
  reason: string;
  evidence?: Evidence[];
  source: string;
  values?: Values;
}

export function notAssessed(a: NotAssessedArgs): Finding {
  return {
    ruleId: a.ruleId, topic: a.topic ?? 'responsiveness', status: 'not-assessed', text: a.text, reason: a.reason,
    ...(a.values ? { values: a.values } : {}), evidence: sortEvidence(a.evidence ?? []), source: a.source,
  };
}

export type UnusableSelection<T> = Exclude<Selection<T>, { state: 'fresh' }>;

/**
 * The not-assessed finding for a selection that is missing, stale or invalid.
 * `label` names the marker ("PPV"), `evidenceOf` turns the seen item into evidence.
 */
export function unusableFinding<T>(
  sel: UnusableSelection<T>,
  args: { ruleId: string; topic?: FindingTopic; label: string; source: string; evidenceOf: (item: T) => Evidence },
): Finding {
  const base = { ruleId: args.ruleId, source: args.source, ...(args.topic ? { topic: args.topic } : {}) };
  switch (sel.state) {
    case 'missing':
      return notAssessed({
        ...base, text: `${args.label}: not assessed (none recorded)`, reason: `no ${inSentence(args.label)} recorded`,
        values: { freshness: 'missing', windowMin: sel.windowMin },
      });
    case 'stale': {
      const why = staleText(sel.ageMinutes, sel.windowMin);
      return notAssessed({
        ...base, text: `${args.label}: not assessed, latest ${why}`, reason: `${args.label} ${why}`,
        evidence: [args.evidenceOf(sel.item)], values: { freshness: 'stale', ageMin: Math.round(sel.ageMinutes), windowMin: sel.windowMin },
      });
    }
    case 'invalid':
      return notAssessed({
        ...base, text: `${args.label}: not assessed, invalid value (${sel.detail})`, reason: `${args.label} invalid: ${sel.detail}`,
        evidence: [args.evidenceOf(sel.item)], values: { freshness: 'invalid' },
      });
  }
}
