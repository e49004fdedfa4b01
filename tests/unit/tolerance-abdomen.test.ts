/** Truth table: intra-abdominal pressure (WSACS 2013) with APP and filtration gradient. */
import { describe, expect, it } from 'vitest';
import { abdominalPressureRule } from '../../src/assess/tolerance/abdominal-pressure.js';
import type { Measurement } from '../../src/snapshot/types.js';
import { limit, m, NOW, snapshot, T } from '../helpers/tolerance-fixtures.js';

const run = (...ms: Measurement[]) => abdominalPressureRule(snapshot({ measurements: ms }), NOW, T)[0]!;

describe('tolerance.abdominal-pressure', () => {
  it('IAP 18, MAP 75 → grade II, APP 57, FG 39, moderate', () => {
    const f = run(m('intraAbdominalPressure', 18, 60), m('meanBp', 75, 55));
    expect(f.values).toMatchObject({ iahGrade: 2, appMmHg: 57, filtrationGradientMmHg: 39, mapMeasured: true });
    expect(limit(f)).toBe('moderate');
  });
  it.each([
    [11, 'none'],
    [12, 'moderate'],
    [20, 'moderate'],
    [21, 'severe'],
    [30, 'severe'],
  ])('IAP %s mmHg → %s', (iap, l) => {
    expect(limit(run(m('intraAbdominalPressure', iap, 60)))).toBe(l);
  });
  it('without a measured MAP, estimates it from SBP/DBP', () => {
    const f = run(m('intraAbdominalPressure', 18, 60), m('systolicBp', 105, 50), m('diastolicBp', 60, 50));
    expect(f.values).toMatchObject({ mapMmHg: 75, mapMeasured: false, appMmHg: 57 });
  });
  it('a MAP more than 60 min from the IAP is not paired; the grade still stands', () => {
    const f = run(m('intraAbdominalPressure', 18, 60), m('meanBp', 75, 200));
    expect(f.values!['appMmHg']).toBeUndefined();
    expect(f.values!['iahGrade']).toBe(2);
  });
  it('absent, stale (7 h) and wrong unit (cm[H2O]) → not assessed', () => {
    expect(run().status).toBe('not-assessed');
    expect(run(m('intraAbdominalPressure', 22, 7 * 60)).status).toBe('not-assessed');
    expect(run(m('intraAbdominalPressure', 24, 60, { unit: 'cm[H2O]' })).status).toBe('not-assessed');
  });
});
