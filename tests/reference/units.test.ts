// Unit conversions through the UCUM reference library (@lhncbc/ucum-lhc), with check values from outside sources.
import { describe, expect, it, vi } from 'vitest';
import { convert, MAX_UNIT_LENGTH, toCanonical, toUcum } from '../../src/fhir/units.js';

const value = (r: ReturnType<typeof toCanonical>) => (r.ok ? r.value : NaN);

describe('canonical units', () => {
  it('albumin 2.5 g/dL = 25 g/L (1 dL = 0.1 L, SI definition)', () => {
    expect(value(toCanonical('albumin', 2.5, 'g/dL'))).toBeCloseTo(25, 10);
  });
  it('lactate 18 mg/dL ≈ 2.0 mmol/L (Sepsis-3 states > 2 mmol/L as > 18 mg/dL; molar mass 90.08 g/mol)', () => {
    expect(value(toCanonical('lactate', 18, 'mg/dL'))).toBeCloseTo(1.998, 3);
    // 36 mg/dL → 36 × 10 / 90.08 = 3.996 mmol/L (mmol/L = mg/dL / 9.008)
    expect(value(toCanonical('lactate', 36, 'mg/dL'))).toBeCloseTo(36 / 9.008, 6);
  });
  it('CVP 10 cm[H2O] = 7.36 mm[Hg] (1 mmHg = 133.322 Pa, 1 cmH2O = 98.0665 Pa → 1 mmHg = 1.35951 cmH2O)', () => {
    expect(value(toCanonical('cvp', 10, 'cm[H2O]'))).toBeCloseTo(10 / 1.35951, 3);
    expect(value(toCanonical('cvp', 10, 'cm[H2O]'))).toBeCloseTo(7.36, 2);
  });
  it('154 [lb_av] = 69.85 kg (1 lb = 0.45359237 kg exactly, international yard and pound agreement 1959)', () => {
    expect(value(toCanonical('bodyWeight', 154, '[lb_av]'))).toBeCloseTo(154 * 0.45359237, 6);
  });
  it('creatinine 88.4 µmol/L ≈ 1.0 mg/dL (molar mass 113.12 g/mol; KDIGO 2012 quotes 0.3 mg/dL = 26.5 µmol/L)', () => {
    expect(value(toCanonical('creatinine', 88.4, 'umol/L'))).toBeCloseTo(1.0, 2);
    expect(value(toCanonical('creatinine', 26.5, 'umol/L'))).toBeCloseTo(0.3, 2);
  });
  it('FiO2 as a fraction (UCUM "1") becomes percent', () => {
    expect(value(toCanonical('fio2', 0.4, '1'))).toBeCloseTo(40, 10);
  });
  it('annotations are ignored for equality: {beats}/min = /min (UCUM §6 curly braces)', () => {
    expect(value(toCanonical('heartRate', 88, '{beats}/min'))).toBe(88);
  });
  it('common non-UCUM spellings map to UCUM codes (checked by the UCUM library)', () => {
    expect(toUcum('mmHg')).toBe('mm[Hg]');
    expect(toUcum('cmH2O')).toBe('cm[H2O]');
    expect(value(toCanonical('systolicBp', 120, 'mmHg'))).toBe(120);
  });
  it('an unknown unit and an incompatible unit are refused with the reason', () => {
    expect(toCanonical('heartRate', 80, 'furlongs')).toMatchObject({ ok: false, reason: 'unknown-unit' });
    expect(toCanonical('heartRate', 80, 'kg')).toMatchObject({ ok: false, reason: 'incompatible-unit' });
    expect(toCanonical('lactate', 2, undefined)).toMatchObject({ ok: false, reason: 'unknown-unit' });
  });
});

// Issue 13 item 3: unit text is client data. @lhncbc/ucum-lhc 7.1.10 prints it with console.log when its parser throws
// (UcumLhcUtils.getSpecifiedUnit), which wrote client text to stdout past the logger.
describe('hostile unit text', () => {
  const hostile = [
    'mm Hg\n{"level":50,"msg":"forged"} Quillfeather',
    'mg\u202e',
    'm\tL',
    'x'.repeat(MAX_UNIT_LENGTH + 1),
    '{a}m(g)',
    '()',
    '(g){a}m',
  ];
  it('is refused as not UCUM, and nothing reaches the console', () => {
    const spies = (['log', 'info', 'warn', 'error', 'debug'] as const).map((m) => vi.spyOn(console, m));
    try {
      for (const u of hostile) {
        expect(toUcum(u), u).toBeUndefined();
        expect(toCanonical('meanBp', 61, u), u).toMatchObject({ ok: false, reason: 'unknown-unit' });
        expect(convert(500, u, 'mL'), u).toBeUndefined();
      }
      expect(spies.flatMap((s) => s.mock.calls)).toEqual([]);
    } finally {
      vi.restoreAllMocks();
    }
  });
  it('the console is the same after a silenced library call as before it', () => {
    const before = console.log;
    toUcum('{a}m(g)');
    expect(console.log).toBe(before);
  });
  it('a reason quotes at most MAX_UNIT_LENGTH characters of the unit', () => {
    const r = toCanonical('meanBp', 61, 'y'.repeat(100_000));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.detail.length).toBeLessThan(MAX_UNIT_LENGTH + 40);
  });
  it('valid UCUM still passes the screen (UCUM examples: mm[Hg], 10*3/uL, {beats}/min, mL/kg/h)', () => {
    for (const u of ['mm[Hg]', '10*3/uL', '{beats}/min', 'mL/kg/h', '%']) expect(toUcum(u), u).toBe(u);
  });
});
