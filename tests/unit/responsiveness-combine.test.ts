/**
 * Combination cases: dynamic outranks static; conflict within a tier → indeterminate with the conflict named; a single
 * static marker never decides except at its extremes; two agreeing static markers decide; stale never counts; the
 * next test is named when indeterminate. Plus thresholds defaults and rule-error isolation.
 */
import { describe, expect, it } from 'vitest';
import { combineResponsiveness } from '../../src/assess/responsiveness/combine.js';
import {
  assessResponsiveness, DEFAULT_RESPONSIVENESS_THRESHOLDS, RESPONSIVENESS_RULE_IDS, responsivenessThresholdsSchema,
} from '../../src/assess/responsiveness/index.js';
import type { Finding } from '../../src/assess/types.js';
import type { PatientSnapshot } from '../../src/snapshot/types.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';

const T = responsivenessThresholdsSchema.parse({});
const run = (b: SnapshotBuilder) => assessResponsiveness(b.build(), b.now, T);
const verdict = (b: SnapshotBuilder) => run(b).verdict;

// Invented markers, one builder call each.
const plrFor = (b: SnapshotBuilder) => b.dynamicTest('plr', 'cardiacOutput', 4.0, 4.6, { ageMin: 10 });
const plrAgainst = (b: SnapshotBuilder) => b.dynamicTest('plr', 'cardiacOutput', 4.0, 4.1, { ageMin: 10 });
const mfcAgainst = (b: SnapshotBuilder) => b.dynamicTest('miniFluidChallenge', 'vti', 20, 20.5, { ageMin: 10 });
const cvpLow = (b: SnapshotBuilder) => b.measure('cvp', 2, { ageMin: 5 });
const cvpHigh = (b: SnapshotBuilder) => b.measure('cvp', 15, { ageMin: 5 });
const cvpMid = (b: SnapshotBuilder) => b.measure('cvp', 8, { ageMin: 5 });
const ivcSpont = (b: SnapshotBuilder, mx: number, mn: number) =>
  b.coded('ventilationMode', 'spontaneous', { ageMin: 30 }).measure('ivcDiameterMax', mx, { ageMin: 20 }).measure('ivcDiameterMin', mn, { ageMin: 20 });
const plrPp = (b: SnapshotBuilder, after: number) => b.dynamicTest('plr', 'pulsePressure', 50, after, { ageMin: 10 });

describe('tiers', () => {
  it('a single valid dynamic marker decides', () => {
    const v = verdict(plrFor(new SnapshotBuilder()));
    expect(v.value).toBe('likely');
    expect(v.decidingRules).toEqual(['responsiveness.plr']);
    expect(v.nextTest).toBeUndefined();
    expect(verdict(plrAgainst(new SnapshotBuilder())).value).toBe('unlikely');
  });
  it('dynamic outranks static-extreme: PLR for + CVP 15 against → likely, CVP named as outranked', () => {
    const v = verdict(cvpHigh(plrFor(new SnapshotBuilder())));
    expect(v.value).toBe('likely');
    expect(v.decidingRules).toEqual(['responsiveness.plr']);
    expect(v.rationale).toMatch(/outranked: CVP \(static-extreme, against\)/);
  });
  it('conflict in the dynamic tier → indeterminate, both named, lower tiers not consulted', () => {
    const v = verdict(cvpLow(mfcAgainst(plrFor(new SnapshotBuilder()))));
    expect(v.value).toBe('indeterminate');
    expect(v.rationale).toBe('Conflicting dynamic evidence: PLR for, mini fluid challenge against fluid responsiveness.');
    expect([...v.decidingRules].sort()).toEqual(['responsiveness.mini-fluid-challenge', 'responsiveness.plr']);
    expect(v.nextTest).toBeTruthy();
  });
  it('a single static-extreme marker decides (CVP 2 → likely, CVP 15 → unlikely)', () => {
    expect(verdict(cvpLow(new SnapshotBuilder())).value).toBe('likely');
    expect(verdict(cvpHigh(new SnapshotBuilder())).value).toBe('unlikely');
  });
  it('conflicting static-extreme markers → indeterminate (CVP 2 vs wide non-collapsing IVC)', () => {
    const v = verdict(ivcSpont(cvpLow(new SnapshotBuilder()), 2.5, 2.4));
    expect(v.value).toBe('indeterminate');
    expect(v.rationale).toMatch(/Conflicting static-extreme evidence: CVP for, IVC against/);
  });
  it('a single static marker never decides (IVC collapsibility 45 % alone)', () => {
    const v = verdict(ivcSpont(new SnapshotBuilder(), 2.4, 1.3));
    expect(v.value).toBe('indeterminate');
    expect(v.rationale).toMatch(/a single static marker does not decide/);
    expect(v.decidingRules).toEqual(['responsiveness.ivc']);
  });
  it('a single static mid-range CVP → indeterminate, no marker points either way', () => {
    const v = verdict(cvpMid(new SnapshotBuilder()));
    expect(v.value).toBe('indeterminate');
    expect(v.rationale).toBe('No marker points either way: CVP inconclusive.');
  });
  it('two agreeing static markers decide (IVC 45 % + PLR by pulse pressure +14 %)', () => {
    const v = verdict(plrPp(ivcSpont(new SnapshotBuilder(), 2.4, 1.3), 57));
    expect(v.value).toBe('likely');
    expect([...v.decidingRules].sort()).toEqual(['responsiveness.ivc', 'responsiveness.plr']);
  });
  it('conflicting static markers → indeterminate', () => {
    const v = verdict(plrPp(ivcSpont(new SnapshotBuilder(), 2.4, 1.3), 51));
    expect(v.value).toBe('indeterminate');
    expect(v.rationale).toMatch(/Conflicting static evidence/);
  });
  it('a grey-zone PPV does not vote: a static-extreme marker then decides', () => {
    const b = new SnapshotBuilder()
      .coded('ventilationMode', 'controlled-no-effort', { ageMin: 20 }).coded('heartRhythm', 'sinus', { ageMin: 20 })
      .coded('chestStatus', 'closed', { ageMin: 20 }).measure('tidalVolume', 600, { ageMin: 10 }).measure('bodyHeight', 175, { ageMin: 900 })
      .measure('intraAbdominalPressure', 7, { ageMin: 60 }).vitals({ hr: 100, rr: 20 }, { ageMin: 5 }).measure('ppv', 11, { ageMin: 5 });
    expect(verdict(b).value).toBe('indeterminate');
    expect(verdict(cvpLow(b)).value).toBe('likely');
  });
  it('stale data never counts: a PLR of 61 min ago leaves the verdict indeterminate', () => {
    const v = verdict(new SnapshotBuilder().dynamicTest('plr', 'cardiacOutput', 4, 5, { ageMin: 61 }));
    expect(v.value).toBe('indeterminate');
    expect(v.rationale).toBe('No usable marker of fluid responsiveness.');
  });
});

describe('next test when indeterminate', () => {
  it('no data: PLR with real-time cardiac output, else a mini fluid challenge with VTI', () => {
    const v = verdict(new SnapshotBuilder());
    expect(v.nextTest).toMatch(/^Passive leg raising with real-time cardiac output/);
    expect(v.nextTest).toMatch(/mini fluid challenge \(100 mL over 1 min\) with subaortic VTI/);
  });
  it('controlled ventilation: PLR or end-expiratory occlusion', () => {
    const v = verdict(new SnapshotBuilder().coded('ventilationMode', 'controlled-with-effort', { ageMin: 10 }));
    expect(v.nextTest).toMatch(/end-expiratory occlusion test/);
  });
  it('controlled, sinus, low tidal volume (PPV invalid for Vt): tidal volume challenge', () => {
    const b = new SnapshotBuilder({ sex: 'male' })
      .coded('ventilationMode', 'controlled-no-effort', { ageMin: 10 }).coded('heartRhythm', 'sinus', { ageMin: 10 })
      .measure('tidalVolume', 420, { ageMin: 10 }).measure('bodyHeight', 175, { ageMin: 900 }).measure('ppv', 16, { ageMin: 5 });
    const v = verdict(b);
    expect(v.value).toBe('indeterminate');
    expect(v.nextTest).toMatch(/^Tidal volume challenge/);
  });
  it('intra-abdominal hypertension: mini fluid challenge', () => {
    const v = verdict(new SnapshotBuilder().measure('intraAbdominalPressure', 16, { ageMin: 30 }));
    expect(v.nextTest).toMatch(/^Mini fluid challenge/);
  });
});

describe('combineResponsiveness on hand-made findings', () => {
  const f = (ruleId: string, direction: Finding['direction'], weight: Finding['weight'], extra: Partial<Finding> = {}): Finding =>
    ({ ruleId, topic: 'responsiveness', status: 'assessed', ...(direction ? { direction } : {}), ...(weight ? { weight } : {}), text: ruleId, evidence: [], ...extra });
  it('not-assessed, context and perfusion findings never vote', () => {
    const v = combineResponsiveness([
      f('a', 'for', 'dynamic', { status: 'not-assessed' }), f('b', 'for', 'context'), f('c', 'for', 'dynamic', { topic: 'perfusion' }),
    ], T, 'next');
    expect(v).toEqual({ value: 'indeterminate', rationale: 'No usable marker of fluid responsiveness.', decidingRules: [], nextTest: 'next' });
  });
  it('staticAgreementMinCount is configurable', () => {
    const fs = [f('x', 'for', 'static'), f('y', 'for', 'static')];
    expect(combineResponsiveness(fs, T, 'n').value).toBe('likely');
    expect(combineResponsiveness(fs, { staticAgreementMinCount: 3 }, 'n').value).toBe('indeterminate');
  });
});

describe('output shape', () => {
  it('one finding per rule, in registry order, every not-assessed finding has a reason', () => {
    const r = run(new SnapshotBuilder());
    expect(r.findings.map((x) => x.ruleId)).toEqual([...RESPONSIVENESS_RULE_IDS]);
    for (const x of r.findings) {
      expect(x.status).toBe('not-assessed');
      expect(x.reason).toBeTruthy();
      expect(x.source).toBeTruthy();
    }
    expect(r.ruleErrors).toEqual([]);
  });
  it('a rule that throws is isolated: reported, the others still count', () => {
    const s = plrFor(new SnapshotBuilder()).build();
    const broken = { ...s, fluids: null } as unknown as PatientSnapshot;
    const r = assessResponsiveness(broken, new Date(s.now), T);
    expect(r.ruleErrors.map((e) => e.ruleId)).toEqual(['responsiveness.last-bolus']);
    expect(r.findings.find((x) => x.ruleId === 'responsiveness.last-bolus')?.reason).toMatch(/^rule error/);
    expect(r.verdict.value).toBe('likely');
  });
  it('thresholds: parse({}) gives the documented defaults; bad values are rejected', () => {
    expect(DEFAULT_RESPONSIVENESS_THRESHOLDS).toMatchObject({
      ppvThresholdPercent: 13, ppvGreyZoneLowPercent: 9, svvThresholdPercent: 11.6, minTidalVolumeMlPerKgPbw: 8,
      minHeartRateRespiratoryRateRatio: 3.6, iahThresholdMmHg: 12, plrFlowRisePercent: 10, miniFluidChallengeRisePercent: 10,
      eeoFlowRisePercent: 5, tidalVolumeChallengePpvRisePoints: 3.5, ivcCollapsibilityPercent: 40, ivcDistensibilityBarbierPercent: 18,
      ivcDistensibilityFeisselPercent: 12, cvpLowMmHg: 3, cvpHighMmHg: 12, capillaryRefillMaxNormalS: 3, lactateMaxNormalMmolL: 2,
      mapTargetMmHg: 65, shockIndexHigh: 1, vitalsMaxAgeMin: 60, ppvSvvMaxAgeMin: 30, dynamicTestMaxAgeMin: 60, lactateMaxAgeMin: 360, ivcMaxAgeMin: 360,
    });
    expect(responsivenessThresholdsSchema.safeParse({ ppvThresholdPercent: -1 }).success).toBe(false);
    expect(responsivenessThresholdsSchema.safeParse({ ivcDistensibilityMethod: 'other' }).success).toBe(false);
    expect(responsivenessThresholdsSchema.parse({ cvpHighMmHg: 14 }).cvpHighMmHg).toBe(14);
    expect(responsivenessThresholdsSchema.safeParse({ ppvThreshold: 12 }).success).toBe(false); // misspelt key
    expect(responsivenessThresholdsSchema.safeParse({ ppvGreyZoneLowPercent: 14 }).success).toBe(false); // above the threshold
    expect(responsivenessThresholdsSchema.safeParse({ cvpLowMmHg: 12 }).success).toBe(false); // not below cvpHighMmHg
  });
});
