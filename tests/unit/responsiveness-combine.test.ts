/**
 * Evidence tiers and confidence (docs/clinical-logic/index.md, "Evidence tiers"): a dynamic test with a flow measurement or
 * a valid PPV/SVV decides; statics only corroborate — two agreeing statics give at most a LOW-confidence verdict, a
 * conflict gives indeterminate, a single static never decides. Plus the next test, defaults and rule-error isolation.
 */
import { describe, expect, it } from 'vitest';
import type { ResponsivenessFinding } from '../../src/assess/common/finding.js';
import { combineResponsiveness } from '../../src/assess/responsiveness/combine.js';
import {
  assessResponsiveness,
  DEFAULT_RESPONSIVENESS_THRESHOLDS,
  RESPONSIVENESS_RULE_IDS,
  responsivenessThresholdsSchema,
} from '../../src/assess/responsiveness/index.js';
import type { PatientSnapshot } from '../../src/snapshot/types.js';
import { contextOf, responsivenessContext } from '../helpers/rule-context.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';

const T = responsivenessThresholdsSchema.parse({});
const run = (b: SnapshotBuilder) => assessResponsiveness(responsivenessContext(b, T));
const verdict = (b: SnapshotBuilder) => run(b).verdict;

// Invented markers, one builder call each.
const plrFor = (b: SnapshotBuilder) => b.dynamicTest('plr', 'cardiacOutput', 4.0, 4.6, { ageMin: 10 });
const plrAgainst = (b: SnapshotBuilder) => b.dynamicTest('plr', 'cardiacOutput', 4.0, 4.1, { ageMin: 10 });
const mfcAgainst = (b: SnapshotBuilder) => b.dynamicTest('miniFluidChallenge', 'vti', 20, 20.5, { ageMin: 10 });
const cvpLow = (b: SnapshotBuilder) => b.measure('cvp', 2, { ageMin: 5 });
const cvpHigh = (b: SnapshotBuilder) => b.measure('cvp', 15, { ageMin: 5 });
const cvpMid = (b: SnapshotBuilder) => b.measure('cvp', 8, { ageMin: 5 });
const ivcSpont = (b: SnapshotBuilder, mx: number, mn: number) =>
  b
    .coded('ventilationMode', 'spontaneous', { ageMin: 30 })
    .measure('ivcDiameterMax', mx, { ageMin: 20 })
    .measure('ivcDiameterMin', mn, { ageMin: 20 });
const plrPp = (b: SnapshotBuilder, after: number) => b.dynamicTest('plr', 'pulsePressure', 50, after, { ageMin: 10 });
const validPpv = (b: SnapshotBuilder, ppv: number) =>
  b
    .coded('ventilationMode', 'controlled-no-effort', { ageMin: 20 })
    .coded('heartRhythm', 'sinus', { ageMin: 20 })
    .coded('chestStatus', 'closed', { ageMin: 20 })
    .measure('tidalVolume', 600, { ageMin: 10 })
    .measure('bodyHeight', 175, { ageMin: 900 })
    .measure('intraAbdominalPressure', 7, { ageMin: 60 })
    .vitals({ hr: 100, rr: 20 }, { ageMin: 5 })
    .measure('ppv', ppv, { ageMin: 5 });

describe('tiers and confidence', () => {
  it('a flow-based dynamic test decides with high confidence', () => {
    const v = verdict(plrFor(new SnapshotBuilder()));
    expect(v).toMatchObject({ value: 'likely', confidence: 'high', decidingRules: ['responsiveness.plr'] });
    expect(verdict(plrAgainst(new SnapshotBuilder()))).toMatchObject({ value: 'unlikely', confidence: 'high' });
  });
  it('a valid PPV alone decides with moderate confidence', () => {
    expect(verdict(validPpv(new SnapshotBuilder(), 16))).toMatchObject({
      value: 'likely',
      confidence: 'moderate',
      decidingRules: ['responsiveness.ppv'],
    });
  });
  it('dynamic outranks static: PLR for + CVP 15 against → likely, the CVP named as corroborating only', () => {
    const v = verdict(cvpHigh(plrFor(new SnapshotBuilder())));
    expect(v.value).toBe('likely');
    expect(v.decidingRules).toEqual(['responsiveness.plr']);
    expect(v.rationale).toMatch(/static markers only corroborate: CVP \(against\)/);
  });
  it('conflict among dynamic tests → indeterminate, both named', () => {
    const v = verdict(cvpLow(mfcAgainst(plrFor(new SnapshotBuilder()))));
    expect(v.value).toBe('indeterminate');
    expect(v.rationale).toBe('Conflicting dynamic evidence: PLR for, mini fluid challenge against fluid responsiveness.');
    expect(v.confidence).toBeUndefined();
  });
  it('a single CVP extreme never decides alone (Eskesen 2016: no CVP value predicts well)', () => {
    for (const b of [cvpLow(new SnapshotBuilder()), cvpHigh(new SnapshotBuilder())]) {
      const v = verdict(b);
      expect(v.value).toBe('indeterminate');
      expect(v.rationale).toMatch(/a static marker only corroborates/);
    }
  });
  it('a single IVC in spontaneous breathing never decides', () => {
    expect(verdict(ivcSpont(new SnapshotBuilder(), 1.6, 0.6)).value).toBe('indeterminate');
  });
  it('two agreeing statics give a LOW-confidence verdict (IVC 45 % + PLR by pulse pressure +14 %)', () => {
    const v = verdict(plrPp(ivcSpont(new SnapshotBuilder(), 2.4, 1.3), 57));
    expect(v).toMatchObject({ value: 'likely', confidence: 'low' });
    expect([...v.decidingRules].sort()).toEqual(['responsiveness.ivc', 'responsiveness.plr']);
  });
  it('two agreeing statics against (CVP 15 + wide, fixed IVC) → unlikely, low confidence', () => {
    expect(verdict(ivcSpont(cvpHigh(new SnapshotBuilder()), 2.5, 2.4))).toMatchObject({ value: 'unlikely', confidence: 'low' });
  });
  it('conflicting statics → indeterminate (CVP 2 vs wide non-collapsing IVC)', () => {
    const v = verdict(ivcSpont(cvpLow(new SnapshotBuilder()), 2.5, 2.4));
    expect(v.value).toBe('indeterminate');
    expect(v.rationale).toMatch(/Conflicting static markers \(CVP for, IVC against\)/);
  });
  it('a mid-range CVP → indeterminate, no marker points either way', () => {
    expect(verdict(cvpMid(new SnapshotBuilder())).rationale).toBe('No marker points either way: CVP inconclusive.');
  });
  it('a grey-zone PPV does not vote; a static then does not decide alone', () => {
    const b = validPpv(new SnapshotBuilder(), 11);
    expect(verdict(b).value).toBe('indeterminate');
    expect(verdict(cvpLow(b)).value).toBe('indeterminate');
  });
  it('stale data never counts: a PLR of 61 min ago leaves the verdict indeterminate', () => {
    const v = verdict(new SnapshotBuilder().dynamicTest('plr', 'cardiacOutput', 4, 5, { ageMin: 61 }));
    expect(v.value).toBe('indeterminate');
    expect(v.rationale).toBe('No usable marker of fluid responsiveness.');
  });
  it('a PLR taken before the latest 250 mL bolus is set aside (docs/clinical-logic, events make evidence old)', () => {
    const b = plrFor(new SnapshotBuilder()).fluid({ volumeMl: 250, startAgeMin: 8, endAgeMin: 2 });
    const r = run(b);
    expect(r.verdict.value).toBe('indeterminate');
    expect(r.findings.find((f) => f.ruleId === 'responsiveness.plr')).toMatchObject({ status: 'not-assessed', gap: 'set-aside' });
  });
  it('a fluid of 50 mL (below 100 mL) does not set a PLR aside; a vasoactive started after it does', () => {
    expect(verdict(plrFor(new SnapshotBuilder()).fluid({ volumeMl: 50, startAgeMin: 8, endAgeMin: 7 })).value).toBe('likely');
    expect(
      verdict(plrFor(new SnapshotBuilder()).vasoactive({ drug: 'norepinephrine', startAgeMin: 5, rate: { value: 0.1, unit: 'ug/kg/min' } }))
        .value,
    ).toBe('indeterminate');
  });
});

describe('next test (a kind from a closed set)', () => {
  it('no flow monitor: a mini fluid challenge with VTI by echo', () => {
    expect(verdict(new SnapshotBuilder()).nextTest).toBe('mini-fluid-challenge');
  });
  it('a flow monitor in use (cardiac output charted): passive leg raising', () => {
    expect(verdict(new SnapshotBuilder().measure('cardiacOutput', 5, { ageMin: 30 })).nextTest).toBe('passive-leg-raise');
  });
  it('controlled, sinus, low tidal volume with a PPV: tidal volume challenge (Myatra 2017)', () => {
    const b = new SnapshotBuilder({ sex: 'male' })
      .coded('ventilationMode', 'controlled-no-effort', { ageMin: 10 })
      .coded('heartRhythm', 'sinus', { ageMin: 10 })
      .measure('tidalVolume', 420, { ageMin: 10 })
      .measure('bodyHeight', 175, { ageMin: 900 })
      .measure('ppv', 6, { ageMin: 5 });
    expect(verdict(b).nextTest).toBe('tidal-volume-challenge');
  });
  it('intra-abdominal hypertension: mini fluid challenge even with a flow monitor (Mahjoub 2010)', () => {
    const v = verdict(
      new SnapshotBuilder().measure('cardiacOutput', 5, { ageMin: 30 }).measure('intraAbdominalPressure', 16, { ageMin: 30 }),
    );
    expect(v.nextTest).toBe('mini-fluid-challenge');
  });
});

describe('combineResponsiveness on hand-made findings', () => {
  const f = (
    ruleId: string,
    direction: ResponsivenessFinding['direction'],
    tier: ResponsivenessFinding['tier'],
    extra: Partial<ResponsivenessFinding> = {},
  ): ResponsivenessFinding => ({
    ruleId,
    topic: 'responsiveness',
    marker: 'ivc',
    status: 'assessed',
    ...(direction ? { direction } : {}),
    ...(tier ? { tier } : {}),
    text: ruleId,
    evidence: [],
    ...extra,
  });
  it('not-assessed and context findings never vote', () => {
    const v = combineResponsiveness(
      [f('a', 'for', 'dynamic', { status: 'not-assessed' }), f('b', 'for', 'context')],
      T,
      'passive-leg-raise',
    );
    expect(v).toEqual({
      value: 'indeterminate',
      rationale: 'No usable marker of fluid responsiveness.',
      decidingRules: [],
      nextTest: 'passive-leg-raise',
    });
  });
  it('staticAgreementMinCount is configurable', () => {
    const fs = [f('x', 'for', 'static'), f('y', 'for', 'static')];
    expect(combineResponsiveness(fs, T, 'passive-leg-raise')).toMatchObject({ value: 'likely', confidence: 'low' });
    expect(combineResponsiveness(fs, { staticAgreementMinCount: 3 }, 'passive-leg-raise').value).toBe('indeterminate');
  });
  it('assumptions of the assessed findings are carried on the verdict', () => {
    const v = combineResponsiveness(
      [f('p', 'for', 'dynamic', { marker: 'ppv', assumptions: ['chest status not recorded: assumed closed'] })],
      T,
      'passive-leg-raise',
    );
    expect(v.assumptions).toEqual(['chest status not recorded: assumed closed']);
  });
});

describe('output shape', () => {
  it('one finding per rule, in registry order, every not-assessed finding has a reason and a gap code', () => {
    const r = run(new SnapshotBuilder());
    expect(r.findings.map((x) => x.ruleId)).toEqual([...RESPONSIVENESS_RULE_IDS]);
    for (const x of r.findings) {
      expect(x.status).toBe('not-assessed');
      expect(x.reason).toBeTruthy();
      expect(x.gap).toBeTruthy();
      expect(x.source).toBeTruthy();
    }
    expect(r.ruleErrors).toEqual([]);
  });
  it('a rule that throws is isolated: reported, the others still count', () => {
    const b = plrFor(new SnapshotBuilder());
    const s = b.build();
    const broken = { ...s, fluids: null } as unknown as PatientSnapshot;
    const r = assessResponsiveness({ ...contextOf(s, b.now, T), snapshot: broken });
    expect(r.ruleErrors.map((e) => e.ruleId)).toEqual(['responsiveness.last-bolus']);
    expect(r.findings.find((x) => x.ruleId === 'responsiveness.last-bolus')).toMatchObject({ gap: 'rule-error' });
    expect(r.verdict.value).toBe('likely');
  });
  it('thresholds: parse({}) gives the documented defaults; bad values are rejected', () => {
    expect(DEFAULT_RESPONSIVENESS_THRESHOLDS).toMatchObject({
      ppvThresholdPercent: 13,
      ppvGreyZoneLowPercent: 9,
      svvThresholdPercent: 11.6,
      minTidalVolumeMlPerKgPbw: 8,
      minHeartRateRespiratoryRateRatio: 3.6,
      iahThresholdMmHg: 12,
      plrFlowRisePercent: 10,
      miniFluidChallengeRisePercent: 10,
      eeoFlowRisePercent: 5,
      tidalVolumeChallengePpvRisePoints: 3.5,
      ivcCollapsibilityPercent: 40,
      ivcDistensibilityBarbierPercent: 18,
      ivcDistensibilityFeisselPercent: 12,
      cvpLowMmHg: 3,
      cvpHighMmHg: 12,
      denseMaxGapMin: 5,
      flowAfterEndMaxMin: 10,
    });
    expect(responsivenessThresholdsSchema.safeParse({ ppvThresholdPercent: -1 }).success).toBe(false);
    expect(responsivenessThresholdsSchema.safeParse({ ivcDistensibilityMethod: 'other' }).success).toBe(false);
    expect(responsivenessThresholdsSchema.parse({ cvpHighMmHg: 14 }).cvpHighMmHg).toBe(14);
    expect(responsivenessThresholdsSchema.safeParse({ ppvThreshold: 12 }).success).toBe(false); // misspelt key
    expect(responsivenessThresholdsSchema.safeParse({ vitalsMaxAgeMin: 60 }).success).toBe(false); // windows moved to thresholds.windows
    expect(responsivenessThresholdsSchema.safeParse({ ppvGreyZoneLowPercent: 14 }).success).toBe(false); // above the threshold
    expect(responsivenessThresholdsSchema.safeParse({ cvpLowMmHg: 12 }).success).toBe(false); // not below cvpHighMmHg
  });
});
