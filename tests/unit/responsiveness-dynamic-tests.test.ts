/**
 * Truth tables for the before/after tests. Boundaries: PLR flow ≥ 10 %, PLR pulse pressure ≥ 12 % (static, weak);
 * mini fluid challenge ≥ 10 %; EEO CI/CO/SV strictly > 5 %, VTI ≥ 9 %, pulse pressure > 5 % (static, weak);
 * tidal volume challenge ΔPPV ≥ 3.5 points, ΔSVV ≥ 2.5 points. Fresh when age ≤ 60 min.
 * Values are chosen so that the change is exact in binary floating point at the boundaries.
 */
import { describe, expect, it } from 'vitest';
import { assessResponsiveness, responsivenessThresholdsSchema } from '../../src/assess/responsiveness/index.js';
import type { ResponsivenessFinding as Finding } from '../../src/assess/common/finding.js';
import { responsivenessContext } from '../helpers/rule-context.js';
import type { DynamicMeasured, DynamicTestKind } from '../../src/fhir/codes.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';

const T = responsivenessThresholdsSchema.parse({});
const ID: Record<DynamicTestKind, string> = {
  plr: 'responsiveness.plr',
  miniFluidChallenge: 'responsiveness.mini-fluid-challenge',
  endExpiratoryOcclusion: 'responsiveness.end-expiratory-occlusion',
  tidalVolumeChallenge: 'responsiveness.tidal-volume-challenge',
};

function find(b: SnapshotBuilder, id: string): Finding {
  const f = assessResponsiveness(responsivenessContext(b, T)).findings.find((x) => x.ruleId === id);
  if (!f) throw new Error(`no finding ${id}`);
  return f;
}
function test1(
  kind: DynamicTestKind,
  measured: DynamicMeasured,
  before: number,
  after: number,
  opts: { ageMin?: number; unit?: string; b?: SnapshotBuilder } = {},
) {
  const b = opts.b ?? new SnapshotBuilder();
  b.dynamicTest(kind, measured, before, after, { ageMin: opts.ageMin ?? 10, ...(opts.unit ? { unit: opts.unit } : {}) });
  return find(b, ID[kind]);
}
/** Ventilated, sinus: the state the tidal volume challenge needs. */
const ventilated = (mode = 'controlled-no-effort', rhythm = 'sinus') =>
  new SnapshotBuilder().coded('ventilationMode', mode, { ageMin: 15 }).coded('heartRhythm', rhythm, { ageMin: 15 });

describe('passive leg raising (Monnet 2016: CO rise ≥ 10 %)', () => {
  it.each([
    ['cardiacOutput', 4.0, 4.5, 'for'],
    ['cardiacOutput', 5, 5.5, 'for'],
    ['cardiacOutput', 5, 5.49, 'against'],
    ['cardiacIndex', 2.5, 2.75, 'for'],
    ['strokeVolume', 50, 55, 'for'],
    ['strokeVolume', 50, 52, 'against'],
    ['vti', 20, 22, 'for'],
  ] as const)('%s %s → %s: %s (dynamic)', (measured, before, after, direction) => {
    const f = test1('plr', measured, before, after);
    expect(f.status).toBe('assessed');
    expect(f.direction).toBe(direction);
    expect(f.tier).toBe('dynamic');
  });
  it('CO 4.0 → 4.5 is +12.5 %', () => {
    const f = test1('plr', 'cardiacOutput', 4.0, 4.5);
    expect(f.values?.changePercent).toBe(12.5);
    expect(f.text).toMatch(/\+12\.5 %; threshold ≥ 10 %/);
  });
  it('judged by pulse pressure: labelled weak and weighed as static (≥ 12 %)', () => {
    const pos = test1('plr', 'pulsePressure', 50, 56);
    expect(pos.direction).toBe('for');
    expect(pos.tier).toBe('static');
    expect(pos.text).toMatch(/weak evidence, a static marker that only corroborates/);
    expect(test1('plr', 'pulsePressure', 50, 55.9).direction).toBe('against');
  });
  it('a flow read-out is preferred to a newer pulse-pressure one', () => {
    const b = new SnapshotBuilder()
      .dynamicTest('plr', 'cardiacOutput', 4, 4.1, { ageMin: 40 })
      .dynamicTest('plr', 'pulsePressure', 50, 60, { ageMin: 5 });
    const f = find(b, ID.plr);
    expect(f.tier).toBe('dynamic');
    expect(f.direction).toBe('against');
  });
  it('PLR read by PPV is not a validated read-out', () => {
    const f = test1('plr', 'ppv', 10, 8);
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toMatch(/no validated threshold/);
  });
  it('absent, stale (61 min), fresh at 60 min, invalid baseline', () => {
    expect(find(new SnapshotBuilder(), ID.plr).reason).toBe('no passive leg raising recorded');
    expect(test1('plr', 'cardiacOutput', 4, 5, { ageMin: 60 }).status).toBe('assessed');
    const stale = test1('plr', 'cardiacOutput', 4, 5, { ageMin: 61 });
    expect(stale.status).toBe('not-assessed');
    expect(stale.reason).toBe('Passive leg raising stale (age 61 min, window 60 min)');
    const bad = test1('plr', 'cardiacOutput', 0, 5);
    expect(bad.status).toBe('not-assessed');
    expect(bad.gap).toBe('invalid');
  });
});

describe('mini fluid challenge (Muller 2011: ΔVTI ≥ 10 %)', () => {
  it.each([
    ['vti', 18, 20, 'for'],
    ['vti', 20, 22, 'for'],
    ['vti', 20, 21.9, 'against'],
    ['strokeVolume', 60, 66, 'for'],
    ['cardiacOutput', 5, 5.2, 'against'],
  ] as const)('%s %s → %s: %s', (measured, before, after, direction) => {
    const f = test1('miniFluidChallenge', measured, before, after);
    expect(f.direction).toBe(direction);
    expect(f.tier).toBe('dynamic');
  });
  it('VTI 18 → 20 is +11.1 %', () => {
    expect(test1('miniFluidChallenge', 'vti', 18, 20).values?.changePercent).toBeCloseTo(11.11, 2);
  });
  it('pulse pressure is not a validated read-out', () => {
    expect(test1('miniFluidChallenge', 'pulsePressure', 40, 50).status).toBe('not-assessed');
  });
  it('stale', () => {
    expect(test1('miniFluidChallenge', 'vti', 18, 20, { ageMin: 90 }).gap).toBe('stale');
  });
});

describe('end-expiratory occlusion (Monnet 2009: CI rise > 5 %)', () => {
  it.each([
    ['cardiacIndex', 3.0, 3.18, 'for', 'dynamic'],
    ['strokeVolume', 60, 63, 'against', 'dynamic'], // exactly 5 %: not > 5
    ['strokeVolume', 60, 63.1, 'for', 'dynamic'],
    ['vti', 25, 27.25, 'for', 'dynamic'], // exactly 9 %: ≥ 9
    ['vti', 25, 27.2, 'against', 'dynamic'],
    ['pulsePressure', 40, 42, 'against', 'static'], // exactly 5 %: not > 5
    ['pulsePressure', 40, 43, 'for', 'static'],
  ] as const)('%s %s → %s: %s (%s)', (measured, before, after, direction, tier) => {
    const f = test1('endExpiratoryOcclusion', measured, before, after);
    expect(f.direction).toBe(direction);
    expect(f.tier).toBe(tier);
  });
  it('CI 3.00 → 3.18 is +6 %', () => {
    expect(test1('endExpiratoryOcclusion', 'cardiacIndex', 3.0, 3.18).values?.changePercent).toBe(6);
  });
});

describe('tidal volume challenge (Myatra 2017: ΔPPV ≥ 3.5 points)', () => {
  it.each([
    ['ppv', 6, 10, 'for'],
    ['ppv', 6, 9.5, 'for'],
    ['ppv', 6, 9.25, 'against'],
    ['svv', 8, 10.5, 'for'],
    ['svv', 8, 10.25, 'against'],
  ] as const)('%s %s → %s: %s', (measured, before, after, direction) => {
    const f = test1('tidalVolumeChallenge', measured, before, after, { b: ventilated() });
    expect(f.status).toBe('assessed');
    expect(f.direction).toBe(direction);
    expect(f.tier).toBe('dynamic');
  });
  it('PPV 6 → 10 is 4 points', () => {
    expect(test1('tidalVolumeChallenge', 'ppv', 6, 10, { b: ventilated() }).values?.changePoints).toBe(4);
  });
  it('needs controlled ventilation without effort and sinus rhythm', () => {
    const spont = test1('tidalVolumeChallenge', 'ppv', 6, 10, { b: ventilated('controlled-with-effort') });
    expect(spont.status).toBe('not-assessed');
    expect(spont.reason).toMatch(/outside validity: controlled ventilation without spontaneous effort not met/);
    const af = test1('tidalVolumeChallenge', 'ppv', 6, 10, { b: ventilated('controlled-no-effort', 'atrial-fibrillation') });
    expect(af.reason).toMatch(/sinus rhythm not met/);
    const unknown = test1('tidalVolumeChallenge', 'ppv', 6, 10);
    expect(unknown.status).toBe('not-assessed');
    expect(unknown.gap).toBe('outside-validity');
  });
  it('a PPV read-out not in % is invalid; a flow read-out is not validated', () => {
    expect(test1('tidalVolumeChallenge', 'ppv', 6, 10, { b: ventilated(), unit: '1' }).gap).toBe('invalid');
    expect(test1('tidalVolumeChallenge', 'cardiacOutput', 4, 5, { b: ventilated() }).status).toBe('not-assessed');
  });
});

describe('thresholds of the dynamic tests are configurable', () => {
  it('PLR threshold 15 % turns +12.5 % into against', () => {
    const t = responsivenessThresholdsSchema.parse({ plrFlowRisePercent: 15 });
    const b = new SnapshotBuilder().dynamicTest('plr', 'cardiacOutput', 4, 4.5, { ageMin: 5 });
    const f = assessResponsiveness(responsivenessContext(b, t)).findings.find((x) => x.ruleId === ID.plr);
    expect(f?.direction).toBe('against');
  });
});
