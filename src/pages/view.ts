/**
 * The one adapter from a stored advice record to what the reasoning page shows (PageView). It is the only file of
 * src/pages/ that reads the Advice, Finding and Verdict shapes (src/assess/types.ts): when assessment v2 changes
 * them, this file changes and the page does not. Everything here is plain data; escaping happens in page.ts.
 */
import { fmt, sentenceStart } from '../assess/common/text.js';
import type { Advice, Finding, Verdict } from '../assess/types.js';
import type { WhatIfOutcome } from '../assess/what-if/types.js';
import type { AdviceRecord } from '../audit/types.js';
import type { Catalogue } from '../cards/catalogue.js';
import { kindLabel, unitDisplay } from '../cards/render.js';
import type { PatientSnapshot } from '../snapshot/types.js';
import { CONFIDENCE_SHORT, NOT_FEASIBLE_WORDS, READ_ON_WORDS, WHAT_IF_TEST_WORDS } from './what-if-words.js';

export interface PageEvidence {
  label: string;
  value: string;
  unit: string;
  effective: string;
  ref: string;
}
export interface PageFinding {
  topic: string;
  ruleId: string;
  assessed: boolean;
  text: string;
  reason?: string;
  direction?: string;
  /** Responsiveness: the evidence tier (dynamic, static, context). */
  tier?: string;
  source?: string;
  /** Derived figures (key, value), shown as they are. */
  figures: Array<[string, string]>;
  evidence: PageEvidence[];
}
export interface PageVerdict {
  key: 'responsiveness' | 'tolerance' | 'need';
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
  /** Conditions assumed because they were not charted. */
  assumptions: string[];
}
export type GapKind = 'missing' | 'stale' | 'set aside' | 'not obtained';
export interface PageGap {
  kind: GapKind;
  what: string;
  why: string;
  ref?: string;
  /** Values the rule saw but could not use (stale, invalid, confounded). */ evidence: PageEvidence[];
}

export interface PageWhatIfOutcome {
  result: 'positive' | 'negative';
  /** The hypothetical result, e.g. "cardiac output +11 % (threshold ≥ 10 %)". */
  assumed: string;
  /** The verdict after the re-run, e.g. "Likely fluid responsive, high confidence". */
  verdict: string;
  /** The recommended action after the re-run, when there is an ordered bolus. */
  action?: string;
  changes: boolean;
}
export interface PageWhatIfRow {
  /** The test's code (data attribute) and name. */
  code: string;
  test: string;
  feasible: boolean;
  /** Why not, in words (empty when feasible). */
  why: string[];
  /** What a hypothetical result is read on, e.g. "VTI by echo". */
  readOn?: string;
  source?: string;
  decisive: boolean;
  outcomes: PageWhatIfOutcome[];
}
export interface PageWhatIf {
  rows: PageWhatIfRow[];
  /** The decisive test's name. */
  decisive?: string;
  /** The current verdict has high confidence: settled, so no test is named as deciding. */
  settled: boolean;
}

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
  /** "Early resuscitation of shock" or "After early resuscitation", when the record says. */
  phase?: string;
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
  /** What would change the advice, when the record has it (advice made by rules that compute it, with a responsiveness verdict). */
  whatIf?: PageWhatIf;
  snapshot?: PatientSnapshot;
}

export interface ViewInput {
  record: AdviceRecord;
  /** The wording of the verdicts, headlines, alternatives and tests (cards/catalogue.json). */
  words: Pick<Catalogue, 'phrases' | 'headlines' | 'alternatives' | 'nextTests'>;
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
  'resuscitate-and-reassess': 'Resuscitate in steps, reassessing after each',
  'question-need': 'Ask whether there is anything to treat before giving volume',
};
/** The gap codes of a not-assessed finding (assess/common/finding.ts GapKind) as the page groups them. */
const GAP_WORDS: Record<string, GapKind> = { missing: 'missing', stale: 'stale' };

/** Evidence kinds the card labels do not name: the draft order itself and a fluid given ("fluid:saline"). */
function evidenceLabel(kind: string): string {
  if (kind === 'draftOrder') return 'Ordered bolus';
  if (kind.startsWith('fluid:')) return `Fluid given (${kind.slice(6).replace(/-/g, ' ')})`;
  return kindLabel(kind);
}

function evidenceOf(f: Finding): PageEvidence[] {
  return f.evidence.map((e) => ({
    label: evidenceLabel(e.kind),
    value: String(e.value),
    unit: unitDisplay(e.unit),
    effective: e.effective,
    ref: e.ref,
  }));
}

function pageFinding(f: Finding): PageFinding {
  return {
    topic: f.topic,
    ruleId: f.ruleId,
    assessed: f.status === 'assessed',
    text: f.text,
    ...(f.reason ? { reason: f.reason } : {}),
    ...(f.source ? { source: f.source } : {}),
    ...(f.topic === 'responsiveness' && f.direction ? { direction: f.direction } : {}),
    ...(f.topic === 'responsiveness' && f.tier ? { tier: f.tier } : {}),
    figures: Object.entries(f.values ?? {}).map(([k, v]) => [k, String(v)]),
    evidence: evidenceOf(f),
  };
}

/** "5 of 9 markers assessed" from the verdict's own count, else "5 of 9 findings assessed" over the topic's findings. */
function coverageOf(v: Verdict<string> | undefined, findings: Finding[], topic: string): string | undefined {
  if (v?.coverage) return `${v.coverage.assessed} of ${v.coverage.total} markers assessed`;
  const of = findings.filter((f) => f.topic === topic);
  if (!of.length) return undefined;
  return `${of.filter((f) => f.status === 'assessed').length} of ${of.length} findings assessed`;
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
    if (GATHER_PROBLEM.has(o.status))
      gaps.push({ kind: 'not obtained', what: `Data: ${o.key}`, why: `${o.status}${o.detail ? `: ${o.detail}` : ''}`, evidence: [] });
  }
  for (const f of rec.findings) {
    if (f.status !== 'not-assessed') continue;
    const why = f.reason ?? 'not assessed';
    const kind: GapKind = f.gap ? (GAP_WORDS[f.gap] ?? 'set aside') : gapKindOfText(why);
    gaps.push({
      kind,
      what: f.text,
      why: f.gap && !GAP_WORDS[f.gap] ? `${f.gap.replace(/-/g, ' ')}: ${why}` : why,
      evidence: evidenceOf(f),
    });
  }
  for (const x of rec.snapshot?.excluded ?? [])
    gaps.push({ kind: 'set aside', what: x.kind ? kindLabel(x.kind) : x.ref, why: `${x.reason}: ${x.detail}`, ref: x.ref, evidence: [] });
  return gaps;
}

/** A gap with no typed kind (an older record), by the words of its reason. */
function gapKindOfText(why: string): GapKind {
  if (NOT_RECORDED.test(why)) return 'missing';
  return STALE.test(why) ? 'stale' : 'set aside';
}

function assumedText(o: WhatIfOutcome): string {
  const on = READ_ON_WORDS[o.assumed.measured] ?? o.assumed.measured;
  const relative = o.assumed.changePercent !== undefined;
  const change = relative ? o.assumed.changePercent! : (o.assumed.changeAbsolute ?? 0);
  const unit = relative ? ' %' : ' points';
  const sign = ['−', '±', '+'][Math.sign(change) + 1];
  const thr = o.assumed.threshold !== undefined ? ` (threshold ${o.assumed.strict ? '>' : '≥'} ${fmt(o.assumed.threshold, 2)}${unit})` : '';
  return `${on} ${sign}${fmt(Math.abs(change), 2)}${unit}${thr}`;
}

function whatIfOf(advice: Advice, words: ViewInput['words']): PageWhatIf | undefined {
  const w = advice.whatIf;
  if (!w) return undefined;
  const p = words.phrases;
  return {
    rows: w.rows.map((r) => ({
      code: r.test,
      test: WHAT_IF_TEST_WORDS[r.test] ?? r.test,
      feasible: r.feasible,
      why: r.notFeasible.map((n) => NOT_FEASIBLE_WORDS[n] ?? n),
      ...(r.outcomes[0] ? { readOn: READ_ON_WORDS[r.outcomes[0].assumed.measured] ?? r.outcomes[0].assumed.measured } : {}),
      ...(r.source ? { source: r.source } : {}),
      decisive: w.decisive === r.test,
      outcomes: r.outcomes.map((o) => ({
        result: o.result,
        assumed: assumedText(o),
        verdict: `${sentenceStart(p.responsiveness[o.responsiveness] ?? o.responsiveness)}${o.confidence ? `, ${CONFIDENCE_SHORT[o.confidence] ?? o.confidence}` : ''}`,
        ...(o.action ? { action: ACTION_WORDS[o.action] ?? o.action } : {}),
        changes: o.changes,
      })),
    })),
    ...(w.decisive ? { decisive: WHAT_IF_TEST_WORDS[w.decisive] ?? w.decisive } : {}),
    settled: advice.responsiveness?.confidence === 'high',
  };
}

/** The patient's reference: the snapshot's, else the one the call named. */
function patientRefOf(rec: AdviceRecord): { patientRef?: string } {
  if (rec.snapshot?.patient.ref) return { patientRef: rec.snapshot.patient.ref };
  return rec.patientId ? { patientRef: `Patient/${rec.patientId}` } : {};
}

export function toPageView(input: ViewInput): PageView {
  const { record: rec, words } = input;
  const p = words.phrases;
  const advice = rec.advice;
  const verdicts: PageVerdict[] = [];
  if (advice) {
    const r = advice.responsiveness;
    const t = advice.tolerance;
    const n = advice.need;
    const rCov = coverageOf(r, advice.findings, 'responsiveness');
    const tCov = coverageOf(t, advice.findings, 'tolerance');
    verdicts.push({
      key: 'responsiveness',
      question: 'Will the heart answer volume? (responsiveness)',
      value: sentenceStart(r ? p.responsiveness[r.value] : p.responsiveness.unassessed),
      rationale: r?.rationale ?? 'No responsiveness verdict was made.',
      ...(r?.confidence ? { confidence: p.confidence[r.confidence] } : {}),
      ...(rCov ? { coverage: rCov } : {}),
      decidingRules: r?.decidingRules ?? [],
      ...(r?.nextTest ? { nextTest: words.nextTests[r.nextTest] } : {}),
      assumptions: r?.assumptions ?? [],
    });
    verdicts.push({
      key: 'tolerance',
      question: 'Can the patient take it? (tolerance)',
      value: sentenceStart(t ? p.tolerance[t.value] : p.tolerance.unassessed),
      rationale: t?.rationale ?? 'No tolerance verdict was made.',
      ...(t?.confidence ? { confidence: p.confidence[t.confidence] } : {}),
      ...(tCov ? { coverage: tCov } : {}),
      decidingRules: t?.decidingRules ?? [],
      assumptions: t?.assumptions ?? [],
    });
    if (n) {
      const nCov = coverageOf(n, advice.findings, 'perfusion');
      verdicts.push({
        key: 'need',
        question: 'Is there anything to treat? (need, perfusion)',
        value: sentenceStart(p.need[n.value]),
        rationale: n.rationale,
        ...(nCov ? { coverage: nCov } : {}),
        decidingRules: n.decidingRules,
        assumptions: n.assumptions ?? [],
      });
    }
  }
  const order = advice?.recommendation;
  const findings = rec.findings.filter((f) => f.topic !== 'order').map(pageFinding);
  const whatIf = advice ? whatIfOf(advice, words) : undefined;
  return {
    adviceId: rec.id,
    service: rec.service,
    hook: rec.hook,
    ...patientRefOf(rec),
    ...(rec.snapshot?.encounter?.ref ? { encounterRef: rec.snapshot.encounter.ref } : {}),
    recordedAt: rec.recordedAt,
    adviceAt: advice?.now ?? rec.snapshot?.now ?? rec.recordedAt,
    answered: rec.outcome === 'answered',
    ...(order
      ? {
          headline: words.headlines[order.headline] ?? order.headline,
          indicator: order.indicator,
          action: ACTION_WORDS[order.action] ?? order.action,
        }
      : {}),
    ...(advice?.phase ? { phase: p.phase[advice.phase.value] } : {}),
    reasons: order?.reasons ?? [],
    alternatives: (order?.alternatives ?? []).map((a) => words.alternatives[a] ?? a),
    verdicts,
    findings,
    gaps: gapsOf(rec),
    order: rec.findings.filter((f) => f.topic === 'order').map(pageFinding),
    rulesVersion: rec.rulesVersion,
    ...(input.running.rulesVersion === rec.rulesVersion ? { thresholds: flatten(input.running.thresholds) } : {}),
    cautions: [...input.cautions],
    ...(whatIf ? { whatIf } : {}),
    ...(rec.snapshot ? { snapshot: rec.snapshot } : {}),
  };
}
