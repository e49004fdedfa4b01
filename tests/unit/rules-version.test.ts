/** The rules version names the package, the card catalogue, the thresholds and the value sets (replay compares it). */
import { describe, expect, it } from 'vitest';
import { PACKAGE_VERSION, rulesVersion, valueSetsDigest } from '../../src/config/rules-version.js';
import { VALUE_SETS } from '../../src/fhir/value-sets.js';

const CAT = 'abcdef0123456789';
const T = { tolerance: { a: 1 } };

describe('rulesVersion', () => {
  it('has the form version+c<catalogue>.t<thresholds>.v<value sets>', () => {
    expect(rulesVersion(CAT, T)).toMatch(
      new RegExp(`^${PACKAGE_VERSION.replace(/\./g, '\\.')}\\+cabcdef01\\.t[0-9a-f]{8}\\.v[0-9a-f]{8}$`),
    );
    expect(rulesVersion(CAT, T)).toBe(rulesVersion(CAT, T, VALUE_SETS));
    expect(rulesVersion(CAT, T).endsWith(`.v${valueSetsDigest()}`)).toBe(true);
  });
  it('changes when a code is removed from a value set', () => {
    const edited = structuredClone(VALUE_SETS) as { conditions: { sets: Array<{ snomed: unknown[] }> } };
    edited.conditions.sets[0]!.snomed.pop();
    expect(rulesVersion(CAT, T, edited)).not.toBe(rulesVersion(CAT, T));
  });
  it('changes with any part of the condition value sets: an ICD-10 range, an effect, the statuses read as active', () => {
    type Sets = {
      conditions: { activeStatuses: string[]; sets: Array<{ icd10: Array<{ to?: string; code?: string }>; effects: string[] }> };
    };
    const range = structuredClone(VALUE_SETS) as Sets;
    const entry = range.conditions.sets.flatMap((s) => s.icd10).find((e) => e.to !== undefined)!;
    entry.to = `${entry.to}9`;
    expect(rulesVersion(CAT, T, range)).not.toBe(rulesVersion(CAT, T));
    const effect = structuredClone(VALUE_SETS) as Sets;
    effect.conditions.sets[0]!.effects.push('high-ppv-doubtful');
    expect(rulesVersion(CAT, T, effect)).not.toBe(rulesVersion(CAT, T));
    const statuses = structuredClone(VALUE_SETS) as Sets;
    statuses.conditions.activeStatuses.push('remission');
    expect(rulesVersion(CAT, T, statuses)).not.toBe(rulesVersion(CAT, T));
  });
  it('changes when a rhythm concept is read as another answer, or a fluid changes class', () => {
    const r = structuredClone(VALUE_SETS) as {
      rhythm: { concepts: Array<{ answer: string }> };
      fluids: { fluids: Array<{ fluidClass: string }> };
    };
    r.rhythm.concepts[0]!.answer = 'other-irregular';
    expect(rulesVersion(CAT, T, r)).not.toBe(rulesVersion(CAT, T));
    const f = structuredClone(VALUE_SETS) as typeof r;
    f.fluids.fluids[0]!.fluidClass = 'other';
    expect(rulesVersion(CAT, T, f)).not.toBe(rulesVersion(CAT, T));
  });
  it('does not change with the key order of the same content (canonical JSON)', () => {
    const { conditions, rhythm, fluids } = VALUE_SETS;
    expect(rulesVersion(CAT, T, { fluids, rhythm, conditions })).toBe(rulesVersion(CAT, T));
  });
  it('still changes with the thresholds and the catalogue', () => {
    expect(rulesVersion(CAT, { tolerance: { a: 2 } })).not.toBe(rulesVersion(CAT, T));
    expect(rulesVersion('ffffffff', T)).not.toBe(rulesVersion(CAT, T));
  });
});
