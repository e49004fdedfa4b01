// Test data is valid FHIR R4: every fixture resource passes the registry's validator (@medplum/core against the
// base StructureDefinitions) plus the status bindings it skips (src/fhir/validator.ts).
import { describe, expect, it } from 'vitest';
import { validateFhir } from '../../src/fhir/validator.js';
import { ADVICE_CASES } from '../helpers/advice-fixtures.js';
import { basicResources, bolusDraft } from '../helpers/hook-fixtures.js';

describe('fixtures are valid FHIR R4', () => {
  const all = [
    ...Object.values(basicResources()).flat(),
    ...Object.values(ADVICE_CASES).flatMap((c) => Object.values(c).flat()),
    bolusDraft(),
  ];
  it.each(all.map((r) => [`${r.resourceType}/${r.id ?? ''}`, r] as const))('%s', (_id, r) => {
    expect(validateFhir(r)).toEqual([]);
  });
  it('the validator refuses a broken one (so these checks can fail)', () => {
    expect(validateFhir({ ...bolusDraft(), intent: undefined, status: 'bogus' }).length).toBeGreaterThanOrEqual(2);
  });
});
