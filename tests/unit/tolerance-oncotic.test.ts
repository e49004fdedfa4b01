/** Truth tables: serum albumin and oedema grade. */
import { describe, expect, it } from 'vitest';
import { albuminRule } from '../../src/assess/tolerance/albumin.js';
import { oedemaRule } from '../../src/assess/tolerance/oedema.js';
import { limit, m, NOW, snapshot, T, tol } from '../helpers/tolerance-fixtures.js';

describe('tolerance.albumin', () => {
  const run = (...ms: Parameters<typeof m>[]) => albuminRule(snapshot({ measurements: ms.map((a) => m(...a)) }), NOW, T)[0]!;
  it('context only, never a limit (docs/clinical-logic: ALBIOS used 30 g/L as a replacement target): 27 g/L named low', () => {
    const f = run(['albumin', 27, 300]);
    expect(tol(f)).toMatchObject({ status: 'assessed', contextOnly: true, limit: 'none' });
    expect(f.values!['band']).toBe('low');
    expect(f.text).toMatch(/context, not a limit/);
  });
  it('severely low: 22 g/L named severely low, still context', () => {
    const f = run(['albumin', 22, 300]);
    expect(tol(f).contextOnly).toBe(true);
    expect(f.text).toContain('severely low');
  });
  it('boundary: 30 g/L is not low, 29.9 is; 25 is low not severe', () => {
    expect(run(['albumin', 30, 300]).values!['band']).toBe('normal');
    expect(run(['albumin', 29.9, 300]).values!['band']).toBe('low');
    expect(run(['albumin', 25, 300]).values!['band']).toBe('low');
  });
  it('absent → not assessed', () => {
    expect(run()).toMatchObject({ status: 'not-assessed', reason: 'no serum albumin recorded' });
  });
  it('fresh up to 72 h (docs/clinical-logic); older does not count', () => {
    expect(run(['albumin', 20, 3 * 1440]).status).toBe('assessed');
    const f = run(['albumin', 20, 3 * 1440 + 1]);
    expect(f.status).toBe('not-assessed');
    expect(f.evidence).toHaveLength(1);
  });
  it('the latest value counts, not an older lower one', () => {
    expect(run(['albumin', 20, 2000], ['albumin', 34, 100]).values!['band']).toBe('normal');
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
  const run = (grade?: number, ago = 200) =>
    oedemaRule(snapshot({ measurements: grade === undefined ? [] : [m('edemaGrade', grade, ago)] }), NOW, T)[0]!;
  it.each([
    [0, 'none'],
    [1, 'none'],
    [2, 'moderate'],
    [4, 'moderate'],
  ])('grade %s → %s', (g, l) => {
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
