/**
 * Rule tolerance.albumin: serum albumin, canonical g/L, as CONTEXT only (docs/clinical-logic): ALBIOS (Caironi P et al., N Engl J
 * Med 2014;370:1412) used 30 g/L as a replacement target, not as a limit of fluid tolerance. Below 30 g/L is named
 * low, below 25 g/L severely low (from memory); neither limits tolerance by itself. A value below 8 g/L is taken as
 * a unit error (g/dL sent as g/L) and not used.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { ToleranceFinding } from '../common/finding.js';
import { assessed, notAssessed, unusableTolerance } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { DEFAULT_WINDOWS, type Windows } from '../common/windows.js';
import { evidenceOfMeasurement, latestReading } from '../common/select.js';
import { fmt } from '../common/text.js';

export const ALBUMIN = 'tolerance.albumin';
const SOURCE = 'ALBIOS target ≥ 30 g/L: Caironi P et al., N Engl J Med 2014;370:1412; < 25 g/L severe (from memory)';

export function albuminRule(
  snapshot: PatientSnapshot,
  now: Date,
  t: ToleranceThresholds,
  w: Windows = DEFAULT_WINDOWS,
): ToleranceFinding[] {
  const pick = latestReading(snapshot, 'albumin', now, w.albuminMin);
  if (pick.state !== 'fresh') {
    return [unusableTolerance(pick, { ruleId: ALBUMIN, domain: 'oncotic', label: 'Serum albumin', source: SOURCE, now })];
  }
  const m = pick.item;
  if (m.value < t.albuminImplausibleBelowGPerL) {
    return [
      notAssessed(
        ALBUMIN,
        'oncotic',
        'Serum albumin not assessed',
        `albumin ${fmt(m.value, 1)} g/L is implausibly low: probably g/dL sent as g/L (original ${m.original.value} ${m.original.unit}); not used`,
        SOURCE,
        [evidenceOfMeasurement(m, now)],
      ),
    ];
  }
  const severe = m.value < t.albuminSevereLowGPerL;
  const low = m.value < t.albuminLowGPerL;
  let band = low ? 'low' : 'normal';
  let bandText = low ? ` (low, < ${t.albuminLowGPerL} g/L)` : '';
  if (severe) [band, bandText] = ['severely-low', ` (severely low, < ${t.albuminSevereLowGPerL} g/L)`];
  return [
    assessed({
      ruleId: ALBUMIN,
      domain: 'oncotic',
      limit: 'none',
      context: true,
      text: `Serum albumin ${fmt(m.value)} g/L${bandText}: context, not a limit of tolerance`,
      values: { albuminGPerL: m.value, band },
      evidence: [evidenceOfMeasurement(m, now)],
      source: SOURCE,
    }),
  ];
}
