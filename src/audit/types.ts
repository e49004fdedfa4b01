/**
 * The audit store interface. Asynchronous so that the SQLite (embedded default) and PostgreSQL (shared by
 * several replicas) adapters fit the same shape. A record is committed before the response is sent.
 * Records form a hash chain (each hash covers the previous hash and the record), so that a changed or
 * removed record shows when the chain is verified.
 */
import type { Advice, Finding } from '../assess/types.js';
import type { ReplayCache } from '../auth/replay-cache.js';
import type { FhirExchange, GatherOutcome } from '../hooks/gather-types.js';
import type { Card } from '../hooks/schemas.js';
import type { PatientSnapshot } from '../snapshot/types.js';

export type AdviceOutcome = 'answered' | 'precondition-failed';

/**
 * What the call brought, as received (docs/decisions/0006-store-what-was-received.md): the request body's text (the
 * bearer token replaced, src/hooks/received.ts) and every FHIR request Tidemark made with its answer's text. With
 * `now`, the clock reading the call was assessed at, they are all the snapshot is built from, so it is rebuilt from
 * them (src/hooks/rebuild.ts) rather than stored.
 */
export interface RecordInputs {
  now: string;
  request: { body: string; asReceived: boolean };
  fhir: FhirExchange[];
}

/** What every record holds, whatever its outcome. */
interface RecordBase {
  id: string;
  recordedAt: string;
  service: string;
  hook: string;
  hookInstance: string;
  userId?: string;
  patientId?: string;
  encounterId?: string;
  outcome: AdviceOutcome;
  rulesVersion: string;
  findings: Finding[];
  cards: Card[];
  /** Card uuid → card kind, for joining feedback. */
  cardKinds: Record<string, string>;
  gathering: GatherOutcome[];
  timings: { totalMs: number; gatherMs: number; fhirWaitMs: number; assessMs: number };
  /** Who called: the verified issuer (never the token). */
  client?: { issuer?: string; tenant?: string; jti?: string };
  /** The inputs as received; a record stored with them (format 2) keeps no snapshot. Absent in records stored before format 2. */
  inputs?: RecordInputs;
}

/**
 * A call that was answered with cards (200): the advice the rules gave and what they saw, as the snapshot (in a
 * record as made, and as stored before format 2) or as the inputs it is rebuilt from (a stored record of format 2).
 */
export interface AnsweredRecord extends RecordBase {
  outcome: 'answered';
  snapshot?: PatientSnapshot;
  advice: Advice;
}

/** A call refused with 412 (required data with no route to it, decision 0001): no snapshot, no advice, no cards. */
export interface PreconditionFailedRecord extends RecordBase {
  outcome: 'precondition-failed';
  snapshot?: undefined;
  advice?: undefined;
}

/** One audit record, told apart by `outcome`. */
export type AdviceRecord = AnsweredRecord | PreconditionFailedRecord;

export type StoredAdvice = AdviceRecord & {
  seq: number;
  hash: string;
  prevHash: string;
  /** How the row was stored: 1, the record's JSON text; 2, its outputs and inputs compressed (src/audit/record-format.ts). */
  format: 1 | 2;
};

export interface AdviceSummary {
  id: string;
  seq: number;
  recordedAt: string;
  service: string;
  hook: string;
  hookInstance: string;
  patientId?: string;
  encounterId?: string;
  outcome: AdviceOutcome;
  rulesVersion: string;
  cardCount: number;
  indicators: string[];
  latencyMs: number;
  /**
   * Cards of this answer with at least one accepted (overridden) feedback — cards, not feedback rows, so that the
   * list agrees with feedbackStats: a card accepted twice counts once; a card both accepted and overridden, in both.
   */
  feedback: { accepted: number; overridden: number };
  /** The answer's verdicts, when it has them (a 412 answer has none). */
  responsiveness?: string;
  tolerance?: string;
}

/** The most urgent indicator of an answer's cards (critical > warning > info); `none` for an answer without cards. */
export type TopIndicator = 'critical' | 'warning' | 'info' | 'none';
export const TOP_INDICATORS: readonly TopIndicator[] = ['critical', 'warning', 'info', 'none'];
/** An answer's feedback: some card accepted, some card overridden, or no feedback on any of its cards. */
export type FeedbackFilter = 'accepted' | 'overridden' | 'none';

export interface AdviceQuery {
  patientId?: string;
  service?: string;
  from?: string;
  to?: string;
  limit: number;
  /** Opaque cursor from a previous page (the last seq seen). */
  cursor?: string;
  /** The answer's most urgent card indicator. */
  indicator?: TopIndicator;
  /** Verdict values as stored (`none`: the answer has no such verdict). */
  responsiveness?: string;
  tolerance?: string;
  feedback?: FeedbackFilter;
}

/** Filters of the console's aggregates (recorded time, inclusive, as UTC text; service). */
export interface OverviewQuery {
  from?: string;
  to?: string;
  service?: string;
}

/**
 * The console overview, computed in SQL by the store (GROUP BY day or week; nothing is loaded record by record).
 * Days are UTC calendar days of `recordedAt` (YYYY-MM-DD); weeks are ISO weeks named by their Monday (YYYY-MM-DD).
 * Every list is sorted by its keys in code-unit order, so both stores give the same arrays.
 */
export interface OverviewAggregates {
  /** Answers (every stored record, 412s included) per day, service and most urgent card indicator. */
  answersByDay: Array<{ day: string; service: string; indicator: TopIndicator; answers: number }>;
  /**
   * Cards per week of their answer and card kind, each counted once by its feedback: overridden (any overriding
   * feedback, even if also accepted), accepted (accepted, never overridden), or none.
   */
  feedbackByWeek: Array<{ week: string; cardKind: string; cards: number; accepted: number; overridden: number; noFeedback: number }>;
  /** Overridden cards per week of their answer and override reason code (`(comment only)` for none). */
  overrideReasonsByWeek: Array<{ week: string; reasonCode: string; reasonDisplay: string; cards: number }>;
  /** Answers per week by responsiveness × tolerance verdict (`none` where the answer has no such verdict). */
  verdictsByWeek: Array<{ week: string; responsiveness: string; tolerance: string; answers: number }>;
  /**
   * Total latency (timings.totalMs) per day: p50 and p99 by the nearest-rank method (the value at rank ⌈p·n⌉ of the
   * day's sorted latencies; PostgreSQL percentile_disc, SQLite ROW_NUMBER over the day), rounded to 0.1 ms.
   */
  latencyByDay: Array<{ day: string; answers: number; p50Ms: number; p99Ms: number }>;
}

/** Filters of a streamed read (records oldest first, by seq). */
export interface RecordStreamQuery {
  service?: string;
  from?: string;
  to?: string;
  outcome?: AdviceOutcome;
  /** Only records after this seq (resume a run; paging of the impact endpoint). */
  afterSeq?: number;
  /** Records fetched per round trip; the store holds at most this many at once. */
  batchSize?: number;
}

export interface FeedbackRow {
  cardUuid: string;
  outcome: 'accepted' | 'overridden';
  acceptedSuggestions: string[];
  overrideReason?: { system?: string; code?: string; display?: string };
  userComment?: string;
  outcomeTimestamp: string;
  receivedAt: string;
  service: string;
}

export interface CardOwner {
  adviceId: string;
  cardKind: string;
  service: string;
  /** The verified issuer whose call received the card (`trial-mode` in trial mode); absent when the record names none. */
  issuer?: string;
}

export interface FeedbackStats {
  /** Per card kind: cards shown, and cards with at least one accepted (overridden) feedback. */
  byKind: Array<{ cardKind: string; cards: number; accepted: number; overridden: number; overrideRate: number }>;
  byReason: Array<{ cardKind: string; reasonCode: string; reasonDisplay: string; count: number }>;
}

export interface AuditStore {
  readonly kind: string;
  init(): Promise<void>;
  append(rec: AdviceRecord): Promise<{ seq: number; hash: string }>;
  get(id: string): Promise<StoredAdvice | undefined>;
  list(q: AdviceQuery): Promise<{ items: AdviceSummary[]; nextCursor?: string }>;
  cardOwner(cardUuid: string): Promise<CardOwner | undefined>;
  /** Stores feedback idempotently: a repeat of the same card, outcome and timestamp is a duplicate. */
  addFeedback(rows: FeedbackRow[]): Promise<{ stored: number; duplicates: number }>;
  feedbackFor(adviceId: string): Promise<FeedbackRow[]>;
  /**
   * Every matching record, oldest first (ascending seq), read in batches by seq so that a trail of any length
   * is never held in memory at once. Stopping the loop early is fine: nothing stays open between batches.
   */
  records(q: RecordStreamQuery): AsyncIterable<StoredAdvice>;
  feedbackStats(q: { from?: string; to?: string; service?: string }): Promise<FeedbackStats>;
  /** The console overview's aggregates, computed in SQL. */
  overview(q: OverviewQuery): Promise<OverviewAggregates>;
  /** Recomputes the hash chain; reports the first record that does not match. */
  verifyChain(): Promise<{ ok: boolean; checked: number; firstBadSeq?: number }>;
  ping(): Promise<void>;
  /**
   * Group commits so far and the records they committed (a store that groups appends: SQLite). Records per commit is
   * the size of the groups; exported as metrics (tidemark_audit_commits, tidemark_audit_committed_records).
   */
  commitStats?(): { commits: number; records: number };
  close(): Promise<void>;
  /** A jti replay cache shared by every replica on this store, if the store is shared (PostgreSQL); else absent. */
  sharedReplayCache?(): ReplayCache;
}
