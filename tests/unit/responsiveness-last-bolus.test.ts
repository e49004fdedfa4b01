/**
 * Truth table for 'responsiveness.last-bolus' (docs/clinical-logic/index.md, "Events make evidence old"). Defaults: bolus
 * ≥ 250 mL over ≤ 60 min, completed, started within 240 min.
 * - Dense monitor data (Aya HD et al., Crit Care Med 2016;44:880: the flow response peaks ~1 min after the end and fades
 *   within ~10 min): a flow reading ≤ 10 min before the start, one ≤ 10 min after the end, no gap > 5 min → a
 *   dynamic reading, rise ≥ 10 % for, else against.
 * - Otherwise hourly charting: the newest MAP/HR within 90 min before the start against the first within 90 min after
 *   the end; MAP ≥ +5 mmHg AND HR ≤ −5/min → for; neither → against; one → neutral. A weak static marker.
 */
import { describe, expect, it } from 'vitest';
import type { ResponsivenessFinding as Finding } from '../../src/assess/common/finding.js';
import { assessResponsiveness, responsivenessThresholdsSchema } from '../../src/assess/responsiveness/index.js';
import { responsivenessContext } from '../helpers/rule-context.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';

const T = responsivenessThresholdsSchema.parse({});
const ID = 'responsiveness.last-bolus';

function find(b: SnapshotBuilder, t = T): Finding {
  const f = assessResponsiveness(responsivenessContext(b, t)).findings.find((x) => x.ruleId === ID);
  if (!f) throw new Error('no finding');
  return f;
}

/** Bolus from 100 to 80 min ago; hourly vitals at 130 min (baseline) and 30 min (after), as nurses chart them. */
function hourly(pre: { map: number; hr: number } | undefined, post: { map: number; hr: number } | undefined, b = new SnapshotBuilder()) {
  b.fluid({ volumeMl: 500, startAgeMin: 100, endAgeMin: 80 });
  if (pre) b.vitals(pre, { ageMin: 130 });
  if (post) b.vitals(post, { ageMin: 30 });
  return b;
}
/** Dense cardiac output every 2 min from 110 to 70 min ago, `before` until the start, `after` from the end on. */
function dense(before: number, after: number, b = new SnapshotBuilder()) {
  b.fluid({ volumeMl: 250, startAgeMin: 100, endAgeMin: 95 });
  for (let age = 110; age >= 84; age -= 2) b.measure('cardiacOutput', age >= 100 ? before : after, { ageMin: age });
  return b;
}

describe('hourly charting: a weak static marker', () => {
  it('MAP +8, HR −10 → read as a response (for, static), named as a weak marker', () => {
    const f = find(hourly({ map: 61, hr: 119 }, { map: 69, hr: 109 }));
    expect(f).toMatchObject({ status: 'assessed', direction: 'for', tier: 'static' });
    expect(f.values).toMatchObject({ mapChangeMmHg: 8, heartRateChangePerMin: -10, dense: false });
    expect(f.text).toMatch(/hourly pressure change: a weak static marker/);
    expect(f.evidence.filter((e) => e.kind.startsWith('fluid'))).toHaveLength(1);
  });
  it('no change → no response (against); one of the two → partial (neutral)', () => {
    expect(find(hourly({ map: 60, hr: 120 }, { map: 61, hr: 119 })).direction).toBe('against');
    expect(find(hourly({ map: 60, hr: 120 }, { map: 70, hr: 120 })).direction).toBe('neutral');
    expect(find(hourly({ map: 60, hr: 120 }, { map: 60, hr: 110 })).direction).toBe('neutral');
  });
  it('boundaries: MAP exactly +5 and HR exactly −5 → response; +4.5 → partial', () => {
    expect(find(hourly({ map: 60, hr: 120 }, { map: 65, hr: 115 })).direction).toBe('for');
    expect(find(hourly({ map: 60, hr: 120 }, { map: 64.5, hr: 115 })).direction).toBe('neutral');
  });
  it('MAP is computed from SBP/DBP when no measured MAP exists (DBP + (SBP − DBP)/3)', () => {
    const b = new SnapshotBuilder()
      .fluid({ volumeMl: 500, startAgeMin: 100, endAgeMin: 80 })
      .vitals({ sbp: 90, dbp: 45, hr: 120 }, { ageMin: 130 }) // MAP 60
      .vitals({ sbp: 100, dbp: 55, hr: 110 }, { ageMin: 30 }); // MAP 70
    expect(find(b)).toMatchObject({ direction: 'for', values: { mapChangeMmHg: 10 } });
  });
  it('a missing reading in a window → not assessed, says which', () => {
    const f = find(hourly({ map: 60, hr: 120 }, undefined));
    expect(f).toMatchObject({ status: 'not-assessed', gap: 'too-few-readings' });
    expect(f.reason).toMatch(/no MAP after, no heart rate after/);
  });
  it('readings outside the 90-min windows do not count', () => {
    const b = new SnapshotBuilder()
      .fluid({ volumeMl: 500, startAgeMin: 100, endAgeMin: 80 })
      .vitals({ map: 60, hr: 120 }, { ageMin: 191 })
      .vitals({ map: 70, hr: 110 }, { ageMin: 30 });
    expect(find(b).gap).toBe('too-few-readings');
  });
});

describe('dense monitor data (Aya 2016): a dynamic reading', () => {
  it('cardiac output 4.0 → 4.6 (+15 %) within 10 min of the end → for, dynamic', () => {
    const f = find(dense(4.0, 4.6));
    expect(f).toMatchObject({ status: 'assessed', direction: 'for', tier: 'dynamic', values: { flowChangePercent: 15, dense: true } });
  });
  it('boundary: +10 % is a response, +9.75 % is not', () => {
    expect(find(dense(4.0, 4.4)).direction).toBe('for');
    expect(find(dense(4.0, 4.39)).direction).toBe('against');
  });
  it('readings 15 min apart are not dense: the hourly path is used', () => {
    const b = new SnapshotBuilder().fluid({ volumeMl: 250, startAgeMin: 100, endAgeMin: 95 });
    for (const age of [105, 90]) b.measure('cardiacOutput', age > 100 ? 4 : 4.6, { ageMin: age });
    expect(find(b).values?.dense).toBeUndefined();
  });
});

describe('confounders and events', () => {
  const responded = () => hourly({ map: 60, hr: 120 }, { map: 70, hr: 110 });
  it('a vasopressor started between baseline and response → not used, named', () => {
    const f = find(responded().vasoactive({ drug: 'norepinephrine', startAgeMin: 90, rate: { value: 0.1, unit: 'ug/kg/min' } }));
    expect(f).toMatchObject({ status: 'not-assessed', gap: 'confounded' });
    expect(f.reason).toMatch(/^confounded: norepinephrine started at/);
  });
  it('rate changed between the windows → confounded; unchanged continuous infusion is not', () => {
    const b = responded()
      .vasoactive({ drug: 'norepinephrine', startAgeMin: 300, endAgeMin: 90, rate: { value: 0.1, unit: 'ug/kg/min' } })
      .vasoactive({ drug: 'norepinephrine', startAgeMin: 90, rate: { value: 0.2, unit: 'ug/kg/min' } });
    expect(find(b).reason).toMatch(/norepinephrine rate changed/);
    expect(
      find(responded().vasoactive({ drug: 'norepinephrine', startAgeMin: 400, rate: { value: 0.1, unit: 'ug/kg/min' } })).direction,
    ).toBe('for');
  });
  it('a later fluid of ≥ 100 mL sets the reading aside', () => {
    const f = find(responded().fluid({ volumeMl: 200, startAgeMin: 20, endAgeMin: 15 }));
    expect(f).toMatchObject({ status: 'not-assessed', gap: 'set-aside' });
  });
});

describe('which fluid counts', () => {
  it('absent → not assessed (missing)', () => {
    expect(find(new SnapshotBuilder()).gap).toBe('missing');
  });
  it('started more than 240 min ago → stale with age and look-back', () => {
    const f = find(new SnapshotBuilder().fluid({ volumeMl: 500, startAgeMin: 241, endAgeMin: 221 }));
    expect(f.gap).toBe('stale');
    expect(f.reason).toMatch(/stale \(started 241 min ago, look-back 240 min\)/);
  });
  it('too small (< 250 mL), too slow (> 60 min) or still running → not a bolus', () => {
    expect(find(new SnapshotBuilder().fluid({ volumeMl: 249, startAgeMin: 100, endAgeMin: 80 })).gap).toBe('missing');
    expect(find(new SnapshotBuilder().fluid({ volumeMl: 1000, startAgeMin: 200, endAgeMin: 100 })).gap).toBe('missing');
    expect(find(new SnapshotBuilder().fluid({ volumeMl: 500, startAgeMin: 10, endAgeMin: -10, status: 'in-progress' })).gap).toBe(
      'missing',
    );
  });
  it('exactly 250 mL over exactly 60 min counts', () => {
    expect(find(new SnapshotBuilder().fluid({ volumeMl: 250, startAgeMin: 140, endAgeMin: 80 })).values?.bolusVolumeMl).toBe(250);
  });
});
