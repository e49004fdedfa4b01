/**
 * HTML escaping for the reasoning page. Everything that came from the client (FHIR text, displays, units, ids,
 * OperationOutcome text) goes through `h` before it is put in the page: the five HTML specials become character
 * references (HTML Living Standard, 13.1.2.6 / OWASP XSS prevention rule 1), and control characters and the
 * Unicode bidirectional controls (UAX #9) are removed so they cannot reorder or hide what a clinician reads.
 */

const INVISIBLE = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;
const SPECIAL = /[&<>"']/g;
const REF: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** Text for an HTML text node or a quoted attribute value. */
export function h(value: unknown): string {
  return String(value ?? '')
    .replace(INVISIBLE, '')
    .replace(SPECIAL, (c) => REF[c] as string);
}

/** A tagged template whose interpolations are escaped, except values made by `raw` (our own markup). */
export class Raw {
  constructor(readonly html: string) {}
  toString(): string {
    return this.html;
  }
}
export const raw = (html: string): Raw => new Raw(html);

export function html(strings: TemplateStringsArray, ...values: unknown[]): Raw {
  let out = strings[0] ?? '';
  values.forEach((v, i) => {
    out += piece(v) + (strings[i + 1] ?? '');
  });
  return new Raw(out);
}

function piece(v: unknown): string {
  if (v instanceof Raw) return v.html;
  if (Array.isArray(v)) return v.map(piece).join('');
  if (v === undefined || v === null || v === false) return '';
  return h(v);
}
