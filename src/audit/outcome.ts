/**
 * The comparable outcome of one answer: what a prescriber was shown, reduced to values that can be compared
 * between the stored record and a replay under other rules — the verdict values, the headline key (when the
 * advice carries one), and per card its kind, indicator, summary as shown and suggestion labels (no uuids, no
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
  tolerance?: string;
  /** A headline key from a closed set, if the advice names one (a code such as `likely/adequate`, not prose). */
  headlineKey?: string;
  cards: CardOutcome[];
}

/** The loosest shape of an advice this needs: stored records of any rules version fit it. */
interface AdviceLike {
  responsiveness?: { value?: unknown };
  tolerance?: { value?: unknown };
  recommendation?: { headline?: unknown; headlineKey?: unknown };
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
  const tolerance = str(advice?.tolerance?.value);
  const headlineKey = headlineKeyOf(advice);
  return {
    ...(responsiveness ? { responsiveness } : {}), ...(tolerance ? { tolerance } : {}), ...(headlineKey ? { headlineKey } : {}),
    cards: cards.map((c) => cardOutcome(c.card, c.kind)),
  };
}

/** From a stored record: its advice and the cards it answered with (kinds from cardKinds; `unknown` if absent). */
export function outcomeOfRecord(rec: Pick<AdviceRecord, 'advice' | 'cards' | 'cardKinds'>): ComparableOutcome {
  return outcomeOf(rec.advice as AdviceLike | undefined, rec.cards.map((card) => ({ card, kind: (card.uuid && rec.cardKinds[card.uuid]) || 'unknown' })));
}
