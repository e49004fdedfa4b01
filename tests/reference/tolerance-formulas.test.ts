/**
 * Published check values for the tolerance formulas, the source named beside each.
 * Arithmetic examples are worked on the published formulas named beside each check.
 */
import { describe, expect, it } from 'vitest';
import { percentFluidOverload, fluidOverloadBand } from '../../src/physiology/fluid-overload.js';
import { kdigoStageFromCreatinine, kdigoStageFromUrineOutput, urineOutputMlPerKgPerHour } from '../../src/physiology/kdigo.js';
import { abdominalPerfusionPressure, filtrationGradient, iahGrade } from '../../src/physiology/intra-abdominal-pressure.js';
import { portalPulsatilityFractionPercent, portalSeverity, renalSeverity, vexusGrade } from '../../src/physiology/vexus.js';
import { evlwiMlPerKg, isPulmonaryOedema } from '../../src/physiology/evlwi.js';
import {
  crystalloidIntravascularAfterDistributionMl,
  crystalloidPlasmaExpansionRangeMl,
  hyperOncoticAlbuminExpansionMl,
  roundToStep,
} from '../../src/physiology/volume-kinetics.js';
import { sepsisInitialCrystalloidMl } from '../../src/physiology/sepsis-volume.js';
import { spo2Fio2Ratio } from '../../src/physiology/oxygenation.js';
import { intravascularEstimate } from '../../src/assess/order/describe-order.js';
import { sepsisReferenceVolumeMl } from '../../src/assess/order/sepsis-context.js';
import { DEFAULT_ORDER_THRESHOLDS } from '../../src/assess/order/thresholds.js';
import { lungUltrasoundRule } from '../../src/assess/tolerance/lung-ultrasound.js';
import { DEFAULT_TOLERANCE_THRESHOLDS } from '../../src/assess/tolerance/thresholds.js';
import { KIND_BOUNDS, LUNG_SIDE_SITES } from '../../src/fhir/codes.js';
import { m, NOW, snapshot } from '../helpers/tolerance-fixtures.js';

describe('percent fluid overload — Goldstein SL et al., Pediatrics 2001;107:1309', () => {
  it('in 12 L, out 4 L, 70 kg → 11.4 % (moderate band, Sutherland 2010 [from memory])', () => {
    const fo = percentFluidOverload(12, 4, 70);
    expect(fo).toBeCloseTo(11.43, 2);
    expect(fluidOverloadBand(fo)).toBe('moderate');
  });
  it('in 8.5 L, out 3.0 L, 70 kg → 7.86 % (below 10 %)', () => {
    const fo = percentFluidOverload(8.5, 3.0, 70);
    expect(fo).toBeCloseTo(7.86, 2);
    expect(fluidOverloadBand(fo)).toBe('below');
  });
  it('uses in − out, not out − in (one public calculator has the sign reversed)', () => {
    expect(percentFluidOverload(4, 12, 70)).toBeCloseTo(-11.43, 2);
  });
});

describe('KDIGO 2012 (Kidney Int Suppl 2012;2:1–138)', () => {
  it('70 kg, 180 mL in 6 h → 0.43 mL/kg/h → stage 1 by urine output', () => {
    const rate = urineOutputMlPerKgPerHour(180, 70, 6);
    expect(rate).toBeCloseTo(0.43, 2);
    expect(kdigoStageFromUrineOutput([{ hours: 6, mlPerKgPerHour: rate }])).toBe(1);
  });
  it('serum creatinine 1.0 → 2.1 mg/dL → stage 2', () => {
    expect(kdigoStageFromCreatinine({ currentMgDl: 2.1, lowest48hMgDl: 1.0, lowest7dMgDl: 1.0 })).toBe(2);
  });
});

describe('WSACS 2013 (Kirkpatrick AW et al., Intensive Care Med 2013)', () => {
  it('IAP 18 mmHg → grade II; MAP 75 → APP 57, filtration gradient 39', () => {
    expect(iahGrade(18)).toBe(2);
    expect(abdominalPerfusionPressure(75, 18)).toBe(57);
    expect(filtrationGradient(75, 18)).toBe(39);
  });
});

describe('VExUS (Beaubien-Souligny W et al., Ultrasound J 2020;12:16)', () => {
  it('IVC 2.3 cm, hepatic S reversal, portal PF (20 − 8)/20 = 60 %, renal biphasic → two severe → grade 3', () => {
    const pf = portalPulsatilityFractionPercent(20, 8);
    expect(pf).toBeCloseTo(60, 6);
    const g = vexusGrade({ ivcMaxCm: 2.3, hepatic: 'severe', portal: portalSeverity(pf), renal: renalSeverity('biphasic') });
    expect(g.severeCount).toBe(2);
    expect(g.min).toBe(3);
    expect(g.max).toBe(3);
  });
});

describe('EVLWI (Tagami T et al., Crit Care 2010; Jozwiak M et al., Ann Intensive Care 2015)', () => {
  it('800 mL / 70 kg PBW = 11.4 mL/kg → pulmonary oedema (≥ 10)', () => {
    const v = evlwiMlPerKg(800, 70);
    expect(v).toBeCloseTo(11.43, 2);
    expect(isPulmonaryOedema(v)).toBe(true);
  });
});

describe('volume kinetics', () => {
  it('500 mL crystalloid ≈ 125 mL intravascular once distributed (saline PV:ISF ≈ 1:3, Ernest D et al., Crit Care Med 1999;27:46)', () => {
    expect(crystalloidIntravascularAfterDistributionMl(500)).toBe(125);
    expect(intravascularEstimate(500, 'balanced-crystalloid', DEFAULT_ORDER_THRESHOLDS)?.values['intravascularAfterDistributionMl']).toBe(
      130,
    ); // 10-mL steps
  });
  it('the rule of thumb (a third, common practice) is shown beside the published figure only', () => {
    const est = intravascularEstimate(500, 'balanced-crystalloid', DEFAULT_ORDER_THRESHOLDS);
    expect(roundToStep(crystalloidIntravascularAfterDistributionMl(500, 1 / 3), 10)).toBe(170);
    expect(est?.values['ruleOfThumbMl']).toBe(170);
    expect(est?.text).toMatch(
      /^About 130 mL of 500 mL stays in the vessels once distributed \(about a quarter, Ernest 1999; the bedside rule of thumb of a third would say 170 mL\)/,
    );
  });
  it("1,000 mL Ringer's: 500–600 mL while infusing, 150–200 mL 30 min after (Hahn RG, Acta Anaesthesiol Scand 2020)", () => {
    expect(crystalloidPlasmaExpansionRangeMl(1000, 'during-infusion')).toEqual([500, 600]);
    const [lo, hi] = crystalloidPlasmaExpansionRangeMl(1000, 'thirty-minutes-after');
    expect(lo).toBeCloseTo(150, 6);
    expect(hi).toBeCloseTo(200, 6);
  });
  it('100 mL albumin 20 % → about 200 mL plasma expansion (Crit Care 2020, doi 10.1186/s13054-020-02855-0)', () => {
    expect(hyperOncoticAlbuminExpansionMl(100)).toBe(200);
    expect(intravascularEstimate(100, 'albumin-hyper', DEFAULT_ORDER_THRESHOLDS)?.values['plasmaExpansionMl']).toBe(200);
  });
});

describe('Surviving Sepsis Campaign 2021 (Evans L et al., Intensive Care Med 2021;47:1181)', () => {
  it('30 mL/kg for 70 kg → 2,100 mL', () => {
    expect(sepsisInitialCrystalloidMl(70)).toBe(2100);
    expect(sepsisReferenceVolumeMl(70, DEFAULT_ORDER_THRESHOLDS)).toBe(2100);
  });
});

describe('SpO2/FiO2 (Rice TW et al., Chest 2007 [from memory])', () => {
  it('SpO2 95 % on FiO2 40 % → 237.5 (FiO2 used as a fraction)', () => {
    expect(spo2Fio2Ratio(95, 40)).toBeCloseTo(237.5, 6);
  });
});

describe('Lung ultrasound B-pattern (Volpicelli G et al., Intensive Care Med 2012;38:577, international evidence-based recommendations for point-of-care lung ultrasound)', () => {
  const T = DEFAULT_TOLERANCE_THRESHOLDS;
  const run = (left: number, right: number) =>
    lungUltrasoundRule(snapshot({ measurements: [m('bLineRegionsLeft', left, 30), m('bLineRegionsRight', right, 30)] }), NOW, T)[0]!;
  it('the 8-region examination: 4 regions per side (Volpicelli 2012)', () => {
    expect(KIND_BOUNDS.bLineRegions).toEqual([0, 8]);
    expect(KIND_BOUNDS.bLineRegionsLeft).toEqual([0, 4]);
    expect(KIND_BOUNDS.bLineRegionsRight).toEqual([0, 4]);
  });
  it('diffuse interstitial syndrome = ≥ 2 positive regions on each side (Volpicelli 2012): 2 + 2 is, 2 + 1 and 4 + 0 are not', () => {
    expect(T.bLineBilateralPerSide).toBe(2);
    expect(run(2, 2)).toMatchObject({ limit: 'severe', harmSign: true });
    expect(run(2, 1)).toMatchObject({ limit: 'moderate', harmSign: false });
    expect(run(4, 0)).toMatchObject({ limit: 'moderate', harmSign: false });
  });
  it('left / right lung as SNOMED CT body structures 44029006 and 3341006 (public FHIR and DICOM mapping tables)', () => {
    expect(LUNG_SIDE_SITES.map((s) => [s.code, s.kind])).toEqual([
      ['44029006', 'bLineRegionsLeft'],
      ['3341006', 'bLineRegionsRight'],
    ]);
  });
});
