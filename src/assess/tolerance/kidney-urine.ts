/**
 * Rule tolerance.kidney-urine: KDIGO 2012 stage from urine output (Kidney Int Suppl 2012;2:1–138), in
 * mL/kg/h over trailing windows of 6, 12 and 24 h ending at the latest urine record, each counted only when
 * the charting covers it. An amount with a period covers that period; an amount charted at a time only
 * covers the interval since the previous urine record (at most `urinePointMaxGapMinutes`), and the first of
 * a run adds no time and no volume. Stage 1–2: moderate limit (less capacity to shed volume; oliguria may
 * also reflect low perfusion); stage 3: severe.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { coveredMs, volumeInWindowMl, withoutOverlaps, type VolumeRecord } from '../../physiology/fluid-balance.js';
import { kdigoStageFromUrineOutput, urineOutputMlPerKgPerHour, type UrineWindow } from '../../physiology/kdigo.js';
import type { Evidence, ToleranceFinding } from '../common/finding.js';
import { assessed, notAssessed, limitFrom } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { weightForPerKg } from './weights.js';
import { evidenceOfMeasurement, readingsOldestFirst, timeMs } from '../common/select.js';
import { ageText, fmt, round } from '../common/text.js';

export const KIDNEY_URINE = 'tolerance.kidney-urine';
const SOURCE =
  'KDIGO AKI guideline, Kidney Int Suppl 2012;2:1–138: stage 1 < 0.5 mL/kg/h for 6–12 h, stage 2 < 0.5 for ≥ 12 h, stage 3 < 0.3 for ≥ 24 h or anuria ≥ 12 h';
const WINDOWS_H = [6, 12, 24] as const;

interface UrineRec extends VolumeRecord {
  evidence: Evidence;
}

/** Urine records as intervals, point amounts placed after the previous record. */
export function urineIntervals(
  snapshot: PatientSnapshot,
  now: Date,
  maxGapMinutes: number,
): { intervals: UrineRec[]; unplaced: UrineRec[] } {
  const recs: UrineRec[] = readingsOldestFirst(snapshot, 'urineOutput', now).items.map((m) => {
    const endMs = timeMs(m.effective);
    const s = m.periodStart !== undefined ? timeMs(m.periodStart) : endMs;
    return {
      id: m.ref,
      volumeMl: m.value,
      startMs: Number.isFinite(s) && s <= endMs ? s : endMs,
      endMs,
      evidence: evidenceOfMeasurement(m, now),
    };
  });
  const kept = withoutOverlaps(recs).kept.sort(
    (a, b) => a.endMs - b.endMs || a.startMs - b.startMs || Number(a.id > b.id) - Number(a.id < b.id),
  );
  const intervals: UrineRec[] = [];
  const unplaced: UrineRec[] = [];
  let prev: { endMs: number; startMs: number; placed: boolean } | undefined;
  for (const r of kept) {
    let placed: UrineRec | undefined;
    if (r.endMs > r.startMs) placed = r;
    else if (prev && r.endMs === prev.endMs) {
      // A second amount at the same time as the previous record belongs to the same interval.
      if (prev.placed) placed = { ...r, startMs: prev.startMs };
    } else if (prev && r.endMs - prev.endMs <= maxGapMinutes * 60_000) placed = { ...r, startMs: prev.endMs };
    if (placed) intervals.push(placed);
    else unplaced.push(r);
    prev = { endMs: r.endMs, startMs: placed?.startMs ?? r.startMs, placed: placed !== undefined };
  }
  return { intervals, unplaced };
}

export function kidneyUrineRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): ToleranceFinding[] {
  const title = 'Urine output (KDIGO) not assessed';
  const weight = weightForPerKg(snapshot, now, t);
  const { intervals, unplaced } = urineIntervals(snapshot, now, t.urinePointMaxGapMinutes);
  if (intervals.length === 0) {
    const reason = unplaced.length > 0 ? 'urine amounts recorded without a period that can be placed in time' : 'no urine output recorded';
    return [
      notAssessed(
        KIDNEY_URINE,
        'kidneys',
        title,
        reason,
        SOURCE,
        unplaced.map((r) => r.evidence),
      ),
    ];
  }
  const endMs = Math.max(...intervals.map((r) => r.endMs));
  const sinceMin = (now.getTime() - endMs) / 60_000;
  if (sinceMin > t.urineRecencyMinutes) {
    return [
      notAssessed(
        KIDNEY_URINE,
        'kidneys',
        title,
        `the latest urine record ended ${ageText(sinceMin)} ago; older than ${ageText(t.urineRecencyMinutes)} does not count`,
        SOURCE,
      ),
    ];
  }
  if (!weight) return [notAssessed(KIDNEY_URINE, 'kidneys', title, 'no body weight recorded for mL/kg/h', SOURCE)];

  const kg = weight.m.value;
  const windows: Array<UrineWindow & { volumeMl: number; coveredHours: number }> = [];
  let widest: { hours: number; volumeMl: number; coveredHours: number } | undefined;
  for (const h of WINDOWS_H) {
    const fromMs = endMs - h * 3_600_000;
    const covered = coveredMs(intervals, fromMs, endMs) / 3_600_000;
    const volumeMl = volumeInWindowMl(intervals, fromMs, endMs);
    if (covered > 0) widest = { hours: h, volumeMl, coveredHours: covered };
    if (covered >= t.urineCoverageFraction * h) {
      windows.push({ hours: h, mlPerKgPerHour: urineOutputMlPerKgPerHour(volumeMl, kg, covered), volumeMl, coveredHours: covered });
    }
  }
  const used = intervals.filter((r) => r.endMs > endMs - 24 * 3_600_000).map((r) => r.evidence);
  const evidence = [...used, evidenceOfMeasurement(weight.m, now)];
  const stage = kdigoStageFromUrineOutput(windows);
  if (stage === undefined) {
    const rate = widest ? urineOutputMlPerKgPerHour(widest.volumeMl, kg, widest.coveredHours) : undefined;
    return [
      notAssessed(
        KIDNEY_URINE,
        'kidneys',
        title,
        `urine charted over ${fmt(widest?.coveredHours ?? 0, 1)} h only; KDIGO needs at least 6 h`,
        SOURCE,
        evidence,
        rate !== undefined ? { urineMlPerKgPerHour: round(rate, 2), coveredHours: round(widest!.coveredHours, 1) } : undefined,
      ),
    ];
  }
  // The window shown: the longest one that gives the stage (or the longest judged when stage 0).
  const shown = [...windows].reverse().find((w) => kdigoStageFromUrineOutput([w]) === stage) ?? windows.at(-1)!;
  const limit = limitFrom(stage, 3, 1);
  return [
    assessed({
      ruleId: KIDNEY_URINE,
      domain: 'kidneys',
      limit,
      text: `Urine output ${fmt(shown.mlPerKgPerHour, 2)} mL/kg/h over ${fmt(shown.hours)} h (${fmt(shown.volumeMl)} mL, ${fmt(kg, 1)} kg)${stage > 0 ? `: KDIGO stage ${stage} by urine output` : ''}`,
      values: {
        kdigoUrineStage: stage,
        urineMlPerKgPerHour: round(shown.mlPerKgPerHour, 3),
        windowHours: shown.hours,
        urineVolumeMl: round(shown.volumeMl, 0),
        weightKg: kg,
        weightBasis: weight.basis,
      },
      evidence,
      source: SOURCE,
    }),
  ];
}
