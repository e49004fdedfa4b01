/**
 * What would change the advice: the pure engine re-run on the current snapshot with the hypothetical result of
 * each responsiveness test that is feasible for this patient, positive and negative at its published threshold.
 * Codes only; wording lives in cards/catalogue.json (the card's gap line) and src/pages/ (the page's table).
 */
import type { AdviceAction, HeadlineKey } from '../advice/types.js';
import type { NextTestKind, Responsiveness } from '../common/verdicts.js';

/** Why a test is not offered for this patient (closed set; wording in the catalogue). */
export const NOT_FEASIBLE = [
  'raised-abdominal-pressure', // passive leg raise: intra-abdominal hypertension makes it unreliable
  'no-flow-monitor', // a test read on cardiac output / stroke volume without a recent flow reading
  'not-ventilated', // end-expiratory occlusion, tidal volume challenge: need controlled ventilation
  'no-arterial-line', // tidal volume challenge: read on PPV, needs an arterial pressure trace
  'spontaneous-breathing', // end-expiratory occlusion / tidal volume challenge: need no breathing effort
  'tidal-volume-not-low', // tidal volume challenge: only when tidal volume is low (< 8 mL/kg PBW)
  'already-done', // a fresh validated result of this test is in the snapshot already
] as const;
export type NotFeasible = (typeof NOT_FEASIBLE)[number];

export interface WhatIfOutcome {
  /** The hypothetical result put into the snapshot (at the test's published threshold, just over or just under). */
  result: 'positive' | 'negative';
  /** The measured variable and the change assumed, e.g. { measured: 'cardiacOutput', changePercent: 12 }. */
  assumed: { measured: string; changePercent?: number; changeAbsolute?: number; unit: string };
  responsiveness: Responsiveness;
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
}

export interface WhatIf {
  rows: WhatIfRow[];
  /** The one feasible test whose result would change the advice, by the engine's order of preference; absent when none would. */
  decisive?: NextTestKind;
}
