/**
 * Shared logic of the before/after tests (PLR, mini fluid challenge, end-expiratory occlusion, tidal volume
 * challenge). Each test kind lists the read-outs it accepts (what was measured), each with its threshold, whether
 * the boundary is ≥ or >, and its weight: flow read-outs (CO, CI, SV, VTI) are 'dynamic'; pressure surrogates
 * (pulse pressure) are weak and weighed as 'static'. Among fresh tests of one kind, a flow read-out is preferred,
 * then the newest.
 */
import type { DynamicMeasured, DynamicTestKind } from '../../fhir/codes.js';
import { absoluteChange, relativeChangePercent } from '../../physiology/dynamic-tests.js';
import type { DynamicTestResult } from '../../snapshot/types.js';
import type { Marker, ResponsivenessFinding } from '../common/finding.js';
import { ageMinutes, dynamicTestsOf, evidenceOfDynamicTest, judge, type Selection } from '../common/select.js';
import { displayUnit, fmt, signed } from '../common/text.js';
import type { RuleContext } from './context.js';
import { assessed, notAssessed, unusableFinding } from './finding.js';
import { conditionText, summarizeValidity, type Condition } from './heart-lung-validity.js';

export interface ReadOut {
  compare: 'relative' | 'absolute';
  threshold: number;
  /** true: change must be strictly above the threshold; false: at or above. */
  strict: boolean;
  /** Flow read-outs decide (dynamic); pressure surrogates only corroborate (static). */
  tier: 'dynamic' | 'static';
  /** Added to the text of weak read-outs. */
  note?: string;
  source: string;
}

export interface DynamicTestSpec {
  ruleId: string;
  marker: Marker;
  kind: DynamicTestKind;
  label: string;
  readOuts: Partial<Record<DynamicMeasured, ReadOut>>;
  /** Source of the test as a whole, for not-assessed findings. */
  source: string;
  /** Conditions that must all be met for the test to count (e.g. tidal volume challenge: controlled ventilation, sinus rhythm). */
  gate?: (ctx: RuleContext) => Condition[];
}

export const MEASURED_LABEL: Record<DynamicMeasured, string> = {
  cardiacOutput: 'cardiac output',
  cardiacIndex: 'cardiac index',
  strokeVolume: 'stroke volume',
  pulsePressure: 'pulse pressure',
  vti: 'VTI',
  ppv: 'PPV',
  svv: 'SVV',
};

function rank(spec: DynamicTestSpec, d: DynamicTestResult): number {
  const r = spec.readOuts[d.measured];
  if (r === undefined) return 2;
  return r.tier === 'dynamic' ? 0 : 1;
}

/**
 * Tests within the window and after the latest event: best read-out first, then newest (the order of
 * dynamicTestsOf is total). Otherwise the newest, judged (stale, or set aside by an event since).
 */
export function selectDynamicTest(ctx: RuleContext, spec: DynamicTestSpec): Selection<DynamicTestResult> {
  const windowMin = ctx.w.dynamicTestMin;
  const all = dynamicTestsOf(ctx.snapshot, spec.kind, ctx.now);
  const opts = { events: ctx.events };
  const usable = all.filter((d) => judge(d, ctx.now, windowMin, opts).state === 'fresh');
  const best = usable.map((d, i) => ({ d, i, r: rank(spec, d) })).sort((a, b) => a.r - b.r || a.i - b.i)[0];
  // A fresh test with no validated read-out decides nothing; a test with one that an event has set aside says more
  // (and names the event), so it is reported instead.
  if (best && best.r === 2) {
    const readable = all.find((d) => rank(spec, d) < 2);
    const judged = readable && judge(readable, ctx.now, windowMin, opts);
    if (judged && judged.state === 'set-aside') return judged;
  }
  if (best) return { state: 'fresh', item: best.d, ageMinutes: ageMinutes(best.d.effective, ctx.now), windowMin };
  return judge(all[0], ctx.now, windowMin, opts);
}

export function assessDynamicTest(ctx: RuleContext, spec: DynamicTestSpec): ResponsivenessFinding {
  const sel = selectDynamicTest(ctx, spec);
  if (sel.state !== 'fresh') {
    return unusableFinding(sel, {
      ruleId: spec.ruleId,
      marker: spec.marker,
      label: spec.label,
      source: spec.source,
      evidenceOf: (d) => evidenceOfDynamicTest(d, ctx.now),
    });
  }
  const f = judgeChosen(ctx, spec, sel.item);
  // A test with a better read-out that a later event set aside is why this one was used: the finding names that event.
  const better = ctx.events.length
    ? dynamicTestsOf(ctx.snapshot, spec.kind, ctx.now).find((x) => rank(spec, x) < rank(spec, sel.item))
    : undefined;
  const judged = better && judge(better, ctx.now, ctx.w.dynamicTestMin, { events: ctx.events });
  if (!judged || judged.state !== 'set-aside') return f;
  const { event } = judged;
  return {
    ...f,
    evidence: [...f.evidence, evidenceOfDynamicTest(judged.item, ctx.now), event.evidence, ...(event.previous ? [event.previous] : [])],
    betterSetAsideBy: event.text,
  };
}

function judgeChosen(ctx: RuleContext, spec: DynamicTestSpec, d: DynamicTestResult): ResponsivenessFinding {
  const mLabel = MEASURED_LABEL[d.measured];
  const readOut = spec.readOuts[d.measured];
  const ev = [evidenceOfDynamicTest(d, ctx.now)];
  const baseValues = { measured: d.measured, before: d.before, after: d.after, unit: d.unit, freshness: 'fresh' };
  if (readOut === undefined) {
    return notAssessed({
      ruleId: spec.ruleId,
      text: `${spec.label} by ${mLabel}: not assessed (not a validated read-out for this test)`,
      reason: `${spec.label} read by ${mLabel} has no validated threshold`,
      gap: 'invalid',
      marker: spec.marker,
      evidence: ev,
      source: spec.source,
      values: baseValues,
    });
  }
  const validity = spec.gate ? summarizeValidity(spec.gate(ctx)) : undefined;
  if (validity) {
    // The conditions the gate relied on are evidence of the result too, met or not.
    ev.push(...validity.evidence);
    if (validity.voiding.length) {
      return notAssessed({
        ruleId: spec.ruleId,
        marker: spec.marker,
        text: `${spec.label}: result shown but not used (${conditionText(validity.voiding)})`,
        reason: `outside validity: ${validity.voiding.map((c) => `${c.label} not met (${c.detail})`).join('; ')}`,
        gap: 'outside-validity',
        evidence: ev,
        source: readOut.source,
        values: { ...baseValues, ...validity.values },
      });
    }
  }
  let change: number;
  if (readOut.compare === 'relative') {
    if (!(d.before > 0)) {
      return notAssessed({
        ruleId: spec.ruleId,
        text: `${spec.label}: not assessed, invalid baseline ${mLabel} ${fmt(d.before, 2)} ${displayUnit(d.unit)}`,
        reason: `${spec.label} invalid: baseline must be positive`,
        gap: 'invalid',
        marker: spec.marker,
        evidence: ev,
        source: readOut.source,
        values: { ...baseValues, freshness: 'invalid' },
      });
    }
    change = relativeChangePercent(d.before, d.after);
  } else {
    if (d.unit !== '%') {
      return notAssessed({
        ruleId: spec.ruleId,
        text: `${spec.label}: not assessed, ${mLabel} in unit '${d.unit}' (expected %)`,
        reason: `${spec.label} invalid: unit '${d.unit}' is not %`,
        gap: 'invalid',
        marker: spec.marker,
        evidence: ev,
        source: readOut.source,
        values: { ...baseValues, freshness: 'invalid' },
      });
    }
    change = absoluteChange(d.before, d.after);
  }
  const positive = readOut.strict ? change > readOut.threshold : change >= readOut.threshold;
  const unitText = readOut.compare === 'relative' ? ' %' : ' points';
  const changeKey = readOut.compare === 'relative' ? 'changePercent' : 'changePoints';
  const thrText = `${readOut.strict ? '>' : '≥'} ${fmt(readOut.threshold, 1)}${unitText}`;
  const text =
    `${spec.label}: ${mLabel} ${fmt(d.before, 2)} → ${fmt(d.after, 2)} ${displayUnit(d.unit)} (${signed(change)}${unitText}; threshold ${thrText}): ` +
    `${positive ? 'points to' : 'points against'} fluid responsiveness${readOut.note ? `; ${readOut.note}` : ''}`;
  return assessed({
    ruleId: spec.ruleId,
    marker: spec.marker,
    direction: positive ? 'for' : 'against',
    tier: readOut.tier,
    text,
    evidence: ev,
    source: readOut.source,
    values: { ...baseValues, ...validity?.values, [changeKey]: Math.round(change * 100) / 100, threshold: readOut.threshold },
  });
}
