/** Truth tables: SpO2/FiO2 and its trend, oxygen need, lung ultrasound, EVLWI. */
import { describe, expect, it } from 'vitest';
import { spo2Fio2Rule, spo2Fio2TrendRule } from '../../src/assess/tolerance/spo2-fio2.js';
import { oxygenNeedRule } from '../../src/assess/tolerance/oxygen-need.js';
import { lungUltrasoundRule } from '../../src/assess/tolerance/lung-ultrasound.js';
import { evlwiRule } from '../../src/assess/tolerance/evlwi.js';
import type { Measurement } from '../../src/snapshot/types.js';
import { limit, m, NOW, snapshot, T, tol } from '../helpers/tolerance-fixtures.js';

const s = (...ms: Measurement[]) => snapshot({ measurements: ms });

describe('tolerance.spo2-fio2', () => {
  it('present: 92 % on 50 % → 184, below 235 → moderate', () => {
    const f = spo2Fio2Rule(s(m('spo2', 92, 10), m('fio2', 50, 20)), NOW, T)[0]!;
    expect(f.values!['spo2Fio2Ratio']).toBe(184);
    expect(limit(f)).toBe('moderate');
  });
  it('boundary: exactly 235 is not low', () => {
    expect(limit(spo2Fio2Rule(s(m('spo2', 94, 10), m('fio2', 40, 10)), NOW, T)[0]!)).toBe('none');
  });
  it('SpO2 above 97 % with a low ratio is not interpretable (context only)', () => {
    const f = spo2Fio2Rule(s(m('spo2', 99, 10), m('fio2', 60, 10)), NOW, T)[0]!;
    expect(tol(f).contextOnly).toBe(true);
    expect(limit(f)).toBe('none');
    expect(f.text).toContain('not interpretable');
  });
  it('SpO2 above 97 % with a ratio ≥ 235 shows good oxygenation', () => {
    expect(limit(spo2Fio2Rule(s(m('spo2', 99, 10), m('fio2', 30, 10)), NOW, T)[0]!)).toBe('none');
  });
  it('absent FiO2 → not assessed (room air is not assumed)', () => {
    expect(spo2Fio2Rule(s(m('spo2', 92, 10)), NOW, T)[0]!.reason).toBe('no FiO2 recorded');
  });
  it('FiO2 is carried forward until changed, up to 12 h (docs/clinical-logic); a later FiO2 is not the one in force', () => {
    expect(spo2Fio2Rule(s(m('spo2', 92, 10), m('fio2', 50, 8 * 60)), NOW, T)[0]!).toMatchObject({
      status: 'assessed',
      values: { fio2Percent: 50 },
    });
    expect(spo2Fio2Rule(s(m('spo2', 92, 10), m('fio2', 50, 12 * 60 + 11)), NOW, T)[0]!.status).toBe('not-assessed');
    expect(spo2Fio2Rule(s(m('spo2', 92, 10), m('fio2', 40, 300), m('fio2', 60, 60)), NOW, T)[0]!.values).toMatchObject({ fio2Percent: 60 });
    expect(spo2Fio2Rule(s(m('spo2', 92, 60), m('fio2', 60, 20)), NOW, T)[0]!.status).toBe('not-assessed');
  });
  it('stale: SpO2 3 h old does not count', () => {
    expect(spo2Fio2Rule(s(m('spo2', 92, 180), m('fio2', 50, 180)), NOW, T)[0]!.reason).toMatch(/SpO2 stale \(age 3 h, window 2 h\)/);
  });
  it('wrong unit: FiO2 sent as a fraction with unit 1 is not used', () => {
    expect(spo2Fio2Rule(s(m('spo2', 92, 10), m('fio2', 0.5, 10, { unit: '1' })), NOW, T)[0]!.reason).toContain("unit '1'");
  });
});

describe('tolerance.spo2-fio2-trend', () => {
  it('falling by ≥ 20 %: moderate and a congestion sign', () => {
    const f = spo2Fio2TrendRule(s(m('spo2', 96, 240), m('fio2', 30, 240), m('spo2', 92, 10), m('fio2', 40, 10)), NOW, T)[0]!;
    // 320 → 230: −28 %.
    expect(f.values).toMatchObject({ earlierRatio: 320, latestRatio: 230, falling: true });
    expect(limit(f)).toBe('moderate');
    expect(tol(f).harmSign).toBe(true);
  });
  it('boundary: a fall of exactly 20 % is falling; 19 % is not', () => {
    const at20 = spo2Fio2TrendRule(s(m('spo2', 95, 240), m('fio2', 30, 240), m('spo2', 95, 10), m('fio2', 37.5, 10)), NOW, T)[0]!;
    expect(at20.values!['falling']).toBe(true);
    const at19 = spo2Fio2TrendRule(s(m('spo2', 95, 240), m('fio2', 30, 240), m('spo2', 95, 10), m('fio2', 37, 10)), NOW, T)[0]!;
    expect(at19.values!['falling']).toBe(false);
    expect(tol(at19).harmSign).toBe(false);
  });
  it('a fall to a ratio on the plateau (SpO2 > 97 %) is not called a fall', () => {
    const f = spo2Fio2TrendRule(s(m('spo2', 96, 240), m('fio2', 21, 240), m('spo2', 98, 10), m('fio2', 40, 10)), NOW, T)[0]!;
    expect(f.values!['falling']).toBe(false);
  });
  it('absent: no earlier pair in the window → not assessed', () => {
    expect(spo2Fio2TrendRule(s(m('spo2', 92, 10), m('fio2', 40, 10)), NOW, T)[0]!.status).toBe('not-assessed');
  });
  it('stale: an earlier pair older than 6 h is outside the window', () => {
    expect(spo2Fio2TrendRule(s(m('spo2', 99, 400), m('fio2', 21, 400), m('spo2', 90, 10), m('fio2', 60, 10)), NOW, T)[0]!.status).toBe(
      'not-assessed',
    );
  });
  it('an earlier pair less than 60 min before is too close to be a trend', () => {
    expect(spo2Fio2TrendRule(s(m('spo2', 99, 50), m('fio2', 21, 50), m('spo2', 90, 10), m('fio2', 60, 10)), NOW, T)[0]!.status).toBe(
      'not-assessed',
    );
  });
});

describe('tolerance.oxygen-need', () => {
  it('FiO2 up 10 points over the last hours → rising, moderate', () => {
    const f = oxygenNeedRule(s(m('fio2', 30, 300), m('fio2', 40, 10)), NOW, T)[0]!;
    expect(f.values).toMatchObject({ fio2Rising: true, rising: true });
    expect(limit(f)).toBe('moderate');
  });
  it('boundary: FiO2 up 9 points is not rising; PEEP up 2 is', () => {
    expect(oxygenNeedRule(s(m('fio2', 30, 300), m('fio2', 39, 10)), NOW, T)[0]!.values!['rising']).toBe(false);
    expect(oxygenNeedRule(s(m('peep', 8, 300), m('peep', 10, 10)), NOW, T)[0]!.values!['rising']).toBe(true);
    expect(oxygenNeedRule(s(m('peep', 8, 300), m('peep', 9.5, 10)), NOW, T)[0]!.values!['rising']).toBe(false);
  });
  it('compares with the lowest earlier value in the window', () => {
    expect(
      oxygenNeedRule(s(m('fio2', 35, 300), m('fio2', 25, 200), m('fio2', 40, 100), m('fio2', 36, 10)), NOW, T)[0]!.values![
        'fio2RisePoints'
      ],
    ).toBe(11);
  });
  it('absent: single values or nothing → not assessed', () => {
    expect(oxygenNeedRule(s(m('fio2', 40, 10)), NOW, T)[0]!.status).toBe('not-assessed');
    expect(oxygenNeedRule(s(), NOW, T)[0]!.status).toBe('not-assessed');
  });
  it('stale: a latest FiO2 3 h old does not count; an earlier value beyond 6 h is not compared', () => {
    expect(oxygenNeedRule(s(m('fio2', 30, 400), m('fio2', 60, 180)), NOW, T)[0]!.status).toBe('not-assessed');
    expect(oxygenNeedRule(s(m('fio2', 21, 420), m('fio2', 60, 10)), NOW, T)[0]!.status).toBe('not-assessed');
  });
});

describe('tolerance.lung-ultrasound', () => {
  const run = (n?: number, ago = 60, unit?: string) =>
    lungUltrasoundRule(s(...(n === undefined ? [] : [m('bLineRegions', n, ago, unit ? { unit } : {})])), NOW, T)[0]!;
  // With the side not charted, diffuse lung water (≥ 2 regions on EACH side, Volpicelli 2012) cannot be shown: capped at moderate
  // (docs/clinical-logic).
  it.each([
    [0, 'none', false],
    [1, 'none', false],
    [2, 'moderate', false],
    [3, 'moderate', false],
    [4, 'moderate', false],
    [8, 'moderate', false],
  ])('%s regions, side unknown → %s (harm sign %s)', (n, l, sign) => {
    const f = run(n);
    expect(limit(f)).toBe(l);
    expect(tol(f).harmSign).toBe(sign);
  });
  it('absent and stale (7 h) → not assessed', () => {
    expect(run().status).toBe('not-assessed');
    expect(run(6, 7 * 60).status).toBe('not-assessed');
  });
  it('wrong unit → not assessed', () => {
    expect(run(6, 60, '%').status).toBe('not-assessed');
  });
});

describe('tolerance.lung-ultrasound per side (left and right lung, 4 regions each)', () => {
  const L = 'bLineRegionsLeft' as const;
  const R = 'bLineRegionsRight' as const;
  const bySide = (left: number | undefined, right: number | undefined, o: { ago?: number; unit?: string; extra?: Measurement[] } = {}) => {
    const ago = o.ago ?? 40;
    const ms = [
      ...(left === undefined ? [] : [m(L, left, ago, o.unit ? { unit: o.unit } : {})]),
      ...(right === undefined ? [] : [m(R, right, ago)]),
      ...(o.extra ?? []),
    ];
    return lungUltrasoundRule(s(...ms), NOW, T)[0]!;
  };
  // Diffuse interstitial syndrome: ≥ 2 positive regions on EACH side (Volpicelli G et al., Intensive Care Med 2012;38:577).
  it.each([
    // left, right, limit, harm sign, pattern
    [2, 2, 'severe', true, 'diffuse'],
    [4, 4, 'severe', true, 'diffuse'],
    [3, 2, 'severe', true, 'diffuse'],
    [2, 1, 'moderate', false, 'one-sided'],
    [1, 2, 'moderate', false, 'one-sided'],
    [0, 4, 'moderate', false, 'one-sided'],
    [4, 0, 'moderate', false, 'one-sided'],
    [1, 1, 'moderate', false, 'scattered'],
    [1, 0, 'none', false, 'focal'],
    [0, 0, 'none', false, 'none'],
  ] as const)('left %s, right %s → %s (harm sign %s, %s)', (l, r, lim, sign, pattern) => {
    const f = bySide(l, r);
    expect(f.status).toBe('assessed');
    expect(limit(f)).toBe(lim);
    expect(tol(f).harmSign).toBe(sign);
    expect(f.values).toMatchObject({ bLineRegionsLeft: l, bLineRegionsRight: r, sideRecorded: true, pattern });
    expect(f.evidence.map((e) => e.kind)).toEqual([L, R]);
  });
  it('boundary 1/2 per side: 2 on each side is diffuse, 1 on either side is not (Volpicelli 2012: ≥ 2 regions per side)', () => {
    expect(tol(bySide(2, 2)).harmSign).toBe(true);
    expect(tol(bySide(1, 2)).harmSign).toBe(false);
    expect(tol(bySide(2, 1)).harmSign).toBe(false);
  });
  it('one-sided says so and names the focal causes; diffuse says it is not specific', () => {
    expect(bySide(0, 4).text).toMatch(/one-sided \(right\).*pneumonia, contusion or atelectasis.*needs ≥ 2 regions on each side/);
    expect(bySide(3, 0).text).toContain('one-sided (left)');
    expect(bySide(3, 3).text).toMatch(/diffuse interstitial syndrome.*not specific/);
  });
  it('side unknown: one side alone is capped at moderate, never a harm sign', () => {
    const f = bySide(4, undefined);
    expect(limit(f)).toBe('moderate');
    expect(tol(f).harmSign).toBe(false);
    expect(f.text).toMatch(/left lung only.*right side not recorded.*diffuse lung water needs ≥ 2 regions on each side/);
    expect(limit(bySide(undefined, 1))).toBe('none');
  });
  it('stale: per-side readings older than 6 h are not used; nothing else → not assessed, stale', () => {
    const f = bySide(3, 3, { ago: 7 * 60 });
    expect(f.status).toBe('not-assessed');
    expect(f.gap).toBe('stale');
    expect(f.text).toContain('left lung');
  });
  it('stale side: a fresh left with a stale right is one side only (moderate, no harm sign)', () => {
    const f = bySide(3, undefined, { extra: [m(R, 3, 7 * 60)] });
    expect(limit(f)).toBe('moderate');
    expect(tol(f).harmSign).toBe(false);
  });
  it('wrong unit: a side in % is not used; with the other side fresh it is one side only, alone → not assessed (invalid)', () => {
    const f = bySide(3, 3, { unit: '%' });
    expect(tol(f).harmSign).toBe(false);
    expect(f.text).toContain('right lung only');
    const alone = lungUltrasoundRule(s(m(L, 3, 40, { unit: '%' })), NOW, T)[0]!;
    expect(alone.status).toBe('not-assessed');
    expect(alone.gap).toBe('invalid');
  });
  it('the per-side reading wins over a fresh whole-chest count charted with or before it', () => {
    const f = bySide(3, 3, { extra: [m('bLineRegions', 4, 60)] });
    expect(limit(f)).toBe('severe');
    expect(f.values).toMatchObject({ sideRecorded: true });
    const g = bySide(0, 0, { extra: [m('bLineRegions', 6, 60)] });
    expect(limit(g)).toBe('none');
  });
  it('a whole-chest count charted after the per-side exam that limits more keeps the limit at least moderate', () => {
    const f = bySide(0, 1, { ago: 200, extra: [m('bLineRegions', 5, 30)] });
    expect(limit(f)).toBe('moderate');
    expect(tol(f).harmSign).toBe(false);
    expect(f.text).toContain('a later whole-chest count, 5 of 8 regions');
    // It never lowers a diffuse reading.
    expect(limit(bySide(2, 2, { ago: 200, extra: [m('bLineRegions', 0, 30)] }))).toBe('severe');
  });
  it('a whole-chest count beside one fresh side: side unknown, capped at moderate', () => {
    const f = bySide(3, undefined, { extra: [m('bLineRegions', 6, 30)] });
    expect(limit(f)).toBe('moderate');
    expect(tol(f).harmSign).toBe(false);
  });
});

describe('tolerance.evlwi', () => {
  const run = (v?: number, ago = 60) => evlwiRule(s(...(v === undefined ? [] : [m('evlwi', v, ago)])), NOW, T)[0]!;
  it('11.4 mL/kg → pulmonary oedema: severe, congestion sign', () => {
    const f = run(11.4);
    expect(limit(f)).toBe('severe');
    expect(tol(f).harmSign).toBe(true);
  });
  it('boundary: 10 is oedema, 9.9 is not', () => {
    expect(limit(run(10))).toBe('severe');
    expect(limit(run(9.9))).toBe('none');
    expect(limit(run(9.9))).toBe('none');
  });
  it('absent → not assessed; stale (13 h) → not assessed', () => {
    expect(run().status).toBe('not-assessed');
    expect(run(14, 13 * 60).status).toBe('not-assessed');
  });
  it('wrong unit: an EVLW in mL (not indexed) is not used', () => {
    expect(evlwiRule(s(m('evlwi', 800, 60, { unit: 'mL' })), NOW, T)[0]!.status).toBe('not-assessed');
  });
});
