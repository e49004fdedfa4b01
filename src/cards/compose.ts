/**
 * What to say: Advice + snapshot + gathering outcomes → card models (rendered by render.ts with the catalogue).
 * Decides which card kinds apply and which suggestions to offer from the advice's codes (action, headline key,
 * alternatives, next-test kind); never looks at clinical thresholds (those live in assess/), never branches on card
 * ids, rule ids or the words of reasons. All wording comes from the catalogue.
 */
import { sentenceStart } from '../assess/common/text.js';
import type { NextTestKind } from '../assess/types.js';
import type { Advice, Finding } from '../assess/types.js';
import type { GatherOutcome } from '../hooks/gather-types.js';
import type { HookName, Suggestion } from '../hooks/schemas.js';
import type { DraftOrder, PatientSnapshot } from '../snapshot/types.js';
import type { Catalogue } from './catalogue.js';
import type { CardModel } from './render.js';
import { kindLabel } from './render.js';
import { formatAge } from './format.js';
import { fill } from './markdown.js';
import { requestTest, smallerAliquot, withdrawDraft, type SuggestionContext, type TestKind } from './suggestions.js';

const GATHER_PROBLEM = new Set(['unavailable', 'http-error', 'timeout', 'network-error', 'not-fhir', 'truncated', 'too-large', 'redirect']);

/**
 * A smaller aliquot: 250 mL when 500 mL or more was ordered, else half the order, never below 100 mL, rounded
 * to 50 mL (common practice: fluid given in small aliquots with reassessment in between).
 */
export function aliquotMl(orderedMl: number): number | undefined {
  const v = orderedMl >= 500 ? 250 : Math.max(100, Math.round(orderedMl / 2 / 50) * 50);
  return v < orderedMl ? v : undefined;
}

/** The aliquot keeps the ordered rate (docs/clinical-logic: 500 mL over 30 min → 250 mL over 15 min): its duration scales with its volume. */
export function aliquotDurationMin(orderedMl: number, orderedMin: number | undefined, aliquot: number): number | undefined {
  if (orderedMin === undefined || !(orderedMin > 0) || !(orderedMl > 0)) return undefined;
  return Math.max(1, Math.round((orderedMin * aliquot) / orderedMl));
}
/** Reassess this long after a bolus ends (common practice: response is judged within minutes of the bolus). */
const REASSESS_MIN = 15;

/** Why a gathering key failed, in a prescriber's words. */
function gatherWhy(o: GatherOutcome): string {
  switch (o.status) {
    case 'timeout': return 'the FHIR server did not answer within the time budget';
    case 'http-error': return `the FHIR server answered with an error (${o.httpStatus ?? '?'})`;
    case 'network-error': return 'the FHIR server could not be reached';
    case 'not-fhir': return 'the FHIR server sent something that is not FHIR';
    case 'truncated': return `only part of the data was read (${o.detail ?? 'paging stopped'})`;
    case 'too-large': return `the FHIR server's answer was too large to read (${o.detail ?? 'size limit'})`;
    case 'redirect': return `the FHIR server redirected the query elsewhere, which is not followed (${o.httpStatus ?? '3xx'})`;
    case 'unavailable': return o.detail ?? 'not sent and no FHIR server to ask';
    default: return o.detail ?? o.status;
  }
}

export interface ComposeInput {
  hook: HookName;
  advice: Advice;
  snapshot: PatientSnapshot;
  gathering: GatherOutcome[];
  purposes: Record<string, string>;
  catalogue: Catalogue;
  context: SuggestionContext;
}

/** Strips a rule's own "X: not assessed (…)" suffix so the gap line reads "X: reason". */
function gapWhat(f: Finding): string {
  return f.text.replace(/:?\s*not assessed.*$/i, '').trim() || f.ruleId;
}


/** One gap line without saying the same thing twice ("PPV: PPV stale …" → "PPV stale …"). */
function gapLine(what: string, why: string): CardModel['gaps'][number] {
  const w = what.toLowerCase();
  const y = why.toLowerCase();
  if (y.startsWith(w)) return { what: why, why: '' };
  const lead = y.split(/[\s:(]+/).filter(Boolean).slice(0, 2).join(' ');
  if (lead && w.includes(lead)) return { what, why: '' };
  return { what, why };
}

export function gapsOf(advice: Advice, snapshot: PatientSnapshot, gathering: GatherOutcome[], purposes: Record<string, string>): CardModel['gaps'] {
  const gaps: CardModel['gaps'] = [];
  for (const o of gathering) if (GATHER_PROBLEM.has(o.status)) gaps.push({ what: `Data: ${purposes[o.key] ?? o.key}`, why: gatherWhy(o) });
  // Stale, invalid or confounded markers one by one (they explain why a value on the chart was not used) …
  const absent: string[] = [];
  for (const f of advice.findings) {
    if (f.status !== 'not-assessed') continue;
    if (f.gap === 'missing') {
      if (!absent.includes(gapWhat(f))) absent.push(gapWhat(f));
    } else gaps.push(gapLine(gapWhat(f), f.reason ?? 'not assessed'));
  }
  // … and markers never recorded on one line, so the card stays readable.
  if (absent.length) gaps.push({ what: 'Not recorded', why: absent.join(', ') });
  for (const e of snapshot.excluded) gaps.push({ what: `${e.kind ? kindLabel(e.kind) : 'Resource'} (${e.ref})`, why: `left out: ${e.detail}` });
  for (const e of advice.ruleErrors) gaps.push({ what: `Rule ${e.ruleId}`, why: 'failed on this data and was skipped' });
  return gaps;
}

function evidenceRows(findings: Finding[]): CardModel['evidence'] {
  return findings.filter((f) => f.status === 'assessed' && f.evidence.length).map((f) => ({ finding: f.text, evidence: f.evidence }));
}

/** True when the data the advice depends on could not be gathered at all. */
function nothingToGoOn(advice: Advice, gathering: GatherOutcome[]): GatherOutcome | undefined {
  if (advice.findings.some((f) => f.status === 'assessed' && f.topic !== 'order')) return undefined;
  return gathering.find((o) => GATHER_PROBLEM.has(o.status));
}


const TEST_SUGGESTION: Record<NextTestKind, 'passive-leg-raise' | 'mini-fluid-challenge' | 'tidal-volume-challenge' | 'end-expiratory-occlusion'> = {
  'passive-leg-raise': 'passive-leg-raise', 'mini-fluid-challenge': 'mini-fluid-challenge',
  'tidal-volume-challenge': 'tidal-volume-challenge', 'end-expiratory-occlusion': 'end-expiratory-occlusion',
};

function suggestionsFor(advice: Advice, order: DraftOrder | undefined, cat: Catalogue, ctx: SuggestionContext, now: string): Suggestion[] {
  const rec = advice.recommendation;
  if (!rec || !order) return [];
  const T = cat.suggestions;
  const orderedMl = order.volumeMl;
  const aliquot = orderedMl !== undefined ? aliquotMl(orderedMl) : undefined;
  const aliquotMin = aliquot !== undefined && orderedMl !== undefined ? aliquotDurationMin(orderedMl, order.durationMin, aliquot) : undefined;
  const vars = {
    aliquotMl: String(aliquot ?? ''), orderedMl: String(Math.round(orderedMl ?? 0)), reassessMin: String(REASSESS_MIN),
    aliquotRate: aliquotMin !== undefined ? ` over ${aliquotMin} min` : '',
  };
  const out: Array<Suggestion | undefined> = [];
  const reassess = () => requestTest('reassess-after-bolus', ctx, T['reassess-after-bolus'], vars, now);
  const test = (k: TestKind) => requestTest(k, ctx, T[k], vars, now);
  const next = rec.nextTest ? TEST_SUGGESTION[rec.nextTest] : undefined;
  const critical = rec.indicator === 'critical';
  const withdraw = () => (rec.phase === 'early-resuscitation' ? undefined : withdrawDraft(order, T['withdraw-bolus'], vars));
  switch (rec.action) {
    case 'proceed-and-reassess':
    case 'resuscitate-and-reassess':
      out.push({ ...reassess(), isRecommended: true });
      if (next) out.push(test(next));
      break;
    case 'smaller-aliquot': {
      const s = aliquot !== undefined ? smallerAliquot(order, aliquot, aliquotMin, T['smaller-aliquot'], vars) : undefined;
      // A critical card never recommends giving (docs/clinical-logic).
      out.push(s ? (critical ? s : { ...s, isRecommended: true }) : undefined, reassess());
      if (next) out.push(test(next));
      if (critical) out.push(withdraw());
      break;
    }
    case 'question-need':
    case 'question-bolus':
      out.push(test('bedside-ultrasound'), withdraw());
      break;
    case 'test-first':
      out.push({ ...test(next ?? 'mini-fluid-challenge'), isRecommended: true }, test('bedside-ultrasound'), withdraw());
      break;
  }
  return out.filter((s): s is Suggestion => !!s);
}

export function composeCards(input: ComposeInput): CardModel[] {
  const { hook, advice, snapshot, gathering, purposes, catalogue } = input;
  const ph = catalogue.phrases;
  const orderHook = hook === 'order-select' || hook === 'order-sign';
  const fluidOrders = snapshot.draftOrders.filter((o) => o.selected && o.isFluid);
  if (orderHook && fluidOrders.length === 0) return []; // not a fluid bolus: no fluid card

  const gaps = gapsOf(advice, snapshot, gathering, purposes);
  const failed = nothingToGoOn(advice, gathering);
  if (failed) return [{ kind: 'assessment-gap', vars: { gapReason: gatherWhy(failed) }, conclusion: [], evidence: [], gaps, order: [], suggestions: [] }];

  const r = advice.responsiveness?.value ?? 'unassessed';
  const t = advice.tolerance?.value ?? 'unassessed';
  const rec = advice.recommendation;
  const responsivenessPhrase = ph.responsiveness[r];
  const tolerancePhrase = ph.tolerance[t];
  const conclusion: string[] = [];
  const confidence = advice.responsiveness?.confidence;
  if (advice.responsiveness) {
    conclusion.push(`${responsivenessPhrase}${confidence ? ` (${ph.confidence[confidence]})` : ''}: ${advice.responsiveness.rationale}`);
  }
  if (advice.tolerance) conclusion.push(`${sentenceStart(tolerancePhrase)}: ${advice.tolerance.rationale}`);
  else conclusion.push(`${sentenceStart(tolerancePhrase)}: no marker of fluid tolerance could be assessed`);
  if (advice.need) conclusion.push(`${ph.need[advice.need.value]}: ${advice.need.rationale}`);
  if (advice.phase) conclusion.push(`${ph.phase[advice.phase.value]}: ${advice.phase.rationale}`);
  const assumed = advice.responsiveness?.assumptions ?? [];
  if (assumed.length) conclusion.push(`${ph.assumed}: ${assumed.join('; ')}`);
  const nextTest = rec ? rec.nextTest : advice.responsiveness?.value === 'indeterminate' ? advice.responsiveness.nextTest : undefined;
  if (nextTest) conclusion.push(`${ph.settle}: ${catalogue.nextTests[nextTest]}`);
  if (!orderHook) {
    // The overview names the newest evidence behind the responsiveness verdict and its age.
    const deciding = advice.findings.filter((f) => f.status === 'assessed' && advice.responsiveness?.decidingRules.includes(f.ruleId));
    const newest = deciding.flatMap((f) => f.evidence.map((e) => ({ f, e }))).sort((a, b) => a.e.ageMinutes - b.e.ageMinutes)[0];
    if (newest) conclusion.push(`Latest responsiveness evidence: ${newest.f.text} (${formatAge(newest.e.ageMinutes)} ago)`);
  }
  const options = (rec?.alternatives ?? []).map((a) => catalogue.alternatives[a]);
  if (options.length) conclusion.push(`${ph.options}: ${options.join('; ')}`);

  const headline = rec ? catalogue.headlines[rec.headline] : '';
  const quantity = advice.findings.flatMap((f) => (f.topic === 'tolerance' && f.status === 'assessed' && f.quantity ? [f.quantity] : []));
  const overload = quantity.find((q) => q.kind === 'fluid-overload-percent');
  const balanceQ = quantity.find((q) => q.kind === 'balance-ml');
  const balancePhrase = overload ? fill(ph.overloadPercent, { value: overload.value.toFixed(1) })
    : balanceQ ? fill(ph.balanceMl, { value: `${balanceQ.value >= 0 ? '+' : '−'}${Math.abs(Math.round(balanceQ.value))}` }) : '';
  const vars: Record<string, string> = {
    responsivenessPhrase, responsivenessPhraseLower: responsivenessPhrase.toLowerCase(), tolerancePhrase,
    tolerance: t, responsiveness: r, headline, balancePhrase, indicator: rec?.indicator ?? 'info',
  };
  const clinical = advice.findings.filter((f) => f.topic !== 'order');
  const orderLines = [
    ...fluidOrders.filter((o) => o.volumeProblem).map((o) => `${o.display ?? 'IV fluid'}: ${o.volumeProblem}`),
    ...advice.findings.filter((f) => f.topic === 'order' && f.status === 'assessed').map((f) => f.text),
  ];
  const suggestions = orderHook ? suggestionsFor(advice, fluidOrders[0], catalogue, input.context, snapshot.now) : [];
  return [
    {
      kind: orderHook ? 'bolus-review' : 'fluid-overview',
      vars,
      conclusion,
      evidence: evidenceRows(clinical),
      gaps,
      order: orderLines,
      suggestions,
      selectionBehavior: 'at-most-one',
    },
  ];
}
