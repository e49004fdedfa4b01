/**
 * Rule tolerance.abdominal-pressure: intra-abdominal hypertension (WSACS 2013, Kirkpatrick AW et al.,
 * Intensive Care Med 2013;39:1190). IAP ≥ 12 mmHg is IAH: grades I–II a moderate limit, III–IV (> 20 mmHg,
 * the pressure of abdominal compartment syndrome) severe, since volume raises IAP further. Abdominal
 * perfusion pressure (MAP − IAP) and filtration gradient (MAP − 2·IAP) are given when a MAP is at hand.
 *
 * MAP: the measured mean pressure nearest the IAP; otherwise estimated from SBP and DBP charted together
 * (physiology/mean-arterial-pressure.ts, the conventional approximation).
 */
import type { Measurement, PatientSnapshot } from '../../snapshot/types.js';
import { meanArterialPressureMmHg } from '../../physiology/mean-arterial-pressure.js';
import { abdominalPerfusionPressure, filtrationGradient, iahGrade, iahGradeLabel } from '../../physiology/intra-abdominal-pressure.js';
import type { Evidence, ToleranceFinding } from '../common/finding.js';
import { assessed, unusableTolerance, limitFrom } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { DEFAULT_WINDOWS, type Windows } from '../common/windows.js';
import { evidenceOfMeasurement, latestReading, readingsOldestFirst, timeMs } from '../common/select.js';
import { fmt, round } from '../common/text.js';

export const ABDOMINAL_PRESSURE = 'tolerance.abdominal-pressure';
const SOURCE =
  'WSACS 2013 (Kirkpatrick AW et al., Intensive Care Med 2013;39:1190, doi 10.1007/s00134-013-2906-z): IAH ≥ 12 mmHg, grades I 12–15, II 16–20, III 21–25, IV > 25; APP = MAP − IAP; FG = MAP − 2·IAP';

function nearest(items: Measurement[], atMs: number, withinMs: number): Measurement | undefined {
  let best: Measurement | undefined;
  let gap = Infinity;
  for (const m of items) {
    const d = Math.abs(timeMs(m.effective) - atMs);
    if (d < gap) {
      best = m;
      gap = d;
    }
  }
  return best && gap <= withinMs ? best : undefined;
}

/** MAP near a time: measured, else from systolic and diastolic charted together (conventional approximation). */
function mapNear(
  snapshot: PatientSnapshot,
  now: Date,
  atMs: number,
  withinMs: number,
): { mapMmHg: number; measured: boolean; evidence: Evidence[] } | undefined {
  const measured = nearest(readingsOldestFirst(snapshot, 'meanBp', now).items, atMs, withinMs);
  if (measured) return { mapMmHg: measured.value, measured: true, evidence: [evidenceOfMeasurement(measured, now)] };
  const sbp = nearest(readingsOldestFirst(snapshot, 'systolicBp', now).items, atMs, withinMs);
  if (!sbp) return undefined;
  const dbp = nearest(readingsOldestFirst(snapshot, 'diastolicBp', now).items, timeMs(sbp.effective), 5 * 60_000);
  if (!dbp || sbp.value < dbp.value) return undefined;
  return {
    mapMmHg: meanArterialPressureMmHg(sbp.value, dbp.value),
    measured: false,
    evidence: [evidenceOfMeasurement(sbp, now), evidenceOfMeasurement(dbp, now)],
  };
}

export function abdominalPressureRule(
  snapshot: PatientSnapshot,
  now: Date,
  t: ToleranceThresholds,
  w: Windows = DEFAULT_WINDOWS,
): ToleranceFinding[] {
  const pick = latestReading(snapshot, 'intraAbdominalPressure', now, w.intraAbdominalPressureMin);
  if (pick.state !== 'fresh') {
    return [
      unusableTolerance(pick, { ruleId: ABDOMINAL_PRESSURE, domain: 'abdomen', label: 'Intra-abdominal pressure', source: SOURCE, now }),
    ];
  }
  const iap = pick.item.value;
  const grade = iahGrade(iap, t.iahMmHg);
  const limit = limitFrom(grade, t.iahSevereGrade, 1);
  const map = mapNear(snapshot, now, timeMs(pick.item.effective), t.mapPairMinutes * 60_000);
  const values: Record<string, number | string | boolean> = { iapMmHg: iap, iahGrade: grade };
  let perfusion = '';
  if (map) {
    const app = abdominalPerfusionPressure(map.mapMmHg, iap);
    const fg = filtrationGradient(map.mapMmHg, iap);
    Object.assign(values, {
      mapMmHg: round(map.mapMmHg, 1),
      mapMeasured: map.measured,
      appMmHg: round(app, 1),
      filtrationGradientMmHg: round(fg, 1),
    });
    perfusion = `; APP ${fmt(app)} mmHg, filtration gradient ${fmt(fg)} mmHg (MAP ${fmt(map.mapMmHg)}${map.measured ? '' : ', from SBP/DBP'})`;
  }
  return [
    assessed({
      ruleId: ABDOMINAL_PRESSURE,
      domain: 'abdomen',
      limit,
      text: `Intra-abdominal pressure ${fmt(iap)} mmHg${grade > 0 ? `: IAH grade ${iahGradeLabel(grade)}` : ''}${perfusion}`,
      values,
      evidence: [evidenceOfMeasurement(pick.item, now), ...(map?.evidence ?? [])],
      source: SOURCE,
    }),
  ];
}
