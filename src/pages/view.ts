/**
 * The one adapter from a stored advice record to what the reasoning page shows (PageView). It is the only file of
 * src/pages/ that reads the Advice, Finding and Verdict shapes (src/assess/types.ts): when assessment v2 changes
 * them, this file changes and the page does not. Everything here is plain data; escaping happens in page.ts.
 */
import type { Finding } from '../assess/types.js';
import type { AdviceRecord } from '../audit/types.js';
import { kindLabel, unitDisplay } from '../cards/render.js';
import type { PatientSnapshot } from '../snapshot/types.js';

export interface PageEvidence { label: string; value: string; unit: string; effective: string; ref: string }
export interface PageFinding {
  topic: string;
  ruleId: string;
  assessed: boolean;
  text: string;
  reason?: string;
  direction?: string;
  source?: string;
  values: Array<[string, string]>;
  evidence: PageEvidence[];
}
export interface PageVerdict {
  question: string;
  /** The verdict in words, e.g. "Likely fluid responsive". */
  value: string;
  rationale: string;
  /** "high", "moderate" …, when the record states it. */
  confidence?: string;
  /** How much of what the rules look at was there, e.g. "5 of 9 findings assessed". */
  coverage?: string;
  decidingRules: string[];
  nextTest?: string;
}
export type GapKind = 'missing' | 'stale' | 'set aside' | 'not obtained';
export interface PageGap { kind: GapKind; what: string; why: string; ref?: string; /** Values the rule saw but could not use (stale, invalid, confounded). */ evidence: PageEvidence[] }

export interface PageView {
  adviceId: string;
  service: string;
  hook: string;
  patientRef?: string;
  encounterRef?: string;
  recordedAt: string;
  /** The instant the advice was made for: ages are counted back from it. */
  adviceAt: string;
  answered: boolean;
  headline?: string;
  indicator?: string;
  action?: string;
  reasons: string[];
  alternatives: string[];
  verdicts: PageVerdict[];
  findings: PageFinding[];
  gaps: PageGap[];
  order: PageFinding[];
  rulesVersion: string;
  /** The active thresholds flattened (key, value), when they are those of the record's rules version. */
  thresholds?: Array<[string, string]>;
  cautions: string[];
  snapshot?: PatientSnapshot;
}

export interface ViewInput {
  record: AdviceRecord;
  /** Phrases for the verdict values (cards/catalogue.json `phrases`). */
  phrases: { responsiveness: Record<string, string>; tolerance: Record<string, string> };
  cautions: readonly string[];
  /** The running service's thresholds and rules version: shown only when the record was made under the same version. */
  running: { rulesVersion: string; thresholds: unknown };
}

const NOT_RECORDED = /(^|: )(no .*recorded|missing\b|no\b)/i;
const STALE = /\bstale\b|\bolder than\b|\bold\b|\bago\b/i;
const GATHER_PROBLEM = new Set(['unavailable', 'http-error', 'timeout', 'network-error', 'not-fhir', 'truncated']);
const ACTION_WORDS: Record<string, string> = {
  'proceed-and-reassess': 'Give as ordered, then reassess',
  'smaller-aliquot': 'Give a smaller amount, reassessing before more',
  'question-bolus': 'Reconsider the bolus',
  'test-first': 'Test responsiveness before giving volume',
};

/** Evidence kinds the card labels do not name: the draft order itself and a fluid given ("fluid:saline"). */
function evidenceLabel(kind: string): string {
  if (kind === 'draftOrder') return 'Ordered bolus';
  if (kind.startsWith('fluid:')) return `Fluid given (${kind.slice(6).replace(/-/g, ' ')})`;
  return kindLabel(kind);
}

function evidenceOf(f: Finding): PageEvidence[] {
  return f.evidence.map((e) => ({ label: evidenceLabel(e.kind), value: String(e.value), unit: unitDisplay(e.unit), effective: e.effective, ref: e.ref }));
}

function pageFinding(f: Finding): PageFinding {
  return {
    topic: f.topic, ruleId: f.ruleId, assessed: f.status === 'assessed', text: f.text,
    ...(f.reason ? { reason: f.reason } : {}), ...(f.direction ? { direction: f.direction } : {}), ...(f.source ? { source: f.source } : {}),
    values: Object.entries(f.values ?? {}).map(([k, v]) => [k, String(v)]),
    evidence: evidenceOf(f),
  };
}

/** "5 of 9 findings assessed" over the findings of one topic. */
function coverageOf(findings: Finding[], topic: string): string | undefined {
  const of = findings.filter((f) => f.topic === topic);
  if (!of.length) return undefined;
  return `${of.filter((f) => f.status === 'assessed').length} of ${of.length} findings assessed`;
}

/** A field a later Advice shape may carry (confidence, coverage), read without depending on its type. */
function optionalText(v: unknown, key: string): string | undefined {
  const x = (v as Record<string, unknown> | undefined)?.[key];
  if (typeof x === 'string') return x;
  if (typeof x === 'number') return String(x);
  if (x && typeof x === 'object' && typeof (x as { level?: unknown }).level === 'string') return (x as { level: string }).level;
  return undefined;
}

function capital(s: string): string {
  return s ? s[0]!.toUpperCase() + s.slice(1) : s;
}

function flatten(v: unknown, prefix = ''): Array<[string, string]> {
  if (v === null || v === undefined) return [];
  if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean') return [[prefix, String(v)]];
  if (Array.isArray(v)) return v.every((x) => typeof x !== 'object') ? [[prefix, v.join(', ')]] : [];
  return Object.entries(v as Record<string, unknown>).flatMap(([k, x]) => flatten(x, prefix ? `${prefix}.${k}` : k));
}

function gapsOf(rec: AdviceRecord): PageGap[] {
  const gaps: PageGap[] = [];
  for (const o of rec.gathering) {
    if (GATHER_PROBLEM.has(o.status)) gaps.push({ kind: 'not obtained', what: `Data: ${o.key}`, why: `${o.status}${o.detail ? `: ${o.detail}` : ''}`, evidence: [] });
  }
  for (const f of rec.findings) {
    if (f.status !== 'not-assessed') continue;
    const why = f.reason ?? 'not assessed';
    gaps.push({ kind: NOT_RECORDED.test(why) ? 'missing' : STALE.test(why) ? 'stale' : 'set aside', what: f.text, why, evidence: evidenceOf(f) });
  }
  for (const x of rec.snapshot?.excluded ?? []) gaps.push({ kind: 'set aside', what: x.kind ? kindLabel(x.kind) : x.ref, why: `${x.reason}: ${x.detail}`, ref: x.ref, evidence: [] });
  return gaps;
}

export function toPageView(input: ViewInput): PageView {
  const { record: rec, phrases } = input;
  const advice = rec.advice;
  const verdicts: PageVerdict[] = [];
  if (advice) {
    const r = advice.responsiveness;
    const t = advice.tolerance;
    const rCov = optionalText(r, 'coverage') ?? coverageOf(advice.findings, 'responsiveness');
    const tCov = optionalText(t, 'coverage') ?? coverageOf(advice.findings, 'tolerance');
    const rConf = optionalText(r, 'confidence');
    const tConf = optionalText(t, 'confidence');
    verdicts.push({
      question: 'Will the heart answer volume? (responsiveness)',
      value: capital(r ? (phrases.responsiveness[r.value] ?? r.value) : (phrases.responsiveness['unassessed'] ?? 'Not assessed')),
      rationale: r?.rationale ?? 'No responsiveness verdict was made.',
      ...(rConf ? { confidence: rConf } : {}), ...(rCov ? { coverage: rCov } : {}),
      decidingRules: r?.decidingRules ?? [], ...(r?.nextTest ? { nextTest: r.nextTest } : {}),
    });
    verdicts.push({
      question: 'Can the patient take it? (tolerance)',
      value: capital(t ? (phrases.tolerance[t.value] ?? t.value) : (phrases.tolerance['unassessed'] ?? 'Not assessed')),
      rationale: t?.rationale ?? 'No tolerance verdict was made.',
      ...(tConf ? { confidence: tConf } : {}), ...(tCov ? { coverage: tCov } : {}),
      decidingRules: t?.decidingRules ?? [],
    });
  }
  const rec2 = advice?.recommendation;
  const findings = rec.findings.filter((f) => f.topic !== 'order').map(pageFinding);
  return {
    adviceId: rec.id, service: rec.service, hook: rec.hook,
    ...(rec.snapshot?.patient.ref ? { patientRef: rec.snapshot.patient.ref } : rec.patientId ? { patientRef: `Patient/${rec.patientId}` } : {}),
    ...(rec.snapshot?.encounter?.ref ? { encounterRef: rec.snapshot.encounter.ref } : {}),
    recordedAt: rec.recordedAt,
    adviceAt: advice?.now ?? rec.snapshot?.now ?? rec.recordedAt,
    answered: rec.outcome === 'answered',
    ...(rec2 ? { headline: rec2.headline, indicator: rec2.indicator, action: ACTION_WORDS[rec2.action] ?? rec2.action } : {}),
    reasons: rec2?.reasons ?? [],
    alternatives: rec2?.alternatives ?? [],
    verdicts,
    findings,
    gaps: gapsOf(rec),
    order: rec.findings.filter((f) => f.topic === 'order').map(pageFinding),
    rulesVersion: rec.rulesVersion,
    ...(input.running.rulesVersion === rec.rulesVersion ? { thresholds: flatten(input.running.thresholds) } : {}),
    cautions: [...input.cautions],
    ...(rec.snapshot ? { snapshot: rec.snapshot } : {}),
  };
}
