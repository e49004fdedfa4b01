// CSV cells: RFC 4180 §2 (quoting rules 5–7, and the example records there) and the OWASP "CSV Injection" page
// (a cell starting with =, +, -, @, tab or carriage return is prefixed with a single quote).
import { describe, expect, it } from 'vitest';
import { csvCell, csvRow } from '../../src/audit/csv.js';

describe('RFC 4180', () => {
  it('rule 7: a double quote inside a field is doubled and the field quoted — the RFC\'s own example "b""bb"', () => {
    expect(csvCell('b"bb')).toBe('"b""bb"');
  });
  it('rule 6: fields with a comma, CR or LF are quoted; plain fields are not', () => {
    expect(csvRow(['aaa', 'b,bb', 'ccc'])).toBe('aaa,"b,bb",ccc\r\n');
    expect(csvCell('line one\nline two')).toBe('"line one\nline two"');
    expect(csvCell('a\r\nb')).toBe('"a\r\nb"');
    expect(csvCell('plain text')).toBe('plain text');
  });
  it('rule 1: each record ends with CRLF', () => {
    expect(csvRow(['x', 'y'])).toMatch(/\r\n$/);
  });
  it('empty and absent values are empty fields; numbers stay numbers', () => {
    expect(csvRow([undefined, null, '', 0, -12.5, 41.3, Number.NaN])).toBe(',,,0,-12.5,41.3,\r\n');
  });
});

describe('formula injection (OWASP CSV Injection)', () => {
  it.each([
    ['=HYPERLINK("http://x.invalid","click")', '"\'=HYPERLINK(""http://x.invalid"",""click"")"'],
    ['+1+1', "'+1+1"],
    ['-1+1', "'-1+1"],
    ['@SUM(A1:A2)', "'@SUM(A1:A2)"],
    ['\tcmd', "'\tcmd"],
    ['\rcmd', '"\'\rcmd"'],
  ])('%j is written as text', (input, out) => {
    expect(csvCell(input)).toBe(out);
  });
  it('leaves cells that only contain such characters later alone', () => {
    expect(csvCell('a=b')).toBe('a=b');
    expect(csvCell('Practitioner/x-1')).toBe('Practitioner/x-1');
  });
});
