/**
 * Rule tolerance.oxygen-need: a rising oxygen need over the last hours, FiO2 up by ≥ 10 percentage points
 * or PEEP up by ≥ 2 cmH2O against the lowest earlier value in the window (common practice): a moderate limit.
 */
import type { Measurement, PatientSnapshot } from '../../snapshot/types.js';
import type { Evidence, ToleranceFinding } from '../common/finding.js';
import { unusableReason } from '../common/finding.js';
import { assessed, notAssessed } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { evidenceOfMeasurement, latestReading, readingsOldestFirst, timeMs } from '../common/select.js';
import { ageText, fmt } from '../common/text.js';

export const OXYGEN_NEED = 'tolerance.oxygen-need';
const SOURCE = 'Rising FiO2 (≥ 10 points) or PEEP (≥ 2 cmH2O) over the last hours (common practice)';

interface Rise {
  latest: Measurement;
  lowest: Measurement;
  rise: number;
}

function riseOf(snapshot: PatientSnapshot, kind: 'fio2' | 'peep', now: Date, t: ToleranceThresholds): Rise | string {
  const pick = latestReading(snapshot, kind, now, t.oxygenationFreshMinutes);
  const label = kind === 'fio2' ? 'FiO2' : 'PEEP';
  if (pick.state !== 'fresh') return unusableReason(pick, label);
  const latest = pick.item;
  const fromMs = timeMs(latest.effective) - t.trendWindowMinutes * 60_000;
  const earlier = readingsOldestFirst(snapshot, kind, now).items.filter(
    (m) => m !== latest && timeMs(m.effective) >= fromMs && timeMs(m.effective) < timeMs(latest.effective),
  );
  if (earlier.length === 0) return `no earlier ${label} in the ${ageText(t.trendWindowMinutes)} before the latest`;
  // Lowest earlier value; at equal values the earliest, so that the choice is independent of input order.
  const lowest = earlier.reduce((a, b) => (b.value < a.value ? b : a));
  return { latest, lowest, rise: latest.value - lowest.value };
}

export function oxygenNeedRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): ToleranceFinding[] {
  const fio2 = riseOf(snapshot, 'fio2', now, t);
  const peep = riseOf(snapshot, 'peep', now, t);
  if (typeof fio2 === 'string' && typeof peep === 'string') {
    return [notAssessed(OXYGEN_NEED, 'lungs', 'Oxygen need trend not assessed', `FiO2: ${fio2}; PEEP: ${peep}`, SOURCE)];
  }
  const parts: string[] = [];
  const evidence: Evidence[] = [];
  const values: Record<string, number | string | boolean> = {};
  let rising = false;
  if (typeof fio2 !== 'string') {
    const up = fio2.rise >= t.fio2RisePoints;
    rising ||= up;
    parts.push(`FiO2 ${fmt(fio2.lowest.value)} → ${fmt(fio2.latest.value)} %${up ? ' (rising)' : ''}`);
    evidence.push(evidenceOfMeasurement(fio2.lowest, now), evidenceOfMeasurement(fio2.latest, now));
    Object.assign(values, { fio2RisePoints: fio2.rise, fio2Rising: up });
  }
  if (typeof peep !== 'string') {
    const up = peep.rise >= t.peepRiseCmH2O;
    rising ||= up;
    parts.push(`PEEP ${fmt(peep.lowest.value)} → ${fmt(peep.latest.value)} cmH2O${up ? ' (rising)' : ''}`);
    evidence.push(evidenceOfMeasurement(peep.lowest, now), evidenceOfMeasurement(peep.latest, now));
    Object.assign(values, { peepRiseCmH2O: peep.rise, peepRising: up });
  }
  return [
    assessed({
      ruleId: OXYGEN_NEED,
      domain: 'lungs',
      limit: rising ? 'moderate' : 'none',
      text: `${rising ? 'Rising oxygen need' : 'No rise in oxygen need'} over the last ${ageText(t.trendWindowMinutes)}: ${parts.join('; ')}`,
      values: { ...values, rising },
      evidence,
      source: SOURCE,
    }),
  ];
}
