/** The advice matrix, cell by cell, and its indicator rule. */
import { describe, expect, it } from 'vitest';
import { adviseOrder } from '../../src/assess/advice/advise-order.js';
import { ADVICE_MATRIX, ALTERNATIVE, CRITICAL_HEADLINE, DEFAULT_NEXT_TEST, UNKNOWN_TOLERANCE_HEADLINE } from '../../src/assess/advice/matrix.js';
import { describeOrder } from '../../src/assess/order/describe-order.js';
import { DEFAULT_ORDER_THRESHOLDS } from '../../src/assess/order/thresholds.js';
import { assessed } from '../../src/assess/tolerance/finding.js';
import type { Finding, Responsiveness, Tolerance, Verdict } from '../../src/assess/types.js';
import { m, NOW, order, snapshot } from '../helpers/tolerance-fixtures.js';

const R: Responsiveness[] = ['likely', 'unlikely', 'indeterminate'];
const TOL: Tolerance[] = ['adequate', 'limited', 'poor'];

const rv = (value: Responsiveness, nextTest?: string): Verdict<Responsiveness> =>
  ({ value, rationale: `Responsiveness ${value}.`, decidingRules: [`responsiveness.${value}`], ...(nextTest ? { nextTest } : {}) });
const tv = (value: Tolerance): Verdict<Tolerance> => ({ value, rationale: `Tolerance ${value}.`, decidingRules: value === 'adequate' ? ['tolerance.cvp'] : ['tolerance.fluid-overload'] });

/** An assessed tolerance marker (so that tolerance counts as assessed). */
const marker = assessed({ ruleId: 'tolerance.cvp', domain: 'venous', limit: 'none', text: 'CVP 8 mmHg', evidence: [], source: 't' });
const evlwi = assessed({ ruleId: 'tolerance.evlwi', domain: 'lungs', limit: 'severe', congestionSign: true, text: 'EVLWI 12.0 mL/kg (≥ 10: pulmonary oedema)', evidence: [], source: 't' });
const orderFs = describeOrder(order(), snapshot({ measurements: [m('bodyWeight', 70, 600)] }), NOW, DEFAULT_ORDER_THRESHOLDS);

const EXPECTED: Record<Responsiveness, Record<Tolerance, [string, string]>> = {
  likely: { adequate: ['proceed-and-reassess', 'info'], limited: ['smaller-aliquot', 'warning'], poor: ['smaller-aliquot', 'warning'] },
  unlikely: { adequate: ['question-bolus', 'warning'], limited: ['question-bolus', 'warning'], poor: ['question-bolus', 'warning'] },
  indeterminate: { adequate: ['test-first', 'info'], limited: ['test-first', 'warning'], poor: ['test-first', 'warning'] },
};

describe('adviseOrder: the nine cells without signs of harm', () => {
  for (const r of R) {
    for (const t of TOL) {
      it(`${r} × ${t}`, () => {
        const a = adviseOrder(rv(r), tv(t), orderFs, [marker]);
        const [action, indicator] = EXPECTED[r][t];
        expect(a).toMatchObject({ action, indicator, cell: `${r}/${t}`, toleranceAssessed: true, harmSigns: [] });
        expect(a.headline).toBe(ADVICE_MATRIX[r][t].headline);
        expect(a.headline.length).toBeLessThan(100);
        expect(a.reasons.slice(0, 2)).toEqual([`Responsiveness ${r}.`, `Tolerance ${t}.`]);
        expect(a.reasons).toContain('500 mL balanced crystalloid over 30 min (1,000 mL/h)');
        expect(a.decidingRules).toEqual([`responsiveness.${r}`, ...tv(t).decidingRules]);
      });
    }
  }
});

describe('adviseOrder: critical only where harm is likely', () => {
  it.each(R)('%s × poor with a congestion sign → critical', (r) => {
    const a = adviseOrder(rv(r), tv('poor'), orderFs, [marker, evlwi]);
    expect(a.indicator).toBe('critical');
    expect(a.headline).toBe(CRITICAL_HEADLINE[r]);
    expect(a.headline.length).toBeLessThan(100);
    expect(a.harmSigns).toEqual(['tolerance.evlwi']);
    expect(a.reasons.join(' ')).toContain('EVLWI 12.0');
    expect(a.decidingRules).toContain('tolerance.evlwi');
  });
  it.each(['adequate', 'limited'] as const)('a congestion sign with %s tolerance is not critical', (t) => {
    expect(adviseOrder(rv('likely'), tv(t), orderFs, [marker, evlwi]).indicator).not.toBe('critical');
  });
  it('a not-assessed finding is never a sign of harm', () => {
    const na: Finding = { ...evlwi, status: 'not-assessed' };
    expect(adviseOrder(rv('likely'), tv('poor'), orderFs, [marker, na]).indicator).toBe('warning');
  });
});

describe('adviseOrder: next steps and alternatives', () => {
  it('likely × adequate names no alternative', () => {
    expect(adviseOrder(rv('likely'), tv('adequate'), orderFs, [marker]).alternatives).toEqual([]);
  });
  it('likely × poor names a smaller aliquot, a vasopressor and albumin — options, never doses', () => {
    const a = adviseOrder(rv('likely'), tv('poor'), orderFs, [marker]);
    expect(a.alternatives).toEqual([ALTERNATIVE.smallerAliquot, ALTERNATIVE.vasopressor, ALTERNATIVE.albumin]);
    expect(a.alternatives.join(' ')).not.toMatch(/\d+\s*(mcg|µg|mg|units?)\b/i);
  });
  it('albumin is not offered as the alternative to an albumin order', () => {
    const albuminOrder = describeOrder(order({ fluidClass: 'albumin-hyper', volumeMl: 100 }), snapshot(), NOW, DEFAULT_ORDER_THRESHOLDS);
    expect(adviseOrder(rv('likely'), tv('poor'), albuminOrder, [marker]).alternatives).not.toContain(ALTERNATIVE.albumin);
  });
  it('unlikely names a better next step first, and fluid removal when tolerance is poor', () => {
    expect(adviseOrder(rv('unlikely'), tv('adequate'), orderFs, [marker]).alternatives[0]).toBe(ALTERNATIVE.vasoactiveByPicture);
    expect(adviseOrder(rv('unlikely'), tv('poor'), orderFs, [marker]).alternatives).toContain(ALTERNATIVE.fluidRemoval);
  });
  it('indeterminate names the test from the responsiveness verdict, or a default one', () => {
    const named = adviseOrder(rv('indeterminate', 'Passive leg raising with cardiac output monitoring'), tv('adequate'), orderFs, [marker]);
    expect(named.nextTest).toBe('Passive leg raising with cardiac output monitoring');
    expect(named.alternatives[0]).toBe(named.nextTest);
    const dflt = adviseOrder(rv('indeterminate'), tv('limited'), orderFs, [marker]);
    expect(dflt.nextTest).toBe(DEFAULT_NEXT_TEST);
    expect(adviseOrder(rv('likely'), tv('adequate'), orderFs, [marker]).nextTest).toBeUndefined();
  });
});

describe('adviseOrder: tolerance not assessed', () => {
  it.each(R)('%s with no tolerance marker: the headline says so and a reason explains', (r) => {
    const a = adviseOrder(rv(r), tv('adequate'), orderFs, []);
    expect(a.toleranceAssessed).toBe(false);
    expect(a.headline).toBe(UNKNOWN_TOLERANCE_HEADLINE[r]);
    expect(a.headline.length).toBeLessThan(100);
    expect(a.reasons.join(' ')).toContain('could not be assessed');
  });
  it('an unread order volume is given as a reason', () => {
    const o = order({ volumeProblem: 'no volume in dosageInstruction' });
    delete o.volumeMl;
    const a = adviseOrder(rv('likely'), tv('adequate'), describeOrder(o, snapshot(), NOW, DEFAULT_ORDER_THRESHOLDS), [marker]);
    expect(a.reasons).toContain('Ordered volume not read: no volume in dosageInstruction.');
  });
});

// The matrix's headlines (kept in the audit record's recommendation) and the shipped card catalogue's (shown on the
// card, editable by a site) are two copies of the same wording; this keeps the shipped copies from drifting apart.
describe('matrix headlines and the shipped card catalogue', () => {
  it('say the same for every cell, congestion and unknown-tolerance headline', async () => {
    const { loadCatalogue } = await import('../../src/cards/catalogue.js');
    const { catalogue } = loadCatalogue();
    const fromMatrix: Record<string, string> = {};
    for (const r of R) {
      for (const t of TOL) fromMatrix[`${r}/${t}`] = ADVICE_MATRIX[r][t].headline;
      fromMatrix[`congestion/${r}`] = CRITICAL_HEADLINE[r];
      fromMatrix[`tolerance-unknown/${r}`] = UNKNOWN_TOLERANCE_HEADLINE[r];
    }
    const shipped = Object.fromEntries(Object.entries(catalogue.headlines).filter(([k]) => k in fromMatrix));
    expect(Object.keys(shipped).sort()).toEqual(Object.keys(fromMatrix).sort());
    expect(shipped).toEqual(fromMatrix);
  });
});
