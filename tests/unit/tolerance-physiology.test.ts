/** Boundaries of the tolerance formulas in src/physiology (pure arithmetic). */
import { describe, expect, it } from 'vitest';
import {
  fluidOverloadBand,
  percentFluidOverload,
  percentFluidOverloadFromBalance,
  weightGainPercent,
} from '../../src/physiology/fluid-overload.js';
import { coveredMs, volumeInWindowMl, withoutOverlaps, type VolumeRecord } from '../../src/physiology/fluid-balance.js';
import { kdigoStageFromCreatinine, kdigoStageFromUrineOutput, urineOutputMlPerKgPerHour } from '../../src/physiology/kdigo.js';
import { iahGrade, iahGradeLabel } from '../../src/physiology/intra-abdominal-pressure.js';
import { portalSeverity, renalSeverity, vexusGrade } from '../../src/physiology/vexus.js';
import { relativeFallPercent, spo2Fio2Ratio } from '../../src/physiology/oxygenation.js';
import { isPulmonaryOedema } from '../../src/physiology/evlwi.js';
import { isoOncoticAlbuminExpansionMl, roundToStep } from '../../src/physiology/volume-kinetics.js';
import { sepsisInitialCrystalloidMl } from '../../src/physiology/sepsis-volume.js';

const H = 3_600_000;
const rec = (id: string, volumeMl: number, startH: number, endH: number): VolumeRecord => ({
  id,
  volumeMl,
  startMs: startH * H,
  endMs: endH * H,
});

describe('fluid overload', () => {
  it('bands at exactly 10 and 20 %', () => {
    expect(fluidOverloadBand(9.99)).toBe('below');
    expect(fluidOverloadBand(10)).toBe('moderate');
    expect(fluidOverloadBand(19.99)).toBe('moderate');
    expect(fluidOverloadBand(20)).toBe('severe');
    expect(fluidOverloadBand(-5)).toBe('below');
  });
  it('from a balance in mL equals the litre form', () => {
    expect(percentFluidOverloadFromBalance(8000, 70)).toBeCloseTo(percentFluidOverload(12, 4, 70), 10);
  });
  it('refuses a zero or negative weight', () => {
    expect(() => percentFluidOverload(1, 0, 0)).toThrow(RangeError);
    expect(() => weightGainPercent(-1, 70)).toThrow(RangeError);
  });
  it('weight gain 70 → 77 kg is 10 %', () => {
    expect(weightGainPercent(70, 77)).toBeCloseTo(10, 10);
  });
});

describe('fluid balance windows', () => {
  it('spreads a period amount over its period and counts only the overlap', () => {
    expect(volumeInWindowMl([rec('a', 600, 0, 6)], 3 * H, 6 * H)).toBeCloseTo(300, 10);
    expect(volumeInWindowMl([rec('a', 600, 0, 6)], 6 * H, 9 * H)).toBe(0);
  });
  it('counts a point amount in (from, to]', () => {
    const p = rec('p', 100, 5, 5);
    expect(volumeInWindowMl([p], 4 * H, 5 * H)).toBe(100);
    expect(volumeInWindowMl([p], 5 * H, 6 * H)).toBe(0);
  });
  it('counts a shift total beside its hourly parts once, whatever the input order', () => {
    const shift = rec('shift', 600, 0, 6);
    const hours = Array.from({ length: 6 }, (_, i) => rec(`h${i}`, 100, i, i + 1));
    const a = withoutOverlaps([shift, ...hours]);
    const b = withoutOverlaps([...hours].reverse().concat(shift));
    expect(a.kept.map((r) => r.id)).toEqual(['shift']);
    expect(b.kept.map((r) => r.id)).toEqual(['shift']);
    expect(a.dropped).toHaveLength(6);
  });
  it('keeps adjacent periods, drops a point inside a period and exact duplicate points', () => {
    const r = withoutOverlaps([
      rec('a', 1, 0, 1),
      rec('b', 1, 1, 2),
      rec('p', 5, 1.5, 1.5),
      rec('q', 7, 3, 3),
      rec('q2', 7, 3, 3),
      rec('q3', 8, 3, 3),
    ]);
    expect(r.kept.map((x) => x.id).sort()).toEqual(['a', 'b', 'q', 'q3']);
  });
  it('coverage merges overlapping spans and ignores points', () => {
    expect(coveredMs([rec('a', 1, 0, 2), rec('b', 1, 1, 3), rec('p', 1, 5, 5)], 0, 10 * H)).toBe(3 * H);
  });
});

describe('KDIGO', () => {
  it('urine stages at their boundaries', () => {
    expect(kdigoStageFromUrineOutput([{ hours: 6, mlPerKgPerHour: 0.5 }])).toBe(0);
    expect(kdigoStageFromUrineOutput([{ hours: 6, mlPerKgPerHour: 0.49 }])).toBe(1);
    expect(
      kdigoStageFromUrineOutput([
        { hours: 6, mlPerKgPerHour: 0.4 },
        { hours: 12, mlPerKgPerHour: 0.45 },
      ]),
    ).toBe(2);
    expect(
      kdigoStageFromUrineOutput([
        { hours: 12, mlPerKgPerHour: 0.45 },
        { hours: 24, mlPerKgPerHour: 0.3 },
      ]),
    ).toBe(2);
    expect(kdigoStageFromUrineOutput([{ hours: 24, mlPerKgPerHour: 0.29 }])).toBe(3);
    expect(kdigoStageFromUrineOutput([{ hours: 12, mlPerKgPerHour: 0 }])).toBe(3);
    expect(kdigoStageFromUrineOutput([{ hours: 6, mlPerKgPerHour: 0 }])).toBe(1);
    expect(kdigoStageFromUrineOutput([{ hours: 5, mlPerKgPerHour: 0 }])).toBeUndefined();
    expect(kdigoStageFromUrineOutput([])).toBeUndefined();
  });
  it('urine rate refuses zero weight or hours', () => {
    expect(() => urineOutputMlPerKgPerHour(100, 0, 6)).toThrow(RangeError);
    expect(() => urineOutputMlPerKgPerHour(100, 70, 0)).toThrow(RangeError);
  });
  it('creatinine stages at their boundaries', () => {
    expect(kdigoStageFromCreatinine({ currentMgDl: 1.29, lowest48hMgDl: 1.0, lowest7dMgDl: 1.0 })).toBe(0);
    expect(kdigoStageFromCreatinine({ currentMgDl: 1.3, lowest48hMgDl: 1.0, lowest7dMgDl: 1.0 })).toBe(1);
    expect(kdigoStageFromCreatinine({ currentMgDl: 1.5, lowest7dMgDl: 1.0 })).toBe(1);
    expect(kdigoStageFromCreatinine({ currentMgDl: 1.49, lowest7dMgDl: 1.0 })).toBe(0);
    expect(kdigoStageFromCreatinine({ currentMgDl: 2.0, lowest7dMgDl: 1.0 })).toBe(2);
    expect(kdigoStageFromCreatinine({ currentMgDl: 2.99, lowest7dMgDl: 1.0 })).toBe(2);
    expect(kdigoStageFromCreatinine({ currentMgDl: 3.0, lowest7dMgDl: 1.0 })).toBe(3);
    // ≥ 4.0 mg/dL is stage 3 only with an acute rise.
    expect(kdigoStageFromCreatinine({ currentMgDl: 4.2, lowest48hMgDl: 3.8, lowest7dMgDl: 3.8 })).toBe(3);
    expect(kdigoStageFromCreatinine({ currentMgDl: 4.2, lowest48hMgDl: 4.1, lowest7dMgDl: 4.1 })).toBe(0);
  });
});

describe('WSACS grades', () => {
  it.each([
    [11.9, 0],
    [12, 1],
    [15, 1],
    [15.5, 2],
    [16, 2],
    [20, 2],
    [20.5, 3],
    [25, 3],
    [25.1, 4],
    [40, 4],
  ])('IAP %s → grade %s', (iap, grade) => {
    expect(iahGrade(iap)).toBe(grade);
  });
  it('labels', () => {
    expect(iahGradeLabel(3)).toBe('III');
  });
});

describe('VExUS', () => {
  it('portal bands at 30 and 50 %', () => {
    expect(portalSeverity(29.9)).toBe('normal');
    expect(portalSeverity(30)).toBe('mild');
    expect(portalSeverity(49.9)).toBe('mild');
    expect(portalSeverity(50)).toBe('severe');
  });
  it('renal patterns', () => {
    expect(renalSeverity('continuous')).toBe('normal');
    expect(renalSeverity('biphasic')).toBe('mild');
    expect(renalSeverity('monophasic')).toBe('severe');
  });
  it('IVC below 2 cm is grade 0 whatever the Doppler', () => {
    expect(vexusGrade({ ivcMaxCm: 1.99, hepatic: 'severe', portal: 'severe', renal: 'severe' })).toMatchObject({ min: 0, max: 0 });
  });
  it('grades 1, 2 and 3 with all parts known', () => {
    expect(vexusGrade({ ivcMaxCm: 2, hepatic: 'mild', portal: 'mild', renal: 'normal' })).toMatchObject({ min: 1, max: 1 });
    expect(vexusGrade({ ivcMaxCm: 2.5, hepatic: 'severe', portal: 'mild', renal: 'normal' })).toMatchObject({ min: 2, max: 2 });
    expect(vexusGrade({ ivcMaxCm: 2.5, hepatic: 'severe', portal: 'normal', renal: 'severe' })).toMatchObject({ min: 3, max: 3 });
  });
  it('missing parts leave a range', () => {
    expect(vexusGrade({ ivcMaxCm: 2.5, hepatic: 'severe' })).toMatchObject({ min: 2, max: 3, missing: ['portal', 'renal'] });
    expect(vexusGrade({ ivcMaxCm: 2.5 })).toMatchObject({ min: 1, max: 3 });
  });
});

describe('small formulas', () => {
  it('SpO2/FiO2 and its fall', () => {
    expect(spo2Fio2Ratio(92, 100)).toBeCloseTo(92, 10);
    expect(relativeFallPercent(300, 240)).toBeCloseTo(20, 10);
    expect(() => spo2Fio2Ratio(92, 0)).toThrow(RangeError);
  });
  it('EVLWI boundary at 10', () => {
    expect(isPulmonaryOedema(9.99)).toBe(false);
    expect(isPulmonaryOedema(10)).toBe(true);
  });
  it('albumin 5 % and rounding', () => {
    expect(isoOncoticAlbuminExpansionMl(250)).toBe(250);
    expect(roundToStep(166.67, 10)).toBe(170);
  });
  it('SSC figure refuses a zero weight', () => {
    expect(() => sepsisInitialCrystalloidMl(0)).toThrow(RangeError);
    expect(sepsisInitialCrystalloidMl(82.5)).toBe(2475);
  });
});
