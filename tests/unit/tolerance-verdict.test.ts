/** The tolerance scheme, assessTolerance as a whole, and the thresholds schema. */
import { describe, expect, it } from 'vitest';
import { assessTolerance, TOLERANCE_RULES } from '../../src/assess/tolerance/index.js';
import { assessed, notAssessed, type ToleranceDomain, type ToleranceLimit } from '../../src/assess/tolerance/finding.js';
import { toleranceVerdict } from '../../src/assess/tolerance/verdict.js';
import { toleranceThresholdsSchema } from '../../src/assess/tolerance/thresholds.js';
import { coded, condition, hourly, m, NOW, snapshot, T } from '../helpers/tolerance-fixtures.js';
import { SNOMED } from '../../src/fhir/codes.js';

const f = (ruleId: string, domain: ToleranceDomain, l: ToleranceLimit, context = false) =>
  assessed({ ruleId, domain, limit: l, text: `${ruleId} ${l}`, evidence: [], source: 'test', context });

describe('toleranceVerdict', () => {
  it('one severe finding → poor, deciding rule named', () => {
    const v = toleranceVerdict([f('a', 'lungs', 'severe'), f('b', 'kidneys', 'moderate'), f('c', 'venous', 'none')], T);
    expect(v).toMatchObject({ value: 'poor', decidingRules: ['a'] });
    expect(v.rationale).toContain('a severe');
  });
  it('moderate findings in 3 domains → poor; in 2 → limited', () => {
    expect(toleranceVerdict([f('a', 'lungs', 'moderate'), f('b', 'kidneys', 'moderate'), f('c', 'conditions', 'moderate')], T).value).toBe('poor');
    const two = toleranceVerdict([f('a', 'lungs', 'moderate'), f('a2', 'lungs', 'moderate'), f('b', 'kidneys', 'moderate')], T);
    expect(two).toMatchObject({ value: 'limited', decidingRules: ['a', 'a2', 'b'] });
  });
  it('the domain count is a threshold', () => {
    const fs = [f('a', 'lungs', 'moderate'), f('b', 'kidneys', 'moderate')];
    expect(toleranceVerdict(fs, { poorWhenModerateDomains: 2 }).value).toBe('poor');
  });
  it('no limit among assessed markers → adequate, the assessed rules named', () => {
    const v = toleranceVerdict([f('a', 'lungs', 'none'), f('ctx', 'balance', 'none', true), notAssessed('n', 'venous', 'x', 'no data', 'test')], T);
    expect(v).toMatchObject({ value: 'adequate', decidingRules: ['a'] });
    expect(v.rationale).toContain('1 marker(s) not assessed');
  });
  it('nothing assessed → adequate in name only, the rationale says unknown', () => {
    const v = toleranceVerdict([notAssessed('n', 'venous', 'x', 'no data', 'test'), f('ctx', 'balance', 'none', true)], T);
    expect(v).toMatchObject({ value: 'adequate', decidingRules: [] });
    expect(v.rationale).toContain('unknown');
  });
  it('a context finding can never limit, whatever limit it was given', () => {
    expect(toleranceVerdict([f('ctx', 'balance', 'severe', true)], T).value).toBe('adequate');
  });
});

describe('assessTolerance', () => {
  it('runs every rule once, in a fixed order, and reports coverage', () => {
    const r = assessTolerance(snapshot(), NOW, T);
    expect(r.findings.map((x) => x.ruleId)).toEqual(TOLERANCE_RULES.map((x) => x.id));
    expect(r.findings.every((x) => x.status === 'not-assessed' && x.topic === 'tolerance' && x.reason)).toBe(true);
    expect(r.coverage).toEqual({ assessed: 0, notAssessed: TOLERANCE_RULES.length });
    expect(r.verdict.value).toBe('adequate');
    expect(r.verdict.rationale).toContain('unknown');
  });
  it('a congested patient: poor, with EVLWI and VExUS deciding', () => {
    const s = snapshot({
      measurements: [
        m('evlwi', 13.2, 90), m('ivcDiameterMax', 2.4, 60), m('portalPulsatility', 65, 60), m('albumin', 24, 600),
        m('bodyWeight', 80, 3 * 1440 - 30), ...hourly('urineOutput', 60, 12),
      ],
      coded: [coded('hepaticVeinPattern', 'severe', 60), coded('renalVeinPattern', 'monophasic', 60)],
      conditions: [condition(SNOMED, '84114007')],
    });
    const r = assessTolerance(s, NOW, T);
    expect(r.verdict.value).toBe('poor');
    expect(r.verdict.decidingRules).toEqual(['tolerance.evlwi', 'tolerance.vexus']);
    expect(r.ruleErrors).toEqual([]);
  });
  it('isolates a rule that throws: the error is recorded, a not-assessed finding stands in, the rest still count', () => {
    // A 0 kg weight (impossible; the snapshot layer would have excluded it) makes the %FO formula throw.
    const s = snapshot({ measurements: [m('bodyWeight', 0, 3 * 1440 - 30), m('fluidIntake', 3000, 0, { periodMinutes: 600 }), m('fluidOutput', 500, 0, { periodMinutes: 600 }), m('evlwi', 12, 60)] });
    const r = assessTolerance(s, NOW, T);
    expect(r.ruleErrors.map((e) => e.ruleId)).toContain('tolerance.fluid-overload');
    const fo = r.findings.find((x) => x.ruleId === 'tolerance.fluid-overload')!;
    expect(fo.status).toBe('not-assessed');
    expect(fo.reason).toMatch(/rule error/);
    expect(r.verdict.value).toBe('poor');
  });
});

describe('toleranceThresholdsSchema', () => {
  it('parse({}) gives the published defaults', () => {
    const t = toleranceThresholdsSchema.parse({});
    expect(t).toMatchObject({ fluidOverloadModeratePercent: 10, fluidOverloadSeverePercent: 20, albuminLowGPerL: 30, evlwiOedemaMlPerKg: 10, vexusIvcCm: 2, iahMmHg: 12, cvpHighMmHg: 12, portalSeverePercent: 50 });
  });
  it('takes a single override, rejects unknown keys and inverted bands', () => {
    expect(toleranceThresholdsSchema.parse({ cvpHighMmHg: 14 }).cvpHighMmHg).toBe(14);
    expect(toleranceThresholdsSchema.safeParse({ cvpHigh: 14 }).success).toBe(false);
    expect(toleranceThresholdsSchema.safeParse({ fluidOverloadModeratePercent: 25 }).success).toBe(false);
    expect(toleranceThresholdsSchema.safeParse({ oxygenationFreshMinutes: -1 }).success).toBe(false);
  });
});
