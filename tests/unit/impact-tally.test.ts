// The impact tally over invented comparable outcomes (no rules run): what counts as a change, how cards of one
// kind are paired, the counts by kind, the examples kept, and the bound on distinct change rows.
import { describe, expect, it } from 'vitest';
import { resolveThresholds } from '../../src/assess/thresholds.js';
import { EXAMPLES, formatImpact, ImpactTally, MAX_CHANGE_ROWS } from '../../src/audit/impact.js';
import type { CardOutcome, ComparableOutcome } from '../../src/audit/outcome.js';
import { loadCatalogue } from '../../src/cards/catalogue.js';

const rules = { thresholds: resolveThresholds({}), catalogue: loadCatalogue().catalogue, rulesVersion: 'test+candidate' };
const card = (kind: string, o: Partial<CardOutcome> = {}): CardOutcome => ({
  kind,
  indicator: 'info',
  summary: 'Invented summary',
  suggestions: ['Invented step'],
  ...o,
});
const outcome = (o: Partial<ComparableOutcome> = {}): ComparableOutcome => ({
  responsiveness: 'likely',
  tolerance: 'adequate',
  cards: [card('review')],
  ...o,
});

describe('ImpactTally', () => {
  it('the same outcome is no change', () => {
    const t = new ImpactTally(rules);
    t.compare('a1', outcome(), outcome());
    const r = t.report();
    expect(r.unchanged).toBe(1);
    expect(r.changed.any).toBe(0);
    expect(r.changes).toEqual([]);
    expect(r.byCardKind).toEqual([{ cardKind: 'review', records: 1, indicator: 0, headline: 0, suggestions: 0, shownOrAbsent: 0 }]);
  });

  it('counts each kind of change once per record, with rows by (what, kind, from → to) and their examples', () => {
    const t = new ImpactTally(rules);
    t.compare(
      'a1',
      outcome(),
      outcome({ responsiveness: 'indeterminate', cards: [card('review', { indicator: 'warning', summary: 'Other', suggestions: [] })] }),
    );
    t.compare('a2', outcome({ cards: [card('review'), card('gap')] }), outcome({ tolerance: 'not-known', cards: [card('review')] }));
    t.compare(
      'a3',
      outcome({ headlineKey: 'likely/adequate' }),
      outcome({ headlineKey: 'likely/limited', cards: [card('review'), card('review', { indicator: 'critical' })] }),
    );
    const r = t.report();
    expect(r.changed).toEqual({
      any: 3,
      responsiveness: 1,
      confidence: 0,
      tolerance: 1,
      action: 0,
      nextTest: 0,
      indicator: 1,
      headline: 2,
      suggestions: 1,
      cards: 2,
    });
    const row = (dimension: string, cardKind = '') =>
      r.changes
        .filter((c) => c.dimension === dimension && c.cardKind === cardKind)
        .map(({ from, to, count, examples }) => ({ from, to, count, examples }));
    expect(row('responsiveness')).toEqual([{ from: 'likely', to: 'indeterminate', count: 1, examples: ['a1'] }]);
    expect(row('tolerance')).toEqual([{ from: 'adequate', to: 'not-known', count: 1, examples: ['a2'] }]);
    expect(row('headline-key')).toEqual([{ from: 'likely/adequate', to: 'likely/limited', count: 1, examples: ['a3'] }]);
    expect(row('indicator', 'review')).toEqual([{ from: 'info', to: 'warning', count: 1, examples: ['a1'] }]);
    expect(row('suggestions', 'review')).toEqual([{ from: 'Invented step', to: '(none)', count: 1, examples: ['a1'] }]);
    // A second card of a kind is paired with nothing: shown now, not then.
    expect(row('card', 'review')).toEqual([{ from: '(none)', to: 'shown', count: 1, examples: ['a3'] }]);
    expect(row('card', 'gap')).toEqual([{ from: 'shown', to: '(none)', count: 1, examples: ['a2'] }]);
    expect(r.byCardKind).toEqual([
      { cardKind: 'gap', records: 1, indicator: 0, headline: 0, suggestions: 0, shownOrAbsent: 1 },
      { cardKind: 'review', records: 3, indicator: 1, headline: 1, suggestions: 1, shownOrAbsent: 1 },
    ]);
  });

  it(`keeps ${EXAMPLES} examples per row, oldest first, and counts every record`, () => {
    const t = new ImpactTally(rules);
    for (let i = 0; i < 12; i += 1) t.compare(`a${i}`, outcome(), outcome({ responsiveness: 'unlikely' }));
    const [row] = t.report().changes;
    expect(row).toMatchObject({ count: 12, examples: ['a0', 'a1', 'a2', 'a3', 'a4'] });
  });

  it(`keeps at most ${MAX_CHANGE_ROWS} distinct rows; later new changes go to an (other) row of their kind`, () => {
    const t = new ImpactTally(rules);
    const n = MAX_CHANGE_ROWS + 50;
    for (let i = 0; i < n; i += 1)
      t.compare(`a${i}`, outcome(), outcome({ cards: [card('review', { summary: `Summary with value ${i}` })] }));
    const r = t.report();
    expect(r.changes).toHaveLength(MAX_CHANGE_ROWS + 1);
    expect(r.changes[0]).toMatchObject({ dimension: 'headline', cardKind: 'review', from: '(other)', to: '(other)', count: 50 });
    expect(r.changes.reduce((s, c) => s + c.count, 0)).toBe(n);
    expect(r.changed.headline).toBe(n);
  });

  it('formats CSV and NDJSON with every change, and a table with control characters made harmless', () => {
    const t = new ImpactTally(rules);
    t.compare('a1', outcome(), outcome({ cards: [card('review', { summary: '=cmd\u001b[31m, "quoted"' })] }));
    const r = t.report();
    expect(formatImpact(r, 'csv')).toBe(
      'dimension,card_kind,from,to,count,examples\r\nheadline,review,Invented summary,"\'=cmd\u001b[31m, ""quoted""",1,a1\r\n',
    );
    const nd = formatImpact(r, 'ndjson')
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l));
    expect(nd[0]).toMatchObject({ type: 'totals', changed: { any: 1 } });
    expect(nd[1]).toMatchObject({ type: 'change', to: '=cmd\u001b[31m, "quoted"' });
    expect(formatImpact(r, 'table')).not.toContain('\u001b');
  });
});
