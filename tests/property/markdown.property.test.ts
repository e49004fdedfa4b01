/**
 * md() escapes values from FHIR data before they stand in card Markdown. Its fast path (a value without any
 * character that needs escaping is returned as it is) must give exactly what the full escaping gives, for any
 * string. The reference below is the escaping written out in full: CommonMark 0.31 §2.4 lets any ASCII
 * punctuation be backslash-escaped; the set escaped here is the inline markup Tidemark's cards could be broken
 * by (emphasis, code, links, tables, strike), and HTML is entity-escaped so no raw HTML reaches a renderer.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { md } from '../../src/cards/markdown.js';

function reference(value: unknown): string {
  return String(value)
    .replace(/[\r\n]+/g, ' ')
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/[\\`*_[\]|~]/g, (c) => `\\${c}`);
}

const special = fc.constantFrom('\r', '\n', '&', '<', '>', '\\', '`', '*', '_', '[', ']', '|', '~', 'a', ' ', '–', '7');

describe('md (Markdown escaping of data values)', () => {
  it('equals the full escaping for any string, with or without characters to escape', () => {
    fc.assert(fc.property(fc.oneof(fc.string({ unit: 'grapheme' }), fc.array(special).map((a) => a.join(''))), (s) => {
      expect(md(s)).toBe(reference(s));
    }), { numRuns: 5000 });
  });

  it('leaves a plain value as it is and escapes markup and HTML', () => {
    expect(md('PPV 16 %')).toBe('PPV 16 %');
    expect(md(42.5)).toBe('42.5');
    expect(md('<b>*x*</b>\nnext')).toBe('&lt;b&gt;\\*x\\*&lt;/b&gt; next');
    expect(md('a|b')).toBe('a\\|b');
  });
});
