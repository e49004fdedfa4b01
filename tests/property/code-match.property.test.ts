/**
 * The ICD-10 matcher against plain definitions, for ICD-10-shaped codes drawn near the value sets' rules:
 * a dotted code and its undotted form (ICD-10-CM codes are written with the dot after the third character; feeds
 * drop it) get the same answer; a code rule takes the code and its descendants only; a range takes exactly the
 * codes that extend one of the codes listed between its ends; and group membership does not depend on case,
 * surrounding spaces or the order of the codings.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { icd10Matches, normaliseIcd10 } from '../../src/fhir/code-match.js';
import { CONDITION_SETS, matchConditionGroups } from '../../src/fhir/value-sets.js';

const ALNUM = '0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZ'.split('');
const rules = CONDITION_SETS.sets.flatMap((s) => s.icd10);
const ends = rules.flatMap((r) => ('code' in r ? [r.code] : [r.from, r.to])).map((c) => normaliseIcd10(c)!);

/** An undotted ICD-10-shaped code: often a rule end, cut or extended, sometimes its neighbour. */
const undotted: fc.Arbitrary<string> = fc
  .tuple(
    fc.constantFrom(...ends),
    fc.integer({ min: 3, max: 7 }),
    fc.array(fc.constantFrom(...ALNUM), { minLength: 4, maxLength: 4 }),
    fc.boolean(),
  )
  .map(([end, len, tail, bump]) => {
    let s = (end + tail.join('')).slice(0, len);
    if (bump) {
      const i = s.length - 1;
      s = s.slice(0, i) + ALNUM[(ALNUM.indexOf(s[i]!) + 1) % ALNUM.length]!;
    }
    return normaliseIcd10(s) ?? end;
  });
const dotted = (c: string) => (c.length > 3 ? `${c.slice(0, 3)}.${c.slice(3)}` : c);

describe('icd10Matches', () => {
  it('a dotted code and its undotted form get the same answer from every rule', () => {
    fc.assert(
      fc.property(undotted, (c) => {
        for (const r of rules) expect(icd10Matches(r, dotted(c))).toBe(icd10Matches(r, c));
      }),
      { numRuns: 1000 },
    );
  });

  it('a code rule takes the code and the codes that extend it, nothing else', () => {
    fc.assert(
      fc.property(undotted, (c) => {
        for (const r of rules) if ('code' in r) expect(icd10Matches(r, c)).toBe(c.startsWith(normaliseIcd10(r.code)!));
      }),
      { numRuns: 1000 },
    );
  });

  it('a range takes exactly the codes that extend one of the codes listed between its ends', () => {
    const ranges = rules.filter((r): r is Extract<typeof r, { from: string }> => 'from' in r);
    expect(ranges.length).toBeGreaterThan(0);
    for (const r of ranges) {
      const from = normaliseIcd10(r.from)!;
      const to = normaliseIcd10(r.to)!;
      // The value sets write ranges whose ends differ in the last character only: list the codes between.
      expect(from.length).toBe(to.length);
      expect(from.slice(0, -1)).toBe(to.slice(0, -1));
      const listed = ALNUM.filter((ch) => ch >= from.at(-1)! && ch <= to.at(-1)!).map((ch) => from.slice(0, -1) + ch);
      fc.assert(
        fc.property(undotted, (c) => {
          expect(icd10Matches(r, c)).toBe(listed.some((l) => c.startsWith(l)));
        }),
        { numRuns: 1000 },
      );
    }
  });
});

describe('matchConditionGroups', () => {
  const systems = [...CONDITION_SETS.icd10Systems, CONDITION_SETS.snomedSystem, 'urn:local'];
  const snomed = CONDITION_SETS.sets.flatMap((s) => s.snomed.map((c) => c.code));
  const coding = fc.oneof(
    fc.tuple(fc.constantFrom(...systems), undotted.map(dotted)).map(([system, code]) => ({ system, code })),
    fc.tuple(fc.constantFrom(...systems), fc.constantFrom(...snomed)).map(([system, code]) => ({ system, code })),
  );
  it('the groups found do not depend on case, spaces around the code or the order of the codings', () => {
    fc.assert(
      fc.property(fc.array(coding, { minLength: 1, maxLength: 4 }), (codings) => {
        const ids = matchConditionGroups(codings).map((h) => h.id);
        const messy = [...codings].reverse().map((c) => ({ system: c.system, code: ` ${c.code.toLowerCase()} ` }));
        expect(matchConditionGroups(messy).map((h) => h.id)).toEqual(ids);
      }),
      { numRuns: 1000 },
    );
  });
});
