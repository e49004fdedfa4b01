/**
 * What would change the advice: the pure engine re-run on the current snapshot with the hypothetical result of
 * each responsiveness test that is feasible for this patient, positive and negative at its published threshold.
 * Codes only; wording lives in cards/catalogue.json (the card's gap line) and src/pages/ (the page's table).
 */
import type { AdviceAction, HeadlineKey } from '../advice/types.js';
import type { Confidence, NextTestKind, Responsiveness } from '../common/verdicts.js';

/** Why a test is not offered for this patient (closed set; wording in the catalogue). */
export const NOT_FEASIBLE = [
  'raised-abdominal-pressure', // passive leg raise: intra-abdominal hypertension makes it unreliable
  'no-flow-monitor', // a test read on cardiac output / stroke volume without a recent flow reading
  'not-ventilated', // end-expiratory occlusion, tidal volume challenge: need controlled ventilation
  'no-arterial-line', // tidal volume challenge: read on PPV, needs an arterial pressure trace
  'spontaneous-breathing', // end-expiratory occlusion / tidal volume challenge: need no breathing effort
  'tidal-volume-not-low', // tidal volume challenge: only when tidal volume is low (< 8 mL/kg PBW)
  'already-done', // a fresh validated result of this test is in the snapshot already
  'no-sinus-rhythm', // tidal volume challenge: read on PPV/SVV, which an irregular (or uncharted) rhythm voids
  'tidal-volume-unknown', // tidal volume challenge: tidal volume (or the height for predicted body weight, or sex) not charted
] as const;
export type NotFeasible = (typeof NOT_FEASIBLE)[number];

export interface WhatIfOutcome {
  /** The hypothetical result put into the snapshot (at the test's published threshold, just over or just under). */
  result: 'positive' | 'negative';
  /**
   * The measured variable and the change assumed, e.g. { measured: 'cardiacOutput', changePercent: 11, unit: 'L/min' }:
   * changePercent for tests read as a relative change, changeAbsolute (in `unit`, the measured variable's canonical
   * unit: points for PPV/SVV) for tests read as an absolute one; `threshold` and `strict` (> rather than ≥) as the rule reads them.
   */
  assumed: { measured: string; changePercent?: number; changeAbsolute?: number; unit: string; threshold?: number; strict?: boolean };
  responsiveness: Responsiveness;
  /** The confidence of that verdict, when it has one. */
  confidence?: Confidence;
  /** The recommendation's action and headline after the re-run, when there is a selected fluid order. */
  action?: AdviceAction;
  headline?: HeadlineKey;
  /** True when the responsiveness verdict or the recommended action differs from the current advice. */
  changes: boolean;
}

export interface WhatIfRow {
  test: NextTestKind;
  feasible: boolean;
  /** Every reason it is not feasible (empty when feasible). */
  notFeasible: NotFeasible[];
  /** Positive then negative, for feasible tests only. */
  outcomes: WhatIfOutcome[];
  /** Feasible tests: the published source of the threshold the hypothetical results were put at. */
  source?: string;
}

export interface WhatIf {
  /** All four tests, in the engine's order of preference (the test the verdict offers first, then NEXT_TESTS order). */
  rows: WhatIfRow[];
  /**
   * The one feasible test whose result would change the advice, by the engine's order of preference; absent when
   * none would, and when the current verdict is of high confidence (settled: decisive.ts).
   */
  decisive?: NextTestKind;
}
