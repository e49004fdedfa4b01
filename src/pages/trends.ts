/**
 * The trend data of the reasoning page, from the record's stored snapshot (values in canonical UCUM units,
 * src/fhir/codes.ts KIND_UNITS): one shared time window of 12 h, or 24 h when there are older values in it, ending
 * shortly after the moment of the advice. Pure: snapshot and that moment in, rows out.
 */
import { balanceOver } from '../assess/tolerance/balance-data.js';
import { absoluteChange, relativeChangePercent } from '../physiology/dynamic-tests.js';
import type { Measurement, PatientSnapshot } from '../snapshot/types.js';

export type RowMark = 'line' | 'bar' | 'point' | 'draft';
export interface TrendRow {
  series: string;
  /** ISO instant (UTC) of the value; for a bar, its end. */
  t: string;
  /** For a bar over a period: its start. */
  t0?: string;
  value: number;
  unit: string;
  mark: RowMark;
  ref: string;
  note?: string;
}
export interface TrendPlot {
  id: string;
  title: string;
  /** One or two value axes: the series on each and the axis title. */
  axes: Array<{
    series: string[];
    title: string;
    /** The value axis spans at least this much, so that small wobbles look small. */ minSpan: number;
  }>;
  rows: TrendRow[];
}
export interface Trends {
  from: string;
  to: string;
  now: string;
  hours: 12 | 24;
  plots: TrendPlot[];
}

const HOUR = 3_600_000;
/**
 * A test read on PPV or SVV changes by percentage points (tidal volume challenge: absolute ΔPPV, Myatra SN et al.,
 * Crit Care Med 2017;45:415–421); one read on flow by % of the baseline (PLR, mini fluid challenge, end-expiratory
 * occlusion: physiology/dynamic-tests.ts).
 */
const ABSOLUTE = new Set(['ppv', 'svv']);
/** The axis ends this long after "now", so the draft bolus at now is not on the frame's edge. */
const AFTER_NOW_MS = 30 * 60_000;

const ms = (iso: string) => Date.parse(iso);
const round = (v: number, d = 1) => Math.round(v * 10 ** d) / 10 ** d;

function series(snap: PatientSnapshot, kind: Measurement['kind'], name: string, unit: string, fromMs: number, toMs: number): TrendRow[] {
  return snap.measurements
    .filter((m) => m.kind === kind && ms(m.effective) >= fromMs && ms(m.effective) <= toMs)
    .sort((a, b) => ms(a.effective) - ms(b.effective))
    .map((m) => ({ series: name, t: m.effective, value: round(m.value, 2), unit, mark: 'line' as const, ref: m.ref }));
}

/** Hourly rate of each charted urine amount that has a period: volume over the period's hours. */
function urineRate(snap: PatientSnapshot, fromMs: number, toMs: number): TrendRow[] {
  return snap.measurements
    .filter(
      (m) =>
        m.kind === 'urineOutput' &&
        m.periodStart &&
        ms(m.effective) > ms(m.periodStart) &&
        ms(m.effective) >= fromMs &&
        ms(m.effective) <= toMs,
    )
    .sort((a, b) => ms(a.effective) - ms(b.effective))
    .map((m) => ({
      series: 'Urine output',
      t: m.effective,
      t0: m.periodStart as string,
      value: round(m.value / ((ms(m.effective) - ms(m.periodStart as string)) / HOUR), 1),
      unit: 'mL/h',
      mark: 'bar' as const,
      ref: m.ref,
      note: `${round(m.value, 0)} mL over ${round((ms(m.effective) - ms(m.periodStart as string)) / 60_000, 0)} min`,
    }));
}

/**
 * Cumulative balance from the window's start, hour by hour up to the advice: the tolerance rules' own balance
 * (assess/tolerance/balance-data.ts: one source per side, so no volume is counted twice; charted intake or else
 * the administrations, charted output or else urine alone), each hour's value over (window start, that hour].
 */
function balance(snap: PatientSnapshot, fromMs: number, nowMs: number): TrendRow[] {
  const rows: TrendRow[] = [];
  const now = new Date(nowMs);
  const times: number[] = [];
  for (let t = fromMs + HOUR; t < nowMs; t += HOUR) times.push(t);
  times.push(nowMs);
  for (const t of times) {
    const b = balanceOver(snap, now, fromMs, t, Number.MAX_SAFE_INTEGER);
    if (b.ok)
      rows.push({
        series: 'Cumulative balance',
        t: new Date(t).toISOString(),
        value: round(b.result.balanceMl, 0),
        unit: 'mL',
        mark: 'line',
        ref: 'derived',
        note: b.result.source,
      });
  }
  return rows;
}

export function trendsOf(snap: PatientSnapshot, nowIso: string): Trends {
  const now = ms(nowIso);
  const times = [
    ...snap.measurements.map((m) => ms(m.effective)),
    ...snap.fluids.map((f) => ms(f.start)),
    ...snap.dynamicTests.map((d) => ms(d.effective)),
  ];
  const hours: 12 | 24 = times.some((t) => t < now - 12 * HOUR && t >= now - 24 * HOUR) ? 24 : 12;
  const fromMs = now - hours * HOUR;
  const toMs = now + AFTER_NOW_MS;
  const inWindow = (t: number) => t >= fromMs && t <= now;

  const fluids: TrendRow[] = snap.fluids
    .filter((f) => inWindow(ms(f.end)) || inWindow(ms(f.start)))
    .sort((a, b) => ms(a.start) - ms(b.start))
    .map((f) => ({
      series: 'Fluid given',
      t: f.end,
      t0: f.start,
      value: f.volumeMl,
      unit: 'mL',
      mark: 'bar' as const,
      ref: f.ref,
      note: f.display,
    }));
  for (const d of snap.draftOrders.filter((o) => o.isFluid && o.selected && o.volumeMl !== undefined)) {
    fluids.push({
      series: 'Draft bolus (now)',
      t: nowIso,
      value: d.volumeMl as number,
      unit: 'mL',
      mark: 'draft',
      ref: d.ref,
      ...(d.display ? { note: d.display } : {}),
    });
  }
  const dynamic: TrendRow[] = [
    ...snap.dynamicTests
      .filter((d) => inWindow(ms(d.effective)) && (ABSOLUTE.has(d.measured) || d.before > 0))
      .map((d) => ({
        series: 'Dynamic test',
        t: d.effective,
        mark: 'point' as const,
        ref: d.ref,
        note: `${d.kind} (${d.measured}) ${d.before} → ${d.after} ${d.unit}`,
        ...(ABSOLUTE.has(d.measured)
          ? { value: round(absoluteChange(d.before, d.after), 1), unit: 'points change' }
          : { value: round(relativeChangePercent(d.before, d.after), 1), unit: '% change' }),
      })),
    ...series(snap, 'ppv', 'PPV', '%', fromMs, now).map((r) => ({ ...r, mark: 'point' as const })),
    ...series(snap, 'svv', 'SVV', '%', fromMs, now).map((r) => ({ ...r, mark: 'point' as const })),
  ].sort((a, b) => ms(a.t) - ms(b.t));

  const plots: TrendPlot[] = [
    {
      id: 'map-hr',
      title: 'Mean arterial pressure and heart rate',
      axes: [{ series: ['MAP', 'Heart rate'], title: 'mmHg · beats/min', minSpan: 60 }],
      rows: [...series(snap, 'meanBp', 'MAP', 'mmHg', fromMs, now), ...series(snap, 'heartRate', 'Heart rate', '/min', fromMs, now)],
    },
    {
      id: 'cvp',
      title: 'Central venous pressure',
      axes: [{ series: ['CVP'], title: 'CVP, mmHg', minSpan: 16 }],
      rows: series(snap, 'cvp', 'CVP', 'mmHg', fromMs, now),
    },
    {
      id: 'lactate',
      title: 'Lactate',
      axes: [{ series: ['Lactate'], title: 'Lactate, mmol/L', minSpan: 4 }],
      rows: series(snap, 'lactate', 'Lactate', 'mmol/L', fromMs, now),
    },
    {
      id: 'urine-balance',
      title: 'Urine output per hour and cumulative balance',
      axes: [
        { series: ['Urine output'], title: 'Urine, mL/h', minSpan: 100 },
        { series: ['Cumulative balance'], title: 'Balance, mL', minSpan: 1000 },
      ],
      rows: [...urineRate(snap, fromMs, now), ...balance(snap, fromMs, now)],
    },
    {
      id: 'fluids',
      title: 'Fluids given and the draft bolus',
      axes: [{ series: ['Fluid given', 'Draft bolus (now)'], title: 'Volume, mL', minSpan: 500 }],
      rows: fluids,
    },
    {
      id: 'dynamic',
      title: 'Dynamic tests, PPV and SVV',
      axes: [{ series: ['Dynamic test', 'PPV', 'SVV'], title: '%; change in a test', minSpan: 20 }],
      rows: dynamic,
    },
  ];
  return { from: new Date(fromMs).toISOString(), to: new Date(toMs).toISOString(), now: nowIso, hours, plots };
}
