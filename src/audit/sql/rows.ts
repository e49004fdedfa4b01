/**
 * Rows of either store as the audit types: feedback rows, per-advice feedback counts and feedback statistics.
 * Both adapters select the same columns under the same names, so one mapper serves both.
 */
import type { FeedbackRow, FeedbackStats } from '../types.js';

export function rowToFeedback(r: Record<string, string | null>): FeedbackRow {
  const reason =
    r['reason_code'] || r['reason_system'] || r['reason_display']
      ? {
          ...(r['reason_system'] ? { system: r['reason_system'] } : {}),
          ...(r['reason_code'] ? { code: r['reason_code'] } : {}),
          ...(r['reason_display'] ? { display: r['reason_display'] } : {}),
        }
      : undefined;
  return {
    cardUuid: String(r['card_uuid']),
    outcome: r['outcome'] === 'accepted' ? 'accepted' : 'overridden',
    acceptedSuggestions: JSON.parse(String(r['accepted_suggestions'] ?? '[]')) as string[],
    ...(reason ? { overrideReason: reason } : {}),
    ...(r['user_comment'] ? { userComment: r['user_comment'] } : {}),
    outcomeTimestamp: String(r['outcome_timestamp']),
    receivedAt: String(r['received_at']),
    service: String(r['service']),
  };
}

/** Cards accepted and cards overridden per advice, from rows of (advice_id, outcome, distinct cards). */
export function feedbackCountsOf(
  rows: ReadonlyArray<{ advice_id: string; outcome: string; n: number }>,
): Map<string, { accepted: number; overridden: number }> {
  const out = new Map<string, { accepted: number; overridden: number }>();
  for (const r of rows) {
    const c = out.get(r.advice_id) ?? { accepted: 0, overridden: 0 };
    if (r.outcome === 'accepted') c.accepted += r.n;
    else c.overridden += r.n;
    out.set(r.advice_id, c);
  }
  return out;
}

export interface KindRow {
  kind: string;
  cards: number;
  accepted: number;
  overridden: number;
}
export interface ReasonRow {
  kind: string;
  code: string | null;
  display: string | null;
  n: number;
}

export function feedbackStatsOf(kinds: readonly KindRow[], reasons: readonly ReasonRow[]): FeedbackStats {
  return {
    byKind: kinds.map((k) => ({
      cardKind: k.kind,
      cards: k.cards,
      accepted: k.accepted,
      overridden: k.overridden,
      overrideRate: k.accepted + k.overridden ? Math.round((k.overridden / (k.accepted + k.overridden)) * 1000) / 1000 : 0,
    })),
    byReason: reasons.map((r) => ({
      cardKind: r.kind,
      reasonCode: r.code ?? '(comment only)',
      reasonDisplay: r.display ?? '',
      count: r.n,
    })),
  };
}

/** The two statistics queries, the same SQL in both dialects but for the schema prefix and the integer casts. */
export function feedbackStatsSql(
  t: (table: string) => string,
  int: string,
  where: string,
  and: string,
): { kinds: string; reasons: string } {
  return {
    kinds: `SELECT c.card_kind AS kind, COUNT(DISTINCT c.card_uuid)${int} AS cards,
         COUNT(DISTINCT CASE WHEN f.outcome = 'accepted' THEN f.card_uuid END)${int} AS accepted,
         COUNT(DISTINCT CASE WHEN f.outcome = 'overridden' THEN f.card_uuid END)${int} AS overridden
       FROM ${t('advice_card')} c JOIN ${t('advice')} a ON a.id = c.advice_id LEFT JOIN ${t('feedback')} f ON f.card_uuid = c.card_uuid ${where}
       GROUP BY c.card_kind ORDER BY c.card_kind`,
    reasons: `SELECT c.card_kind AS kind, f.reason_code AS code, MAX(f.reason_display) AS display, COUNT(DISTINCT f.card_uuid)${int} AS n
       FROM ${t('feedback')} f JOIN ${t('advice_card')} c ON c.card_uuid = f.card_uuid JOIN ${t('advice')} a ON a.id = c.advice_id
       WHERE ${and}f.outcome = 'overridden' GROUP BY c.card_kind, f.reason_code ORDER BY n DESC, kind, code NULLS LAST`,
  };
}
