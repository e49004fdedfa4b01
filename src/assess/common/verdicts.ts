/** The closed sets of the verdicts' values: a leaf, so the advice and what-if types can name them without a cycle. */

/** How much the evidence that decided a verdict can bear (docs/clinical-logic/index.md, evidence tiers). */
export type Confidence = 'high' | 'moderate' | 'low';

/** The test that would settle or confirm responsiveness (closed set; wording in cards/catalogue.json). */
export const NEXT_TESTS = ['passive-leg-raise', 'mini-fluid-challenge', 'tidal-volume-challenge', 'end-expiratory-occlusion'] as const;
export type NextTestKind = (typeof NEXT_TESTS)[number];

export type Responsiveness = 'likely' | 'unlikely' | 'indeterminate';
export type Tolerance = 'adequate' | 'limited' | 'poor' | 'not-known';
/** Is there anything to treat: a fresh sign of hypoperfusion (present), none among those assessed (absent), or too little data. */
export type Need = 'present' | 'absent' | 'unknown';
export type PhaseValue = 'early-resuscitation' | 'later';
