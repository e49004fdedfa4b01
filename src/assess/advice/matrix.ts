/**
 * The advice matrix: responsiveness × tolerance → action, headline and alternatives
 * (rationale in docs/clinical-logic/tolerance.md). Kept as data so that it can be read and reviewed as a table.
 *
 *                 adequate               limited                poor
 *   likely        proceed-and-reassess   smaller-aliquot        smaller-aliquot + alternatives
 *   unlikely      question-bolus         question-bolus         question-bolus (+ fluid removal later)
 *   indeterminate test-first             test-first             test-first (+ alternatives)
 *
 * Indicator: info by default; warning when tolerance is limited or poor or a response is unlikely;
 * critical only when tolerance is poor and a finding shows pulmonary oedema or severe congestion
 * (EVLWI ≥ 10, diffuse B-pattern, VExUS 3, falling SpO2/FiO2).
 */
import type { Responsiveness, Tolerance } from '../types.js';
import type { AdviceAction } from './types.js';

export interface MatrixEntry {
  action: AdviceAction;
  headline: string;
  alternatives: string[];
}

export const ALTERNATIVE = {
  smallerAliquot: 'A smaller aliquot, with response and tolerance reassessed before any more',
  vasopressor: 'Vasopressor support to restore perfusion pressure instead of more volume',
  vasoactiveByPicture: 'Vasopressor or inotrope support as the haemodynamic picture indicates',
  albumin: 'Albumin rather than more crystalloid if large crystalloid volumes have been given (SSC 2021, weak recommendation)',
  echo: 'Bedside echocardiography to look for the cause of hypotension or low output',
  cause: 'Treatment of the underlying cause (source control, bleeding, obstruction)',
  fluidRemoval: 'Once stable, whether fluid removal (diuretic or ultrafiltration) is appropriate',
  bolusIfPositive: 'If the test shows a response: a bolus, reassessed after',
} as const;

export const ADVICE_MATRIX: Record<Responsiveness, Record<Tolerance, MatrixEntry>> = {
  likely: {
    adequate: { action: 'proceed-and-reassess', headline: 'Likely fluid responsive, no tolerance limit found: give and reassess after', alternatives: [] },
    limited: { action: 'smaller-aliquot', headline: 'Likely fluid responsive, tolerance limited: smaller aliquot, reassess before more', alternatives: [ALTERNATIVE.smallerAliquot] },
    poor: {
      action: 'smaller-aliquot', headline: 'Likely responsive but poor fluid tolerance: small aliquot at most; weigh alternatives',
      alternatives: [ALTERNATIVE.smallerAliquot, ALTERNATIVE.vasopressor, ALTERNATIVE.albumin],
    },
  },
  unlikely: {
    adequate: { action: 'question-bolus', headline: 'Fluid response unlikely: reconsider this bolus', alternatives: [ALTERNATIVE.vasoactiveByPicture, ALTERNATIVE.echo, ALTERNATIVE.cause] },
    limited: { action: 'question-bolus', headline: 'Fluid response unlikely and tolerance limited: reconsider this bolus', alternatives: [ALTERNATIVE.vasoactiveByPicture, ALTERNATIVE.echo, ALTERNATIVE.cause] },
    poor: {
      action: 'question-bolus', headline: 'Fluid response unlikely and tolerance poor: bolus risks harm without benefit',
      alternatives: [ALTERNATIVE.vasoactiveByPicture, ALTERNATIVE.echo, ALTERNATIVE.cause, ALTERNATIVE.fluidRemoval],
    },
  },
  indeterminate: {
    adequate: { action: 'test-first', headline: 'Fluid responsiveness uncertain: a quick test would settle it', alternatives: [ALTERNATIVE.bolusIfPositive] },
    limited: { action: 'test-first', headline: 'Responsiveness uncertain, tolerance limited: test before giving volume', alternatives: [ALTERNATIVE.bolusIfPositive, ALTERNATIVE.smallerAliquot] },
    poor: {
      action: 'test-first', headline: 'Responsiveness uncertain, tolerance poor: test first, avoid untested volume',
      alternatives: [ALTERNATIVE.vasopressor, ALTERNATIVE.albumin],
    },
  },
};

/** Headlines when tolerance is poor and a finding shows oedema or severe congestion (indicator critical). */
export const CRITICAL_HEADLINE: Record<Responsiveness, string> = {
  likely: 'Responsive, but signs of lung water or congestion: more volume likely harmful',
  unlikely: 'Response unlikely and signs of lung water or congestion: this bolus is likely to harm',
  indeterminate: 'Signs of lung water or congestion, responsiveness unknown: test before any volume',
};

/** Headlines of the adequate column when no tolerance marker could be assessed. */
export const UNKNOWN_TOLERANCE_HEADLINE: Record<Responsiveness, string> = {
  likely: 'Likely fluid responsive; fluid tolerance not assessed: give and reassess after',
  unlikely: 'Fluid response unlikely (tolerance not assessed): reconsider this bolus',
  indeterminate: 'Fluid responsiveness uncertain, tolerance not assessed: a quick test would settle it',
};

/** Test named when the responsiveness verdict does not name one. */
export const DEFAULT_NEXT_TEST = 'Passive leg raising with real-time cardiac output, or a mini fluid challenge (100 mL) with VTI';
