/** The tolerance scheme, assessTolerance as a whole, and the thresholds schema. */
import { describe, expect, it } from 'vitest';
import { assessTolerance, TOLERANCE_RULES } from '../../src/assess/tolerance/index.js';
import { assessed, notAssessed, type ToleranceDomain, type ToleranceLimit } from '../../src/assess/tolerance/finding.js';
import { countOnce, toleranceVerdict } from '../../src/assess/tolerance/verdict.js';
import { contextOf } from '../helpers/rule-context.js';
import { toleranceThresholdsSchema } from '../../src/assess/tolerance/thresholds.js';
import { coded, condition, hourly, m, NOW, snapshot, T } from '../helpers/tolerance-fixtures.js';
import { SNOMED } from '../../src/fhir/codes.js';

const f = (ruleId: string, domain: ToleranceDomain, l: ToleranceLimit, context = false) =>
  assessed({ ruleId, domain, limit: l, text: `${ruleId} ${l}`, evidence: [], source: 'test', context });

describe('toleranceVerdict (docs/clinical-logic/index.md, "Tolerance")', () => {
  it('a severe lung, venous or balance finding → poor, deciding rules named', () => {
    const v = toleranceVerdict([f('a', 'lungs', 'severe'), f('b', 'kidneys', 'moderate'), f('c', 'venous', 'none')], T);
    expect(v).toMatchObject({ value: 'poor', decidingRules: ['a', 'b'] });
    expect(v.rationale).toContain('a severe');
  });
  it('"poor" needs a lung, venous or balance finding: severe kidneys or abdomen alone stay limited', () => {
    const v = toleranceVerdict(
      [f('k', 'kidneys', 'severe'), f('i', 'abdomen', 'severe'), f('c', 'conditions', 'moderate'), f('s', 'lungs', 'none')],
      T,
    );
    expect(v.value).toBe('limited');
    expect(v.rationale).toMatch(/no lung, venous or balance finding, so not called poor/);
    expect(toleranceVerdict([f('k', 'kidneys', 'severe'), f('l', 'lungs', 'moderate')], T).value).toBe('poor');
  });
  it('moderate findings in 3 domains, one of them lungs/venous/balance → poor; without one → limited; in 2 → limited', () => {
    expect(toleranceVerdict([f('a', 'lungs', 'moderate'), f('b', 'kidneys', 'moderate'), f('c', 'conditions', 'moderate')], T).value).toBe(
      'poor',
    );
    expect(
      toleranceVerdict([f('a', 'abdomen', 'moderate'), f('b', 'kidneys', 'moderate'), f('c', 'conditions', 'moderate')], T).value,
    ).toBe('limited');
    const two = toleranceVerdict([f('a', 'lungs', 'moderate'), f('a2', 'lungs', 'moderate'), f('b', 'kidneys', 'moderate')], T);
    expect(two).toMatchObject({ value: 'limited', decidingRules: ['a', 'a2', 'b'] });
  });
  it('the domain count is a threshold', () => {
    const fs = [f('a', 'lungs', 'moderate'), f('b', 'kidneys', 'moderate')];
    expect(toleranceVerdict(fs, { ...T, poorWhenModerateDomains: 2 }).value).toBe('poor');
  });
  it('no limit among at least 3 assessed markers, one in lungs/venous/balance → adequate, with its coverage', () => {
    const v = toleranceVerdict(
      [
        f('a', 'lungs', 'none'),
        f('b', 'kidneys', 'none'),
        f('c', 'venous', 'none'),
        f('ctx', 'balance', 'none', true),
        notAssessed('n', 'venous', 'x', 'no data', 'test'),
      ],
      T,
    );
    expect(v).toMatchObject({ value: 'adequate', decidingRules: ['a', 'b', 'c'], coverage: { assessed: 3, total: 4 } });
    expect(v.rationale).toBe('No limit found in 3 of 4 markers.');
  });
  it('too few markers assessed → not known (never "adequate" by default)', () => {
    expect(toleranceVerdict([f('a', 'lungs', 'none'), f('b', 'kidneys', 'none')], T).value).toBe('not-known');
    expect(toleranceVerdict([f('a', 'kidneys', 'none'), f('b', 'conditions', 'none'), f('c', 'abdomen', 'none')], T).value).toBe(
      'not-known',
    );
    const v = toleranceVerdict([notAssessed('n', 'venous', 'x', 'no data', 'test'), f('ctx', 'balance', 'none', true)], T);
    expect(v).toMatchObject({ value: 'not-known', decidingRules: [] });
    expect(v.rationale).toMatch(/only 0 of 1 markers/);
  });
  it('a context finding can never limit, whatever limit it was given', () => {
    expect(toleranceVerdict([f('ctx', 'balance', 'severe', true)], T).value).toBe('not-known');
  });
  it('a number counts once: a CVP finding that decided responsiveness becomes context (docs/clinical-logic)', () => {
    const cvp = assessed({
      ruleId: 'tolerance.cvp',
      domain: 'venous',
      limit: 'moderate',
      text: 'CVP 14 mmHg',
      evidence: [],
      source: 'test',
      uses: ['cvp'],
    });
    const [counted] = countOnce([cvp], ['cvp']);
    expect(counted).toMatchObject({ contextOnly: true, limit: 'none' });
    expect(counted!.text).toMatch(/counted once/);
    expect(countOnce([cvp], [])[0]).toBe(cvp);
  });
});

describe('assessTolerance', () => {
  const run = (s: ReturnType<typeof snapshot>, counted: Parameters<typeof assessTolerance>[1] = []) =>
    assessTolerance(contextOf(s, NOW, T), counted);
  it('runs every rule once, in a fixed order, and reports coverage', () => {
    const r = run(snapshot());
    expect(r.findings.map((x) => x.ruleId)).toEqual(TOLERANCE_RULES.map((x) => x.id));
    expect(r.findings.every((x) => x.status === 'not-assessed' && x.topic === 'tolerance' && x.reason)).toBe(true);
    expect(r.coverage).toEqual({ assessed: 0, total: TOLERANCE_RULES.length, notAssessed: TOLERANCE_RULES.length });
    expect(r.verdict.value).toBe('not-known');
  });
  it('a congested patient: poor, with EVLWI and VExUS deciding', () => {
    const s = snapshot({
      measurements: [
        m('evlwi', 13.2, 90),
        m('ivcDiameterMax', 2.4, 60),
        m('portalPulsatility', 65, 60),
        m('albumin', 24, 600),
        m('bodyWeight', 80, 3 * 1440 - 30),
        ...hourly('urineOutput', 60, 12),
      ],
      coded: [coded('hepaticVeinPattern', 'severe', 60), coded('renalVeinPattern', 'monophasic', 60)],
      conditions: [condition(SNOMED, '84114007')],
    });
    const r = run(s);
    expect(r.verdict.value).toBe('poor');
    expect(r.verdict.decidingRules).toEqual(['tolerance.evlwi', 'tolerance.vexus', 'tolerance.conditions']);
    expect(r.ruleErrors).toEqual([]);
  });
  it('a CVP of 14 limits tolerance unless it decided responsiveness', () => {
    const s = snapshot({ measurements: [m('cvp', 14, 30)] });
    expect(run(s).findings.find((x) => x.ruleId === 'tolerance.cvp')).toMatchObject({ limit: 'moderate', contextOnly: false });
    expect(run(s, ['cvp']).findings.find((x) => x.ruleId === 'tolerance.cvp')).toMatchObject({ limit: 'none', contextOnly: true });
  });
  it('isolates a rule that throws: the error is recorded, a not-assessed finding stands in, the rest still count', () => {
    // A 0 kg weight (impossible; the snapshot layer would have excluded it) makes the %FO formula throw.
    const s = snapshot({
      measurements: [
        m('bodyWeight', 0, 3 * 1440 - 30),
        m('fluidIntake', 3000, 0, { periodMinutes: 600 }),
        m('fluidOutput', 500, 0, { periodMinutes: 600 }),
        m('evlwi', 12, 60),
      ],
    });
    const r = run(s);
    expect(r.ruleErrors.map((e) => e.ruleId)).toContain('tolerance.fluid-overload');
    const fo = r.findings.find((x) => x.ruleId === 'tolerance.fluid-overload')!;
    expect(fo).toMatchObject({ status: 'not-assessed', gap: 'rule-error' });
    expect(r.verdict.value).toBe('poor');
  });
});

describe('toleranceThresholdsSchema', () => {
  it('parse({}) gives the published defaults', () => {
    const t = toleranceThresholdsSchema.parse({});
    expect(t).toMatchObject({
      adultFluidOverloadPercent: 10,
      adequateMinMarkers: 3,
      bLineBilateralPerSide: 2,
      fluidOverloadModeratePercent: 10,
      fluidOverloadSeverePercent: 20,
      albuminLowGPerL: 30,
      evlwiOedemaMlPerKg: 10,
      vexusIvcCm: 2,
      iahMmHg: 12,
      cvpHighMmHg: 12,
      portalSeverePercent: 50,
    });
  });
  it('takes a single override, rejects unknown keys and inverted bands', () => {
    expect(toleranceThresholdsSchema.parse({ cvpHighMmHg: 14 }).cvpHighMmHg).toBe(14);
    expect(toleranceThresholdsSchema.safeParse({ cvpHigh: 14 }).success).toBe(false);
    expect(toleranceThresholdsSchema.safeParse({ fluidOverloadModeratePercent: 25 }).success).toBe(false);
    expect(toleranceThresholdsSchema.safeParse({ oxygenationFreshMinutes: -1 }).success).toBe(false);
  });
});
