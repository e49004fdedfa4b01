/**
 * Gathering intake and output for a balance window, with one source per side so that no volume is
 * counted twice:
 *   intake  — intake observations (fluidIntake) when any fall in the window, since they already include
 *             the administrations; otherwise the recorded administrations (snapshot.fluids);
 *   output  — output observations (fluidOutput) when any fall in the window, since urine is part of
 *             them; otherwise urine output alone (other losses then go uncounted, and the text says so);
 *   net     — where intake or output cannot be had, charted 24-h balances (fluidBalance), if any.
 * Records of one kind that overlap in time (a shift total beside its hourly amounts) are counted once.
 */
import type { NumericKind } from '../../fhir/codes.js';
import type { Measurement, PatientSnapshot } from '../../snapshot/types.js';
import { volumeInWindowMl, withoutOverlaps, type VolumeRecord } from '../../physiology/fluid-balance.js';
import type { Evidence } from '../types.js';
import { encounterStartMs } from './weights.js';
import { ageMinutesRounded, evidenceOfMeasurement, readingsOldestFirst, timeMs } from '../common/select.js';

/** LOINC 9097-7 is a 24-hour balance: without a period it covers the 24 h before its time. */
const BALANCE_DEFAULT_PERIOD_MS = 24 * 3_600_000;

export type IntakeSource = 'intake-observations' | 'administrations';
export type OutputSource = 'output-observations' | 'urine-observations';

export interface BalanceWindowResult {
  fromMs: number;
  toMs: number;
  balanceMl: number;
  intakeMl?: number;
  outputMl?: number;
  /** Plain name of the sources used, e.g. "intake observations − output observations". */
  source: string;
  intakeSource?: IntakeSource;
  outputSource?: OutputSource | 'balance-observations';
  /** Output from urine only: other losses not counted. */
  urineOnly: boolean;
  droppedOverlapping: number;
  /** End (ms) of the latest record used. */
  latestEndMs: number;
  evidence: Evidence[];
}

export type BalanceOutcome = { ok: true; result: BalanceWindowResult } | { ok: false; reason: string; staleEvidence?: Evidence[] };

interface Rec extends VolumeRecord {
  evidence: Evidence;
}

function measurementRecords(snapshot: PatientSnapshot, kind: NumericKind, now: Date): { kept: Rec[]; dropped: Rec[] } {
  const recs = readingsOldestFirst(snapshot, kind, now).items.map((m: Measurement): Rec => {
    const endMs = timeMs(m.effective);
    let startMs = m.periodStart !== undefined ? timeMs(m.periodStart) : endMs;
    if (!Number.isFinite(startMs) || startMs > endMs) startMs = endMs;
    if (kind === 'fluidBalance' && m.periodStart === undefined) startMs = endMs - BALANCE_DEFAULT_PERIOD_MS;
    return { id: m.ref, volumeMl: m.value, startMs, endMs, evidence: evidenceOfMeasurement(m, now) };
  });
  return withoutOverlaps(recs);
}

function administrationRecords(snapshot: PatientSnapshot, now: Date): Rec[] {
  const out: Rec[] = [];
  for (const f of snapshot.fluids) {
    const startMs = timeMs(f.start);
    let endMs = timeMs(f.end);
    if (!Number.isFinite(startMs) || !Number.isFinite(f.volumeMl) || f.volumeMl <= 0) continue;
    if (!Number.isFinite(endMs) || endMs < startMs) endMs = startMs;
    if (startMs > now.getTime()) continue;
    out.push({
      id: f.ref,
      volumeMl: f.volumeMl,
      startMs,
      endMs,
      evidence: {
        ref: f.ref,
        kind: `fluid:${f.fluidClass}`,
        value: f.volumeMl,
        unit: 'mL',
        effective: f.end,
        ageMinutes: ageMinutesRounded(f.end, now),
      },
    });
  }
  return out.sort((a, b) => a.endMs - b.endMs || Number(a.id > b.id) - Number(a.id < b.id));
}

function inWindow(recs: readonly Rec[], fromMs: number, toMs: number): Rec[] {
  return recs.filter((r) => (r.endMs > r.startMs ? r.startMs < toMs && r.endMs > fromMs : r.endMs > fromMs && r.endMs <= toMs));
}

/** Start of the cumulative window: the admission time, else the earliest intake/output record within the lookback. */
export function cumulativeStartMs(
  snapshot: PatientSnapshot,
  now: Date,
  lookbackHours: number,
): { ms: number; basis: 'admission' | 'earliest-record' } | undefined {
  const start = encounterStartMs(snapshot, now);
  if (start !== undefined) return { ms: start, basis: 'admission' };
  const lookbackFrom = now.getTime() - lookbackHours * 3_600_000;
  const all: Rec[] = [
    ...(['fluidIntake', 'fluidOutput', 'urineOutput', 'fluidBalance'] as const).flatMap((k) => measurementRecords(snapshot, k, now).kept),
    ...administrationRecords(snapshot, now),
  ].filter((r) => r.endMs > lookbackFrom);
  if (all.length === 0) return undefined;
  // The earliest record's own period belongs to the stay: start where that record starts (bounded by the lookback).
  return { ms: Math.max(lookbackFrom, Math.min(...all.map((r) => r.startMs)) - 1), basis: 'earliest-record' };
}

/** Balance over (fromMs, toMs], or why it cannot be had. `recencyMinutes`: the latest record used must be this recent. */
export function balanceOver(snapshot: PatientSnapshot, now: Date, fromMs: number, toMs: number, recencyMinutes: number): BalanceOutcome {
  const intakeObs = measurementRecords(snapshot, 'fluidIntake', now);
  const outputObs = measurementRecords(snapshot, 'fluidOutput', now);
  const urineObs = measurementRecords(snapshot, 'urineOutput', now);
  const balanceObs = measurementRecords(snapshot, 'fluidBalance', now);

  const intakeW = inWindow(intakeObs.kept, fromMs, toMs);
  const adminW = inWindow(administrationRecords(snapshot, now), fromMs, toMs);
  const outputW = inWindow(outputObs.kept, fromMs, toMs);
  const urineW = inWindow(urineObs.kept, fromMs, toMs);
  const balanceW = inWindow(balanceObs.kept, fromMs, toMs);

  // Overlapping records are reported only when they fall in the window (older ones do not concern it).
  const droppedIn = (d: Rec[]) => inWindow(d, fromMs, toMs).length;
  const firstWith = <S extends string>(...options: Array<{ recs: Rec[]; source: S; dropped: number }>) =>
    options.find((o) => o.recs.length > 0);
  const intake = firstWith(
    { recs: intakeW, source: 'intake-observations' as const, dropped: droppedIn(intakeObs.dropped) },
    { recs: adminW, source: 'administrations' as const, dropped: 0 },
  );
  const output = firstWith(
    { recs: outputW, source: 'output-observations' as const, dropped: droppedIn(outputObs.dropped) },
    { recs: urineW, source: 'urine-observations' as const, dropped: droppedIn(urineObs.dropped) },
  );

  let result: BalanceWindowResult | undefined;
  if (intake && output) {
    const intakeMl = volumeInWindowMl(intake.recs, fromMs, toMs);
    const outputMl = volumeInWindowMl(output.recs, fromMs, toMs);
    const used = [...intake.recs, ...output.recs];
    result = {
      fromMs,
      toMs,
      intakeMl,
      outputMl,
      balanceMl: intakeMl - outputMl,
      source: `${intake.source === 'intake-observations' ? 'intake observations' : 'recorded IV administrations'} − ${output.source === 'output-observations' ? 'output observations' : 'urine output only'}`,
      intakeSource: intake.source,
      outputSource: output.source,
      urineOnly: output.source === 'urine-observations',
      droppedOverlapping: intake.dropped + output.dropped,
      latestEndMs: Math.max(...used.map((r) => r.endMs)),
      evidence: used.map((r) => r.evidence),
    };
  } else if (balanceW.length > 0) {
    result = {
      fromMs,
      toMs,
      balanceMl: volumeInWindowMl(balanceW, fromMs, toMs),
      source: 'charted 24-h balances',
      outputSource: 'balance-observations',
      urineOnly: false,
      droppedOverlapping: droppedIn(balanceObs.dropped),
      latestEndMs: Math.max(...balanceW.map((r) => r.endMs)),
      evidence: balanceW.map((r) => r.evidence),
    };
  }
  if (!result) {
    let missing = 'no output recorded (no output or urine observations)';
    if (!intake) missing = output ? 'no intake recorded (no intake observations or IV administrations)' : 'no intake or output recorded';
    return { ok: false, reason: `${missing} in the window, and no charted balance` };
  }
  result.evidence.sort((a, b) => timeMs(a.effective) - timeMs(b.effective) || Number(a.ref > b.ref) - Number(a.ref < b.ref));
  if ((now.getTime() - result.latestEndMs) / 60_000 > recencyMinutes) {
    return {
      ok: false,
      reason: `the latest intake/output record ended ${Math.round((now.getTime() - result.latestEndMs) / 3_600_000)} h ago; charting older than ${Math.round(recencyMinutes / 60)} h leaves the balance unknown`,
      staleEvidence: result.evidence,
    };
  }
  return { ok: true, result };
}
