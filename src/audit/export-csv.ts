/**
 * The CSV export: one row per answer with the columns an analyst asks for first. Cells are RFC 4180 and
 * formula-safe (src/audit/csv.ts). Several values in one cell (card kinds, feedback) are joined with "; ".
 */
import { csvRow } from './csv.js';
import { outcomeOfRecord } from './outcome.js';
import type { FeedbackRow, StoredAdvice } from './types.js';

export const CSV_EXPORT_COLUMNS = [
  'advice_id',
  'recorded_at',
  'service',
  'outcome',
  'patient_id',
  'encounter_id',
  'user_id',
  'responsiveness',
  'tolerance',
  'indicator',
  'card_kinds',
  'feedback_outcome',
  'override_reason',
  'rules_version',
  'latency_ms',
] as const;

const RANK: Record<string, number> = { info: 1, warning: 2, critical: 3 };

const list = (xs: Iterable<string>): string => [...new Set(xs)].join('; ');

export function csvExportHeader(): string {
  return csvRow(CSV_EXPORT_COLUMNS);
}

export function csvExportRow(rec: StoredAdvice, feedback: readonly FeedbackRow[]): string {
  const o = outcomeOfRecord(rec);
  // The most urgent indicator of the answer's cards.
  const indicator = o.cards.map((c) => c.indicator).sort((a, b) => (RANK[b] ?? 0) - (RANK[a] ?? 0))[0] ?? '';
  const reasons = feedback
    .filter((f) => f.outcome === 'overridden')
    .map((f) => f.overrideReason?.display ?? f.overrideReason?.code ?? (f.userComment ? `comment: ${f.userComment}` : ''))
    .filter(Boolean);
  return csvRow([
    rec.id,
    rec.recordedAt,
    rec.service,
    rec.outcome,
    rec.patientId,
    rec.encounterId,
    rec.userId,
    o.responsiveness,
    o.tolerance,
    indicator,
    list(o.cards.map((c) => c.kind)),
    list(feedback.map((f) => f.outcome)),
    list(reasons),
    rec.rulesVersion,
    Math.round(rec.timings.totalMs * 10) / 10,
  ]);
}
