/** Markdown helpers. Values from FHIR data are escaped so that they cannot inject markup or raw HTML. */

const NEEDS_ESCAPE = /[\r\n&<>\\`*_[\]|~]/;

/** Escapes the characters that start inline Markdown (emphasis, code, links, tables, strike) and HTML. Values only ever stand inside our own lines. */
export function md(value: unknown): string {
  const s = String(value);
  // Most values (numbers, units, plain words) hold none of these characters: returned as they are, without five passes.
  if (!NEEDS_ESCAPE.test(s)) return s;
  return s
    .replace(/[\r\n]+/g, ' ')
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/[\\`*_[\]|~]/g, (c) => `\\${c}`);
}

/**
 * Control characters (C0, DEL, C1) and the Unicode bidirectional controls (ALM U+061C, LRM/RLM U+200E–F, the
 * embeddings and overrides U+202A–U+202E, the isolates U+2066–U+2069; Unicode Standard Annex #9): in a client's text
 * they can reorder or hide what a prescriber reads (an RLO U+202E shows the rest of the line backwards).
 */
const INVISIBLE = /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;

/**
 * Client text inside one line of our own text (a card summary): the controls above removed (tabs and line breaks
 * become spaces), then escaped as md() escapes detail values.
 */
export function inline(value: unknown): string {
  return md(String(value).replace(INVISIBLE, (c) => (c === '\t' || c === '\n' || c === '\r' ? ' ' : '')));
}

export function table(headers: string[], rows: string[][]): string {
  const line = (cells: string[]) => `| ${cells.join(' | ')} |`;
  return [line(headers), line(headers.map(() => '---')), ...rows.map(line)].join('\n');
}

/** Fills {{name}} placeholders. Unknown names become empty; values are inserted as given (escape before). */
export function fill(template: string, vars: Record<string, string>): string {
  return template.replace(/\{\{(\w+)\}\}/g, (_m, k: string) => vars[k] ?? '');
}
