/**
 * What to say: Advice + snapshot + gathering outcomes → card models (rendered by render.ts with the catalogue).
 * Decides which card kinds apply and which suggestions to offer from the advice's codes (action, headline key,
 * alternatives, next-test kind, what-if outcomes); never looks at clinical thresholds (those live in assess/), never
 * branches on card ids, rule ids or the words of reasons. All wording comes from the catalogue.
 *
 * The card is a pop-up read in seconds while ordering (issue 16): one line per question, up to three deciding
 * findings with their local time and age, the one test that would change the advice, one caution with the link to
 * the reasoning page, which shows everything else (every finding with its reference, what was missing, the order).
 */
import type { Advice, Evidence, Finding, NextTestKind } from '../assess/types.js';
import type { WhatIfOutcome } from '../assess/what-if/types.js';
import { absoluteChange, relativeChangePercent } from '../physiology/dynamic-tests.js';
import type { GatherOutcome } from '../hooks/gather-types.js';
import type { HookName, Suggestion } from '../hooks/schemas.js';
import type { DraftOrder, PatientSnapshot } from '../snapshot/types.js';
import type { Catalogue } from './catalogue.js';
import type { CardModel, DetailLine } from './render.js';
import { kindLabel, unitDisplay } from './render.js';
import { clockAndAge, utcDay } from './format.js';
import { clip, fill } from './markdown.js';
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

/**
 * The aliquot keeps the ordered rate (docs/clinical-logic: 500 mL over 30 min → 250 mL over 15 min): its duration scales with its volume.
 */
export function aliquotDurationMin(orderedMl: number, orderedMin: number | undefined, aliquot: number): number | undefined {
  if (orderedMin === undefined || !(orderedMin > 0) || !(orderedMl > 0)) return undefined;
  return Math.max(1, Math.round((orderedMin * aliquot) / orderedMl));
}
/** Reassess this long after a bolus ends (common practice: response is judged within minutes of the bolus). */
const REASSESS_MIN = 15;

/** Why a gathering key failed, in a prescriber's words. */
function gatherWhy(o: GatherOutcome): string {
  switch (o.status) {
    case 'timeout':
      return 'the FHIR server did not answer within the time budget';
    case 'http-error':
      return `the FHIR server answered with an error (${o.httpStatus ?? '?'})`;
    case 'network-error':
      return 'the FHIR server could not be reached';
    case 'not-fhir':
      return 'the FHIR server sent something that is not FHIR';
    case 'truncated':
      return `only part of the data was read (${o.detail ?? 'paging stopped'})`;
    case 'too-large':
      return `the FHIR server's answer was too large to read (${o.detail ?? 'size limit'})`;
    case 'redirect':
      return `the FHIR server redirected the query elsewhere, which is not followed (${o.httpStatus ?? '3xx'})`;
    case 'unavailable':
      return o.detail ?? 'not sent and no FHIR server to ask';
    default:
      return o.detail ?? o.status;
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
  /** The site's IANA time zone for the times on the card (TIDEMARK_TIME_ZONE); UTC when not given. */
  timeZone?: string;
}

/** Longest piece of client text kept in one line of the pop-up (a display, a reason quoted from the FHIR server). */
const CLIENT_TEXT_MAX = 80;
/** Deciding findings shown on the pop-up (issue 16: up to three). */
const MAX_FINDINGS = 3;

/** A number as the card shows it: at most two decimals, no trailing zeros. */
function num(v: number): string {
  return String(Number.isInteger(v) ? v : Number(v.toFixed(Math.abs(v) >= 10 ? 1 : 2)));
}

/**
 * A finding's own sentence, shortened for one line: up to the first ";", without parenthesised asides, and without a
 * trailing comment after a colon (": points to …", lower case), keeping a colon followed by data (": MAP 58 → 65").
 */
function shortText(text: string): string {
  const first = (text.split(';')[0] ?? text)
    .replace(/\s*\([^()]*\)/g, '')
    .replace(/\s+/g, ' ')
    .trim();
  const comment = /:\s+[a-z]/.exec(first);
  return clip(comment ? first.slice(0, comment.index) : first, 100);
}

interface TimeWords {
  zone: string;
  at: string;
  dateOnly: string;
}

/** "14:05, 18 min ago", or "1 Dec, date only, time assumed" when the record gave a date alone. */
function when(e: Evidence, assumed: boolean, t: TimeWords): string {
  return assumed ? `${utcDay(e.effective)}, ${t.dateOnly}` : clockAndAge(e.effective, t.zone, t.at);
}

/** One line for one deciding finding: what was measured, its value and unit, its local time and age. */
function findingLine(
  f: Finding,
  snapshot: PatientSnapshot,
  cat: Catalogue,
  t: TimeWords,
  assumedRefs: ReadonlySet<string>,
): string | undefined {
  // The finding's own reading: a dynamic test it judged, else its first piece of evidence (the rules list what they
  // read first, then the context that made it valid: rhythm, ventilation).
  const test = f.evidence.map((e) => snapshot.dynamicTests.find((d) => d.ref === e.ref)).find((d) => d !== undefined);
  const main = test ? f.evidence.find((e) => e.ref === test.ref) : f.evidence[0];
  if (!main) return f.text ? shortText(f.text) : undefined;
  // A figure worked out at the moment of the advice (a balance) has no time of its own: the newest reading behind it is shown.
  const atNow = (e: Evidence) => Math.abs(Date.parse(e.effective) - Date.parse(snapshot.now)) < 1000;
  const timeOf = (e: Evidence | undefined) => (e && !atNow(e) ? when(e, assumedRefs.has(e.ref), t) : '');
  const time = timeOf(main);
  if (test) {
    // A test by its change, as its threshold is read (Monnet 2016, Muller 2011, Monnet 2009: relative; Myatra 2017: absolute PPV points).
    const signOf = (x: number) => (x >= 0 ? '+' : '−');
    let change = '';
    if (test.kind === 'tidalVolumeChallenge') {
      const points = absoluteChange(test.before, test.after);
      change = `${signOf(points)}${num(Math.abs(points))} points`;
    } else if (test.before > 0) {
      const pct = relativeChangePercent(test.before, test.after);
      change = `${signOf(pct)}${num(Math.abs(Math.round(pct * 10) / 10))} %`;
    }
    return withTime(
      `${kindLabel(`${test.kind}:${test.measured}`)} ${change} (${num(test.before)} → ${num(test.after)} ${unitDisplay(test.unit)})`.replace(
        /\s+/g,
        ' ',
      ),
      time,
    );
  }
  const coded = snapshot.coded.find((c) => c.ref === main.ref && c.kind === main.kind);
  if (coded) {
    const words = (cat.answers as Record<string, Record<string, string>>)[coded.kind]?.[coded.answer];
    return words ? withTime(`${kindLabel(coded.kind)}: ${words}`, time) : undefined;
  }
  const numericKinds = new Set(
    f.evidence.filter((e) => snapshot.measurements.some((x) => x.ref === e.ref && x.kind === e.kind)).map((e) => e.kind),
  );
  const m = snapshot.measurements.find((x) => x.ref === main.ref && x.kind === main.kind);
  if (m && numericKinds.size === 1 && f.evidence.filter((e) => e.kind === main.kind).length === 1) {
    const unit = unitDisplay(m.unit);
    return withTime(`${kindLabel(m.kind)} ${num(m.value)}${unit ? ` ${unit}` : ''}`, time);
  }
  // Several readings or a derived figure (a balance, an IVC with its collapsibility): the rule's own sentence, shortened.
  const newest = [...f.evidence].filter((e) => !atNow(e)).sort((a, b) => a.ageMinutes - b.ageMinutes)[0];
  return withTime(clip(shortText(f.text), 90), timeOf(newest));
}

const withTime = (what: string, time: string) => (time ? `${what}, ${time}` : what);

/**
 * How strongly a deciding finding speaks, by its typed fields, strongest first: a dynamic test before a static
 * marker before context (responsiveness); a harm sign, then a severe, then a moderate limit (tolerance); a sign of
 * hypoperfusion before a normal sign, context last (perfusion).
 */
const TIER_RANK: Record<string, number> = { dynamic: 0, static: 10 };
const LIMIT_RANK: Record<string, number> = { severe: 1, moderate: 2 };

function weight(f: Finding): number {
  switch (f.topic) {
    case 'responsiveness':
      return (TIER_RANK[f.tier ?? ''] ?? 20) + (f.direction === 'for' || f.direction === 'against' ? 0 : 5);
    case 'tolerance':
      if (f.harmSign) return 0;
      return LIMIT_RANK[f.limit] ?? (f.contextOnly ? 4 : 3);
    case 'perfusion':
      if (f.contextOnly) return 3;
      return f.hypoperfusion ? 0 : 1;
    default:
      return 9;
  }
}

/** The deciding findings of the verdicts, strongest first, taken in turn from responsiveness, tolerance and perfusion. */
function decidingFindings(advice: Advice): Finding[] {
  const assessed = advice.findings.filter((f) => f.status === 'assessed');
  const lists = [advice.responsiveness, advice.tolerance, advice.need].map((v) =>
    (v?.decidingRules ?? []).flatMap((id) => assessed.filter((f) => f.ruleId === id)).sort((a, b) => weight(a) - weight(b)),
  );
  const out: Finding[] = [];
  for (let i = 0; lists.some((l) => l.length > i); i++) {
    for (const l of lists) {
      const f = l[i];
      if (f && !out.includes(f)) out.push(f);
    }
  }
  return out;
}

/**
 * What the result of `test` would lead to, in words: the action after the re-run, else the responsiveness verdict. A
 * result that would leave the advice at "test first" is said as the verdict ("still unclear"): telling the prescriber to
 * test before volume, right after the test, would read as a loop.
 */
function outcomeWords(o: WhatIfOutcome | undefined, cat: Catalogue): string | undefined {
  if (!o) return undefined;
  return o.action && o.action !== 'test-first' ? cat.actionWords[o.action] : cat.verdictWords[o.responsiveness];
}

/** The one gap that would change the advice: from the counterfactual engine when it ran, else the verdict's next-test kind. */
function settleLine(advice: Advice, cat: Catalogue): string | undefined {
  const P = cat.popup;
  if (advice.whatIf) {
    const k = advice.whatIf.decisive;
    if (!k) return undefined;
    const row = advice.whatIf.rows.find((r) => r.test === k);
    const pos = outcomeWords(
      row?.outcomes.find((o) => o.result === 'positive'),
      cat,
    );
    const neg = outcomeWords(
      row?.outcomes.find((o) => o.result === 'negative'),
      cat,
    );
    // Both results lead to the same step (early resuscitation gives either way): the test settles the verdict only.
    if (!pos || !neg || pos === neg) return fill(P.settleFallback, { test: cat.testNames[k] });
    return fill(P.settle, {
      test: cat.testNames[k],
      positive: cat.testResults[k].positive,
      positiveOutcome: pos,
      negative: cat.testResults[k].negative,
      negativeOutcome: neg,
    });
  }
  const indeterminate = advice.responsiveness?.value === 'indeterminate' ? advice.responsiveness.nextTest : undefined;
  const k = advice.recommendation ? advice.recommendation.nextTest : indeterminate;
  return k ? fill(P.settleFallback, { test: cat.testNames[k] }) : undefined;
}

/** The test a suggestion should recommend: the decisive one when the engine ran, else the verdict's next-test kind. */
function testToOffer(advice: Advice): NextTestKind | undefined {
  if (advice.whatIf) return advice.whatIf.decisive;
  return advice.recommendation?.nextTest ?? (advice.responsiveness?.value === 'indeterminate' ? advice.responsiveness.nextTest : undefined);
}

/** The question lines: responsiveness with its confidence, tolerance with its coverage, perfusion (and the phase). */
function questionLines(advice: Advice, cat: Catalogue): DetailLine[] {
  const P = cat.popup;
  const r = advice.responsiveness;
  const t = advice.tolerance;
  const lines: DetailLine[] = [];
  lines.push({
    label: P.labels.responsiveness,
    text: `${P.responsiveness[r?.value ?? 'unassessed']}${r?.confidence ? ` (${P.confidence[r.confidence]})` : ''}`,
    keep: true,
  });
  const cov = t?.coverage ? fill(P.coverage, { assessed: String(t.coverage.assessed), total: String(t.coverage.total) }) : '';
  lines.push({ label: P.labels.tolerance, text: `${P.tolerance[t?.value ?? 'unassessed']}${cov ? ` (${cov})` : ''}`, keep: true });
  if (advice.need) {
    lines.push({
      label: P.labels.need,
      text: `${P.need[advice.need.value]}${advice.phase?.value === 'early-resuscitation' ? `; ${P.earlyPhase}` : ''}`,
      keep: true,
    });
  }
  return lines;
}

/**
 * Data the FHIR server could not give, by purpose, with why when the card says it nowhere else (the full list is on the reasoning page).
 */
function dataMissingLine(
  gathering: GatherOutcome[],
  purposes: Record<string, string>,
  cat: Catalogue,
  withReasons: boolean,
): DetailLine | undefined {
  const byPurpose = new Map<string, string>();
  for (const o of gathering) {
    if (!GATHER_PROBLEM.has(o.status)) continue;
    const what = purposes[o.key] ?? o.key;
    if (!byPurpose.has(what)) byPurpose.set(what, withReasons ? `${what} (${clip(gatherWhy(o), CLIENT_TEXT_MAX)})` : what);
  }
  return byPurpose.size
    ? { text: fill(cat.popup.dataMissing, { what: clip([...byPurpose.values()].join(withReasons ? '; ' : ', '), 160) }) }
    : undefined;
}

/** True when the data the advice depends on could not be gathered at all. */
function nothingToGoOn(advice: Advice, gathering: GatherOutcome[]): GatherOutcome | undefined {
  if (advice.findings.some((f) => f.status === 'assessed' && f.topic !== 'order')) return undefined;
  return gathering.find((o) => GATHER_PROBLEM.has(o.status));
}

function suggestionsFor(advice: Advice, order: DraftOrder | undefined, cat: Catalogue, ctx: SuggestionContext, now: string): Suggestion[] {
  const rec = advice.recommendation;
  if (!rec || !order) return [];
  const T = cat.suggestions;
  const orderedMl = order.volumeMl;
  const aliquot = orderedMl !== undefined ? aliquotMl(orderedMl) : undefined;
  const aliquotMin =
    aliquot !== undefined && orderedMl !== undefined ? aliquotDurationMin(orderedMl, order.durationMin, aliquot) : undefined;
  const vars = {
    aliquotMl: String(aliquot ?? ''),
    orderedMl: String(Math.round(orderedMl ?? 0)),
    reassessMin: String(REASSESS_MIN),
    aliquotRate: aliquotMin !== undefined ? ` over ${aliquotMin} min` : '',
  };
  const nowMs = Date.parse(now);
  // A test is wanted before any volume (now); a reassessment when the bolus has run and the interval has passed.
  const reassessAt = new Date(nowMs + ((order.durationMin ?? 0) + REASSESS_MIN) * 60_000).toISOString();
  const aliquotReassessAt = new Date(nowMs + ((aliquotMin ?? 0) + REASSESS_MIN) * 60_000).toISOString();
  const out: Array<Suggestion | undefined> = [];
  const reassess = (at = reassessAt, ml = vars.orderedMl) =>
    requestTest('reassess-after-bolus', ctx, T['reassess-after-bolus'], { ...vars, reassessMl: ml }, now, at);
  const test = (k: TestKind) => requestTest(k, ctx, T[k], vars, now, now);
  const next = testToOffer(advice);
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
      // A critical card never recommends giving (docs/clinical-logic): there the decisive test, if any, is recommended.
      const give = s && !critical ? { ...s, isRecommended: true } : s;
      out.push(give, s ? reassess(aliquotReassessAt, vars.aliquotMl) : reassess());
      if (next) out.push(critical ? { ...test(next), isRecommended: true } : test(next));
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
  const P = catalogue.popup;
  const orderHook = hook === 'order-select' || hook === 'order-sign';
  const fluidOrders = snapshot.draftOrders.filter((o) => o.selected && o.isFluid);
  if (orderHook && fluidOrders.length === 0) return []; // not a fluid bolus: no fluid card

  const failed = nothingToGoOn(advice, gathering);
  if (failed) {
    const missing = dataMissingLine(gathering, purposes, catalogue, false);
    return [
      {
        kind: 'assessment-gap',
        vars: { gapReason: clip(gatherWhy(failed), CLIENT_TEXT_MAX) },
        lines: [
          { text: fill(P.notAvailable, { reason: clip(gatherWhy(failed), CLIENT_TEXT_MAX) }), keep: true },
          ...(missing ? [missing] : []),
        ],
        suggestions: [],
      },
    ];
  }

  const r = advice.responsiveness?.value ?? 'unassessed';
  const t = advice.tolerance?.value ?? 'unassessed';
  const rec = advice.recommendation;
  const responsivenessPhrase = ph.responsiveness[r];
  const tolerancePhrase = ph.tolerance[t];
  const times: TimeWords = { zone: input.timeZone ?? 'UTC', at: snapshot.now, dateOnly: P.timeAssumed };
  const assumedRefs = new Set(snapshot.measurements.filter((m) => m.timeAssumed).map((m) => m.ref));

  const lines: DetailLine[] = questionLines(advice, catalogue);
  // One line per finding, a number that two questions used (a CVP) once, at most three.
  const findings = new Set<string>();
  for (const f of decidingFindings(advice)) {
    if (findings.size >= MAX_FINDINGS) break; // the lines below are not shown: not worded either
    const line = findingLine(f, snapshot, catalogue, times, assumedRefs);
    if (line) findings.add(line);
  }
  for (const f of findings) lines.push({ text: f, bullet: true, priority: 2 });
  const settle = settleLine(advice, catalogue);
  if (settle) lines.push({ text: settle, keep: true });
  const assumed = advice.responsiveness?.assumptions ?? [];
  if (assumed.length) lines.push({ text: fill(P.assumed, { what: assumed.join('; ') }), priority: 1 });
  for (const o of fluidOrders.filter((x) => x.volumeProblem)) {
    lines.push({ text: fill(P.orderProblem, { text: clip(`${o.display ?? 'IV fluid'}: ${o.volumeProblem ?? ''}`, 120) }), priority: 3 });
  }
  const missing = dataMissingLine(gathering, purposes, catalogue, true);
  if (missing) lines.push({ ...missing, priority: 3 });

  const headline = rec ? catalogue.headlines[rec.headline] : '';
  const quantity = advice.findings.flatMap((f) => (f.topic === 'tolerance' && f.status === 'assessed' && f.quantity ? [f.quantity] : []));
  const overload = quantity.find((q) => q.kind === 'fluid-overload-percent');
  const balanceQ = quantity.find((q) => q.kind === 'balance-ml');
  let balancePhrase = balanceQ
    ? fill(ph.balanceMl, { value: `${balanceQ.value >= 0 ? '+' : '−'}${Math.abs(Math.round(balanceQ.value))}` })
    : '';
  if (overload) balancePhrase = fill(ph.overloadPercent, { value: overload.value.toFixed(1) });
  const vars: Record<string, string> = {
    responsivenessPhrase,
    responsivenessPhraseLower: responsivenessPhrase.toLowerCase(),
    tolerancePhrase,
    tolerance: t,
    responsiveness: r,
    headline,
    balancePhrase,
    indicator: rec?.indicator ?? 'info',
  };
  const suggestions = orderHook ? suggestionsFor(advice, fluidOrders[0], catalogue, input.context, snapshot.now) : [];
  return [{ kind: orderHook ? 'bolus-review' : 'fluid-overview', vars, lines, suggestions, selectionBehavior: 'at-most-one' }];
}
