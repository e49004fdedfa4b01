/**
 * Markdown helpers. Values from FHIR data (texts, displays, units, ids, OperationOutcome text) are made inert before
 * they stand in card Markdown (summary, detail, suggestion labels): wherever a value lands, it cannot start markup,
 * structure, a link or raw HTML, cannot reorder what the prescriber reads, and cannot run on without end.
 */

/**
 * Control characters (C0, DEL, C1) and the Unicode bidirectional controls (ALM U+061C, LRM/RLM U+200E–F, the
 * embeddings and overrides U+202A–U+202E, the isolates U+2066–U+2069; Unicode Standard Annex #9): in a client's text
 * they can reorder or hide what a prescriber reads (an RLO U+202E shows the rest of the line backwards).
 */
const INVISIBLE = /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;

/** Longest value kept by default (our own bound: one value is a phrase, never a paragraph). */
export const MAX_VALUE_LENGTH = 300;

/**
 * Anything md() changes: a character to escape or remove, Markdown structure at the start (ATX heading `#`, list
 * `-` `+` `*` `1.` `1)`, block quote `>`, setext underline `=`; CommonMark 0.31 §4.2, §5.1–5.3), a dot inside a
 * word (a bare domain becomes a link under GFM's autolink extension), a colon after a letter or `:/` (a scheme).
 */
const NEEDS_ESCAPE =
  /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069&<>\\`*_[\]|~]|^\s|^(?:[#>=]|[+-](?=[\s-]|$)|\d+[.)](?=\s|$))|[A-Za-z0-9]\.[A-Za-z]|[A-Za-z]:\S|:\//;

/** The first `max` characters, never ending in the first half of a surrogate pair, with an ellipsis when cut. */
export function clip(s: string, max: number): string {
  if (s.length <= max) return s;
  let t = s.slice(0, Math.max(0, max - 1));
  if (/[\ud800-\udbff]$/.test(t)) t = t.slice(0, -1);
  return `${t.trimEnd()}…`;
}

/**
 * Makes a value inert in Markdown: control and bidi characters removed (tabs and line breaks become spaces), the
 * length capped, HTML specials as entities, inline markup characters backslash-escaped (CommonMark 0.31 §2.4:
 * any ASCII punctuation may be), structure at its start escaped, a dot between letters, a colon after a letter
 * (a scheme: `mailto:`, `http:`) and the `/` of `://` escaped so no autolink forms (GFM autolinks, linkify). Plain values (numbers, units, words) come back as they are.
 */
export function md(value: unknown, max = MAX_VALUE_LENGTH): string {
  const raw = String(value);
  if (raw.length <= max && !NEEDS_ESCAPE.test(raw)) return raw;
  const s = clip(raw.replace(INVISIBLE, (c) => (c === '\t' || c === '\n' || c === '\r' ? ' ' : '')).trimStart(), max);
  return (
    s
      .replace(/&/g, '&amp;')
      .replace(/</g, '&lt;')
      .replace(/>/g, '&gt;')
      .replace(/[\\`*_[\]|~]/g, (c) => `\\${c}`)
      // A `>` at the start is an entity by now (no block quote); a list marker needs a space after it (CommonMark 0.31 §5.2).
      .replace(/^(?:[#=]|[+-](?=[\s-]|$))/, (c) => `\\${c}`)
      .replace(/^(\d+)([.)])(?=\s|$)/, '$1\\$2')
      .replace(/([A-Za-z0-9])\.(?=[A-Za-z])/g, '$1\\.')
      .replace(/([A-Za-z]):(?=\S)/g, '$1\\:')
      .replace(/:\//g, ':\\/')
  );
}

/** Client text inside one line of our own text (a card summary, a suggestion label): the same as md(). */
export function inline(value: unknown, max = MAX_VALUE_LENGTH): string {
  return md(value, max);
}

export function table(headers: string[], rows: string[][]): string {
  const line = (cells: string[]) => `| ${cells.join(' | ')} |`;
  return [line(headers), line(headers.map(() => '---')), ...rows.map(line)].join('\n');
}

/** Fills {{name}} placeholders. Unknown names become empty; values are inserted as given (escape before). */
export function fill(template: string, vars: Record<string, string>): string {
  return template.replace(/\{\{(\w+)\}\}/g, (_m, k: string) => vars[k] ?? '');
}
