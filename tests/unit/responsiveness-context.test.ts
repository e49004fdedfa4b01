/**
 * Truth tables for the context findings (weight 'context'; they never decide responsiveness):
 * capillary refill > 3 s prolonged; lactate > 2 mmol/L raised; shock index > 1.0 raised; MAP < 65 mmHg below target;
 * echo impression of LV function.
 */
import { describe, expect, it } from 'vitest';
import { assessResponsiveness, responsivenessThresholdsSchema } from '../../src/assess/responsiveness/index.js';
import type { Finding } from '../../src/assess/types.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';

const T = responsivenessThresholdsSchema.parse({});
function find(b: SnapshotBuilder, id: string): Finding {
  const f = assessResponsiveness(b.build(), b.now, T).findings.find((x) => x.ruleId === id);
  if (!f) throw new Error(`no finding ${id}`);
  return f;
}

describe('capillary refill (ANDROMEDA-SHOCK: > 3 s abnormal)', () => {
  const crt = (v: number, ageMin = 10) => find(new SnapshotBuilder().measure('capillaryRefill', v, { ageMin }), 'responsiveness.capillary-refill');
  it.each([[2, false], [3, false], [3.1, true], [6, true]] as const)('CRT %s s → prolonged %s', (v, prolonged) => {
    const f = crt(v);
    expect(f.topic).toBe('perfusion');
    expect(f.weight).toBe('context');
    expect(f.direction).toBeUndefined();
    expect(f.values?.prolonged).toBe(prolonged);
  });
  it('absent, stale (61 min)', () => {
    expect(find(new SnapshotBuilder(), 'responsiveness.capillary-refill').reason).toBe('no capillary refill recorded');
    expect(crt(4, 61).reason).toBe('Capillary refill stale (age 61 min, window 60 min)');
  });
});

describe('lactate (Sepsis-3: > 2 mmol/L)', () => {
  const lac = (v: number, ageMin = 30) => find(new SnapshotBuilder().measure('lactate', v, { ageMin }), 'responsiveness.lactate');
  it.each([[1.5, false], [2, false], [2.1, true], [6, true]] as const)('lactate %s → raised %s', (v, raised) => {
    expect(lac(v).values?.raised).toBe(raised);
  });
  it('fresh up to 360 min, stale after', () => {
    expect(lac(3, 360).status).toBe('assessed');
    expect(lac(3, 361).values?.freshness).toBe('stale');
  });
});

describe('shock index (HR/SBP, > 1.0 raised)', () => {
  const si = (hr: number, sbp: number) => find(new SnapshotBuilder().vitals({ hr, sbp }, { ageMin: 5 }), 'responsiveness.shock-index');
  it('110/100 = 1.1 → raised; 100/100 = 1.0 → not raised; 70/120 = 0.58', () => {
    expect(si(110, 100).values).toMatchObject({ shockIndex: 1.1, raised: true });
    expect(si(100, 100).values).toMatchObject({ shockIndex: 1, raised: false });
    expect(si(70, 120).values?.shockIndex).toBe(0.58);
  });
  it('needs both heart rate and systolic pressure', () => {
    const f = find(new SnapshotBuilder().measure('heartRate', 100, { ageMin: 5 }), 'responsiveness.shock-index');
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toMatch(/systolic pressure/);
  });
});

describe('MAP against the 65 mmHg target (SSC 2021)', () => {
  const map = (b: SnapshotBuilder) => find(b, 'responsiveness.map');
  it('measured 64 → below; 65 → at target (boundary: below means < 65)', () => {
    expect(map(new SnapshotBuilder().measure('meanBp', 64, { ageMin: 5 })).values?.belowTarget).toBe(true);
    expect(map(new SnapshotBuilder().measure('meanBp', 65, { ageMin: 5 })).values?.belowTarget).toBe(false);
  });
  it('computed from SBP/DBP 120/60 = 80 when no measured MAP', () => {
    const f = map(new SnapshotBuilder().vitals({ sbp: 120, dbp: 60 }, { ageMin: 5 }));
    expect(f.values).toMatchObject({ mapMmHg: 80, measured: false, belowTarget: false });
    expect(f.evidence.map((e) => e.kind).sort()).toEqual(['diastolicBp', 'systolicBp']);
  });
  it('a measured MAP wins over SBP/DBP at the same time', () => {
    const f = map(new SnapshotBuilder().vitals({ sbp: 120, dbp: 60, map: 70 }, { ageMin: 5 }));
    expect(f.values?.mapMmHg).toBe(70);
  });
  it('SBP and DBP at different times are not paired', () => {
    const f = map(new SnapshotBuilder().measure('systolicBp', 120, { ageMin: 5 }).measure('diastolicBp', 60, { ageMin: 6 }));
    expect(f.values?.freshness).toBe('missing');
  });
  it('stale after 60 min', () => {
    expect(map(new SnapshotBuilder().measure('meanBp', 60, { ageMin: 61 })).reason).toBe('MAP stale (age 61 min, window 60 min)');
  });
});

describe('echo impression of LV function (context)', () => {
  it.each(['hyperdynamic', 'normal', 'reduced', 'severely-reduced'])('%s → context, neutral', (answer) => {
    const f = find(new SnapshotBuilder().coded('lvFunction', answer, { ageMin: 60 }), 'responsiveness.lv-function');
    expect(f.status).toBe('assessed');
    expect(f.weight).toBe('context');
    expect(f.direction).toBe('neutral');
    expect(f.values?.lvFunction).toBe(answer);
  });
  it('stale after 24 h', () => {
    expect(find(new SnapshotBuilder().coded('lvFunction', 'hyperdynamic', { ageMin: 1441 }), 'responsiveness.lv-function').values?.freshness).toBe('stale');
  });
});

describe('context never decides', () => {
  it('every context marker abnormal and nothing else → indeterminate', () => {
    const b = new SnapshotBuilder()
      .vitals({ hr: 130, sbp: 80, dbp: 40, map: 52 }, { ageMin: 5 })
      .measure('lactate', 6, { ageMin: 20 }).measure('capillaryRefill', 6, { ageMin: 10 })
      .coded('lvFunction', 'hyperdynamic', { ageMin: 30 });
    const r = assessResponsiveness(b.build(), b.now, T);
    expect(r.verdict.value).toBe('indeterminate');
    expect(r.verdict.decidingRules).toEqual([]);
  });
});
