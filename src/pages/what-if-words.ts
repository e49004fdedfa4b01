/**
 * The page's words for the what-if table ("What would change the advice"): the tests, why one is not feasible,
 * what a hypothetical result was read on, and the confidence in short. Keyed by the assessment's codes, so a code
 * added there without words here fails the type check.
 */
import type { NextTestKind } from '../assess/types.js';
import type { NotFeasible } from '../assess/what-if/types.js';

export const WHAT_IF_TEST_WORDS: Record<NextTestKind, string> = {
  'passive-leg-raise': 'Passive leg raising',
  'mini-fluid-challenge': 'Mini fluid challenge (100 mL over 1 min)',
  'end-expiratory-occlusion': 'End-expiratory occlusion (15 s hold)',
  'tidal-volume-challenge': 'Tidal volume challenge (6 → 8 mL/kg predicted body weight for 1 min)',
};

export const NOT_FEASIBLE_WORDS: Record<NotFeasible, string> = {
  'raised-abdominal-pressure': 'intra-abdominal pressure is raised, which makes a leg raise unreliable',
  'no-flow-monitor':
    'no cardiac output or stroke volume monitor is in use (no recent reading), and the effect is too brief to catch without one',
  'not-ventilated': 'controlled ventilation is not charted',
  'no-arterial-line': 'no current PPV or SVV from an arterial line to read it on',
  'spontaneous-breathing': 'the patient breathes spontaneously (or makes breathing efforts on the ventilator)',
  'tidal-volume-not-low': 'tidal volume is already 8 mL/kg predicted body weight or more: the test is made for low tidal volume',
  'already-done': 'a recent, valid result of this test with a flow measurement is already on the chart',
  'no-sinus-rhythm': 'sinus rhythm is not charted, and an irregular rhythm voids PPV and SVV',
  'tidal-volume-unknown': 'tidal volume, height or sex is not charted, so it is not known whether tidal volume is low',
};

/** What the hypothetical result is read on. */
export const READ_ON_WORDS: Record<string, string> = {
  cardiacOutput: 'cardiac output',
  cardiacIndex: 'cardiac index',
  strokeVolume: 'stroke volume',
  vti: 'VTI by echo',
  pulsePressure: 'pulse pressure',
  ppv: 'PPV',
  svv: 'SVV',
};

export const CONFIDENCE_SHORT: Record<string, string> = { high: 'high confidence', moderate: 'moderate confidence', low: 'low confidence' };
