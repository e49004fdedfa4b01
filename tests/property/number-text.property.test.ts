/**
 * fmt (src/assess/common/text.ts, the one number formatter of every finding text) writes numbers into finding texts as
 * Intl.NumberFormat('en-US') does
 * (ECMA-402: grouping separators, at most `decimals` fraction digits, half-expand rounding), with a shortcut
 * for values below 1,000. For any number and any number of decimals the text must be the formatter's own, except that
 * a value rounding to zero is written 0, never -0.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { fmt, round } from '../../src/assess/common/text.js';

const reference = (v: number, d: number) =>
  new Intl.NumberFormat('en-US', { maximumFractionDigits: d, minimumFractionDigits: 0 }).format(round(v, d) || 0);

describe('fmt (numbers in finding texts)', () => {
  it('equals Intl.NumberFormat en-US for any finite number, 0–3 decimals', () => {
    const value = fc.oneof(
      fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e7, max: 1e7 }),
      fc.double({ noNaN: true, min: -2000, max: 2000 }),
      fc.integer({ min: -5000, max: 5000 }).map((n) => n / 8),
      fc.constantFrom(0, -0, 1e-7, -1e-7, 999.95, 999.5, -999.96, 0.05, 2.675, 1.005),
    );
    fc.assert(
      fc.property(value, fc.integer({ min: 0, max: 3 }), (v, d) => {
        expect(fmt(v, d)).toBe(reference(v, d));
      }),
      { numRuns: 20000 },
    );
  });

  it('writes the usual clinical values as a prescriber reads them', () => {
    expect(fmt(2100)).toBe('2,100');
    expect(fmt(16.94, 1)).toBe('16.9');
    expect(fmt(3.0, 1)).toBe('3');
    expect(fmt(-0.04, 1)).toBe('0');
  });
});
