/**
 * Rule 'responsiveness.last-bolus': how the patient answered the most recent completed fluid bolus.
 * - Dense monitor data (flow readings no more than `denseMaxGapMin` apart, one within `flowBeforeStartMaxMin` before
 *   the start and one within `flowAfterEndMaxMin` after the end): the flow response is a fluid challenge read the
 *   way it was validated — it peaks about a minute after the end and fades within about 10 min (Aya HD et al., Crit
 *   Care Med 2016;44:880). A rise ≥ `bolusFlowRisePercent` → for, else against; dynamic tier.
 * - Otherwise, hourly charting: the MAP (measured, else from SBP/DBP) and heart rate charted before the start and
 *   after the end. MAP rise ≥ 5 mmHg with HR fall ≥ 5/min → for; neither → against; one → neutral. This is a weak
 *   static marker, not a response test (docs/clinical-logic), and the finding says so.
 * Not used when a vasoactive started, stopped or changed between the baseline and the response (confounder), or
 * when a later fluid or vasoactive change has made it old (set aside). Capillary refill, lactate and urine output
 * before/after are shown when present; they do not change the reading.
 */
import type { NumericKind } from '../../fhir/codes.js';
import { relativeChangePercent } from '../../physiology/dynamic-tests.js';
import type { FluidGiven, Measurement } from '../../snapshot/types.js';
import { mapPointEvidence, mapSeries } from '../common/blood-pressure.js';
import type { Evidence, Figures, ResponsivenessFinding } from '../common/finding.js';
import {
  ageMinutes,
  compareText,
  evidenceOfFluid,
  evidenceOfMeasurement,
  evidenceOfVasoactive,
  readings,
  timeMs,
  usableTime,
} from '../common/select.js';
import { fmt, signed } from '../common/text.js';
import { vasoactiveChangesBetween, vasoactivesAround } from '../common/vasoactive-changes.js';
import type { ResponsivenessRule, RuleContext } from './context.js';
import { assessed, notAssessed, ruleErrorFinding } from './finding.js';

export const LAST_BOLUS_RULE_ID = 'responsiveness.last-bolus';
const SOURCE_DENSE =
  'Flow response to a fluid challenge, read 1–5 min after its end: Aya HD et al., Crit Care Med 2016;44:880 (10 % rise from memory)';
const SOURCE_HOURLY =
  'MAP rise about 5–10 mmHg with falling heart rate after a bolus: common practice; an hourly pressure change is a weak static marker (Aya 2016: the flow response fades within ~10 min)';
const MIN_MS = 60_000;
const FLOW_KINDS: readonly NumericKind[] = ['cardiacOutput', 'cardiacIndex', 'strokeVolume'];

/** Completed boluses (volume and duration within the thresholds), newest end first. */
export function completedBoluses(ctx: RuleContext): FluidGiven[] {
  const { t, now } = ctx;
  return ctx.snapshot.fluids
    .filter((f) => {
      const s = timeMs(f.start);
      const e = timeMs(f.end);
      return (
        f.status === 'completed' &&
        Number.isFinite(s) &&
        usableTime(f.end, now) &&
        s <= e &&
        f.volumeMl >= t.bolusMinVolumeMl &&
        (e - s) / MIN_MS <= t.bolusMaxDurationMin
      );
    })
    .sort(
      (a, b) =>
        timeMs(b.end) - timeMs(a.end) ||
        timeMs(b.start) - timeMs(a.start) ||
        compareText(a.ref, b.ref) ||
        compareText(JSON.stringify(a), JSON.stringify(b)),
    );
}

interface FlowResponse {
  kind: NumericKind;
  before: Measurement;
  after: Measurement;
  changePercent: number;
  readings: Measurement[];
}

/** The dense flow response, when the monitor data allow it. */
function denseFlow(ctx: RuleContext, startMs: number, endMs: number): FlowResponse | undefined {
  const { t, now } = ctx;
  for (const kind of FLOW_KINDS) {
    const items = readings(ctx.snapshot, kind, now).items; // newest first
    const before = items.find((m) => {
      const ms = timeMs(m.effective);
      return ms <= startMs && ms >= startMs - t.flowBeforeStartMaxMin * MIN_MS;
    });
    const afters = items.filter((m) => {
      const ms = timeMs(m.effective);
      return ms > endMs && ms <= endMs + t.flowAfterEndMaxMin * MIN_MS;
    });
    if (!before || afters.length === 0 || !(before.value > 0)) continue;
    const after = afters.reduce((a, b) => (b.value > a.value ? b : a));
    const fromMs = timeMs(before.effective);
    const toMs = timeMs(after.effective);
    const span = items
      .filter((m) => {
        const ms = timeMs(m.effective);
        return ms >= fromMs && ms <= toMs;
      })
      .map((m) => timeMs(m.effective))
      .sort((a, b) => a - b);
    const dense = span.every((ms, i) => i === 0 || ms - (span[i - 1] as number) <= t.denseMaxGapMin * MIN_MS);
    if (!dense) continue;
    return {
      kind,
      before,
      after,
      changePercent: relativeChangePercent(before.value, after.value),
      readings: items.filter((m) => {
        const ms = timeMs(m.effective);
        return ms >= fromMs && ms <= toMs;
      }),
    };
  }
  return undefined;
}

function secondary(ctx: RuleContext, startMs: number, endMs: number): { text: string[]; values: Figures; evidence: Evidence[] } {
  const { now, snapshot: s } = ctx;
  const w = ctx.t.bolusSecondaryWindowMin * MIN_MS;
  const inPre = (ms: number) => ms >= startMs - w && ms <= startMs;
  const inPost = (ms: number) => ms > endMs && ms <= endMs + w;
  const text: string[] = [];
  const values: Figures = {};
  const evidence: Evidence[] = [];
  const pick = (kind: 'capillaryRefill' | 'lactate', label: string, unit: string, key: string) => {
    const items = readings(s, kind, now).items;
    const before = items.find((m) => inPre(timeMs(m.effective)));
    const after = items.find((m) => inPost(timeMs(m.effective)));
    if (!before || !after) return;
    text.push(`${label} ${fmt(before.value, 1)} → ${fmt(after.value, 1)} ${unit}`);
    values[`${key}Before`] = before.value;
    values[`${key}After`] = after.value;
    evidence.push(evidenceOfMeasurement(before, now), evidenceOfMeasurement(after, now));
  };
  pick('capillaryRefill', 'capillary refill', 's', 'capillaryRefillS');
  pick('lactate', 'lactate', 'mmol/L', 'lactateMmolL');
  return { text, values, evidence };
}

export const lastBolusRule: ResponsivenessRule = {
  id: LAST_BOLUS_RULE_ID,
  onError: ruleErrorFinding(LAST_BOLUS_RULE_ID, 'last-bolus'),
  run: (ctx): ResponsivenessFinding => {
    const { t, now } = ctx;
    const base = { ruleId: LAST_BOLUS_RULE_ID, marker: 'last-bolus' as const };
    const boluses = completedBoluses(ctx);
    const describe = `completed bolus (≥ ${fmt(t.bolusMinVolumeMl)} mL over ≤ ${t.bolusMaxDurationMin} min)`;
    const bolus = boluses.find((f) => ageMinutes(f.start, now) <= t.lastBolusLookbackMin);
    if (!bolus) {
      const old = boluses[0];
      if (old) {
        const age = ageMinutes(old.start, now);
        const why = `stale (started ${Math.round(age)} min ago, look-back ${t.lastBolusLookbackMin} min)`;
        return notAssessed({
          ...base,
          text: `Last fluid bolus: not assessed, ${why}`,
          reason: `last ${describe} ${why}`,
          gap: 'stale',
          evidence: [evidenceOfFluid(old, now)],
          source: SOURCE_HOURLY,
          values: { freshness: 'stale', ageMin: Math.round(age), windowMin: t.lastBolusLookbackMin },
        });
      }
      return notAssessed({
        ...base,
        text: 'Last fluid bolus: not assessed (none recorded)',
        reason: `no ${describe} started in the last ${t.lastBolusLookbackMin} min`,
        gap: 'missing',
        source: SOURCE_HOURLY,
        values: { freshness: 'missing', windowMin: t.lastBolusLookbackMin },
      });
    }

    const startMs = timeMs(bolus.start);
    const endMs = timeMs(bolus.end);
    const head = `Last bolus ${fmt(bolus.volumeMl)} mL${bolus.display ? ` ${bolus.display}` : ''} (ended ${Math.round(ageMinutes(bolus.end, now))} min ago)`;
    const values: Figures = { bolusVolumeMl: bolus.volumeMl, bolusEndedMinAgo: Math.round(ageMinutes(bolus.end, now)) };
    const later = ctx.events.find(
      (e) =>
        e.atMs > startMs &&
        e.evidence.ref !== bolus.ref &&
        !(e.kind === 'vasoactive-change' && e.atMs <= endMs + t.bolusPostWindowMin * MIN_MS),
    );
    if (later) {
      return notAssessed({
        ...base,
        text: `${head}: set aside, a later event (${later.text})`,
        reason: `the response to the last bolus no longer describes the patient: ${later.text} since`,
        gap: 'set-aside',
        evidence: [evidenceOfFluid(bolus, now), later.evidence],
        source: SOURCE_HOURLY,
        values,
      });
    }

    const flow = denseFlow(ctx, startMs, endMs);
    const spanTo = flow ? timeMs(flow.after.effective) : endMs + t.bolusPostWindowMin * MIN_MS;
    const spanFrom = flow ? timeMs(flow.before.effective) : startMs - t.bolusPreWindowMin * MIN_MS;
    const changes = vasoactiveChangesBetween(ctx.snapshot.vasoactives, spanFrom, spanTo);
    const vasoEvidence = vasoactivesAround(ctx.snapshot.vasoactives, spanFrom, spanTo).map((v) => evidenceOfVasoactive(v, now));
    if (changes.length) {
      const why = `confounded: ${changes.map((c) => `${c.drug.drug} ${c.kind} at ${c.at}`).join('; ')} between baseline and response`;
      return notAssessed({
        ...base,
        text: `${head}: response not used, ${why}`,
        reason: why,
        gap: 'confounded',
        evidence: [evidenceOfFluid(bolus, now), ...vasoEvidence],
        source: SOURCE_HOURLY,
        values: { ...values, confounded: true },
      });
    }

    if (flow) {
      const positive = flow.changePercent >= t.bolusFlowRisePercent;
      const labels: Partial<Record<NumericKind, string>> = { cardiacOutput: 'cardiac output', cardiacIndex: 'cardiac index' };
      const label = labels[flow.kind] ?? 'stroke volume';
      return assessed({
        ...base,
        direction: positive ? 'for' : 'against',
        tier: 'dynamic',
        text:
          `${head}: ${label} ${fmt(flow.before.value, 2)} → ${fmt(flow.after.value, 2)} (${signed(flow.changePercent)} %; threshold ≥ ${fmt(t.bolusFlowRisePercent, 1)} %, dense monitor data): ` +
          `${positive ? 'points to' : 'points against'} fluid responsiveness`,
        evidence: [evidenceOfFluid(bolus, now), ...flow.readings.map((m) => evidenceOfMeasurement(m, now)), ...vasoEvidence],
        source: SOURCE_DENSE,
        values: { ...values, flowChangePercent: Math.round(flow.changePercent * 10) / 10, dense: true },
      });
    }

    const preFrom = startMs - t.bolusPreWindowMin * MIN_MS;
    const postTo = endMs + t.bolusPostWindowMin * MIN_MS;
    const maps = mapSeries(ctx.snapshot, now); // newest first
    const mapPre = maps.find((p) => p.effectiveMs >= preFrom && p.effectiveMs <= startMs);
    const mapPost = [...maps].reverse().find((p) => p.effectiveMs > endMs && p.effectiveMs <= postTo);
    const hrs = readings(ctx.snapshot, 'heartRate', now).items;
    const hrPre = hrs.find((m) => {
      const ms = timeMs(m.effective);
      return ms >= preFrom && ms <= startMs;
    });
    const hrPost = [...hrs].reverse().find((m) => {
      const ms = timeMs(m.effective);
      return ms > endMs && ms <= postTo;
    });
    const evidence: Evidence[] = [
      evidenceOfFluid(bolus, now),
      ...[mapPre, mapPost].flatMap((p) => (p ? mapPointEvidence(p, now) : [])),
      ...[hrPre, hrPost].flatMap((m) => (m ? [evidenceOfMeasurement(m, now)] : [])),
      ...vasoEvidence,
    ];
    const short = [
      [mapPre, 'MAP before'],
      [mapPost, 'MAP after'],
      [hrPre, 'heart rate before'],
      [hrPost, 'heart rate after'],
    ]
      .filter(([x]) => x === undefined)
      .map(([, label]) => label as string);
    if (!mapPre || !mapPost || !hrPre || !hrPost) {
      const why = `too few readings (no ${short.join(', no ')}; windows ${t.bolusPreWindowMin} min before the start and ${t.bolusPostWindowMin} min after the end)`;
      return notAssessed({
        ...base,
        text: `${head}: response not used, ${why}`,
        reason: why,
        gap: 'too-few-readings',
        evidence,
        source: SOURCE_HOURLY,
        values,
      });
    }
    const dMap = mapPost.mapMmHg - mapPre.mapMmHg;
    const dHr = hrPost.value - hrPre.value;
    const mapUp = dMap >= t.bolusMapRiseMmHg;
    const hrDown = -dHr >= t.bolusHrFallPerMin;
    const extra = secondary(ctx, startMs, endMs);
    const changeText =
      `MAP ${fmt(mapPre.mapMmHg)} → ${fmt(mapPost.mapMmHg)} mmHg (${signed(dMap)}), HR ${fmt(hrPre.value)} → ${fmt(hrPost.value)}/min (${signed(dHr)})` +
      (extra.text.length ? `; ${extra.text.join('; ')}` : '');
    let direction: 'for' | 'against' | 'neutral' = mapUp === hrDown ? 'against' : 'neutral';
    if (mapUp && hrDown) direction = 'for';
    const reading = { for: 'read as a response', against: 'no response', neutral: 'partial response, inconclusive' }[direction];
    return assessed({
      ...base,
      direction,
      tier: 'static',
      text: `${head}: ${changeText}: ${reading} (hourly pressure change: a weak static marker, corroborates only)`,
      evidence: [...evidence, ...extra.evidence],
      source: SOURCE_HOURLY,
      values: {
        ...values,
        mapChangeMmHg: Math.round(dMap * 10) / 10,
        heartRateChangePerMin: Math.round(dHr * 10) / 10,
        dense: false,
        ...extra.values,
      },
    });
  },
};
