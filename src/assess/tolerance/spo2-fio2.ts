/**
 * Rules tolerance.spo2-fio2 and tolerance.spo2-fio2-trend. SpO2/FiO2 (FiO2 as a fraction) is a
 * non-invasive stand-in for PaO2/FiO2: 235 ≈ P/F 200 (Rice TW et al., Chest 2007 — from memory).
 * A low ratio means little reserve against more lung water: a moderate limit. A ratio falling by ≥ 20 %
 * over the last hours (common practice) is a moderate limit and a sign that volume may be doing harm.
 * Above SpO2 97 % the ratio understates oxygenation (flat part of the dissociation curve), so a low ratio
 * there proves nothing and a fall to such a value is not called a fall.
 */
import type { Measurement, PatientSnapshot } from '../../snapshot/types.js';
import { relativeFallPercent, spo2Fio2Ratio } from '../../physiology/oxygenation.js';
import type { ToleranceFinding } from '../common/finding.js';
import { unusableReason } from '../common/finding.js';
import { DEFAULT_WINDOWS, type Windows } from '../common/windows.js';
import { assessed, notAssessed } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { CLOCK_SKEW_MIN, ageMinutesRounded, evidenceOfMeasurement, latestReading, readingsOldestFirst, timeMs } from '../common/select.js';
import { ageText, fmt, round } from '../common/text.js';

export const SPO2_FIO2 = 'tolerance.spo2-fio2';
export const SPO2_FIO2_TREND = 'tolerance.spo2-fio2-trend';
const SOURCE =
  'SpO2/FiO2 (FiO2 as a fraction); 235 ≈ PaO2/FiO2 200, valid for SpO2 ≤ 97 %: Rice TW et al., Chest 2007;132:410 (from memory)';
const TREND_SOURCE = `${SOURCE}; a fall ≥ 20 % over the last hours as a warning sign (common practice)`;

export interface Spo2Fio2Pair {
  spo2: Measurement;
  fio2: Measurement;
  ratio: number;
  timeMs: number;
}

/**
 * Each SpO2 with the FiO2 in force at its time: the latest FiO2 charted at or before it (up to the clock skew after
 * it), carried forward until changed for at most `carryForwardMinutes` (docs/clinical-logic: FiO2 is charted when it changes).
 */
export function spo2Fio2Pairs(snapshot: PatientSnapshot, now: Date, carryForwardMinutes: number): Spo2Fio2Pair[] {
  const fio2 = readingsOldestFirst(snapshot, 'fio2', now).items;
  const pairs: Spo2Fio2Pair[] = [];
  for (const s of readingsOldestFirst(snapshot, 'spo2', now).items) {
    const sMs = timeMs(s.effective);
    let best: Measurement | undefined;
    for (const f of fio2) if (timeMs(f.effective) <= sMs + CLOCK_SKEW_MIN * 60_000) best = f;
    if (best && sMs - timeMs(best.effective) <= carryForwardMinutes * 60_000)
      pairs.push({ spo2: s, fio2: best, ratio: spo2Fio2Ratio(s.value, best.value), timeMs: sMs });
  }
  return pairs;
}

function latestFreshPair(pairs: Spo2Fio2Pair[], now: Date, t: ToleranceThresholds): Spo2Fio2Pair | undefined {
  const last = pairs.at(-1);
  return last && ageMinutesRounded(last.spo2.effective, now) <= t.oxygenationFreshMinutes ? last : undefined;
}

function missingReason(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds, w: Windows): string {
  const spo2 = latestReading(snapshot, 'spo2', now, t.oxygenationFreshMinutes);
  if (spo2.state !== 'fresh') return unusableReason(spo2, 'SpO2');
  const fio2 = latestReading(snapshot, 'fio2', now, Number.MAX_SAFE_INTEGER);
  if (fio2.state !== 'fresh') return unusableReason(fio2, 'FiO2');
  return `no FiO2 charted in the ${ageText(w.fio2CarryForwardMin)} before a recent SpO2`;
}

export function spo2Fio2Rule(
  snapshot: PatientSnapshot,
  now: Date,
  t: ToleranceThresholds,
  w: Windows = DEFAULT_WINDOWS,
): ToleranceFinding[] {
  const pair = latestFreshPair(spo2Fio2Pairs(snapshot, now, w.fio2CarryForwardMin), now, t);
  if (!pair) return [notAssessed(SPO2_FIO2, 'lungs', 'SpO2/FiO2 not assessed', missingReason(snapshot, now, t, w), SOURCE)];
  const plateau = pair.spo2.value > t.spo2PlateauPercent;
  const low = pair.ratio < t.spo2Fio2LowRatio;
  const base = `SpO2/FiO2 ${fmt(pair.ratio)} (SpO2 ${fmt(pair.spo2.value)} % on FiO2 ${fmt(pair.fio2.value)} %)`;
  const evidence = [evidenceOfMeasurement(pair.fio2, now), evidenceOfMeasurement(pair.spo2, now)];
  const values = {
    spo2Fio2Ratio: round(pair.ratio, 1),
    spo2Percent: pair.spo2.value,
    fio2Percent: pair.fio2.value,
    spo2OnPlateau: plateau,
  };
  if (plateau && low) {
    return [
      assessed({
        ruleId: SPO2_FIO2,
        domain: 'lungs',
        limit: 'none',
        context: true,
        text: `${base}: not interpretable with SpO2 > ${t.spo2PlateauPercent} %`,
        values,
        evidence,
        source: SOURCE,
      }),
    ];
  }
  return [
    assessed({
      ruleId: SPO2_FIO2,
      domain: 'lungs',
      limit: low ? 'moderate' : 'none',
      text: low ? `${base}, below ${t.spo2Fio2LowRatio} (about PaO2/FiO2 200)` : base,
      values,
      evidence,
      source: SOURCE,
    }),
  ];
}

export function spo2Fio2TrendRule(
  snapshot: PatientSnapshot,
  now: Date,
  t: ToleranceThresholds,
  w: Windows = DEFAULT_WINDOWS,
): ToleranceFinding[] {
  const title = 'SpO2/FiO2 trend not assessed';
  const pairs = spo2Fio2Pairs(snapshot, now, w.fio2CarryForwardMin);
  const latest = latestFreshPair(pairs, now, t);
  if (!latest) return [notAssessed(SPO2_FIO2_TREND, 'lungs', title, missingReason(snapshot, now, t, w), TREND_SOURCE)];
  const earliest = pairs.find(
    (p) => p.timeMs >= latest.timeMs - t.trendWindowMinutes * 60_000 && p.timeMs <= latest.timeMs - t.trendMinSpanMinutes * 60_000,
  );
  if (!earliest) {
    return [
      notAssessed(
        SPO2_FIO2_TREND,
        'lungs',
        title,
        `no earlier SpO2/FiO2 between ${ageText(t.trendWindowMinutes)} and ${ageText(t.trendMinSpanMinutes)} before the latest`,
        TREND_SOURCE,
        [evidenceOfMeasurement(latest.spo2, now)],
      ),
    ];
  }
  const fall = relativeFallPercent(earliest.ratio, latest.ratio);
  const latestOnPlateau = latest.spo2.value > t.spo2PlateauPercent;
  const falling = fall >= t.spo2Fio2FallPercent && !latestOnPlateau;
  const span = ageText((latest.timeMs - earliest.timeMs) / 60_000);
  let move = fall > 0 ? `fell ${fmt(fall)} %` : 'unchanged';
  if (fall < 0) move = `rose ${fmt(-fall)} %`;
  return [
    assessed({
      ruleId: SPO2_FIO2_TREND,
      domain: 'lungs',
      limit: falling ? 'moderate' : 'none',
      congestionSign: falling,
      text: `SpO2/FiO2 ${fmt(earliest.ratio)} → ${fmt(latest.ratio)} over ${span} (${move})${falling ? ': falling oxygenation' : ''}`,
      values: {
        earlierRatio: round(earliest.ratio, 1),
        latestRatio: round(latest.ratio, 1),
        fallPercent: round(fall, 1),
        spanMinutes: round((latest.timeMs - earliest.timeMs) / 60_000, 0),
        falling,
      },
      evidence: [
        evidenceOfMeasurement(earliest.fio2, now),
        evidenceOfMeasurement(earliest.spo2, now),
        evidenceOfMeasurement(latest.fio2, now),
        evidenceOfMeasurement(latest.spo2, now),
      ],
      source: TREND_SOURCE,
    }),
  ];
}
