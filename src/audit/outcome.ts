/**
 * The comparable outcome of one answer: what a prescriber was shown, reduced to values that can be compared
 * between the stored record and a replay under other rules — the verdict values and confidence, the action, the
 * test offered and the headline key (each when the advice carries it), and per card its kind, indicator, summary as shown and suggestion
 * labels (no uuids, no
 * links, no times). The one place that knows where these live in a record and in an advice, so that a change
 * of the advice's shape (verdict confidence, tolerance "not known", headline codes) is adapted here only. Pure.
 */
import type { Card } from '../hooks/schemas.js';
import type { AdviceRecord } from './types.js';

export interface CardOutcome {
  kind: string;
  indicator: string;
  summary: string;
  /** Suggestion labels in the order shown. */
  suggestions: string[];
}

export interface ComparableOutcome {
  responsiveness?: string;
  /** The responsiveness verdict's confidence (the evidence tier that decided it), when the advice carries one. */
  confidence?: string;
  tolerance?: string;
  /** The recommended action for an ordered bolus (a code such as `smaller-aliquot`). */
  action?: string;
  /** The test the advice offers (a code such as `passive-leg-raise`), when it offers one. */
  nextTest?: string;
  /** A headline key from a closed set, if the advice names one (a code such as `likely/adequate`, not prose). */
  headlineKey?: string;
  cards: CardOutcome[];
}

/** The loosest shape of an advice this needs: stored records of any rules version fit it. */
interface AdviceLike {
  responsiveness?: { value?: unknown; confidence?: unknown; nextTest?: unknown };
  tolerance?: { value?: unknown };
  recommendation?: { action?: unknown; headline?: unknown; headlineKey?: unknown; nextTest?: unknown };
}

const HEADLINE_KEY = /^[a-z][a-z-]*\/[a-z][a-z-]*$/;

const str = (v: unknown): string | undefined => (typeof v === 'string' && v ? v : undefined);

function headlineKeyOf(a: AdviceLike | undefined): string | undefined {
  const r = a?.recommendation;
  const k = str(r?.headlineKey) ?? str(r?.headline);
  return k && HEADLINE_KEY.test(k) ? k : undefined;
}

function cardOutcome(card: Card, kind: string): CardOutcome {
  return { kind, indicator: card.indicator, summary: card.summary, suggestions: (card.suggestions ?? []).map((s) => s.label) };
}

/** From an advice and its cards, each with the kind it was made as. */
export function outcomeOf(advice: AdviceLike | undefined, cards: ReadonlyArray<{ kind: string; card: Card }>): ComparableOutcome {
  const responsiveness = str(advice?.responsiveness?.value);
  const confidence = str(advice?.responsiveness?.confidence);
  const tolerance = str(advice?.tolerance?.value);
  const action = str(advice?.recommendation?.action);
  const nextTest = str(advice?.recommendation?.nextTest) ?? str(advice?.responsiveness?.nextTest);
  const headlineKey = headlineKeyOf(advice);
  return {
    ...(responsiveness ? { responsiveness } : {}),
    ...(confidence ? { confidence } : {}),
    ...(tolerance ? { tolerance } : {}),
    ...(action ? { action } : {}),
    ...(nextTest ? { nextTest } : {}),
    ...(headlineKey ? { headlineKey } : {}),
    cards: cards.map((c) => cardOutcome(c.card, c.kind)),
  };
}

/** From a stored record: its advice and the cards it answered with (kinds from cardKinds; `unknown` if absent). */
export function outcomeOfRecord(rec: Pick<AdviceRecord, 'advice' | 'cards' | 'cardKinds'>): ComparableOutcome {
  return outcomeOf(
    rec.advice as AdviceLike | undefined,
    rec.cards.map((card) => ({ card, kind: (card.uuid && rec.cardKinds[card.uuid]) || 'unknown' })),
  );
}
