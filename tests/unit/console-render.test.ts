// The console's pure parts: the date range (UTC days, ISO weeks by their Monday: ISO 8601 week dates, checked
// against a calendar), and escaping of client text on its pages.
import { describe, expect, it } from 'vitest';
import { dayRange, weekOf } from '../../src/console/range.js';
import { listPage, recordPage } from '../../src/console/render.js';

const NOW = new Date('2031-03-12T15:00:00Z');

describe('dayRange', () => {
  it('defaults to the 30 UTC days ending today', () => {
    const r = dayRange(undefined, undefined, NOW);
    if (!r.ok) throw new Error(r.message);
    expect([r.range.from, r.range.to, r.range.days.length]).toEqual(['2031-02-11', '2031-03-12', 30]);
    expect([r.range.fromInstant, r.range.toInstant]).toEqual(['2031-02-11T00:00:00.000Z', '2031-03-12T23:59:59.999Z']);
    // 2031-02-10 and 2031-03-10 are Mondays (a calendar for 2031).
    expect(r.range.weeks[0]).toBe('2031-02-10');
    expect(r.range.weeks.at(-1)).toBe('2031-03-10');
    expect(r.range.weeks).toHaveLength(5);
  });
  it('names each week by its Monday; a Sunday belongs to the week before', () => {
    expect(weekOf('2031-03-09')).toBe('2031-03-03');
    expect(weekOf('2031-03-10')).toBe('2031-03-10');
    expect(weekOf('2031-01-01')).toBe('2030-12-30');
  });
  it('refuses text that is no date, a start after the end, and more than 366 days', () => {
    expect(dayRange('2031-02-30', undefined, NOW).ok).toBe(false);
    expect(dayRange('yesterday', undefined, NOW).ok).toBe(false);
    expect(dayRange('2031-03-05', '2031-03-01', NOW).ok).toBe(false);
    expect(dayRange('2029-01-01', '2031-01-01', NOW).ok).toBe(false);
    const one = dayRange('2031-03-01', '2031-03-01', NOW);
    expect(one.ok && one.range.days).toEqual(['2031-03-01']);
  });
});

describe('console pages escape what came from clients', () => {
  const chrome = { csrf: 'tok"en', session: true };
  it('feedback comments and reasons on a record page', () => {
    const out = recordPage(
      '<!doctype html><html><body><main><p>page</p></main></body></html>',
      [
        {
          cardUuid: 'c1',
          outcome: 'overridden',
          acceptedSuggestions: [],
          userComment: '<img src=x onerror=alert(1)>',
          overrideReason: { code: 'x"y', display: '<b>bold</b>' },
          outcomeTimestamp: 't',
          receivedAt: 't',
          service: 's',
        },
      ],
      { c1: 'kind-a' },
      chrome,
    );
    expect(out).not.toContain('<img');
    expect(out).toContain('&lt;img src=x onerror=alert(1)&gt;');
    expect(out).toContain('&lt;b&gt;bold&lt;/b&gt; (x&quot;y)');
    expect(out).toContain('value="tok&quot;en"');
    expect(out.indexOf('id="feedback"')).toBeLessThan(out.indexOf('</main>'));
  });
  it('filters echoed into the list form', () => {
    const out = listPage({
      chrome,
      filters: { from: '2031-03-01', to: '2031-03-02', service: '"><script>x</script>' },
      items: [],
      zoneNote: '',
    });
    expect(out).not.toContain('<script>');
    expect(out).toContain('id="advice-list-empty"');
  });
});
