/**
 * Rule tolerance.lung-ultrasound: regions with a B-pattern (≥ 3 B-lines per intercostal space) in the 8-region
 * examination, 4 per side. Diffuse interstitial syndrome needs a bilateral B-pattern, ≥ `bLineBilateralPerSide` (2)
 * positive regions on EACH side (Volpicelli G et al., Intensive Care Med 2012;38:577 [M], international evidence-based
 * recommendations for point-of-care lung ultrasound; docs/clinical-logic). Readings, all within `ultrasoundFreshMinutes`:
 *   - per side (markers `lung-us-b-regions-left` / `-right`, or the whole-chest code with a one-lung bodySite), both
 *     sides fresh: ≥ 2 on each side → diffuse, a severe lung finding and a harm sign; otherwise the sum of both sides
 *     from `bLineModerateRegions` (2) is a moderate limit, named one-sided (focal: pneumonia, contusion and atelectasis
 *     give one-sided B-lines) or scattered. The per-side reading wins over a whole-chest count; a whole-chest count
 *     charted after it that limits more keeps the limit at least moderate;
 *   - the whole-chest count (side not recorded) or one side alone: from 2 regions a moderate limit, capped there,
 *     never a harm sign, since a bilateral pattern cannot be shown.
 * B-lines are not specific for hydrostatic oedema (ARDS, interstitial pneumonia and fibrosis give them too).
 */
import type { PatientSnapshot, Measurement } from '../../snapshot/types.js';
import type { ToleranceFinding, ToleranceLimit } from '../common/finding.js';
import { assessed, unusableTolerance } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { evidenceOfMeasurement, latestReading, timeMs, type Selection, type Unusable } from '../common/select.js';
import { fmt } from '../common/text.js';

export const LUNG_ULTRASOUND = 'tolerance.lung-ultrasound';
const SOURCE =
  'Lung ultrasound B-pattern; diffuse interstitial syndrome needs ≥ 2 positive regions on each side: Volpicelli G et al., Intensive Care Med 2012;38:577 (international evidence-based recommendations for point-of-care lung ultrasound; from memory); the moderate band from 2 regions: common practice';

type Side = 'left' | 'right';
const OTHER: Record<Side, Side> = { left: 'right', right: 'left' };

function freshItem(sel: Selection<Measurement>): Measurement | undefined {
  return sel.state === 'fresh' ? sel.item : undefined;
}

/** The whole-chest (or one-side) band: from `bLineModerateRegions` a moderate limit, capped there. */
function cappedLimit(n: number, t: ToleranceThresholds): ToleranceLimit {
  return n >= t.bLineModerateRegions ? 'moderate' : 'none';
}

/** The B-pattern's spread: both sides positive, one side, scattered (≥ the moderate count in all), a few regions, none. */
function lungPattern(diffuse: boolean, oneSide: boolean, sum: number, t: ToleranceThresholds): string {
  if (diffuse) return 'diffuse';
  if (oneSide) return 'one-sided';
  if (sum >= t.bLineModerateRegions) return 'scattered';
  return sum > 0 ? 'focal' : 'none';
}

const LIMIT_ORDER: Record<ToleranceLimit, number> = { none: 0, moderate: 1, severe: 2 };

function bySide(
  left: Measurement,
  right: Measurement,
  whole: Measurement | undefined,
  now: Date,
  t: ToleranceThresholds,
): ToleranceFinding {
  const l = left.value;
  const r = right.value;
  const per = t.bLineBilateralPerSide;
  const positive = (n: number) => n >= per;
  const diffuse = positive(l) && positive(r);
  const sum = l + r;
  const pattern = lungPattern(diffuse, positive(l) || positive(r), sum, t);
  const sideLimit: ToleranceLimit = diffuse ? 'severe' : cappedLimit(sum, t);
  // A whole-chest count charted after both sides describes a later examination: it may raise the limit, never lower it.
  const later = whole && timeMs(whole.effective) > Math.max(timeMs(left.effective), timeMs(right.effective)) ? whole : undefined;
  const laterLimit = later ? cappedLimit(later.value, t) : 'none';
  const limit = LIMIT_ORDER[laterLimit] > LIMIT_ORDER[sideLimit] ? laterLimit : sideLimit;
  const counts = `B-pattern in ${fmt(l)} of 4 regions on the left and ${fmt(r)} of 4 on the right`;
  const oneSide: Side = positive(l) ? 'left' : 'right';
  const reading = {
    diffuse: `diffuse interstitial syndrome (≥ ${fmt(per)} on each side), a sign that more volume may add lung water (not specific: ARDS, interstitial pneumonia and fibrosis also give it)`,
    'one-sided': `one-sided (${oneSide}): a focal pattern, as pneumonia, contusion or atelectasis give; not diffuse lung water, which needs ≥ ${fmt(per)} regions on each side; a moderate limit`,
    scattered: `scattered, fewer than ${fmt(per)} on either side: not diffuse; a moderate limit`,
    focal: 'focal',
    none: 'none on either side',
  }[pattern];
  const laterText =
    later && limit !== sideLimit
      ? `; a later whole-chest count, ${fmt(later.value)} of 8 regions with the side not recorded, keeps it a moderate limit`
      : '';
  return assessed({
    ruleId: LUNG_ULTRASOUND,
    domain: 'lungs',
    limit,
    congestionSign: diffuse,
    text: `Lung ultrasound: ${counts}: ${reading}${laterText}`,
    values: { bLineRegionsLeft: l, bLineRegionsRight: r, sideRecorded: true, pattern },
    evidence: [left, right, ...(later ? [later] : [])].map((m) => evidenceOfMeasurement(m, now)),
    source: SOURCE,
  });
}

function sideUnknown(
  whole: Measurement | undefined,
  one: { side: Side; item: Measurement } | undefined,
  now: Date,
  t: ToleranceThresholds,
): ToleranceFinding {
  const parts: string[] = [];
  let worst = 0;
  if (whole) {
    parts.push(whole.value === 0 ? 'no region with B-pattern' : `B-pattern in ${fmt(whole.value)} of 8 regions, side not recorded`);
    worst = Math.max(worst, whole.value);
  }
  if (one) {
    parts.push(`${one.side} lung only: B-pattern in ${fmt(one.item.value)} of 4 regions, ${OTHER[one.side]} side not recorded`);
    worst = Math.max(worst, one.item.value);
  }
  const limit = cappedLimit(worst, t);
  const couldBeBilateral = worst >= 2 * t.bLineBilateralPerSide || (one !== undefined && one.item.value >= t.bLineBilateralPerSide);
  const why = couldBeBilateral ? `diffuse lung water needs ≥ ${fmt(t.bLineBilateralPerSide)} regions on each side, so ` : '';
  let tail = `: ${why}read as a moderate limit`;
  if (limit === 'none') tail = worst > 0 ? ' (focal)' : '';
  return assessed({
    ruleId: LUNG_ULTRASOUND,
    domain: 'lungs',
    limit,
    congestionSign: false,
    text: `Lung ultrasound: ${parts.join('; ')}${tail}`,
    values: {
      ...(whole ? { bLineRegions: whole.value } : {}),
      ...(one ? { [one.side === 'left' ? 'bLineRegionsLeft' : 'bLineRegionsRight']: one.item.value } : {}),
      sideRecorded: false,
    },
    evidence: [whole, one?.item].filter((m): m is Measurement => m !== undefined).map((m) => evidenceOfMeasurement(m, now)),
    source: SOURCE,
  });
}

export function lungUltrasoundRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): ToleranceFinding[] {
  const window = t.ultrasoundFreshMinutes;
  const whole = latestReading(snapshot, 'bLineRegions', now, window);
  const left = latestReading(snapshot, 'bLineRegionsLeft', now, window);
  const right = latestReading(snapshot, 'bLineRegionsRight', now, window);
  const [w, l, r] = [freshItem(whole), freshItem(left), freshItem(right)];
  if (l && r) return [bySide(l, r, w, now, t)];
  const one = [
    { side: 'left' as const, item: l },
    { side: 'right' as const, item: r },
  ].find((o): o is { side: 'left' | 'right'; item: Measurement } => o.item !== undefined);
  if (w || one) return [sideUnknown(w, one, now, t)];
  // Nothing fresh: say why by the first reading that exists (stale, invalid), else none recorded.
  const unusable = [whole, left, right].filter((s): s is Unusable<Measurement> => s.state !== 'fresh');
  const sel = unusable.find((s) => s.state !== 'missing') ?? { state: 'missing' as const, windowMin: window };
  let label = 'Lung ultrasound';
  if (sel === left) label = 'Lung ultrasound (left lung)';
  else if (sel === right) label = 'Lung ultrasound (right lung)';
  return [unusableTolerance(sel, { ruleId: LUNG_ULTRASOUND, domain: 'lungs', label, source: SOURCE, now })];
}
