/**
 * Rule tolerance.albumin: serum albumin, canonical g/L. Below 30 g/L (the ALBIOS target; Caironi P et al.,
 * N Engl J Med 2014) low oncotic pressure favours leak of infused volume: a moderate limit. Below 25 g/L is
 * named severely low (from memory) but stays a moderate limit by itself: it raises the risk, it does not
 * show harm. A value below 8 g/L is taken as a unit error (g/dL sent as g/L) and not used.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { Finding } from '../types.js';
import { assessed, notAssessed } from './finding.js';
import { evidenceOf, fmt, latestOf, unusableReason } from './select.js';
import type { ToleranceThresholds } from './thresholds.js';

export const ALBUMIN = 'tolerance.albumin';
const SOURCE = 'ALBIOS target ≥ 30 g/L: Caironi P et al., N Engl J Med 2014;370:1412; < 25 g/L severe (from memory)';

export function albuminRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): Finding[] {
  const pick = latestOf(snapshot, 'albumin', now, t.albuminFreshMinutes);
  if (pick.state !== 'fresh') {
    return [notAssessed(ALBUMIN, 'oncotic', 'Serum albumin not assessed', unusableReason('serum albumin', pick, now, t.albuminFreshMinutes), SOURCE,
      pick.state === 'stale' ? [evidenceOf(pick.item, now)] : [])];
  }
  const m = pick.item;
  if (m.value < t.albuminImplausibleBelowGPerL) {
    return [notAssessed(ALBUMIN, 'oncotic', 'Serum albumin not assessed',
      `albumin ${fmt(m.value, 1)} g/L is implausibly low: probably g/dL sent as g/L (original ${m.original.value} ${m.original.unit}); not used`, SOURCE, [evidenceOf(m, now)])];
  }
  const severe = m.value < t.albuminSevereLowGPerL;
  const low = m.value < t.albuminLowGPerL;
  return [assessed({
    ruleId: ALBUMIN, domain: 'oncotic', limit: low ? 'moderate' : 'none',
    text: `Serum albumin ${fmt(m.value)} g/L${severe ? ` (severely low, < ${t.albuminSevereLowGPerL} g/L)` : low ? ` (low, < ${t.albuminLowGPerL} g/L)` : ''}`,
    values: { albuminGPerL: m.value, band: severe ? 'severely-low' : low ? 'low' : 'normal' },
    evidence: [evidenceOf(m, now)], source: SOURCE,
  })];
}
