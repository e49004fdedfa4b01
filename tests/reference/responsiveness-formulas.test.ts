/**
 * Reference checks for the responsiveness formulas. Each expected value is worked out by hand from the published
 * formula (arithmetic shown beside it), with the source named.
 */
import { describe, expect, it } from 'vitest';
import { heartRateRespiratoryRateRatio } from '../../src/physiology/heart-rate-respiratory-rate-ratio.js';
import {
  ivcCollapsibilityIndexPercent,
  ivcDistensibilityIndexBarbierPercent,
  ivcDistensibilityIndexFeisselPercent,
} from '../../src/physiology/ivc-indices.js';
import { meanArterialPressureMmHg } from '../../src/physiology/mean-arterial-pressure.js';
import { predictedBodyWeightKg, tidalVolumeMlPerKg } from '../../src/physiology/predicted-body-weight.js';
import { pulsePressureVariationPercent, respiratoryVariationPercent } from '../../src/physiology/pulse-pressure-variation.js';
import { absoluteChange, relativeChangePercent } from '../../src/physiology/dynamic-tests.js';
import { estimateRightAtrialPressureFromIvc } from '../../src/physiology/right-atrial-pressure.js';
import { shockIndex } from '../../src/physiology/shock-index.js';

describe('PPV — Michard et al., Am J Respir Crit Care Med 2000;162:134 (per-cycle (max − min)/mean, averaged)', () => {
  it('single cycle PP 60/50: 100 × 10 / 55 = 18.18 %', () => {
    expect(respiratoryVariationPercent(60, 50)).toBeCloseTo(18.18, 2);
    expect(pulsePressureVariationPercent([{ pulsePressureMaxMmHg: 60, pulsePressureMinMmHg: 50 }])).toBeCloseTo(18.18, 2);
  });
  it('three cycles (60,50),(58,50),(62,52): mean of 18.18, 14.81, 17.54 = 16.85 %', () => {
    const cycles = [
      [60, 50],
      [58, 50],
      [62, 52],
    ].map(([mx, mn]) => ({ pulsePressureMaxMmHg: mx as number, pulsePressureMinMmHg: mn as number }));
    expect(pulsePressureVariationPercent(cycles)).toBeCloseTo(16.85, 2);
    expect(respiratoryVariationPercent(58, 50)).toBeCloseTo(14.81, 2); // 800 / 54
    expect(respiratoryVariationPercent(62, 52)).toBeCloseTo(17.54, 2); // 1000 / 57
  });
  it('rejects a cycle with min > max and an empty list', () => {
    expect(() => respiratoryVariationPercent(50, 60)).toThrow(RangeError);
    expect(() => pulsePressureVariationPercent([])).toThrow(RangeError);
  });
});

describe('Predicted body weight — ARDSNet, N Engl J Med 2000;342:1301', () => {
  it('male 175 cm: 50 + 0.91 × 22.6 = 70.566 kg', () => {
    expect(predictedBodyWeightKg(175, 'male')).toBeCloseTo(70.566, 3);
    expect(predictedBodyWeightKg(175, 'male')).toBeCloseTo(70.57, 2);
  });
  it('female 160 cm: 45.5 + 0.91 × 7.6 = 52.416 kg', () => {
    expect(predictedBodyWeightKg(160, 'female')).toBeCloseTo(52.42, 2);
  });
  it('Vt 420 mL at 70.566 kg = 5.95 mL/kg: below 8 mL/kg, PPV invalid (Monnet, Marik, Teboul, Ann Intensive Care 2016)', () => {
    const perKg = tidalVolumeMlPerKg(420, 70.566);
    expect(perKg).toBeCloseTo(5.95, 2);
    expect(perKg < 8).toBe(true);
  });
});

describe('HR/RR ratio — De Backer et al., Anesthesiology 2009;110:1092 (valid when > 3.6)', () => {
  it('90 / 30 = 3.0: invalid', () => {
    expect(heartRateRespiratoryRateRatio(90, 30)).toBeCloseTo(3.0, 10);
    expect(heartRateRespiratoryRateRatio(90, 30) > 3.6).toBe(false);
  });
  it('90 / 20 = 4.5: valid', () => {
    expect(heartRateRespiratoryRateRatio(90, 20)).toBeCloseTo(4.5, 10);
  });
  it('respiratory rate 0 is rejected', () => {
    expect(() => heartRateRespiratoryRateRatio(90, 0)).toThrow(RangeError);
  });
});

describe('IVC indices', () => {
  it('collapsibility 2.0/0.9 cm: 100 × 1.1 / 2.0 = 55 % (Muller et al., Crit Care 2012)', () => {
    expect(ivcCollapsibilityIndexPercent(2.0, 0.9)).toBeCloseTo(55, 10);
  });
  it('distensibility Dmax 2.2, Dmin 1.8 cm: 100 × 0.4 / 1.8 = 22.2 % (Barbier et al., Intensive Care Med 2004)', () => {
    expect(ivcDistensibilityIndexBarbierPercent(2.2, 1.8)).toBeCloseTo(22.22, 2);
  });
  it('Feissel variant: 100 × 0.4 / 2.0 = 20 % (Feissel et al., Intensive Care Med 2004)', () => {
    expect(ivcDistensibilityIndexFeisselPercent(2.2, 1.8)).toBeCloseTo(20, 10);
  });
  it('rejects Dmin > Dmax and Barbier with Dmin 0', () => {
    expect(() => ivcCollapsibilityIndexPercent(1.0, 1.2)).toThrow(RangeError);
    expect(() => ivcDistensibilityIndexBarbierPercent(2.0, 0)).toThrow(RangeError);
  });
});

describe('Dynamic tests: relative and absolute change', () => {
  it('PLR CO 4.0 → 4.5 L/min = +12.5 % (≥ 10 %: positive; Monnet, Marik, Teboul, Intensive Care Med 2016)', () => {
    expect(relativeChangePercent(4.0, 4.5)).toBeCloseTo(12.5, 10);
  });
  it('EEO CI 3.00 → 3.18 = +6 % (> 5 %: positive; Monnet et al., Crit Care Med 2009)', () => {
    expect(relativeChangePercent(3.0, 3.18)).toBeCloseTo(6, 10);
  });
  it('mini fluid challenge VTI 18 → 20 cm = +11.1 % (≥ 10 %: positive; Muller et al., Anesthesiology 2011)', () => {
    expect(relativeChangePercent(18, 20)).toBeCloseTo(11.11, 2);
  });
  it('tidal volume challenge PPV 6 → 10 % = 4 points (≥ 3.5: positive; Myatra et al., Crit Care Med 2017)', () => {
    expect(absoluteChange(6, 10)).toBe(4);
  });
  it('baseline 0 is rejected', () => {
    expect(() => relativeChangePercent(0, 1)).toThrow(RangeError);
  });
});

describe('Right atrial pressure from the IVC — Rudski et al., J Am Soc Echocardiogr 2010;23:685 (ASE)', () => {
  it('1.8 cm, 60 % collapse (≤ 2.1 and > 50 %) → 3 mmHg', () => {
    expect(estimateRightAtrialPressureFromIvc(1.8, 60).estimateMmHg).toBe(3);
  });
  it('2.5 cm, 30 % (> 2.1 and < 50 %) → 15 mmHg', () => {
    expect(estimateRightAtrialPressureFromIvc(2.5, 30).estimateMmHg).toBe(15);
  });
  it('1.8 cm, 30 % and 2.5 cm, 60 % (mixed) → 8 mmHg', () => {
    expect(estimateRightAtrialPressureFromIvc(1.8, 30).estimateMmHg).toBe(8);
    expect(estimateRightAtrialPressureFromIvc(2.5, 60).estimateMmHg).toBe(8);
  });
  it('boundaries: 2.1 cm counts as small, 50 % collapse is neither > 50 nor < 50 → 8', () => {
    expect(estimateRightAtrialPressureFromIvc(2.1, 51).estimateMmHg).toBe(3);
    expect(estimateRightAtrialPressureFromIvc(2.1, 50).estimateMmHg).toBe(8);
    expect(estimateRightAtrialPressureFromIvc(2.2, 50).estimateMmHg).toBe(8);
  });
});

describe('Shock index and MAP', () => {
  it('shock index 110 / 100 = 1.1 (Allgöwer & Burri 1967; > 1.0 raised, Koch et al. 2019)', () => {
    expect(shockIndex(110, 100)).toBeCloseTo(1.1, 10);
  });
  it('MAP 120/60: 60 + 60/3 = 80 mmHg (conventional approximation, common practice)', () => {
    expect(meanArterialPressureMmHg(120, 60)).toBe(80);
  });
  it('MAP rejects systolic below diastolic', () => {
    expect(() => meanArterialPressureMmHg(60, 80)).toThrow(RangeError);
  });
});
