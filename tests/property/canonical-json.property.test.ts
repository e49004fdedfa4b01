// canonicalJson (src/util/canonical-json.ts) takes a fast path (a sorted copy, one JSON.stringify) and falls back to
// the recursive writer for values whose copy could serialise differently; both must give the text written out in
// full below: RFC 8259 JSON with every object's keys in UTF-16 code-unit order, as Array.prototype.sort orders them.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/util/canonical-json.js';

/** An array element: undefined is written as null, as JSON.stringify writes it. */
const element = (x: unknown): string => (x === undefined ? 'null' : reference(x));

function reference(v: unknown): string {
  if (v === null || typeof v !== 'object') return JSON.stringify(v) ?? 'null';
  if (Array.isArray(v)) return `[${Array.from({ length: v.length }, (_, i) => (i in v ? element(v[i]) : '')).join(',')}]`;
  const o = v as Record<string, unknown>;
  return `{${Object.keys(o)
    .sort()
    .filter((k) => o[k] !== undefined)
    .map((k) => `${JSON.stringify(k)}:${reference(o[k])}`)
    .join(',')}}`;
}

describe('canonicalJson', () => {
  it('equals the reference for any JSON value (fast path)', () => {
    fc.assert(
      fc.property(fc.jsonValue(), (v) => {
        expect(canonicalJson(v)).toBe(reference(v));
      }),
      { numRuns: 2000 },
    );
  });
  it('equals the reference for objects with integer keys and for sparse arrays (plain path)', () => {
    fc.assert(
      fc.property(fc.dictionary(fc.oneof(fc.nat().map(String), fc.string()), fc.jsonValue()), (o) => {
        expect(canonicalJson(o)).toBe(reference(o));
      }),
      { numRuns: 1000 },
    );
    const sparse = [1, 2, 3];
    delete sparse[1]; // a hole, as `[1, , 3]` writes it
    expect(canonicalJson({ b: sparse, a: { 10: 'x', 9: 'y' } })).toBe(reference({ b: sparse, a: { 10: 'x', 9: 'y' } }));
    expect(canonicalJson({ b: sparse })).toBe('{"b":[1,,3]}');
  });
  it('sorts keys and leaves out undefined members', () => {
    expect(canonicalJson({ b: 1, a: { d: undefined, c: [2] } })).toBe('{"a":{"c":[2]},"b":1}');
  });
});
