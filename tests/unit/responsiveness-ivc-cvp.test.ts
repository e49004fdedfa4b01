/**
 * Truth tables for 'responsiveness.ivc' and 'responsiveness.cvp'.
 * IVC, spontaneous breathing: collapse > 40 % → for; Dmax > 2.1 and collapse < 10 % → against; otherwise neutral; all
 * static (they only corroborate, docs/clinical-logic). Controlled ventilation without
 * effort: Barbier > 18 % (or Feissel > 12 %) → for, else against (static). Fresh when ≤ 360 min.
 * CVP: ≤ 3 mmHg → for, ≥ 12 → against, between → neutral "not evidence either way"; static. Fresh ≤ 120 min (one window
 * for both questions, docs/clinical-logic).
 */
import { describe, expect, it } from 'vitest';
import {
  assessResponsiveness,
  responsivenessThresholdsSchema,
  type ResponsivenessThresholds,
} from '../../src/assess/responsiveness/index.js';
import type { ResponsivenessFinding as Finding } from '../../src/assess/common/finding.js';
import { responsivenessContext } from '../helpers/rule-context.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';

const T = responsivenessThresholdsSchema.parse({});
function find(b: SnapshotBuilder, id: string, t: ResponsivenessThresholds = T): Finding {
  const f = assessResponsiveness(responsivenessContext(b, t)).findings.find((x) => x.ruleId === id);
  if (!f) throw new Error(`no finding ${id}`);
  return f;
}
const IVC = 'responsiveness.ivc';
function ivc(maxCm: number, minCm: number, mode: string | null, opts: { ageMin?: number; minAgeMin?: number; modeAgeMin?: number } = {}) {
  const b = new SnapshotBuilder();
  if (mode !== null) b.coded('ventilationMode', mode, { ageMin: opts.modeAgeMin ?? 30 });
  b.measure('ivcDiameterMax', maxCm, { ageMin: opts.ageMin ?? 20 }).measure('ivcDiameterMin', minCm, {
    ageMin: opts.minAgeMin ?? opts.ageMin ?? 20,
  });
  return b;
}

describe('IVC, spontaneous breathing (collapsibility)', () => {
  it.each([
    [2.0, 0.9, 'for', 'static', 55], // small, > 50 %
    [2.1, 0.9, 'for', 'static', 57.1], // 2.1 counts as small
    [2.0, 1.0, 'for', 'static', 50], // exactly 50 %: not > 50, but > 40
    [2.4, 1.3, 'for', 'static', 45.8],
    [2.5, 1.5, 'neutral', 'static', 40], // exactly 40 %: not > 40
    [2.5, 2.3, 'against', 'static', 8], // wide, < 10 %
    [2.5, 2.25, 'neutral', 'static', 10], // exactly 10 %: not < 10
    [1.8, 1.75, 'neutral', 'static', 2.8], // small and no variation: not an extreme
  ] as const)('Dmax %s / Dmin %s → %s (%s), cIVC %s %%', (mx, mn, direction, tier, c) => {
    const f = find(ivc(mx, mn, 'spontaneous'), IVC);
    expect(f.status).toBe('assessed');
    expect(f.direction).toBe(direction);
    expect(f.tier).toBe(tier);
    expect(f.values?.ivcCollapsibilityPercent).toBe(c);
  });
  it('the ASE right atrial pressure estimate is shown (Rudski 2010)', () => {
    expect(find(ivc(2.0, 0.9, 'spontaneous'), IVC).values?.aseRapEstimateMmHg).toBe(3);
    expect(find(ivc(2.5, 2.3, 'spontaneous'), IVC).values?.aseRapEstimateMmHg).toBe(15);
  });
  it('neutral text says it does not exclude', () => {
    expect(find(ivc(2.5, 1.5, 'spontaneous'), IVC).text).toMatch(/does not exclude/);
  });
});

describe('IVC, controlled ventilation without effort (distensibility)', () => {
  it('Dmax 2.2 / Dmin 1.8: Barbier 22.2 % > 18 → for (static), Feissel 20 % shown', () => {
    const f = find(ivc(2.2, 1.8, 'controlled-no-effort'), IVC);
    expect(f.direction).toBe('for');
    expect(f.tier).toBe('static');
    expect(f.values?.ivcDistensibilityBarbierPercent).toBe(22.2);
    expect(f.values?.ivcDistensibilityFeisselPercent).toBe(20);
  });
  it('Dmax 2.0 / Dmin 1.8: Barbier 11.1 % → against', () => {
    expect(find(ivc(2.0, 1.8, 'controlled-no-effort'), IVC).direction).toBe('against');
  });
  it('boundary is strict: exactly at the threshold → against (threshold set to 25 %, Dmax 2.5 / Dmin 2.0 = 25 %)', () => {
    const t = responsivenessThresholdsSchema.parse({ ivcDistensibilityBarbierPercent: 25 });
    expect(find(ivc(2.5, 2.0, 'controlled-no-effort'), IVC, t).direction).toBe('against');
    expect(find(ivc(2.51, 2.0, 'controlled-no-effort'), IVC, t).direction).toBe('for');
  });
  it('Feissel method: 2.2/1.8 = 20 % > 12 → for; 2.0/1.8 = 10.5 % → against', () => {
    const t = responsivenessThresholdsSchema.parse({ ivcDistensibilityMethod: 'feissel' });
    expect(find(ivc(2.2, 1.8, 'controlled-no-effort'), IVC, t).direction).toBe('for');
    expect(find(ivc(2.0, 1.8, 'controlled-no-effort'), IVC, t).direction).toBe('against');
  });
  it('Dmin 0 gives no Barbier index → invalid', () => {
    expect(find(ivc(2.0, 0, 'controlled-no-effort'), IVC).gap).toBe('invalid');
  });
});

describe('IVC not assessed', () => {
  it('absent', () => {
    expect(find(new SnapshotBuilder(), IVC).gap).toBe('missing');
  });
  it('spontaneous effort on the ventilator: neither index validated', () => {
    const f = find(ivc(2.2, 1.8, 'controlled-with-effort'), IVC);
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toMatch(/not validated with spontaneous breathing effort/);
  });
  it('ventilation state not recorded, or stale', () => {
    expect(find(ivc(2.2, 1.8, null), IVC).reason).toMatch(/ventilation state not recorded/);
    expect(find(ivc(2.2, 1.8, 'spontaneous', { modeAgeMin: 300 }), IVC).reason).toMatch(/ventilation state stale \(age 5 h, window 4 h\)/);
  });
  it('ventilation state changed since the measurement', () => {
    const b = ivc(2.2, 1.8, 'controlled-no-effort', { ageMin: 100, modeAgeMin: 120 }).coded('ventilationMode', 'spontaneous', {
      ageMin: 30,
    });
    const f = find(b, IVC);
    expect(f.status).toBe('not-assessed');
    expect(f.text).toMatch(/changed around or since the measurement/);
  });
  it('a state change before the measurement does not matter', () => {
    const b = ivc(2.0, 0.9, 'spontaneous', { ageMin: 30, modeAgeMin: 60 }).coded('ventilationMode', 'controlled-no-effort', {
      ageMin: 200,
    });
    expect(find(b, IVC).direction).toBe('for');
  });
  it('stale: 361 min > window 360', () => {
    const f = find(ivc(2.0, 0.9, 'spontaneous', { ageMin: 361 }), IVC);
    expect(f.reason).toBe('IVC stale (age 6 h 1 min, window 6 h)');
    expect(find(ivc(2.0, 0.9, 'spontaneous', { ageMin: 200 }), IVC).status).toBe('assessed');
  });
  it('Dmax and Dmin must be measured together (≤ 5 min apart)', () => {
    expect(find(ivc(2.0, 0.9, 'spontaneous', { ageMin: 20, minAgeMin: 25 }), IVC).status).toBe('assessed');
    const f = find(ivc(2.0, 0.9, 'spontaneous', { ageMin: 20, minAgeMin: 26 }), IVC);
    expect(f.status).toBe('not-assessed');
    expect(f.text).toMatch(/no maximum and minimum diameter measured at the same time/);
  });
  it('Dmin above Dmax is invalid', () => {
    expect(find(ivc(1.5, 1.8, 'spontaneous'), IVC).gap).toBe('invalid');
  });
});

describe('CVP at the extremes only', () => {
  const cvp = (v: number, ageMin = 10) => find(new SnapshotBuilder().measure('cvp', v, { ageMin }), 'responsiveness.cvp');
  it.each([
    [-2, 'for', 'static'],
    [3, 'for', 'static'],
    [3.1, 'neutral', 'static'],
    [8, 'neutral', 'static'],
    [11.9, 'neutral', 'static'],
    [12, 'against', 'static'],
    [18, 'against', 'static'],
  ] as const)('CVP %s mmHg → %s (%s)', (v, direction, tier) => {
    const f = cvp(v);
    expect(f.status).toBe('assessed');
    expect(f.direction).toBe(direction);
    expect(f.tier).toBe(tier);
  });
  it('mid-range text says it is not evidence either way (Marik 2008, 2013)', () => {
    expect(cvp(8).text).toBe('CVP 8 mmHg: mid-range, not evidence either way (Marik 2008, 2013)');
  });
  it('absent, stale', () => {
    expect(find(new SnapshotBuilder(), 'responsiveness.cvp').reason).toBe('no CVP recorded');
    expect(cvp(2, 120).status).toBe('assessed');
    expect(cvp(2, 121).reason).toBe('CVP stale (age 2 h 1 min, window 2 h)');
  });
  it('a measured right atrial pressure stands in when no fresh CVP exists', () => {
    const b = new SnapshotBuilder().measure('cvp', 8, { ageMin: 180 }).measure('rightAtrialPressure', 2, { ageMin: 10 });
    const f = find(b, 'responsiveness.cvp');
    expect(f.direction).toBe('for');
    expect(f.text).toMatch(/^Right atrial pressure 2 mmHg/);
  });
  it('extremes are configurable', () => {
    const t = responsivenessThresholdsSchema.parse({ cvpLowMmHg: 2, cvpHighMmHg: 15 });
    expect(find(new SnapshotBuilder().measure('cvp', 3, { ageMin: 5 }), 'responsiveness.cvp', t).direction).toBe('neutral');
    expect(find(new SnapshotBuilder().measure('cvp', 14, { ageMin: 5 }), 'responsiveness.cvp', t).direction).toBe('neutral');
  });
});
