/**
 * The advice in codes (docs/clinical-logic/index.md): the matrix cell by cell, early resuscitation before it, the need
 * check, critical only with harm signs, and the closed sets of headline keys and alternatives.
 */
import { describe, expect, it } from 'vitest';
import { adviseOrder, type AdviseInput } from '../../src/assess/advice/advise-order.js';
import { ADVICE_MATRIX } from '../../src/assess/advice/matrix.js';
import { HEADLINE_KEYS, MATRIX_ROWS, TOLERANCE_COLUMNS } from '../../src/assess/advice/types.js';
import { describeOrder } from '../../src/assess/order/describe-order.js';
import { DEFAULT_ORDER_THRESHOLDS } from '../../src/assess/order/thresholds.js';
import { assessed } from '../../src/assess/tolerance/finding.js';
import type { Confidence, Need, PhaseValue, Responsiveness, Tolerance, Verdict } from '../../src/assess/types.js';
import { m, NOW, order, snapshot } from '../helpers/tolerance-fixtures.js';

const rv = (value: Responsiveness, confidence?: Confidence): Verdict<Responsiveness> => ({
  value,
  rationale: `Responsiveness ${value}.`,
  decidingRules: [`responsiveness.${value}`],
  nextTest: 'mini-fluid-challenge',
  ...(confidence ? { confidence } : {}),
});
const tv = (value: Tolerance): Verdict<Tolerance> => ({ value, rationale: `Tolerance ${value}.`, decidingRules: [] });
const need = (value: Need): Verdict<Need> => ({ value, rationale: `Need ${value}.`, decidingRules: [] });
const phase = (value: PhaseValue): Verdict<PhaseValue> => ({ value, rationale: `Phase ${value}.`, decidingRules: [] });
const evlwi = assessed({
  ruleId: 'tolerance.evlwi',
  domain: 'lungs',
  limit: 'severe',
  congestionSign: true,
  text: 'EVLWI 12.0 mL/kg (≥ 10: pulmonary oedema)',
  evidence: [],
  source: 't',
});
const orderFs = describeOrder(order(), snapshot({ measurements: [m('bodyWeight', 70, 600)] }), NOW, DEFAULT_ORDER_THRESHOLDS);

function advise(p: Partial<AdviseInput> & { r?: Verdict<Responsiveness>; t?: Tolerance; n?: Need; ph?: PhaseValue } = {}) {
  return adviseOrder({
    responsiveness: p.r ?? rv('likely', 'high'),
    tolerance: tv(p.t ?? 'adequate'),
    need: need(p.n ?? 'present'),
    phase: phase(p.ph ?? 'later'),
    findings: p.findings ?? [],
    orderFindings: p.orderFindings ?? orderFs,
  });
}

describe('the matrix, later phase, with signs of hypoperfusion', () => {
  const EXPECTED: Record<string, string> = {
    'likely/adequate': 'proceed-and-reassess',
    'likely/limited': 'smaller-aliquot',
    'likely/poor': 'smaller-aliquot',
    'likely/not-known': 'smaller-aliquot',
    'unlikely/adequate': 'question-bolus',
    'unlikely/poor': 'question-bolus',
    'indeterminate/adequate': 'test-first',
    'indeterminate/not-known': 'test-first',
    'likely-low/adequate': 'test-first',
    'unlikely-low/adequate': 'test-first',
  };
  for (const [cell, action] of Object.entries(EXPECTED)) {
    it(`${cell} → ${action}, headline key ${cell}`, () => {
      const [row, t] = cell.split('/') as [string, Tolerance];
      const low: Record<string, ReturnType<typeof rv>> = { 'likely-low': rv('likely', 'low'), 'unlikely-low': rv('unlikely', 'low') };
      const r = low[row] ?? rv(row as Responsiveness, row === 'indeterminate' ? undefined : 'high');
      const rec = advise({ r, t });
      expect(rec).toMatchObject({ action, headline: cell, cell });
    });
  }
  it('every row × column has an entry, and every headline key is in the closed set', () => {
    for (const row of MATRIX_ROWS)
      for (const t of TOLERANCE_COLUMNS) {
        expect(ADVICE_MATRIX[row][t].action).toBeTruthy();
        expect(HEADLINE_KEYS).toContain(`${row}/${t}`);
      }
  });
  it('indicator: info for likely/adequate; warning when tolerance is limited or poor, or a response is unlikely', () => {
    expect(advise().indicator).toBe('info');
    expect(advise({ t: 'limited' }).indicator).toBe('warning');
    expect(advise({ r: rv('unlikely', 'high') }).indicator).toBe('warning');
    expect(advise({ t: 'not-known' }).indicator).toBe('info');
  });
  it('the next test is offered beside a verdict that is not of high confidence', () => {
    expect(advise().nextTest).toBeUndefined();
    expect(advise({ r: rv('likely', 'moderate') }).nextTest).toBe('mini-fluid-challenge');
    expect(advise({ r: rv('indeterminate') })).toMatchObject({ action: 'test-first', nextTest: 'mini-fluid-challenge' });
  });
  it('albumin is not offered as the alternative to an albumin order', () => {
    const alb = describeOrder(
      order({ fluidClass: 'albumin-iso' }),
      snapshot({ measurements: [m('bodyWeight', 70, 600)] }),
      NOW,
      DEFAULT_ORDER_THRESHOLDS,
    );
    expect(advise({ t: 'poor' }).alternatives).toContain('albumin');
    expect(advise({ t: 'poor', orderFindings: alb }).alternatives).not.toContain('albumin');
  });
});

describe('responsiveness is not an indication (docs/clinical-logic)', () => {
  it('responsive with no sign of hypoperfusion → question-need, never a give action', () => {
    const rec = advise({ n: 'absent' });
    expect(rec).toMatchObject({
      action: 'question-need',
      headline: 'no-need/responsive',
      indicator: 'warning',
      alternatives: ['perfusion-check'],
    });
  });
  it('responsive, need unknown → question-need with its own headline', () => {
    expect(advise({ n: 'unknown' })).toMatchObject({ action: 'question-need', headline: 'need-unknown/responsive' });
  });
  it('untested and no sign of hypoperfusion → question-need; untested and need unknown → test first', () => {
    expect(advise({ r: rv('indeterminate'), n: 'absent' })).toMatchObject({ action: 'question-need', headline: 'no-need/untested' });
    expect(advise({ r: rv('indeterminate'), n: 'unknown' }).action).toBe('test-first');
  });
});

describe('early resuscitation (docs/clinical-logic; SSC 2021)', () => {
  it('never a withdrawal: resuscitate-and-reassess whatever the responsiveness', () => {
    for (const r of [rv('likely', 'high'), rv('indeterminate'), rv('unlikely', 'high')]) {
      expect(advise({ r, ph: 'early-resuscitation' }).action).toBe('resuscitate-and-reassess');
    }
    expect(advise({ r: rv('unlikely', 'high'), ph: 'early-resuscitation' })).toMatchObject({
      headline: 'early/unlikely',
      alternatives: ['vasopressor', 'echo', 'cause'],
    });
  });
  it('with poor tolerance and a harm sign: small aliquots only, critical', () => {
    expect(advise({ t: 'poor', ph: 'early-resuscitation', findings: [evlwi] })).toMatchObject({
      action: 'smaller-aliquot',
      headline: 'early/congestion',
      indicator: 'critical',
    });
  });
});

describe('critical only where harm is likely', () => {
  it('poor tolerance with a harm sign → critical, congestion headline by responsiveness', () => {
    expect(advise({ t: 'poor', findings: [evlwi] })).toMatchObject({
      indicator: 'critical',
      headline: 'congestion/likely',
      harmSigns: ['tolerance.evlwi'],
    });
    expect(advise({ t: 'poor', findings: [evlwi], r: rv('unlikely', 'high') }).headline).toBe('congestion/unlikely');
  });
  it('poor tolerance without a harm sign → warning; limited with a harm sign → warning', () => {
    expect(advise({ t: 'poor' }).indicator).toBe('warning');
    expect(advise({ t: 'limited', findings: [evlwi] }).indicator).toBe('warning');
  });
});

describe('reasons', () => {
  it('carry the verdict rationales and the order figures (finding texts), never a headline', () => {
    const rec = advise();
    expect(rec.reasons.slice(0, 4)).toEqual(['Responsiveness likely.', 'Tolerance adequate.', 'Need present.', 'Phase later.']);
    expect(rec.reasons.some((x) => /mL balanced crystalloid over 30 min/.test(x))).toBe(true);
  });
});
