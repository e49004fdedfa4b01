/**
 * Truth table for 'responsiveness.last-bolus'. Defaults: bolus ≥ 250 mL over ≤ 60 min, completed, started within
 * 240 min; baseline = 30 min before the start, response = 30 min after the end, ≥ 2 readings each for MAP and HR;
 * response when MAP rises ≥ 5 mmHg AND HR falls ≥ 5/min (both boundaries inclusive); neither → no response;
 * one only → partial (neutral). Weighed as static.
 */
import { describe, expect, it } from 'vitest';
import { assessResponsiveness, responsivenessThresholdsSchema } from '../../src/assess/responsiveness/index.js';
import type { Finding } from '../../src/assess/types.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';

const T = responsivenessThresholdsSchema.parse({});
const ID = 'responsiveness.last-bolus';

function find(b: SnapshotBuilder): Finding {
  const f = assessResponsiveness(b.build(), b.now, T).findings.find((x) => x.ruleId === ID);
  if (!f) throw new Error('no finding');
  return f;
}

/** Bolus from 100 to 80 min ago; baseline readings at 125 and 110 min, response readings at 75 and 60 min. */
function bolus(pre: { map: number; hr: number }[], post: { map: number; hr: number }[], b = new SnapshotBuilder()) {
  b.fluid({ volumeMl: 500, startAgeMin: 100, endAgeMin: 80 });
  [125, 110].forEach((age, i) => { const p = pre[i]; if (p) b.vitals(p, { ageMin: age }); });
  [75, 60].forEach((age, i) => { const p = post[i]; if (p) b.vitals(p, { ageMin: age }); });
  return b;
}
const steady = (map: number, hr: number) => [{ map, hr }, { map, hr }];

describe('reading the response', () => {
  it('MAP +8, HR −10 → read as a response (for, static), values and evidence cited', () => {
    const f = find(bolus([{ map: 60, hr: 120 }, { map: 62, hr: 118 }], [{ map: 69, hr: 110 }, { map: 69, hr: 108 }]));
    expect(f.status).toBe('assessed');
    expect(f.direction).toBe('for');
    expect(f.weight).toBe('static');
    expect(f.values).toMatchObject({ mapBeforeMmHg: 61, mapAfterMmHg: 69, mapChangeMmHg: 8, heartRateBeforePerMin: 119, heartRateAfterPerMin: 109, heartRateChangePerMin: -10 });
    expect(f.evidence.filter((e) => e.kind === 'fluid')).toHaveLength(1);
    expect(f.evidence.filter((e) => e.kind === 'meanBp')).toHaveLength(4);
    expect(f.evidence.filter((e) => e.kind === 'heartRate')).toHaveLength(4);
    expect(f.text).toMatch(/read as a response/);
  });
  it('no change → no response (against)', () => {
    const f = find(bolus(steady(60, 120), [{ map: 61, hr: 119 }, { map: 62, hr: 120 }]));
    expect(f.direction).toBe('against');
    expect(f.text).toMatch(/no response/);
  });
  it('MAP up but HR unchanged → partial (neutral)', () => {
    expect(find(bolus(steady(60, 120), steady(70, 120))).direction).toBe('neutral');
  });
  it('HR down but MAP unchanged → partial (neutral)', () => {
    expect(find(bolus(steady(60, 120), steady(60, 110))).direction).toBe('neutral');
  });
  it('boundaries: MAP exactly +5 and HR exactly −5 → response; +4.5 → partial', () => {
    expect(find(bolus(steady(60, 120), steady(65, 115))).direction).toBe('for');
    expect(find(bolus(steady(60, 120), steady(64.5, 115))).direction).toBe('neutral');
    expect(find(bolus(steady(60, 120), steady(65, 116))).direction).toBe('neutral');
  });
  it('MAP is computed from SBP/DBP when no measured MAP exists (DBP + (SBP − DBP)/3)', () => {
    const b = new SnapshotBuilder().fluid({ volumeMl: 500, startAgeMin: 100, endAgeMin: 80 });
    b.vitals({ sbp: 90, dbp: 45, hr: 120 }, { ageMin: 125 }).vitals({ sbp: 90, dbp: 45, hr: 120 }, { ageMin: 110 }); // MAP 60
    b.vitals({ sbp: 105, dbp: 54, hr: 110 }, { ageMin: 75 }).vitals({ sbp: 105, dbp: 54, hr: 110 }, { ageMin: 60 }); // MAP 71
    const f = find(b);
    expect(f.values?.mapBeforeMmHg).toBe(60);
    expect(f.values?.mapAfterMmHg).toBe(71);
    expect(f.direction).toBe('for');
  });
  it('capillary refill, lactate and urine output before/after are shown when present', () => {
    const b = bolus(steady(60, 120), steady(70, 110));
    b.measure('capillaryRefill', 4.5, { ageMin: 105 }).measure('capillaryRefill', 2.5, { ageMin: 70 });
    b.measure('lactate', 3.4, { ageMin: 150 }).measure('lactate', 2.6, { ageMin: 30 });
    b.measure('urineOutput', 20, { ageMin: 110 }).measure('urineOutput', 60, { ageMin: 20 });
    const f = find(b);
    expect(f.values).toMatchObject({ capillaryRefillSBefore: 4.5, capillaryRefillSAfter: 2.5, lactateMmolLBefore: 3.4, lactateMmolLAfter: 2.6, urineBeforeMl: 20, urineAfterMl: 60 });
    expect(f.text).toMatch(/capillary refill 4\.5 → 2\.5 s; lactate 3\.4 → 2\.6 mmol\/L; urine 20 → 60 mL/);
    expect(f.direction).toBe('for');
  });
});

describe('too few readings', () => {
  it('one baseline MAP (2 needed) → not assessed, says which window', () => {
    const f = find(bolus([{ map: 60, hr: 120 }], steady(70, 110)));
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toMatch(/too few readings \(MAP before: 1 of 2 readings; heart rate before: 1 of 2 readings/);
  });
  it('no readings after the end → not assessed', () => {
    const f = find(bolus(steady(60, 120), []));
    expect(f.reason).toMatch(/MAP after: 0 of 2 readings; heart rate after: 0 of 2 readings/);
  });
  it('readings outside the windows do not count (window 30 min before start / after end)', () => {
    const b = new SnapshotBuilder().fluid({ volumeMl: 500, startAgeMin: 100, endAgeMin: 80 });
    b.vitals({ map: 60, hr: 120 }, { ageMin: 131 }).vitals({ map: 60, hr: 120 }, { ageMin: 130 }); // 130 = exactly 30 min before: counts
    b.vitals({ map: 70, hr: 110 }, { ageMin: 50 }).vitals({ map: 70, hr: 110 }, { ageMin: 49 }); // 50 = exactly 30 min after: counts; 49 does not
    const f = find(b);
    expect(f.reason).toMatch(/MAP before: 1 of 2 readings/);
    expect(f.reason).toMatch(/MAP after: 1 of 2 readings/);
  });
  it('the minimum is configurable', () => {
    const t = responsivenessThresholdsSchema.parse({ bolusMinPointsPerWindow: 1 });
    const b = bolus([{ map: 60, hr: 120 }], [{ map: 70, hr: 110 }]);
    expect(assessResponsiveness(b.build(), b.now, t).findings.find((x) => x.ruleId === ID)?.direction).toBe('for');
  });
});

describe('vasoactive confounder', () => {
  const responded = () => bolus(steady(60, 120), steady(70, 110));
  it('a vasopressor started between the windows → not used, named', () => {
    const f = find(responded().vasoactive({ drug: 'norepinephrine', startAgeMin: 90, rate: { value: 0.1, unit: 'ug/kg/min' } }));
    expect(f.status).toBe('not-assessed');
    expect(f.values?.confounded).toBe(true);
    expect(f.reason).toMatch(/^confounded: norepinephrine started at/);
    expect(f.evidence.some((e) => e.kind === 'vasoactive')).toBe(true);
  });
  it('stopped between the windows → confounded', () => {
    expect(find(responded().vasoactive({ drug: 'norepinephrine', startAgeMin: 300, endAgeMin: 95 })).reason).toMatch(/norepinephrine stopped/);
  });
  it('rate changed between the windows (one period ends, the next starts at another rate) → confounded', () => {
    const b = responded()
      .vasoactive({ drug: 'norepinephrine', startAgeMin: 300, endAgeMin: 90, rate: { value: 0.1, unit: 'ug/kg/min' } })
      .vasoactive({ drug: 'norepinephrine', startAgeMin: 90, rate: { value: 0.2, unit: 'ug/kg/min' } });
    const f = find(b);
    expect(f.reason).toMatch(/norepinephrine rate changed/);
    expect(f.reason).not.toMatch(/stopped/);
  });
  it('a continuous infusion at an unchanged rate is no confounder', () => {
    expect(find(responded().vasoactive({ drug: 'norepinephrine', startAgeMin: 400, rate: { value: 0.1, unit: 'ug/kg/min' } })).direction).toBe('for');
    const split = responded()
      .vasoactive({ drug: 'norepinephrine', startAgeMin: 300, endAgeMin: 90, rate: { value: 0.1, unit: 'ug/kg/min' } })
      .vasoactive({ drug: 'norepinephrine', startAgeMin: 90, rate: { value: 0.1, unit: 'ug/kg/min' } });
    expect(find(split).direction).toBe('for');
  });
  it('changes outside the windows do not confound; not-done entries are ignored', () => {
    expect(find(responded().vasoactive({ drug: 'vasopressin', startAgeMin: 200 })).direction).toBe('for');
    expect(find(responded().vasoactive({ drug: 'vasopressin', startAgeMin: 90, status: 'not-done' })).direction).toBe('for');
  });
});

describe('which fluid counts', () => {
  it('absent → not assessed', () => {
    const f = find(new SnapshotBuilder());
    expect(f.status).toBe('not-assessed');
    expect(f.values?.freshness).toBe('missing');
  });
  it('started more than 240 min ago → stale with age and look-back', () => {
    const b = new SnapshotBuilder().fluid({ volumeMl: 500, startAgeMin: 241, endAgeMin: 221 });
    const f = find(b);
    expect(f.values?.freshness).toBe('stale');
    expect(f.reason).toMatch(/stale \(started 241 min ago, look-back 240 min\)/);
  });
  it('too small (< 250 mL), too slow (> 60 min) or still running → not a bolus', () => {
    expect(find(new SnapshotBuilder().fluid({ volumeMl: 249, startAgeMin: 100, endAgeMin: 80 })).values?.freshness).toBe('missing');
    expect(find(new SnapshotBuilder().fluid({ volumeMl: 1000, startAgeMin: 200, endAgeMin: 100 })).values?.freshness).toBe('missing');
    expect(find(new SnapshotBuilder().fluid({ volumeMl: 500, startAgeMin: 10, endAgeMin: -10, status: 'in-progress' })).values?.freshness).toBe('missing');
  });
  it('exactly 250 mL over exactly 60 min counts', () => {
    const b = new SnapshotBuilder().fluid({ volumeMl: 250, startAgeMin: 140, endAgeMin: 80 });
    expect(find(b).values?.bolusVolumeMl).toBe(250);
  });
  it('the most recent bolus is used', () => {
    const b = bolus(steady(60, 120), steady(70, 110)).fluid({ volumeMl: 300, startAgeMin: 200, endAgeMin: 190 });
    expect(find(b).values?.bolusVolumeMl).toBe(500);
  });
});
