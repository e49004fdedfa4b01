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
import type { Finding } from '../types.js';
import type { RuleContext } from './context.js';
import { assessed, displayUnit, fmt, notAssessed, signed, unusableFinding } from './finding.js';
import { summarizeValidity, type Condition } from './heart-lung-validity.js';
import { ageMinutes, dynamicTestsOf, evidenceOfDynamicTest, type Selection } from './select.js';

export interface ReadOut {
  compare: 'relative' | 'absolute';
  threshold: number;
  /** true: change must be strictly above the threshold; false: at or above. */
  strict: boolean;
  weight: 'dynamic' | 'static';
  /** Added to the text of weak read-outs. */
  note?: string;
  source: string;
}

export interface DynamicTestSpec {
  ruleId: string;
  kind: DynamicTestKind;
  label: string;
  readOuts: Partial<Record<DynamicMeasured, ReadOut>>;
  /** Source of the test as a whole, for not-assessed findings. */
  source: string;
  /** Conditions that must all be met for the test to count (e.g. tidal volume challenge: controlled ventilation, sinus rhythm). */
  gate?: (ctx: RuleContext) => Condition[];
}

export const MEASURED_LABEL: Record<DynamicMeasured, string> = {
  cardiacOutput: 'cardiac output', cardiacIndex: 'cardiac index', strokeVolume: 'stroke volume',
  pulsePressure: 'pulse pressure', vti: 'VTI', ppv: 'PPV', svv: 'SVV',
};

function rank(spec: DynamicTestSpec, d: DynamicTestResult): number {
  const r = spec.readOuts[d.measured];
  return r === undefined ? 2 : r.weight === 'dynamic' ? 0 : 1;
}

/** Fresh tests: best read-out first, then newest (the order of dynamicTestsOf is total). Otherwise the newest, stale. */
export function selectDynamicTest(ctx: RuleContext, spec: DynamicTestSpec): Selection<DynamicTestResult> {
  const windowMin = ctx.t.dynamicTestMaxAgeMin;
  const all = dynamicTestsOf(ctx.snapshot, spec.kind, ctx.now);
  const fresh = all.filter((d) => ageMinutes(d.effective, ctx.now) <= windowMin);
  const best = fresh.map((d, i) => ({ d, i, r: rank(spec, d) })).sort((a, b) => a.r - b.r || a.i - b.i)[0];
  if (best) return { state: 'fresh', item: best.d, ageMinutes: ageMinutes(best.d.effective, ctx.now), windowMin };
  const newest = all[0];
  if (newest) return { state: 'stale', item: newest, ageMinutes: ageMinutes(newest.effective, ctx.now), windowMin };
  return { state: 'missing', windowMin };
}

export function assessDynamicTest(ctx: RuleContext, spec: DynamicTestSpec): Finding {
  const sel = selectDynamicTest(ctx, spec);
  if (sel.state !== 'fresh') {
    return unusableFinding(sel, { ruleId: spec.ruleId, label: spec.label, source: spec.source, evidenceOf: (d) => evidenceOfDynamicTest(d, ctx.now) });
  }
  const d = sel.item;
  const mLabel = MEASURED_LABEL[d.measured];
  const readOut = spec.readOuts[d.measured];
  const ev = [evidenceOfDynamicTest(d, ctx.now)];
  const baseValues = { measured: d.measured, before: d.before, after: d.after, unit: d.unit, freshness: 'fresh' };
  if (readOut === undefined) {
    return notAssessed({
      ruleId: spec.ruleId, text: `${spec.label} by ${mLabel}: not assessed (not a validated read-out for this test)`,
      reason: `${spec.label} read by ${mLabel} has no validated threshold`, evidence: ev, source: spec.source, values: baseValues,
    });
  }
  const validity = spec.gate ? summarizeValidity(spec.gate(ctx)) : undefined;
  if (validity) {
    // The conditions the gate relied on are evidence of the result too, met or not.
    ev.push(...validity.evidence);
    if (validity.state !== 'met') {
      return notAssessed({
        ruleId: spec.ruleId, text: `${spec.label}: result shown but not used (${validity.failed.length ? 'outside validity' : 'validity could not be checked'})`,
        reason: validity.reason, evidence: ev, source: readOut.source,
        values: { ...baseValues, ...validity.values, validity: validity.state },
      });
    }
  }
  let change: number;
  if (readOut.compare === 'relative') {
    if (!(d.before > 0)) {
      return notAssessed({
        ruleId: spec.ruleId, text: `${spec.label}: not assessed, invalid baseline ${mLabel} ${fmt(d.before, 2)} ${displayUnit(d.unit)}`,
        reason: `${spec.label} invalid: baseline must be positive`, evidence: ev, source: readOut.source, values: { ...baseValues, freshness: 'invalid' },
      });
    }
    change = relativeChangePercent(d.before, d.after);
  } else {
    if (d.unit !== '%') {
      return notAssessed({
        ruleId: spec.ruleId, text: `${spec.label}: not assessed, ${mLabel} in unit '${d.unit}' (expected %)`,
        reason: `${spec.label} invalid: unit '${d.unit}' is not %`, evidence: ev, source: readOut.source, values: { ...baseValues, freshness: 'invalid' },
      });
    }
    change = absoluteChange(d.before, d.after);
  }
  const positive = readOut.strict ? change > readOut.threshold : change >= readOut.threshold;
  const unitText = readOut.compare === 'relative' ? ' %' : ' points';
  const changeKey = readOut.compare === 'relative' ? 'changePercent' : 'changePoints';
  const thrText = `${readOut.strict ? '>' : '≥'} ${fmt(readOut.threshold)}${unitText}`;
  const text = `${spec.label}: ${mLabel} ${fmt(d.before, 2)} → ${fmt(d.after, 2)} ${displayUnit(d.unit)} (${signed(change)}${unitText}; threshold ${thrText}): `
    + `${positive ? 'points to' : 'points against'} fluid responsiveness${readOut.note ? `; ${readOut.note}` : ''}`;
  return assessed({
    ruleId: spec.ruleId, direction: positive ? 'for' : 'against', weight: readOut.weight, text, evidence: ev, source: readOut.source,
    values: {
      ...baseValues, ...validity?.values, [changeKey]: Math.round(change * 100) / 100, threshold: readOut.threshold,
      ...(validity ? { validity: validity.state } : {}), ...(readOut.weight === 'static' ? { weak: true } : {}),
    },
  });
}
