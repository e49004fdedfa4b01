/** Truth tables: serum albumin and oedema grade. */
import { describe, expect, it } from 'vitest';
import { albuminRule } from '../../src/assess/tolerance/albumin.js';
import { oedemaRule } from '../../src/assess/tolerance/oedema.js';
import { limit, m, NOW, snapshot, T } from '../helpers/tolerance-fixtures.js';

describe('tolerance.albumin', () => {
  const run = (...ms: Parameters<typeof m>[]) => albuminRule(snapshot({ measurements: ms.map((a) => m(...a)) }), NOW, T)[0]!;
  it('present and low: 27 g/L → moderate, named low', () => {
    const f = run(['albumin', 27, 300]);
    expect(limit(f)).toBe('moderate');
    expect(f.values!['band']).toBe('low');
  });
  it('severely low: 22 g/L → still a moderate limit, named severely low', () => {
    const f = run(['albumin', 22, 300]);
    expect(limit(f)).toBe('moderate');
    expect(f.text).toContain('severely low');
  });
  it('boundary: 30 g/L is not low, 29.9 is; 25 is low not severe', () => {
    expect(limit(run(['albumin', 30, 300]))).toBe('none');
    expect(limit(run(['albumin', 29.9, 300]))).toBe('moderate');
    expect(run(['albumin', 25, 300]).values!['band']).toBe('low');
  });
  it('absent → not assessed', () => {
    expect(run()).toMatchObject({ status: 'not-assessed', reason: 'no serum albumin recorded' });
  });
  it('stale: 3 days old does not count, even if low', () => {
    const f = run(['albumin', 20, 3 * 1440]);
    expect(f.status).toBe('not-assessed');
    expect(f.evidence).toHaveLength(1);
  });
  it('the latest value counts, not an older lower one', () => {
    expect(limit(run(['albumin', 20, 2000], ['albumin', 34, 100]))).toBe('none');
  });
  it('wrong unit: a value labelled g/dL is not used', () => {
    expect(run(['albumin', 2.4, 100, { unit: 'g/dL' }]).reason).toContain("unit 'g/dL'");
  });
  it('wrong unit the rule can see: 2.8 "g/L" is g/dL sent as g/L', () => {
    const f = run(['albumin', 2.8, 100]);
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toContain('g/dL');
  });
});

describe('tolerance.oedema', () => {
  const run = (grade?: number, ago = 200) => oedemaRule(snapshot({ measurements: grade === undefined ? [] : [m('edemaGrade', grade, ago)] }), NOW, T)[0]!;
  it.each([[0, 'none'], [1, 'none'], [2, 'moderate'], [4, 'moderate']])('grade %s → %s', (g, l) => {
    expect(limit(run(g))).toBe(l);
  });
  it('absent → not assessed', () => {
    expect(run().status).toBe('not-assessed');
  });
  it('stale: 25 h old does not count; 24 h still does', () => {
    expect(run(3, 25 * 60).status).toBe('not-assessed');
    expect(run(3, 24 * 60).status).toBe('assessed');
  });
});
