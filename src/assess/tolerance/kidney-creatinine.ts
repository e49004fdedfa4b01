/**
 * Rule tolerance.kidney-creatinine: KDIGO 2012 stage from serum creatinine (Kidney Int Suppl 2012;2:1–138):
 * the latest value against the lowest in the preceding 48 h (rise ≥ 0.3 mg/dL) and 7 days (ratio ≥ 1.5).
 * Any stage is a moderate limit: injured kidneys shed volume less well.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { kdigoStageFromCreatinine } from '../../physiology/kdigo.js';
import type { ToleranceFinding } from '../common/finding.js';
import { assessed, notAssessed, unusableTolerance } from './finding.js';
import { DEFAULT_WINDOWS, type Windows } from '../common/windows.js';
import type { ToleranceThresholds } from './thresholds.js';
import { evidenceOfMeasurement, latestReading, readingsOldestFirst, timeMs } from '../common/select.js';
import { fmt, round } from '../common/text.js';

export const KIDNEY_CREATININE = 'tolerance.kidney-creatinine';
const SOURCE =
  'KDIGO AKI guideline, Kidney Int Suppl 2012;2:1–138: rise ≥ 0.3 mg/dL in 48 h or ≥ 1.5× baseline in 7 days; stage 2 ≥ 2.0×, stage 3 ≥ 3.0× or ≥ 4.0 mg/dL';

export function kidneyCreatinineRule(
  snapshot: PatientSnapshot,
  now: Date,
  _t: ToleranceThresholds,
  w: Windows = DEFAULT_WINDOWS,
): ToleranceFinding[] {
  const title = 'Creatinine (KDIGO) not assessed';
  const pick = latestReading(snapshot, 'creatinine', now, w.creatinineMin);
  if (pick.state !== 'fresh')
    return [unusableTolerance(pick, { ruleId: KIDNEY_CREATININE, domain: 'kidneys', label: 'Creatinine (KDIGO)', source: SOURCE, now })];
  const latest = pick.item;
  const atMs = timeMs(latest.effective);
  const earlier = readingsOldestFirst(snapshot, 'creatinine', now).items.filter((m) => timeMs(m.effective) < atMs);
  const lowestSince = (hours: number) =>
    earlier
      .filter((m) => timeMs(m.effective) >= atMs - hours * 3_600_000)
      .reduce<typeof latest | undefined>((a, b) => (a === undefined || b.value < a.value ? b : a), undefined);
  const low48 = lowestSince(48);
  const low7d = lowestSince(168);
  if (!low7d) {
    return [
      notAssessed(
        KIDNEY_CREATININE,
        'kidneys',
        title,
        'no earlier creatinine in the 7 days before the latest to compare with',
        SOURCE,
        [evidenceOfMeasurement(latest, now)],
        { creatinineMgDl: latest.value },
      ),
    ];
  }
  const stage = kdigoStageFromCreatinine({ currentMgDl: latest.value, lowest48hMgDl: low48?.value, lowest7dMgDl: low7d.value });
  const ratio = latest.value / low7d.value;
  const evidence = [
    evidenceOfMeasurement(low7d, now),
    ...(low48 && low48 !== low7d ? [evidenceOfMeasurement(low48, now)] : []),
    evidenceOfMeasurement(latest, now),
  ];
  return [
    assessed({
      ruleId: KIDNEY_CREATININE,
      domain: 'kidneys',
      limit: stage >= 1 ? 'moderate' : 'none',
      text: `Creatinine ${fmt(latest.value, 2)} mg/dL, ${fmt(ratio, 1)}× the lowest of 7 days (${fmt(low7d.value, 2)})${stage > 0 ? `: KDIGO stage ${stage} by creatinine` : ''}`,
      values: {
        kdigoCreatinineStage: stage,
        creatinineMgDl: latest.value,
        lowest7dMgDl: low7d.value,
        ratioToLowest7d: round(ratio, 2),
        ...(low48 ? { lowest48hMgDl: low48.value, rise48hMgDl: round(latest.value - low48.value, 2) } : {}),
      },
      evidence,
      source: SOURCE,
    }),
  ];
}
