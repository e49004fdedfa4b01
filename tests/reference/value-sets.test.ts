/**
 * The value sets (src/fhir/value-sets/*.json) checked against outside values: the SNOMED CT identifier
 * scheme, concept ids as published in named public code sets, the ICD-10-CM chapter and block structure, the
 * RxNorm names the generic-name reader must recognise. And docs/codes.md lists every code.
 */
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { isSnomedConceptId, normaliseIcd10, verhoeffValid } from '../../src/fhir/code-match.js';
import { CODED_ANSWERS } from '../../src/fhir/codes.js';
import { classifyFluid, fluidClassFromText } from '../../src/fhir/medications.js';
import { CONDITION_SETS, FLUID_SET, RHYTHM_SET, type ConditionGroupId } from '../../src/fhir/value-sets.js';

const setOf = (id: ConditionGroupId) => CONDITION_SETS.sets.find((s) => s.id === id)!;
const snomedOf = (id: ConditionGroupId) => new Map(setOf(id).snomed.map((c) => [c.code, c.display]));

describe('SNOMED CT identifiers (SNOMED CT Technical Implementation Guide: SCTID = item id, partition id, Verhoeff check digit)', () => {
  it('the Verhoeff implementation gives the published worked example (236 → check digit 3)', () => {
    expect(verhoeffValid('2363')).toBe(true);
    expect([0, 1, 2, 4, 5, 6, 7, 8, 9].some((d) => verhoeffValid(`236${d}`))).toBe(false);
  });
  const all = [
    ...CONDITION_SETS.sets.flatMap((s) => s.snomed.map((c) => [s.id, c.code] as const)),
    ...RHYTHM_SET.concepts.map((c) => ['rhythm', c.code] as const),
  ];
  it.each(all)('%s %s is a well-formed concept id (partition 00 or 10, check digit valid)', (_set, code) => {
    expect(isSnomedConceptId(code)).toBe(true);
  });
});

describe('concept ids as published', () => {
  // Source: UoM-Data-Science-Platforms/gm-sde, shared/clinical-code-sets/conditions/heart-failure/1/heart-failure.snomed.txt
  it.each([
    ['84114007', 'Heart failure'],
    ['42343007', 'Congestive heart failure'],
    ['703272007', 'Heart failure with reduced ejection fraction'],
    ['446221000', 'Heart failure with normal ejection fraction'],
    ['153941000119100', 'Chronic combined systolic and diastolic heart failure'],
  ])('heart failure: %s %s (gm-sde heart-failure code set)', (code, display) => expect(snomedOf('heart-failure').get(code)).toBe(display));
  it.each([
    ['128404006', 'Right heart failure'],
    ['367363000', 'Right ventricular failure'],
    ['83291003', 'Cor pulmonale'],
    ['49584005', 'Acute cor pulmonale'],
  ])('right-ventricular failure: %s %s (gm-sde heart-failure code set)', (code, display) =>
    expect(snomedOf('right-ventricular-failure').get(code)).toBe(display),
  );
  // Source: gm-sde chronic-kidney-disease code set
  it.each([
    ['46177005', 'End-stage renal disease'],
    ['433146000', 'Chronic kidney disease stage 5'],
    ['714152005', 'Chronic kidney disease stage 5 on dialysis'],
  ])('end-stage kidney disease: %s %s (gm-sde chronic-kidney-disease code set)', (code, display) =>
    expect(snomedOf('end-stage-kidney-disease').get(code)).toBe(display),
  );
  // Source: gm-sde liver-fibrosis-sclerosis-and-cirrhosis code set
  it.each([
    ['19943007', 'Cirrhosis of liver'],
    ['420054005', 'Alcoholic cirrhosis of liver'],
    ['31712002', 'Primary biliary cirrhosis'],
  ])('cirrhosis: %s %s (gm-sde liver code set)', (code, display) => expect(snomedOf('advanced-liver-disease').get(code)).toBe(display));
  it('the same code set lists hepatic fibrosis and sclerosis, which are not cirrhosis and stay out (62484002, 235899008, 235880004)', () => {
    for (const code of ['62484002', '235899008', '235880004']) expect(snomedOf('advanced-liver-disease').has(code)).toBe(false);
  });
  // Source: DICOM PS3.16 CID 3640 Hypertension (bvdh/dicom-terminology-in-fhir)
  it('pulmonary hypertension 70995007 (DICOM CID 3640)', () =>
    expect(snomedOf('pulmonary-hypertension').get('70995007')).toBe('Pulmonary hypertension'));
  // Sources: DICOM CID 3826 (64730000), CID 3230 (49436004); hl7-be/patient-monitoring PPG rhythm codes (164889003, 164890007)
  it.each([
    ['64730000', 'sinus'],
    ['49436004', 'atrial-fibrillation'],
    ['164889003', 'atrial-fibrillation'],
    ['164890007', 'other-irregular'],
  ])('rhythm %s → %s (DICOM CID 3826 / 3230, hl7-be PPG rhythm value set)', (code, answer) => {
    expect(RHYTHM_SET.concepts.find((c) => c.code === code)?.answer).toBe(answer);
  });
  it('every rhythm answer is one of the heart-rhythm answers Tidemark reads', () => {
    for (const c of RHYTHM_SET.concepts) expect(CODED_ANSWERS.heartRhythm).toContain(c.answer);
  });
});

/**
 * ICD-10-CM Tabular List, chapter and block ranges (categories): chapter 9 circulatory I00–I99 with blocks
 * I05–I09 chronic rheumatic heart diseases, I10–I16 hypertensive diseases, I26–I28 pulmonary heart disease and
 * diseases of pulmonary circulation, I30–I5A other forms of heart disease, I95–I99 other disorders of the
 * circulatory system; chapter 10 respiratory J80–J84 (diseases principally affecting the interstitium);
 * chapter 11 digestive K70–K77 diseases of liver; chapter 14 genitourinary N17–N19 acute kidney failure and
 * chronic kidney disease; chapter 21 Z40–Z53 encounters for other specific health care, Z77–Z99 persons with
 * certain conditions influencing health status. (Block titles from memory of the tabular list.)
 */
const BLOCKS: Record<ConditionGroupId, Array<[string, string]>> = {
  'advanced-liver-disease': [['K70', 'K77']],
  'heart-failure': [
    ['I05', 'I09'],
    ['I10', 'I16'],
    ['I30', 'I5A'],
    ['I95', 'I99'],
  ],
  'end-stage-kidney-disease': [
    ['N17', 'N19'],
    ['I10', 'I16'],
    ['Z40', 'Z53'],
    ['Z77', 'Z99'],
  ],
  ards: [['J80', 'J84']],
  'right-ventricular-failure': [
    ['I26', 'I28'],
    ['I30', 'I5A'],
  ],
  'pulmonary-hypertension': [['I26', 'I28']],
};

describe('ICD-10 rules fall in the ICD-10-CM chapters and blocks of their condition', () => {
  const rules = CONDITION_SETS.sets.flatMap((s) => s.icd10.map((r) => [s.id, 'code' in r ? r.code : `${r.from}–${r.to}`, r] as const));
  it.each(rules)('%s %s', (id, _label, rule) => {
    const ends = 'code' in rule ? [rule.code] : [rule.from, rule.to];
    for (const e of ends) {
      const n = normaliseIcd10(e);
      expect(n, e).toBeDefined();
      const category = n!.slice(0, 3);
      expect(
        BLOCKS[id].some(([lo, hi]) => category >= lo && category <= hi),
        `${e} outside the blocks of ${id}`,
      ).toBe(true);
    }
    if ('from' in rule) expect(normaliseIcd10(rule.from)! <= normaliseIcd10(rule.to)!).toBe(true);
  });
  it('the codes the brief names are covered: I50.*, K70.3x, K74.x cirrhosis, N18.6, Z99.2, J80', () => {
    const rulesOf = (id: ConditionGroupId) => setOf(id).icd10.map((r) => ('code' in r ? r.code : `${r.from}–${r.to}`));
    expect(rulesOf('heart-failure')).toContain('I50');
    expect(rulesOf('advanced-liver-disease')).toEqual(expect.arrayContaining(['K70.3', 'K74.3–K74.6']));
    expect(rulesOf('end-stage-kidney-disease')).toEqual(expect.arrayContaining(['N18.6', 'Z99.2']));
    expect(rulesOf('ards')).toEqual(['J80']);
  });
});

describe('sources', () => {
  it('every entry names a known source, and the from-memory entries are exactly these (each to verify)', () => {
    const fromMemory = [
      ...CONDITION_SETS.sets.flatMap((s) =>
        [...s.snomed, ...s.icd10].filter((e) => e.source === 'from-memory').map((e) => ('code' in e ? e.code : `${e.from}–${e.to}`)),
      ),
      ...RHYTHM_SET.concepts.filter((c) => c.source === 'from-memory').map((c) => c.code),
      ...FLUID_SET.fluids.filter((f) => f.source === 'from-memory').map((f) => f.name),
    ];
    expect(fromMemory).toEqual([
      'K76.7',
      'Z49',
      'I26.0',
      '10370003',
      'magnesium chloride 0.3 MG/ML / potassium chloride 0.37 MG/ML / sodium acetate 3.68 MG/ML / sodium chloride 5.26 MG/ML / sodium gluconate 5.02 MG/ML Injectable Solution',
    ]);
  });
});

describe('fluids: RxNorm clinical-drug names and codes', () => {
  it.each(FLUID_SET.fluids.map((f) => [f.name, f.fluidClass] as const))('the generic-name reader recognises "%s" as %s', (name, cls) => {
    expect(fluidClassFromText(name)).toBe(cls);
  });
  it.each(FLUID_SET.fluids.filter((f) => f.rxcui).map((f) => [f.rxcui!, f.fluidClass] as const))(
    'RxNorm %s is read by code as %s',
    (rxcui, cls) => {
      expect(classifyFluid({ coding: [{ system: FLUID_SET.rxnormSystem, code: rxcui }] })).toBe(cls);
    },
  );
  it('313002 is Sodium Chloride 9 MG/ML Injectable Solution (seen in a public data file)', () => {
    expect(FLUID_SET.fluids.find((f) => f.rxcui === '313002')?.name).toBe('Sodium Chloride 9 MG/ML Injectable Solution');
  });
});

describe('docs/codes.md lists every entry of the value sets with its source', () => {
  const doc = readFileSync(resolve(__dirname, '../../docs/codes.md'), 'utf8');
  const rows = [
    ...CONDITION_SETS.sets.flatMap((s) =>
      [...s.snomed, ...s.icd10].map((e) => ['code' in e ? e.code : `${e.from}–${e.to}`, e.source] as const),
    ),
    ...RHYTHM_SET.concepts.map((c) => [c.code, c.source] as const),
    ...FLUID_SET.fluids.map((f) => [f.rxcui ?? f.name, f.source] as const),
  ];
  const esc = (x: string) => x.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&');
  it.each(rows)('%s (%s)', (code, source) => {
    expect(new RegExp(`\\| ${esc(code)} \\|[^\\n]*\\| ${esc(source)} \\|`).test(doc)).toBe(true);
  });
});
