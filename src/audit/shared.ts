/** Helpers shared by the audit adapters. */
import { createHash } from 'node:crypto';
import type { AdviceRecord, AdviceSummary, CardOwner, FeedbackRow, OverviewAggregates } from './types.js';

/** At most this many records per group commit, in both stores (common practice: a bound on one transaction's size). */
export const MAX_BATCH = 64;

export function summarize(
  r: AdviceRecord & { seq: number },
  feedback: Map<string, { accepted: number; overridden: number }>,
): AdviceSummary {
  return {
    id: r.id,
    seq: r.seq,
    recordedAt: r.recordedAt,
    service: r.service,
    hook: r.hook,
    hookInstance: r.hookInstance,
    ...(r.patientId ? { patientId: r.patientId } : {}),
    ...(r.encounterId ? { encounterId: r.encounterId } : {}),
    outcome: r.outcome,
    rulesVersion: r.rulesVersion,
    cardCount: r.cards.length,
    indicators: r.cards.map((c) => c.indicator),
    latencyMs: Math.round(r.timings.totalMs * 10) / 10,
    feedback: feedback.get(r.id) ?? { accepted: 0, overridden: 0 },
    ...(r.advice?.responsiveness ? { responsiveness: r.advice.responsiveness.value } : {}),
    ...(r.advice?.tolerance ? { tolerance: r.advice.tolerance.value } : {}),
  };
}

/**
 * A time bound of an audit query as the UTC text `recordedAt` is compared with: a date alone is the start of that
 * day (`from`) or its last millisecond (`to`, `endOfDay`), so both bounds include the whole day; an instant is
 * converted to UTC. Undefined for text that is no date.
 */
export function auditInstant(v: string, endOfDay = false): string | undefined {
  if (/^\d{4}-\d{2}-\d{2}$/.test(v)) return `${v}T${endOfDay ? '23:59:59.999' : '00:00:00.000'}Z`;
  const t = new Date(v);
  return Number.isNaN(t.getTime()) ? undefined : t.toISOString();
}

/** Idempotency key: the same card, outcome, timestamp and content is the same feedback, however often sent. */
export function feedbackKey(f: FeedbackRow): string {
  return createHash('sha256')
    .update(
      JSON.stringify([
        f.cardUuid,
        f.outcome,
        f.outcomeTimestamp,
        [...f.acceptedSuggestions].sort(),
        f.overrideReason?.code ?? null,
        f.userComment ?? null,
      ]),
    )
    .digest('hex');
}

/** A card-owner row of either store as a CardOwner (no `issuer` when the record names none). */
export function ownerOf(r: { advice_id: string; card_kind: string; service: string; issuer: string | null }): CardOwner {
  return { adviceId: r.advice_id, cardKind: r.card_kind, service: r.service, ...(r.issuer !== null ? { issuer: r.issuer } : {}) };
}

/** Code-unit order of the named keys (not locale order), so that both stores' aggregates sort alike. */
function byKeys<T>(keys: Array<keyof T>): (a: T, b: T) => number {
  return (a, b) => {
    for (const k of keys) {
      const x = String(a[k]);
      const y = String(b[k]);
      if (x !== y) return x < y ? -1 : 1;
    }
    return 0;
  };
}

/** Counts as numbers (PostgreSQL returns bigint sums as text), latencies rounded to 0.1 ms, every list sorted by its keys. */
export function normaliseOverview(o: OverviewAggregates): OverviewAggregates {
  const n = (v: unknown) => Number(v);
  const ms = (v: unknown) => Math.round(Number(v) * 10) / 10;
  return {
    answersByDay: o.answersByDay.map((r) => ({ ...r, answers: n(r.answers) })).sort(byKeys(['day', 'service', 'indicator'])),
    feedbackByWeek: o.feedbackByWeek
      .map((r) => ({ ...r, cards: n(r.cards), accepted: n(r.accepted), overridden: n(r.overridden), noFeedback: n(r.noFeedback) }))
      .sort(byKeys(['week', 'cardKind'])),
    overrideReasonsByWeek: o.overrideReasonsByWeek.map((r) => ({ ...r, cards: n(r.cards) })).sort(byKeys(['week', 'reasonCode'])),
    verdictsByWeek: o.verdictsByWeek.map((r) => ({ ...r, answers: n(r.answers) })).sort(byKeys(['week', 'responsiveness', 'tolerance'])),
    latencyByDay: o.latencyByDay
      .map((r) => ({ day: r.day, answers: n(r.answers), p50Ms: ms(r.p50Ms), p99Ms: ms(r.p99Ms) }))
      .sort(byKeys(['day'])),
  };
}
