/**
 * The snapshot finds an Observation's kind by map lookups (kindLookup). For any list of codings, drawn from the
 * codes Tidemark reads (src/fhir/codes.ts) and from codes it does not, the answer must be the one the plain
 * rule gives: the first code in the list's order that any coding names by system and code (FHIR R4 Coding:
 * system + code identify the concept, display is not used).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CODED_OBSERVATION_CODES, DYNAMIC_TEST_CODES, OBSERVATION_CODES } from '../../src/fhir/codes.js';
import { kindLookup } from '../../src/snapshot/normalize.js';

type Coding = { system?: string; code?: string; display?: string };

const lists = { numeric: OBSERVATION_CODES, coded: CODED_OBSERVATION_CODES, dynamic: DYNAMIC_TEST_CODES };

describe('kindLookup (Observation code → kind)', () => {
  for (const [name, list] of Object.entries(lists)) {
    it(`gives the first listed match for any codings (${name} codes)`, () => {
      const lookup = kindLookup(list);
      const all = [...OBSERVATION_CODES, ...CODED_OBSERVATION_CODES, ...DYNAMIC_TEST_CODES];
      const coding: fc.Arbitrary<Coding> = fc.oneof(
        fc.constantFrom(...all).map((c) => ({ system: c.system, code: c.code })),
        fc.constantFrom(...all).map((c) => ({ system: c.system, code: `${c.code}x` })),
        fc.constantFrom(...all).map((c) => ({ code: c.code })),
        fc.record({ system: fc.string(), code: fc.string() }, { requiredKeys: [] }),
      );
      fc.assert(
        fc.property(fc.array(coding, { maxLength: 5 }), (codings) => {
          const want = list.find((c) => codings.some((x) => x.system === c.system && x.code === c.code))?.kind;
          expect(lookup(codings)).toBe(want);
        }),
        { numRuns: 3000 },
      );
    });
  }
});
