/**
 * md() escapes values from FHIR data before they stand in card Markdown. Its fast path (a value without any
 * character that needs escaping is returned as it is) must give exactly what the full escaping gives, for any
 * string. The reference below is the escaping written out in full: CommonMark 0.31 §2.4 lets any ASCII
 * punctuation be backslash-escaped; the set escaped here is the inline markup Tidemark's cards could be broken
 * by (emphasis, code, links, tables, strike), and HTML is entity-escaped so no raw HTML reaches a renderer.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { loadCatalogue } from '../../src/cards/catalogue.js';
import { inline, md } from '../../src/cards/markdown.js';
import { renderCard } from '../../src/cards/render.js';

const INVISIBLE_ALL = /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;

/** The escaping written out in full, step by step, with no fast path (the cap of 300 characters included). */
function reference(value: unknown): string {
  let s = String(value)
    .replace(INVISIBLE_ALL, (c) => (c === '\t' || c === '\n' || c === '\r' ? ' ' : ''))
    .trimStart();
  if (s.length > 300) {
    s = s.slice(0, 299);
    if (/[\ud800-\udbff]$/.test(s)) s = s.slice(0, -1);
    s = `${s.trimEnd()}…`;
  }
  return s
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/[\\`*_[\]|~]/g, (c) => `\\${c}`)
    .replace(/^(?:[#=]|[+-](?=[\s-]|$))/, (c) => `\\${c}`)
    .replace(/^(\d+)([.)])(?=\s|$)/, '$1\\$2')
    .replace(/([A-Za-z0-9])\.(?=[A-Za-z])/g, '$1\\.')
    .replace(/([A-Za-z]):(?=\S)/g, '$1\\:')
    .replace(/:\//g, ':\\/');
}

const special = fc.constantFrom(
  '\r',
  '\n',
  '&',
  '<',
  '>',
  '\\',
  '`',
  '*',
  '_',
  '[',
  ']',
  '|',
  '~',
  'a',
  ' ',
  '–',
  '7',
  '#',
  '-',
  '+',
  '=',
  '.',
  ':',
  '/',
  '1',
  '\u202E',
  '\t',
);

describe('md (Markdown escaping of data values)', () => {
  it('equals the full escaping for any string, with or without characters to escape', () => {
    fc.assert(
      fc.property(
        fc.oneof(
          fc.string({ unit: 'grapheme' }),
          fc.array(special).map((a) => a.join('')),
        ),
        (s) => {
          expect(md(s)).toBe(reference(s));
        },
      ),
      { numRuns: 5000 },
    );
  });

  it('leaves a plain value as it is and escapes markup and HTML', () => {
    expect(md('PPV 16 %')).toBe('PPV 16 %');
    expect(md(42.5)).toBe('42.5');
    expect(md('<b>*x*</b>\nnext')).toBe('&lt;b&gt;\\*x\\*&lt;/b&gt; next');
    expect(md('a|b')).toBe('a\\|b');
    // Structure at the start (CommonMark 0.31 §4.2 headings, §5.2 lists, §4.3 setext), autolinks (GFM, linkify).
    expect(md('# Stop')).toBe('\\# Stop');
    expect(md('- item')).toBe('\\- item');
    expect(md('1. item')).toBe('1\\. item');
    expect(md('> quote')).toBe('&gt; quote');
    expect(md('see www.x.com')).toBe('see www\\.x\\.com');
    expect(md('http://x')).toBe('http\\:\\//x');
    expect(md('4.6 L/min')).toBe('4.6 L/min');
    expect(md('x'.repeat(400))).toHaveLength(300);
  });
});

// Issue 13 item 9: client text in a card summary (the reason of the "advice not available" card quotes what a
// prefetch OperationOutcome said). inline() removes control and bidi characters (Unicode UAX #9) and escapes as
// md() does; the rendered summary keeps that for any string, also where it is cut to stay under 140 characters
// (CDS Hooks 2.0: summary < 140 characters).
const INVISIBLE = /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/;
const attack = fc.constantFrom(
  '[click](javascript:alert(1))',
  '<img src=x onerror=alert(1)>',
  '\u202E',
  '\u2066',
  '\u200F',
  '&lt;',
  '\\',
  '\\\\[',
  '`',
  '**',
  '_',
  '|',
  '~~',
  '\n',
  '\r\n',
  '\t',
  '\u0000',
  '\u0085',
  '💧',
  'a',
  ' ',
);
const hostile = fc.oneof(
  fc.string({ unit: 'grapheme' }),
  fc.string({ unit: 'binary' }),
  fc.array(attack, { maxLength: 40 }).map((a) => a.join('')),
);

/** Undoes the escaping: a backslash escape gives its character, an entity its character, in one pass. */
function unescape(s: string): string {
  return s.replace(
    /\\([\\`*_[\]|~#+=.:/)-])|&(amp|lt|gt);/g,
    (_m, c: string | undefined, e: string | undefined) => c ?? ({ amp: '&', lt: '<', gt: '>' } as Record<string, string>)[e ?? ''] ?? '',
  );
}

/** Holds for escaped text: no control or bidi character, no raw HTML, markup only escaped, & only in entities. */
function safelyEscaped(s: string): void {
  expect(s).not.toMatch(INVISIBLE);
  expect(s).not.toMatch(/[<>]/);
  const bare = s.replace(/\\[\\`*_[\]|~#+=.:/)-]/g, '').replace(/&(amp|lt|gt);/g, '');
  expect(bare).not.toMatch(/[\\`*_[\]|~&]/);
}

describe('inline (client text in a card summary)', () => {
  it('escapes any hostile string and keeps its visible text', () => {
    fc.assert(
      fc.property(hostile, (s) => {
        const out = inline(s, 10_000);
        safelyEscaped(out);
        expect(unescape(out)).toBe(
          s.replace(new RegExp(INVISIBLE.source, 'g'), (c) => (c === '\t' || c === '\n' || c === '\r' ? ' ' : '')).trimStart(),
        );
      }),
      { numRuns: 3000 },
    );
  });

  it('the rendered summary of an assessment-gap card is escaped and under 140 characters for any reason text', () => {
    const cat = loadCatalogue().catalogue;
    fc.assert(
      fc.property(hostile, (reason) => {
        const card = renderCard(
          { kind: 'assessment-gap', vars: { gapReason: reason }, lines: [{ text: reason, keep: true }], suggestions: [] },
          cat,
          { hook: 'order-select', publicUrl: 'http://localhost:8080' },
        );
        expect(card.summary.length).toBeLessThan(140);
        safelyEscaped(card.summary.replace(/…$/, ''));
      }),
      { numRuns: 2000 },
    );
  });

  it('neutralises the attacks of issue 13', () => {
    expect(inline('[click](javascript:alert(1))')).toBe('\\[click\\](javascript\\:alert(1))');
    expect(inline('<img src=x onerror=alert(1)>')).toBe('&lt;img src=x onerror=alert(1)&gt;');
    expect(inline('abc\u202Edef')).toBe('abcdef');
  });
});
