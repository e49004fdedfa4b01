/** Truth table: conditions that lower tolerance, matched against src/fhir/value-sets/conditions.json. */
import { describe, expect, it } from 'vitest';
import { CONDITION_SETS, conditionsRule, matchConditionSets } from '../../src/assess/tolerance/conditions.js';
import { ICD10, SNOMED } from '../../src/fhir/codes.js';
import { condition, limit, NOW, snapshot, T } from '../helpers/tolerance-fixtures.js';

const ICD10CM = 'http://hl7.org/fhir/sid/icd-10-cm';
const run = (...cs: ReturnType<typeof condition>[]) => conditionsRule(snapshot({ conditions: cs }), NOW, T)[0]!;

describe('condition sets file', () => {
  it('carries its provenance and the six sets', () => {
    expect(CONDITION_SETS.provenance).toMatch(/from-memory/i);
    expect(CONDITION_SETS.sets.map((s) => s.id)).toEqual([
      'advanced-liver-disease',
      'heart-failure',
      'end-stage-kidney-disease',
      'ards',
      'right-ventricular-failure',
      'pulmonary-hypertension',
    ]);
  });
});

describe('tolerance.conditions', () => {
  it.each([
    [SNOMED, '19943007', 'advanced-liver-disease'],
    [ICD10, 'K70.30', 'advanced-liver-disease'],
    [ICD10, 'K7031', 'advanced-liver-disease'],
    [SNOMED, '84114007', 'heart-failure'],
    [ICD10, 'I50.9', 'heart-failure'],
    [ICD10CM, 'I50.22', 'heart-failure'],
    [ICD10CM, 'N18.6', 'end-stage-kidney-disease'],
    [ICD10, 'Z99.2', 'end-stage-kidney-disease'],
    [SNOMED, '67782005', 'ards'],
    [ICD10, 'J80', 'ards'],
  ])('%s %s → %s', (system, code, set) => {
    const f = run(condition(system, code));
    expect(limit(f)).toBe('moderate');
    expect(f.values!['matchedSets']).toBe(set);
  });
  it('prefixes do not match across codes: K74.0 (fibrosis) and N18.3 (CKD 3) are not on the lists', () => {
    expect(limit(run(condition(ICD10, 'K74.0'), condition(ICD10, 'N18.3')))).toBe('none');
  });
  it('an ICD-10 code under a SNOMED system does not match', () => {
    expect(matchConditionSets(condition(SNOMED, 'I50'))).toEqual([]);
  });
  it('inactive or resolved conditions do not count', () => {
    const f = run(condition(SNOMED, '84114007', 'resolved'));
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toBe('no active condition recorded');
  });
  it('absent: no conditions → not assessed', () => {
    expect(run().reason).toBe('no conditions recorded');
  });
  it('several sets are listed in file order whatever the condition order', () => {
    const a = run(condition(SNOMED, '67782005', 'active', 'Condition/a'), condition(ICD10, 'K74.6', 'active', 'Condition/b'));
    const b = run(condition(ICD10, 'K74.6', 'active', 'Condition/b'), condition(SNOMED, '67782005', 'active', 'Condition/a'));
    expect(a.values!['matchedSets']).toBe('advanced-liver-disease,ards');
    expect(b).toEqual(a);
  });
  it('active but unlisted conditions: assessed, no limit', () => {
    expect(run(condition(SNOMED, '38341003'))).toMatchObject({ status: 'assessed', limit: 'none' });
  });
});
