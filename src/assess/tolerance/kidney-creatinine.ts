/**
 * Rule tolerance.kidney-creatinine: KDIGO 2012 stage from serum creatinine (Kidney Int Suppl 2012;2:1–138):
 * the latest value against the lowest in the preceding 48 h (rise ≥ 0.3 mg/dL) and 7 days (ratio ≥ 1.5).
 * Any stage is a moderate limit: injured kidneys shed volume less well.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { kdigoStageFromCreatinine } from '../../physiology/kdigo.js';
import type { Finding } from '../types.js';
import { assessed, notAssessed } from './finding.js';
import { evidenceOf, fmt, latestOf, round, seriesOf, timeMs, unusableReason } from './select.js';
import type { ToleranceThresholds } from './thresholds.js';

export const KIDNEY_CREATININE = 'tolerance.kidney-creatinine';
const SOURCE = 'KDIGO AKI guideline, Kidney Int Suppl 2012;2:1–138: rise ≥ 0.3 mg/dL in 48 h or ≥ 1.5× baseline in 7 days; stage 2 ≥ 2.0×, stage 3 ≥ 3.0× or ≥ 4.0 mg/dL';

export function kidneyCreatinineRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): Finding[] {
  const title = 'Creatinine (KDIGO) not assessed';
  const pick = latestOf(snapshot, 'creatinine', now, t.creatinineFreshMinutes);
  if (pick.state !== 'fresh') {
    return [notAssessed(KIDNEY_CREATININE, 'kidneys', title, unusableReason('creatinine', pick, now, t.creatinineFreshMinutes), SOURCE,
      pick.state === 'stale' ? [evidenceOf(pick.item, now)] : [])];
  }
  const latest = pick.item;
  const atMs = timeMs(latest.effective);
  const earlier = seriesOf(snapshot, 'creatinine', now).items.filter((m) => timeMs(m.effective) < atMs);
  const lowestSince = (hours: number) => earlier
    .filter((m) => timeMs(m.effective) >= atMs - hours * 3_600_000)
    .reduce<typeof latest | undefined>((a, b) => (a === undefined || b.value < a.value ? b : a), undefined);
  const low48 = lowestSince(48);
  const low7d = lowestSince(168);
  if (!low7d) {
    return [notAssessed(KIDNEY_CREATININE, 'kidneys', title, 'no earlier creatinine in the 7 days before the latest to compare with', SOURCE,
      [evidenceOf(latest, now)], { creatinineMgDl: latest.value })];
  }
  const stage = kdigoStageFromCreatinine({ currentMgDl: latest.value, lowest48hMgDl: low48?.value, lowest7dMgDl: low7d.value });
  const ratio = latest.value / low7d.value;
  const evidence = [evidenceOf(low7d, now), ...(low48 && low48 !== low7d ? [evidenceOf(low48, now)] : []), evidenceOf(latest, now)];
  return [assessed({
    ruleId: KIDNEY_CREATININE, domain: 'kidneys', limit: stage >= 1 ? 'moderate' : 'none',
    text: `Creatinine ${fmt(latest.value, 2)} mg/dL, ${fmt(ratio, 1)}× the lowest of 7 days (${fmt(low7d.value, 2)})${stage > 0 ? `: KDIGO stage ${stage} by creatinine` : ''}`,
    values: {
      kdigoCreatinineStage: stage, creatinineMgDl: latest.value, lowest7dMgDl: low7d.value, ratioToLowest7d: round(ratio, 2),
      ...(low48 ? { lowest48hMgDl: low48.value, rise48hMgDl: round(latest.value - low48.value, 2) } : {}),
    },
    evidence, source: SOURCE,
  })];
}
