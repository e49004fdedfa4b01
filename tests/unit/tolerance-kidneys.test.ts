/** Truth tables: KDIGO by urine output and by creatinine. */
import { describe, expect, it } from 'vitest';
import { kidneyUrineRule } from '../../src/assess/tolerance/kidney-urine.js';
import { kidneyCreatinineRule } from '../../src/assess/tolerance/kidney-creatinine.js';
import type { Measurement } from '../../src/snapshot/types.js';
import { hourly, limit, m, NOW, snapshot, T } from '../helpers/tolerance-fixtures.js';

const kg70 = () => m('bodyWeight', 70, 600);
const urine = (...ms: Measurement[]) => kidneyUrineRule(snapshot({ measurements: ms }), NOW, T)[0]!;

describe('tolerance.kidney-urine', () => {
  it('180 mL over 6 h at 70 kg → 0.43 mL/kg/h → stage 1, moderate', () => {
    const f = urine(...hourly('urineOutput', 30, 6), kg70());
    expect(f.values).toMatchObject({ kdigoUrineStage: 1, windowHours: 6, urineVolumeMl: 180 });
    expect(f.values!['urineMlPerKgPerHour']).toBeCloseTo(0.429, 3);
    expect(limit(f)).toBe('moderate');
  });
  it('one 6-h amount with its period counts the same', () => {
    expect(urine(m('urineOutput', 180, 0, { periodMinutes: 360 }), kg70()).values!['kdigoUrineStage']).toBe(1);
  });
  it('boundary: 0.5 mL/kg/h (35 mL/h at 70 kg) is not oliguria', () => {
    expect(urine(...hourly('urineOutput', 35, 24), kg70()).values!['kdigoUrineStage']).toBe(0);
    expect(limit(urine(...hourly('urineOutput', 35, 24), kg70()))).toBe('none');
  });
  it('< 0.5 for 12 h → stage 2; < 0.3 for 24 h → stage 3, severe', () => {
    expect(urine(...hourly('urineOutput', 30, 12), kg70()).values!['kdigoUrineStage']).toBe(2);
    const f = urine(...hourly('urineOutput', 20, 24), kg70());
    expect(f.values!['kdigoUrineStage']).toBe(3);
    expect(limit(f)).toBe('severe');
  });
  it('anuria for 12 h → stage 3', () => {
    expect(urine(...hourly('urineOutput', 0, 12), kg70()).values!['kdigoUrineStage']).toBe(3);
  });
  it('hourly amounts without periods are placed after the previous one (the first adds nothing)', () => {
    const points = Array.from({ length: 7 }, (_, i) => m('urineOutput', 30, i * 60));
    const f = urine(...points, kg70());
    expect(f.values).toMatchObject({ kdigoUrineStage: 1, urineVolumeMl: 180 });
  });
  it('less than 6 h charted → not assessed, rate kept', () => {
    const f = urine(...hourly('urineOutput', 10, 4), kg70());
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toContain('6 h');
    expect(f.values!['coveredHours']).toBe(4);
  });
  it('a 12-h window with a 3-h gap is not counted (coverage < 90 %)', () => {
    const f = urine(...hourly('urineOutput', 30, 6), ...hourly('urineOutput', 30, 3, 9 * 60), kg70());
    expect(f.values).toMatchObject({ kdigoUrineStage: 1, windowHours: 6 });
  });
  it('absent urine, absent weight, stale urine → not assessed', () => {
    expect(urine(kg70()).reason).toBe('no urine output recorded');
    expect(urine(...hourly('urineOutput', 30, 6)).reason).toContain('body weight');
    expect(urine(...hourly('urineOutput', 30, 6, 240), kg70()).reason).toContain('ago');
  });
  it('wrong unit: urine in L is not used', () => {
    expect(urine(m('urineOutput', 0.18, 0, { periodMinutes: 360, unit: 'L' }), kg70()).status).toBe('not-assessed');
  });
});

const crea = (...ms: Measurement[]) => kidneyCreatinineRule(snapshot({ measurements: ms }), NOW, T)[0]!;

describe('tolerance.kidney-creatinine', () => {
  it('1.0 → 2.1 mg/dL → stage 2, moderate', () => {
    const f = crea(m('creatinine', 1.0, 4 * 1440), m('creatinine', 2.1, 60));
    expect(f.values).toMatchObject({ kdigoCreatinineStage: 2, ratioToLowest7d: 2.1 });
    expect(limit(f)).toBe('moderate');
  });
  it('boundary: a rise of 0.3 in 48 h is stage 1; 0.2 is none', () => {
    expect(crea(m('creatinine', 1.0, 40 * 60), m('creatinine', 1.3, 60)).values!['kdigoCreatinineStage']).toBe(1);
    expect(limit(crea(m('creatinine', 1.0, 40 * 60), m('creatinine', 1.2, 60)))).toBe('none');
  });
  it('a 0.3 rise over more than 48 h is not the absolute criterion', () => {
    expect(crea(m('creatinine', 1.0, 50 * 60), m('creatinine', 1.3, 60)).values!['kdigoCreatinineStage']).toBe(0);
  });
  it('the baseline is the lowest value of 7 days before the latest; older values do not count', () => {
    expect(
      crea(m('creatinine', 0.7, 8 * 1440), m('creatinine', 1.2, 3 * 1440), m('creatinine', 1.3, 60)).values!['kdigoCreatinineStage'],
    ).toBe(0);
  });
  it('absent, a single value, stale latest (37 h; window 36 h, docs/clinical-logic), wrong unit (µmol/L) → not assessed', () => {
    expect(crea().status).toBe('not-assessed');
    expect(crea(m('creatinine', 2.0, 60)).reason).toContain('no earlier creatinine');
    expect(crea(m('creatinine', 1.0, 4 * 1440), m('creatinine', 2.5, 37 * 60)).status).toBe('not-assessed');
    expect(crea(m('creatinine', 1.0, 4 * 1440), m('creatinine', 2.5, 36 * 60)).status).toBe('assessed');
    expect(crea(m('creatinine', 88, 4 * 1440, { unit: 'umol/L' }), m('creatinine', 186, 60, { unit: 'umol/L' })).status).toBe(
      'not-assessed',
    );
  });
});
