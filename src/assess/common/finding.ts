/**
 * The Finding type: one union by topic, each with typed fields that the verdicts and the cards read. `values`
 * holds derived figures for the record and the card detail only: no code reads them back (enforced by
 * tests/unit/architecture.test.ts). Plain JSON, stored in the audit record.
 */
import type { FluidClass } from '../../snapshot/types.js';
import type { Evidence, Selection, Unusable } from './evidence.js';
import { inSentence, staleText } from './text.js';

export type { Evidence };

export type Freshness = 'fresh' | 'stale' | 'missing';

/** Why a finding was not assessed, as a code: the cards group gaps by it, never by the words of the reason. */
export type GapKind =
  'missing' | 'stale' | 'set-aside' | 'invalid' | 'outside-validity' | 'confounded' | 'too-few-readings' | 'not-applicable' | 'rule-error';

/** A number that more than one question could use; it counts once (docs/clinical-logic/index.md). */
export type SharedNumber = 'cvp';

export type Figures = Record<string, number | string | boolean>;

interface FindingBase {
  /** Stable id of the rule that made it, e.g. 'perfusion.map'. */
  ruleId: string;
  /** assessed: the rule had what it needed; not-assessed: it did not (gap and reason say why). */
  status: 'assessed' | 'not-assessed';
  /** Short plain sentence for a prescriber, e.g. "MAP 58 mmHg, below the target of 65 mmHg". */
  text: string;
  reason?: string;
  gap?: GapKind;
  /** Derived figures with units in the key name, for the record (never read back by code). */
  values?: Figures;
  evidence: Evidence[];
  /** The published source (or "common practice") of the threshold or formula used. */
  source?: string;
  /** Shared numbers this finding used. */
  uses?: SharedNumber[];
}

export type Tier = 'dynamic' | 'static' | 'context';
export type Direction = 'for' | 'against' | 'neutral';
export const MARKERS = [
  'ppv',
  'svv',
  'plr',
  'mini-fluid-challenge',
  'end-expiratory-occlusion',
  'tidal-volume-challenge',
  'last-bolus',
  'ivc',
  'cvp',
  'lv-function',
] as const;
export type Marker = (typeof MARKERS)[number];

export interface ResponsivenessFinding extends FindingBase {
  topic: 'responsiveness';
  marker: Marker;
  direction?: Direction;
  /** dynamic decides; static only corroborates; context never votes (docs/clinical-logic/index.md, evidence tiers). */
  tier?: Tier;
  /** Conditions assumed because they were not charted (e.g. "chest closed"), said on the card. */
  assumptions?: string[];
  /** The event that set aside a test with a better read-out, which is why this one was used. */
  betterSetAsideBy?: string;
}

export type ToleranceLimit = 'none' | 'moderate' | 'severe';
export type ToleranceDomain = 'balance' | 'oncotic' | 'lungs' | 'venous' | 'abdomen' | 'kidneys' | 'conditions';

export interface ToleranceFinding extends FindingBase {
  topic: 'tolerance';
  domain: ToleranceDomain;
  limit: ToleranceLimit;
  /** Pulmonary oedema, severe venous congestion or falling oxygenation: harm from volume is likely. */
  harmSign: boolean;
  /** Context only: never limits (e.g. the balance in mL, albumin). */
  contextOnly: boolean;
  /** The balance figure the overview card shows. */
  quantity?: { kind: 'fluid-overload-percent' | 'balance-ml'; value: number };
}

export const NEED_SIGNS = ['map', 'lactate', 'capillary-refill', 'urine-output', 'vasopressor', 'shock-index'] as const;
export type NeedSign = (typeof NEED_SIGNS)[number];

export interface PerfusionFinding extends FindingBase {
  topic: 'perfusion';
  sign: NeedSign;
  /** true: a sign of hypoperfusion (need); false: this sign is normal. Unset when not assessed. */
  hypoperfusion?: boolean;
  /** Shown, never counted as a sign of need (shock index). */
  contextOnly: boolean;
}

export type Phase = 'early-resuscitation' | 'later';
export interface PhaseFinding extends FindingBase {
  topic: 'phase';
}

export type OrderPart = 'volume' | 'volume-per-kg' | 'intravascular-estimate' | 'sepsis-context';
export interface OrderFinding extends FindingBase {
  topic: 'order';
  part: OrderPart;
  fluidClass?: FluidClass;
}

export type Finding = ResponsivenessFinding | ToleranceFinding | PerfusionFinding | PhaseFinding | OrderFinding;
export type FindingTopic = Finding['topic'];

/** The parts of a not-assessed finding for a selection that is missing, stale, set aside or invalid. */
export function unusableParts<T>(
  sel: Unusable<T>,
  label: string,
  evidenceOf: (item: T) => Evidence,
): Pick<FindingBase, 'status' | 'text' | 'reason' | 'gap' | 'evidence' | 'values'> {
  switch (sel.state) {
    case 'missing':
      return {
        status: 'not-assessed',
        gap: 'missing',
        text: `${label}: not assessed (none recorded)`,
        reason: `no ${inSentence(label)} recorded`,
        evidence: [],
        values: { freshness: 'missing', windowMin: sel.windowMin },
      };
    case 'stale': {
      const why = staleText(sel.ageMinutes, sel.windowMin);
      return {
        status: 'not-assessed',
        gap: 'stale',
        text: `${label}: not assessed, latest ${why}`,
        reason: `${label} ${why}`,
        evidence: [evidenceOf(sel.item)],
        values: { freshness: 'stale', ageMin: Math.round(sel.ageMinutes), windowMin: sel.windowMin },
      };
    }
    case 'set-aside':
      return {
        status: 'not-assessed',
        gap: 'set-aside',
        text: `${label}: set aside, taken before a later event (${sel.event.text})`,
        reason: `${label} no longer describes the patient: taken before ${sel.event.text}`,
        evidence: [evidenceOf(sel.item), sel.event.evidence, ...(sel.event.previous ? [sel.event.previous] : [])],
        values: { freshness: 'set-aside', ageMin: Math.round(sel.ageMinutes) },
      };
    case 'invalid':
      return {
        status: 'not-assessed',
        gap: 'invalid',
        text: `${label}: not assessed, invalid value (${sel.detail})`,
        reason: `${label} invalid: ${sel.detail}`,
        evidence: [evidenceOf(sel.item)],
        values: { freshness: 'invalid' },
      };
  }
}

/** The reason sentence for an unusable selection (for rules that fold it into a longer reason). */
export function unusableReason<T>(sel: Unusable<T>, label: string): string {
  return unusableParts(sel, label, () => ({ ref: '', kind: '', value: '', effective: '', ageMinutes: 0 })).reason ?? '';
}

export function isUnusable<T>(sel: Selection<T>): sel is Unusable<T> {
  return sel.state !== 'fresh';
}
