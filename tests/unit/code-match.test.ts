/**
 * Truth tables of the code matchers (src/fhir/code-match.ts) and of condition-group matching
 * (src/fhir/value-sets.ts): exact code, descendant concept, ICD range in and out, dotted and undotted,
 * wrong system, and the groups that include others.
 */
import { describe, expect, it } from 'vitest';
import { icd10Matches, isSnomedConceptId, normaliseIcd10, verhoeffValid } from '../../src/fhir/code-match.js';
import { activeConditionGroups, CONDITION_SETS, matchConditionGroups, parseConditionSets, VALUE_SETS } from '../../src/fhir/value-sets.js';
import { matchConditionSets } from '../../src/assess/tolerance/conditions.js';
import type { ConditionEntry } from '../../src/snapshot/types.js';

const SCT = 'http://snomed.info/sct';
const ICD = 'http://hl7.org/fhir/sid/icd-10';
const CM = 'http://hl7.org/fhir/sid/icd-10-cm';
const groups = (system: string, code: string) => matchConditionGroups([{ system, code }]).map((h) => h.id);

describe('normaliseIcd10', () => {
  it.each([
    ['I50.22', 'I5022'],
    ['I5022', 'I5022'],
    [' i50.9 ', 'I509'],
    ['J80', 'J80'],
    ['T79.4XXA', 'T794XXA'],
    ['K70.30', 'K7030'],
  ])('%s → %s', (code, norm) => expect(normaliseIcd10(code)).toBe(norm));
  it.each([['I5'], ['50.2'], ['I50.22222'], ['I50..2'], [''], ['84114007'], ['I50-22']])('%s is not ICD-10-shaped', (code) => {
    expect(normaliseIcd10(code)).toBeUndefined();
  });
});

describe('icd10Matches', () => {
  it.each([
    // rule, code, expected
    [{ code: 'I50' }, 'I50', true],
    [{ code: 'I50' }, 'I50.9', true],
    [{ code: 'I50' }, 'I50.810', true],
    [{ code: 'I50' }, 'I5081', true], // undotted
    [{ code: 'I50' }, 'I51.7', false],
    [{ code: 'I50' }, 'I5', false], // above the rule in the hierarchy
    [{ code: 'K70.3' }, 'K70.31', true],
    [{ code: 'K70.3' }, 'K70', false], // the category is alcoholic liver disease, not cirrhosis
    [{ code: 'K70.3' }, 'K70.2', false],
    [{ code: 'N18.6' }, 'N186', true],
    [{ code: 'N18.6' }, 'N18.4', false],
    [{ from: 'K74.3', to: 'K74.6' }, 'K74.3', true], // first end
    [{ from: 'K74.3', to: 'K74.6' }, 'K74.60', true], // below the last end
    [{ from: 'K74.3', to: 'K74.6' }, 'K7469', true],
    [{ from: 'K74.3', to: 'K74.6' }, 'K74.5', true],
    [{ from: 'K74.3', to: 'K74.6' }, 'K74.0', false], // fibrosis, before the range
    [{ from: 'K74.3', to: 'K74.6' }, 'K74.1', false],
    [{ from: 'K74.3', to: 'K74.6' }, 'K75.4', false], // after it
    [{ from: 'K74.3', to: 'K74.6' }, 'K74', false], // above it
    [{ from: 'I27.20', to: 'I27.29' }, 'I27.24', true],
    [{ from: 'I27.20', to: 'I27.29' }, 'I27.2', false],
    [{ from: 'I27.20', to: 'I27.29' }, 'I27.81', false],
    [{ code: 'I50' }, 'garbage', false],
    [{ code: 'bad rule' }, 'I50', false],
  ] as const)('%j ∋ %s: %s', (rule, code, expected) => {
    expect(icd10Matches(rule, code)).toBe(expected);
  });
});

describe('Verhoeff check digit and SNOMED CT concept ids', () => {
  // Worked example of the Verhoeff scheme as commonly published: 236 takes check digit 3.
  it('236 → 2363 valid; one digit changed or two swapped is caught', () => {
    expect(verhoeffValid('2363')).toBe(true);
    expect(verhoeffValid('2364')).toBe(false);
    expect(verhoeffValid('3263')).toBe(false);
  });
  it.each([
    ['138875005', true], // SNOMED CT root concept
    ['84114007', true], // Heart failure
    ['153931000119109', true], // a concept of the US extension (partition 10)
    ['84114008', false], // check digit wrong
    ['84114017', false], // partition 01: a description id, not a concept
    ['084114007', false], // leading zero
    ['12345', false], // too short
    ['I50.9', false],
  ])('%s → %s', (id, ok) => expect(isSnomedConceptId(id)).toBe(ok));
});

describe('condition groups: SNOMED CT concepts', () => {
  it('the parent concept matches', () => expect(groups(SCT, '84114007')).toEqual(['heart-failure']));
  it('a descendant listed in the set matches (heart failure with reduced ejection fraction)', () => {
    expect(groups(SCT, '703272007')).toEqual(['heart-failure']);
  });
  it('a concept not listed does not match, however close (hepatic fibrosis 62484002)', () => {
    expect(groups(SCT, '62484002')).toEqual([]);
  });
  it('SNOMED codes match exactly: no prefix matching of concept ids', () => {
    expect(groups(SCT, '8411400')).toEqual([]);
    expect(groups(SCT, '841140070')).toEqual([]);
  });
  it('surrounding whitespace in a code is ignored', () => expect(groups(SCT, ' 67782005 ')).toEqual(['ards']));
  it('right heart failure is in its own group and, by includes, in heart failure', () => {
    expect(groups(SCT, '128404006')).toEqual(['heart-failure', 'right-ventricular-failure']);
  });
  it('right heart failure due to pulmonary hypertension falls in three groups', () => {
    expect(groups(SCT, '426012001')).toEqual(['heart-failure', 'right-ventricular-failure', 'pulmonary-hypertension']);
  });
  it('pulmonary hypertension alone is not heart failure', () => expect(groups(SCT, '70995007')).toEqual(['pulmonary-hypertension']));
});

describe('condition groups: ICD-10 and ICD-10-CM', () => {
  it.each([
    [CM, 'I50.22', ['heart-failure']],
    [CM, 'I5022', ['heart-failure']],
    [CM, 'I50.811', ['heart-failure', 'right-ventricular-failure']],
    [CM, 'I27.21', ['pulmonary-hypertension']],
    [ICD, 'I27.2', ['pulmonary-hypertension']],
    [CM, 'I27.81', ['heart-failure', 'right-ventricular-failure']],
    [CM, 'K70.31', ['advanced-liver-disease']],
    [CM, 'K74.69', ['advanced-liver-disease']],
    [CM, 'K74.0', []],
    [CM, 'N18.6', ['end-stage-kidney-disease']],
    [CM, 'N18.4', []],
    [CM, 'Z99.2', ['end-stage-kidney-disease']],
    [CM, 'I13.2', ['heart-failure', 'end-stage-kidney-disease']],
    [CM, 'J80', ['ards']],
    [CM, 'J81.0', []],
  ])('%s %s → %j', (system, code, expected) => expect(groups(system, code)).toEqual(expected));

  it('wrong system: an ICD-10 code under SNOMED CT, a SNOMED id under ICD-10, an unknown system', () => {
    expect(groups(SCT, 'I50.9')).toEqual([]);
    expect(groups(CM, '84114007')).toEqual([]);
    expect(groups('http://example.org/local', 'I50.9')).toEqual([]);
    expect(groups('http://hl7.org/fhir/sid/icd-9-cm', '428.0')).toEqual([]);
  });
  it('the first coding that matches is named as the evidence', () => {
    const hits = matchConditionGroups([
      { system: 'urn:local', code: 'HF' },
      { system: CM, code: 'I50.9' },
      { system: SCT, code: '84114007' },
    ]);
    expect(hits).toEqual([{ id: 'heart-failure', label: 'heart failure', coding: `${CM}|I50.9` }]);
  });
  it("matchConditionSets (the tolerance module's name) gives the same answer", () => {
    const entry: ConditionEntry = { ref: 'Condition/c1', codings: [{ system: CM, code: 'I27.0' }], clinicalStatus: 'active' };
    expect(matchConditionSets(entry)).toEqual(matchConditionGroups(entry.codings));
  });
});

describe('activeConditionGroups (for rules that need a group, e.g. high PPV doubtful)', () => {
  const c = (ref: string, system: string, code: string, clinicalStatus = 'active'): ConditionEntry => ({
    ref,
    codings: [{ system, code }],
    clinicalStatus,
  });
  it('lists groups in file order with their effects, refs and codings; inactive conditions do not count', () => {
    const got = activeConditionGroups([
      c('Condition/ph', CM, 'I27.20'),
      c('Condition/old-hf', SCT, '84114007', 'resolved'),
      c('Condition/cir', SCT, '19943007'),
    ]);
    expect(got).toEqual([
      {
        id: 'advanced-liver-disease',
        label: 'advanced liver disease (cirrhosis or liver failure)',
        effects: ['lowers-tolerance'],
        refs: ['Condition/cir'],
        codings: [`${SCT}|19943007`],
      },
      {
        id: 'pulmonary-hypertension',
        label: 'pulmonary hypertension',
        effects: ['lowers-tolerance', 'high-ppv-doubtful'],
        refs: ['Condition/ph'],
        codings: [`${CM}|I27.20`],
      },
    ]);
  });
  it('only right-ventricular failure and pulmonary hypertension make a high PPV doubtful', () => {
    expect(CONDITION_SETS.sets.filter((s) => s.effects.includes('high-ppv-doubtful')).map((s) => s.id)).toEqual([
      'right-ventricular-failure',
      'pulmonary-hypertension',
    ]);
  });
  it('nothing active → nothing', () => expect(activeConditionGroups([c('Condition/x', SCT, '84114007', 'inactive')])).toEqual([]));
});

describe('a bad edit of conditions.json stops start-up', () => {
  type Raw = {
    sources: Record<string, string>;
    sets: Array<Record<string, unknown> & { snomed: Array<{ code: string; source: string }>; icd10: Array<{ code?: string }> }>;
  };
  const edit = (f: (raw: Raw) => void) => {
    const raw = structuredClone(VALUE_SETS.conditions) as unknown as Raw;
    f(raw);
    return () => parseConditionSets(raw);
  };
  it('the shipped file parses', () => expect(edit(() => {})).not.toThrow());
  it.each([
    [
      'a SNOMED CT id with a wrong check digit',
      (r: Raw) => {
        r.sets[1]!.snomed[0]!.code = '84114008';
      },
      /Verhoeff/,
    ],
    [
      'an ICD-10 code of the wrong shape',
      (r: Raw) => {
        r.sets[1]!.icd10[0]!.code = 'I-50';
      },
      /not an ICD-10 code/,
    ],
    [
      'an unknown source',
      (r: Raw) => {
        r.sets[0]!.snomed[0]!.source = 'a friend';
      },
      /unknown source .{0,4}a friend/,
    ],
    [
      'a source no entry uses',
      (r: Raw) => {
        r.sources['spare'] = 'a list nobody cites';
      },
      /source .{0,4}spare.{0,4} is not used/,
    ],
    [
      'a missing group',
      (r: Raw) => {
        r.sets.pop();
      },
      /pulmonary-hypertension is missing/,
    ],
    [
      'a group listed twice',
      (r: Raw) => {
        r.sets.push(structuredClone(r.sets[0]!));
      },
      /listed twice/,
    ],
    [
      'high-ppv-doubtful without its source',
      (r: Raw) => {
        delete r.sets[4]!['effectSources'];
      },
      /needs its source/,
    ],
    [
      'an includes two levels deep',
      (r: Raw) => {
        r.sets[4]!['includes'] = ['pulmonary-hypertension'];
      },
      /one level deep/,
    ],
  ] as const)('%s', (_name, f, message) => expect(edit(f)).toThrow(message));
});
