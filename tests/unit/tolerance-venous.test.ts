/** Truth tables: VExUS from its parts, CVP. */
import { describe, expect, it } from 'vitest';
import { vexusRule } from '../../src/assess/tolerance/vexus.js';
import { cvpRule } from '../../src/assess/tolerance/cvp.js';
import type { CodedMeasurement, Measurement } from '../../src/snapshot/types.js';
import { coded, limit, m, NOW, snapshot, T, tol } from '../helpers/tolerance-fixtures.js';

function vexus(parts: { ivc?: number; hv?: string; pf?: number; rv?: string; ago?: number; ivcUnit?: string }) {
  const ago = parts.ago ?? 30;
  const measurements: Measurement[] = [];
  const cs: CodedMeasurement[] = [];
  if (parts.ivc !== undefined) measurements.push(m('ivcDiameterMax', parts.ivc, ago, parts.ivcUnit ? { unit: parts.ivcUnit } : {}));
  if (parts.pf !== undefined) measurements.push(m('portalPulsatility', parts.pf, ago));
  if (parts.hv) cs.push(coded('hepaticVeinPattern', parts.hv, ago));
  if (parts.rv) cs.push(coded('renalVeinPattern', parts.rv, ago));
  return vexusRule(snapshot({ measurements, coded: cs }), NOW, T)[0]!;
}

describe('tolerance.vexus', () => {
  it('the reference case: IVC 2.3, hepatic severe, PF 60 %, renal biphasic → grade 3, severe, congestion sign', () => {
    const f = vexus({ ivc: 2.3, hv: 'severe', pf: 60, rv: 'biphasic' });
    expect(f.values).toMatchObject({ vexusGrade: 3, severePatterns: 2, definite: true });
    expect(limit(f)).toBe('severe');
    expect(tol(f).harmSign).toBe(true);
    expect(f.evidence).toHaveLength(4);
  });
  it('one severe pattern → grade 2, moderate', () => {
    const f = vexus({ ivc: 2.3, hv: 'mild', pf: 55, rv: 'biphasic' });
    expect(f.values!['vexusGrade']).toBe(2);
    expect(limit(f)).toBe('moderate');
    expect(tol(f).harmSign).toBe(false);
  });
  it('mild patterns only → grade 1, limits nothing', () => {
    expect(limit(vexus({ ivc: 2.3, hv: 'mild', pf: 40, rv: 'biphasic' }))).toBe('none');
  });
  it('boundary: IVC 1.99 cm is grade 0; 2.0 cm opens the grading', () => {
    expect(vexus({ ivc: 1.99, hv: 'severe', pf: 60, rv: 'monophasic' }).values!['vexusGrade']).toBe(0);
    expect(vexus({ ivc: 2.0, hv: 'severe', pf: 60, rv: 'monophasic' }).values!['vexusGrade']).toBe(3);
  });
  it('boundary: PF 49 % is mild, 50 % severe', () => {
    expect(vexus({ ivc: 2.2, hv: 'severe', pf: 49, rv: 'continuous' }).values!['vexusGrade']).toBe(2);
    expect(vexus({ ivc: 2.2, hv: 'severe', pf: 50, rv: 'continuous' }).values!['vexusGrade']).toBe(3);
  });
  it('missing parts: two severe known is grade 3 already; one severe known is "at least 2"', () => {
    expect(vexus({ ivc: 2.4, hv: 'severe', rv: 'monophasic' }).values).toMatchObject({ vexusGrade: 3, definite: true });
    const f = vexus({ ivc: 2.4, hv: 'severe' });
    expect(f.values).toMatchObject({ vexusGradeMin: 2, vexusGradeMax: 3, definite: false });
    expect(f.text).toContain('at least grade 2');
    expect(limit(f)).toBe('moderate');
  });
  it('IVC ≥ 2 cm with no Doppler at all → not assessed', () => {
    expect(vexus({ ivc: 2.4 }).status).toBe('not-assessed');
  });
  it('IVC < 2 cm needs no Doppler: grade 0', () => {
    expect(vexus({ ivc: 1.5 })).toMatchObject({ status: 'assessed', limit: 'none' });
  });
  it('absent IVC → not assessed, even with severe Doppler patterns', () => {
    expect(vexus({ hv: 'severe', pf: 70 }).status).toBe('not-assessed');
  });
  it('stale: parts 7 h old do not count', () => {
    expect(vexus({ ivc: 2.3, hv: 'severe', pf: 60, rv: 'monophasic', ago: 7 * 60 }).status).toBe('not-assessed');
  });
  it('a stale Doppler part is treated as missing', () => {
    const f = vexusRule(
      snapshot({
        measurements: [m('ivcDiameterMax', 2.3, 30), m('portalPulsatility', 60, 30)],
        coded: [coded('hepaticVeinPattern', 'severe', 8 * 60)],
      }),
      NOW,
      T,
    )[0]!;
    expect(f.values).toMatchObject({ vexusGradeMin: 2, vexusGradeMax: 3 });
  });
  it('wrong unit: IVC in mm is not used', () => {
    expect(vexus({ ivc: 23, ivcUnit: 'mm', hv: 'severe', pf: 60 }).status).toBe('not-assessed');
  });
});

describe('tolerance.cvp', () => {
  const run = (v?: number, ago = 30, unit?: string) =>
    cvpRule(snapshot({ measurements: v === undefined ? [] : [m('cvp', v, ago, unit ? { unit } : {})] }), NOW, T)[0]!;
  it('boundary: 12 mmHg is high (moderate), 11 is not', () => {
    expect(limit(run(12))).toBe('moderate');
    expect(limit(run(11))).toBe('none');
  });
  it('absent, stale (3 h) and wrong unit (cm[H2O]) → not assessed', () => {
    expect(run().status).toBe('not-assessed');
    expect(run(15, 180).status).toBe('not-assessed');
    expect(run(16, 30, 'cm[H2O]').status).toBe('not-assessed');
  });
});
