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

export function table(headers: string[], rows: string[][]): string {
  const line = (cells: string[]) => `| ${cells.join(' | ')} |`;
  return [line(headers), line(headers.map(() => '---')), ...rows.map(line)].join('\n');
}

/** Fills {{name}} placeholders. Unknown names become empty; values are inserted as given (escape before). */
export function fill(template: string, vars: Record<string, string>): string {
  return template.replace(/\{\{(\w+)\}\}/g, (_m, k: string) => vars[k] ?? '');
}
