/**
 * The card catalogue is validated at start-up against the closed sets of the advice (headline keys, alternatives,
 * next-test kinds, suggestion kinds): a missing or unknown key stops start-up (issue 19).
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ADVICE_ACTIONS, ALTERNATIVES, HEADLINE_KEYS } from '../../src/assess/advice/types.js';
import { CODED_ANSWERS } from '../../src/fhir/codes.js';
import { NEXT_TESTS } from '../../src/assess/types.js';
import { DEFAULT_CATALOGUE_PATH, loadCatalogue, SUGGESTION_KINDS } from '../../src/cards/catalogue.js';

const shipped = JSON.parse(readFileSync(DEFAULT_CATALOGUE_PATH, 'utf8')) as Record<string, Record<string, unknown>>;
function loadEdited(edit: (c: Record<string, Record<string, unknown>>) => void) {
  const c = structuredClone(shipped);
  edit(c);
  const p = join(mkdtempSync(join(tmpdir(), 'tm-cat-')), 'catalogue.json');
  writeFileSync(p, JSON.stringify(c));
  return () => loadCatalogue(p);
}

describe('card catalogue against the closed sets', () => {
  it('the shipped catalogue loads and has wording for every code', () => {
    const { catalogue } = loadCatalogue();
    for (const k of HEADLINE_KEYS) expect(catalogue.headlines[k], k).toBeTruthy();
    for (const k of ALTERNATIVES) expect(catalogue.alternatives[k], k).toBeTruthy();
    for (const k of NEXT_TESTS) expect(catalogue.nextTests[k], k).toBeTruthy();
    for (const k of SUGGESTION_KINDS) expect(catalogue.suggestions[k].label, k).toBeTruthy();
  });
  it('a missing headline key stops start-up, naming the key', () => {
    expect(
      loadEdited((c) => {
        delete c['headlines']!['early/any'];
      }),
    ).toThrow(/headlines\.early\/any/);
  });
  it('an unknown headline key stops start-up (a misspelt key would never be shown)', () => {
    expect(
      loadEdited((c) => {
        c['headlines']!['likely/adequat'] = 'x';
      }),
    ).toThrow(/headlines/);
  });
  it('a missing alternative, next test or suggestion stops start-up', () => {
    expect(
      loadEdited((c) => {
        delete c['alternatives']!['perfusion-check'];
      }),
    ).toThrow(/alternatives\.perfusion-check/);
    expect(
      loadEdited((c) => {
        delete c['nextTests']!['tidal-volume-challenge'];
      }),
    ).toThrow(/nextTests\.tidal-volume-challenge/);
    expect(
      loadEdited((c) => {
        delete c['suggestions']!['tidal-volume-challenge'];
      }),
    ).toThrow(/suggestions\.tidal-volume-challenge/);
  });
  it('the pop-up words are checked too: test names and results, action words, answer words, the pop-up lines (issue 16)', () => {
    const { catalogue } = loadCatalogue();
    for (const k of NEXT_TESTS)
      expect(catalogue.testNames[k] && catalogue.testResults[k].positive && catalogue.testResults[k].negative, k).toBeTruthy();
    for (const k of ADVICE_ACTIONS) expect(catalogue.actionWords[k], k).toBeTruthy();
    for (const [kind, codes] of Object.entries(CODED_ANSWERS))
      for (const a of codes) expect((catalogue.answers as Record<string, Record<string, string>>)[kind]?.[a], `${kind}.${a}`).toBeTruthy();
    expect(
      loadEdited((c) => {
        delete c['testNames']!['passive-leg-raise'];
      }),
    ).toThrow(/testNames\.passive-leg-raise/);
    expect(
      loadEdited((c) => {
        delete (c['testResults']!['end-expiratory-occlusion'] as Record<string, unknown>)['negative'];
      }),
    ).toThrow(/testResults\.end-expiratory-occlusion\.negative/);
    expect(
      loadEdited((c) => {
        delete c['actionWords']!['question-need'];
      }),
    ).toThrow(/actionWords\.question-need/);
    expect(
      loadEdited((c) => {
        delete (c['answers']!['ventilationMode'] as Record<string, unknown>)['controlled-no-effort'];
      }),
    ).toThrow(/answers\.ventilationMode\.controlled-no-effort/);
    expect(
      loadEdited((c) => {
        c['answers']!['heartRhythm'] = { ...(c['answers']!['heartRhythm'] as object), 'atrial-flutter': 'x' };
      }),
    ).toThrow(/answers\.heartRhythm/);
    expect(
      loadEdited((c) => {
        delete c['popup']!['caution'];
      }),
    ).toThrow(/popup\.caution/);
    expect(
      loadEdited((c) => {
        c['popup']!['caution'] = 'x'.repeat(161);
      }),
    ).toThrow(/popup\.caution/);
  });
  it('every headline is short enough for a card summary (< 140 characters)', () => {
    for (const h of Object.values(loadCatalogue().catalogue.headlines)) expect(h.length).toBeLessThan(140);
  });
});
