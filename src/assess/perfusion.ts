/**
 * Perfusion picture from the latest vitals and lactate: MAP (measured, or estimated), shock index,
 * lactate, each with its freshness. Pure function of (snapshot, thresholds).
 */
import type { PatientSnapshot } from '../snapshot/types.js';
import { evidenceOf, formatAge, pickLatest, roundTo, type Picked } from './select.js';
import type { PerfusionThresholds } from './thresholds.js';
import type { Evidence, Finding } from './types.js';

/** MAP ≈ DBP + (SBP − DBP)/3: the conventional approximation (from memory); a measured MAP is preferred. */
export function estimateMapMmHg(systolicMmHg: number, diastolicMmHg: number): number {
  return diastolicMmHg + (systolicMmHg - diastolicMmHg) / 3;
}

/** Shock index = HR / SBP (Allgöwer & Burri 1967, from memory); > 1.0 flags risk (Koch et al., Open Access Emerg Med 2019). */
export function shockIndex(heartRatePerMin: number, systolicMmHg: number): number {
  return heartRatePerMin / systolicMmHg;
}

function notAssessed(ruleId: string, what: string, picked: Picked, windowMin: number): Finding {
  const reason = picked.latest
    ? `stale: latest is ${formatAge(picked.latest.ageMinutes)} old (window ${formatAge(windowMin)})`
    : `missing: no ${what} found`;
  return { ruleId, topic: 'perfusion', status: 'not-assessed', text: `${what}: not assessed (${reason})`, reason, evidence: picked.latest ? [evidenceOf(picked.latest)] : [] };
}

export function assessPerfusion(s: PatientSnapshot, t: PerfusionThresholds): Finding[] {
  const out: Finding[] = [];
  const w = t.vitalsWindowMinutes;
  const map = pickLatest(s, 'meanBp', w);
  const sbp = pickLatest(s, 'systolicBp', w);
  const dbp = pickLatest(s, 'diastolicBp', w);
  const hr = pickLatest(s, 'heartRate', w);

  // MAP: measured if fresh, else estimated from a fresh SBP/DBP pair.
  let mapValue: number | undefined;
  let mapEvidence: Evidence[] = [];
  let estimated = false;
  if (map.freshness === 'fresh' && map.latest) {
    mapValue = map.latest.value;
    mapEvidence = [evidenceOf(map.latest)];
  } else if (sbp.freshness === 'fresh' && dbp.freshness === 'fresh' && sbp.latest && dbp.latest) {
    mapValue = estimateMapMmHg(sbp.latest.value, dbp.latest.value);
    mapEvidence = [evidenceOf(sbp.latest), evidenceOf(dbp.latest)];
    estimated = true;
  }
  if (mapValue === undefined) {
    out.push(notAssessed('perfusion.map', 'Mean arterial pressure', map.latest ? map : sbp, w));
  } else {
    const low = mapValue < t.mapTargetMmHg;
    out.push({
      ruleId: 'perfusion.map', topic: 'perfusion', status: 'assessed', direction: low ? 'for' : 'neutral', weight: 'context',
      text: `MAP ${Math.round(mapValue)} mmHg${estimated ? ' (estimated from SBP/DBP)' : ''}, ${low ? 'below' : 'at or above'} the target of ${t.mapTargetMmHg} mmHg`,
      values: { mapMmHg: roundTo(mapValue, 1), estimated, belowTarget: low },
      evidence: mapEvidence,
      source: 'Initial MAP target 65 mmHg: Surviving Sepsis Campaign 2021 (Evans et al., Intensive Care Med 2021)',
    });
  }

  if (hr.freshness === 'fresh' && sbp.freshness === 'fresh' && hr.latest && sbp.latest && sbp.latest.value > 0) {
    const si = shockIndex(hr.latest.value, sbp.latest.value);
    const high = si > t.shockIndexHigh;
    out.push({
      ruleId: 'perfusion.shock-index', topic: 'perfusion', status: 'assessed', direction: high ? 'for' : 'neutral', weight: 'context',
      text: `Shock index ${si.toFixed(2)} (HR ${Math.round(hr.latest.value)} / SBP ${Math.round(sbp.latest.value)})${high ? `, above ${t.shockIndexHigh}` : ''}`,
      values: { shockIndex: roundTo(si, 2), high },
      evidence: [evidenceOf(hr.latest), evidenceOf(sbp.latest)],
      source: 'Shock index HR/SBP > 1.0: Koch et al., Open Access Emerg Med 2019;11:179',
    });
  } else {
    out.push(notAssessed('perfusion.shock-index', 'Shock index (heart rate and systolic pressure)', hr.freshness !== 'fresh' ? hr : sbp, w));
  }

  const lac = pickLatest(s, 'lactate', t.lactateWindowMinutes);
  if (lac.freshness === 'fresh' && lac.latest) {
    const high = lac.latest.value > t.lactateHighMmolL;
    out.push({
      ruleId: 'perfusion.lactate', topic: 'perfusion', status: 'assessed', direction: high ? 'for' : 'neutral', weight: 'context',
      text: `Lactate ${lac.latest.value.toFixed(1)} mmol/L${high ? `, above ${t.lactateHighMmolL}` : ''} (${formatAge(lac.latest.ageMinutes)} ago)`,
      values: { lactateMmolL: roundTo(lac.latest.value, 2), high },
      evidence: [evidenceOf(lac.latest)],
      source: 'Lactate > 2 mmol/L: Sepsis-3 (Singer et al., JAMA 2016;315:801)',
    });
  } else {
    out.push(notAssessed('perfusion.lactate', 'Lactate', lac, t.lactateWindowMinutes));
  }
  return out;
}
