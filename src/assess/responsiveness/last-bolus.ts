/**
 * Rule 'responsiveness.last-bolus': how the patient answered the most recent completed fluid bolus.
 * Baseline = readings in the window before the bolus start; response = readings in the window after its end
 * (when a bolus has no duration, the instant of the bolus belongs to the baseline only). Median MAP (measured, else
 * from SBP/DBP) and median heart rate of each window are compared:
 *   MAP rise ≥ bolusMapRiseMmHg and HR fall ≥ bolusHrFallPerMin → for (read as a response);
 *   neither → against (no response); only one → neutral (partial).
 * Weighed as static: MAP and heart rate are surrogates of cardiac output. Not used when a window has too few
 * readings, or when a vasoactive was started, stopped or changed between the first and the last window (confounder).
 * Capillary refill, lactate and urine output before/after are shown when present; they do not change the reading.
 * Source: common practice (clinical-references §11).
 */
import type { Measurement } from '../../snapshot/types.js';
import type { Evidence, Finding } from '../types.js';
import { mapPointEvidence, mapSeries, type MapPoint } from './blood-pressure.js';
import type { ResponsivenessRule, RuleContext } from './context.js';
import { assessed, fmt, notAssessed, signed, type Values } from './finding.js';
import {
  ageMinutes, compareText, evidenceOfFluid, evidenceOfMeasurement, evidenceOfVasoactive, measurementsOf, timeMs, usableTime,
} from './select.js';
import { vasoactiveChangesBetween, vasoactivesAround } from './vasoactive-changes.js';

export const LAST_BOLUS_RULE_ID = 'responsiveness.last-bolus';
const SOURCE = 'Response to a fluid bolus, MAP rise about 5–10 mmHg with falling heart rate: common practice';
const MIN_MS = 60_000;

export function median(values: readonly number[]): number {
  const v = [...values].sort((a, b) => a - b);
  const mid = Math.floor(v.length / 2);
  if (v.length === 0) return Number.NaN;
  return v.length % 2 ? (v[mid] as number) : ((v[mid - 1] as number) + (v[mid] as number)) / 2;
}

interface Span { fromMs: number; toMs: number; openStart?: boolean }
const inSpan = (ms: number, s: Span) => (s.openStart ? ms > s.fromMs : ms >= s.fromMs) && ms <= s.toMs;

/** Completed boluses (volume and duration within the thresholds), newest end first. */
export function completedBoluses(ctx: RuleContext) {
  const { t, now } = ctx;
  return ctx.snapshot.fluids
    .filter((f) => {
      const s = timeMs(f.start);
      const e = timeMs(f.end);
      return f.status === 'completed' && Number.isFinite(s) && usableTime(f.end, now) && s <= e
        && f.volumeMl >= t.bolusMinVolumeMl && (e - s) / MIN_MS <= t.bolusMaxDurationMin;
    })
    .sort((a, b) => timeMs(b.end) - timeMs(a.end) || timeMs(b.start) - timeMs(a.start) || compareText(a.ref, b.ref)
      || compareText(JSON.stringify(a), JSON.stringify(b)));
}

function secondary(ctx: RuleContext, pre: Span, post: Span): { text: string[]; values: Values; evidence: Evidence[] } {
  const { now, snapshot: s } = ctx;
  const text: string[] = [];
  const values: Values = {};
  const evidence: Evidence[] = [];
  const pick = (kind: 'capillaryRefill' | 'lactate', label: string, unit: string, key: string) => {
    const items = measurementsOf(s, kind, now).items; // newest first
    const before = items.find((m) => inSpan(timeMs(m.effective), pre));
    const after = items.find((m) => inSpan(timeMs(m.effective), post));
    if (!before || !after) return;
    text.push(`${label} ${fmt(before.value)} → ${fmt(after.value)} ${unit}`);
    values[`${key}Before`] = before.value;
    values[`${key}After`] = after.value;
    evidence.push(evidenceOfMeasurement(before, now), evidenceOfMeasurement(after, now));
  };
  pick('capillaryRefill', 'capillary refill', 's', 'capillaryRefillS');
  pick('lactate', 'lactate', 'mmol/L', 'lactateMmolL');
  const urine = measurementsOf(s, 'urineOutput', now).items;
  const uBefore = urine.filter((m) => inSpan(timeMs(m.effective), pre));
  const uAfter = urine.filter((m) => inSpan(timeMs(m.effective), post));
  if (uBefore.length && uAfter.length) {
    const sum = (l: Measurement[]) => l.reduce((acc, m) => acc + m.value, 0);
    text.push(`urine ${fmt(sum(uBefore), 0)} → ${fmt(sum(uAfter), 0)} mL per ${ctx.t.bolusSecondaryWindowMin} min`);
    values.urineBeforeMl = sum(uBefore);
    values.urineAfterMl = sum(uAfter);
    evidence.push(...uBefore.map((m) => evidenceOfMeasurement(m, now)), ...uAfter.map((m) => evidenceOfMeasurement(m, now)));
  }
  return { text, values, evidence };
}

export const lastBolusRule: ResponsivenessRule = {
  id: LAST_BOLUS_RULE_ID,
  run: (ctx): Finding => {
    const { t, now } = ctx;
    const boluses = completedBoluses(ctx);
    const describe = `completed bolus (≥ ${fmt(t.bolusMinVolumeMl, 0)} mL over ≤ ${t.bolusMaxDurationMin} min)`;
    const recent = boluses.filter((f) => ageMinutes(f.start, now) <= t.lastBolusLookbackMin);
    const bolus = recent[0];
    if (!bolus) {
      const old = boluses[0];
      if (old) {
        const age = ageMinutes(old.start, now);
        const why = `stale (started ${Math.round(age)} min ago, look-back ${t.lastBolusLookbackMin} min)`;
        return notAssessed({
          ruleId: LAST_BOLUS_RULE_ID, text: `Last fluid bolus: not assessed, ${why}`, reason: `last ${describe} ${why}`,
          evidence: [evidenceOfFluid(old, now)], source: SOURCE, values: { freshness: 'stale', ageMin: Math.round(age), windowMin: t.lastBolusLookbackMin },
        });
      }
      return notAssessed({
        ruleId: LAST_BOLUS_RULE_ID, text: 'Last fluid bolus: not assessed (none recorded)',
        reason: `no ${describe} started in the last ${t.lastBolusLookbackMin} min`, source: SOURCE, values: { freshness: 'missing', windowMin: t.lastBolusLookbackMin },
      });
    }

    const startMs = timeMs(bolus.start);
    const endMs = timeMs(bolus.end);
    const pre: Span = { fromMs: startMs - t.bolusPreWindowMin * MIN_MS, toMs: startMs };
    const post: Span = { fromMs: endMs, toMs: endMs + t.bolusPostWindowMin * MIN_MS, openStart: endMs === startMs };
    const preSec: Span = { fromMs: startMs - t.bolusSecondaryWindowMin * MIN_MS, toMs: startMs };
    const postSec: Span = { fromMs: endMs, toMs: endMs + t.bolusSecondaryWindowMin * MIN_MS, openStart: endMs === startMs };

    const maps = mapSeries(ctx);
    const mapPre = maps.filter((p) => inSpan(p.effectiveMs, pre));
    const mapPost = maps.filter((p) => inSpan(p.effectiveMs, post));
    const hrs = measurementsOf(ctx.snapshot, 'heartRate', now).items;
    const hrPre = hrs.filter((m) => inSpan(timeMs(m.effective), pre));
    const hrPost = hrs.filter((m) => inSpan(timeMs(m.effective), post));

    const evidence: Evidence[] = [
      evidenceOfFluid(bolus, now),
      ...[...mapPre, ...mapPost].flatMap((p: MapPoint) => mapPointEvidence(p, now)),
      ...[...hrPre, ...hrPost].map((m) => evidenceOfMeasurement(m, now)),
    ];
    const head = `Last bolus ${fmt(bolus.volumeMl, 0)} mL${bolus.display ? ` ${bolus.display}` : ''} (ended ${Math.round(ageMinutes(bolus.end, now))} min ago)`;
    const values: Values = { bolusVolumeMl: bolus.volumeMl, bolusEndedMinAgo: Math.round(ageMinutes(bolus.end, now)) };

    const need = t.bolusMinPointsPerWindow;
    const short: string[] = [];
    for (const [label, n] of [['MAP before', mapPre.length], ['MAP after', mapPost.length], ['heart rate before', hrPre.length], ['heart rate after', hrPost.length]] as const) {
      if (n < need) short.push(`${label}: ${n} of ${need} readings`);
    }
    if (short.length === 0) {
      const dMap = median(mapPost.map((p) => p.mapMmHg)) - median(mapPre.map((p) => p.mapMmHg));
      const dHr = median(hrPost.map((m) => m.value)) - median(hrPre.map((m) => m.value));
      Object.assign(values, {
        mapBeforeMmHg: median(mapPre.map((p) => p.mapMmHg)), mapAfterMmHg: median(mapPost.map((p) => p.mapMmHg)),
        heartRateBeforePerMin: median(hrPre.map((m) => m.value)), heartRateAfterPerMin: median(hrPost.map((m) => m.value)),
        mapChangeMmHg: Math.round(dMap * 10) / 10, heartRateChangePerMin: Math.round(dHr * 10) / 10,
      });
    }

    const changes = vasoactiveChangesBetween(ctx.snapshot.vasoactives, pre.fromMs, post.toMs);
    // Every vasoactive the check looked at is cited, changed or not ("running unchanged" is evidence too).
    evidence.push(...vasoactivesAround(ctx.snapshot.vasoactives, pre.fromMs, post.toMs).map((v) => evidenceOfVasoactive(v, now)));
    if (changes.length || short.length) {
      const reasons: string[] = [];
      if (changes.length) {
        reasons.push(`confounded: ${changes.map((c) => `${c.drug.drug} ${c.kind} at ${c.at}`).join('; ')} between the windows`);
      }
      if (short.length) reasons.push(`too few readings (${short.join('; ')}; windows ${t.bolusPreWindowMin} min before the start and ${t.bolusPostWindowMin} min after the end)`);
      return notAssessed({
        ruleId: LAST_BOLUS_RULE_ID, text: `${head}: response not used, ${reasons.join('; ')}`, reason: reasons.join('; '),
        evidence, source: SOURCE, values: { ...values, freshness: 'fresh', ...(changes.length ? { confounded: true } : {}) },
      });
    }

    const dMap = values.mapChangeMmHg as number;
    const dHr = values.heartRateChangePerMin as number;
    const mapUp = dMap >= t.bolusMapRiseMmHg;
    const hrDown = -dHr >= t.bolusHrFallPerMin;
    const extra = secondary(ctx, preSec, postSec);
    evidence.push(...extra.evidence);
    const changeText = `MAP ${fmt(values.mapBeforeMmHg as number, 0)} → ${fmt(values.mapAfterMmHg as number, 0)} mmHg (${signed(dMap)}), `
      + `HR ${fmt(values.heartRateBeforePerMin as number, 0)} → ${fmt(values.heartRateAfterPerMin as number, 0)}/min (${signed(dHr)})`
      + (extra.text.length ? `; ${extra.text.join('; ')}` : '');
    const direction = mapUp && hrDown ? 'for' : !mapUp && !hrDown ? 'against' : 'neutral';
    const reading = direction === 'for' ? 'read as a response (static)'
      : direction === 'against' ? 'no response (static)' : 'partial response, inconclusive';
    return assessed({
      ruleId: LAST_BOLUS_RULE_ID, direction, weight: 'static', text: `${head}: ${changeText}: ${reading}`,
      evidence, source: SOURCE, values: { ...values, ...extra.values },
    });
  },
};
