/**
 * CSV cells and rows: RFC 4180 (a field holding a comma, double quote, CR or LF is quoted, a double quote inside
 * is doubled, records end with CRLF) and safe to open in a spreadsheet: a text cell that begins with =, +, -, @,
 * a tab or a carriage return is prefixed with a single quote, as the OWASP "CSV Injection" page recommends, so
 * it is read as text, never as a formula. Numbers are written as numbers (a negative number stays a number).
 */

const FORMULA_START = /^[=+\-@\t\r]/;
const NEEDS_QUOTES = /[",\r\n]/;

export function csvCell(v: unknown): string {
  if (v === undefined || v === null) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  if (typeof v === 'boolean') return v ? 'true' : 'false';
  let s = String(v);
  if (FORMULA_START.test(s)) s = `'${s}`;
  return NEEDS_QUOTES.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function csvRow(cells: readonly unknown[]): string {
  return `${cells.map(csvCell).join(',')}\r\n`;
}
