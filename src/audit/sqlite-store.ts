/**
 * SQLite audit store (embedded default): better-sqlite3, WAL journal, synchronous=FULL so that a committed
 * record survives a process kill or power loss. Appends go to a writer thread with a connection of its own
 * (src/audit/sqlite-writer.ts), which commits them in groups; each append settles only after its record has
 * committed. Reads, feedback and the integrity check use this thread's connection. An in-memory database
 * (':memory:', which a second connection could not see) appends on this thread, with the same group commit.
 */
import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import { Worker } from 'node:worker_threads';
import type Database from 'better-sqlite3';
import { GENESIS } from './chain.js';
import { decodeRow, rowHashMatches, storedAdviceOf } from './record-format.js';
import { createBatchAppender, MAX_BATCH, openAuditDb, prepareRecord, type AppendResult, type PreparedRecord } from './sqlite-append.js';
import type { WriterError, WriterIn, WriterOut } from './sqlite-writer.js';
import type {
  AdviceQuery,
  AdviceRecord,
  AdviceSummary,
  AuditStore,
  CardOwner,
  FeedbackRow,
  FeedbackStats,
  OverviewAggregates,
  OverviewQuery,
  RecordStreamQuery,
  StoredAdvice,
} from './types.js';
import { normaliseOverview, summarize, feedbackKey, ownerOf } from './shared.js';
import { MIGRATIONS, SCHEMA_VERSION } from './sql/migrations.js';
import { feedbackCountsOf, feedbackStatsOf, feedbackStatsSql, rowToFeedback, type KindRow, type ReasonRow } from './sql/rows.js';
import { adviceFilters, recordFilters, Where, type RecordSql } from './sql/where.js';

/**
 * The writer thread's entry. Built (dist/, `npm start`) this module is JavaScript and the compiled writer runs as is;
 * run from source (tsx, vitest) a worker does not inherit the loader, so the .mjs bridge registers tsx first.
 */
const WRITER_ENTRY = import.meta.url.endsWith('.ts') ? './sqlite-writer.mjs' : './sqlite-writer.js';

interface AdviceRow {
  seq: number;
  record: string;
  format: number | null;
  outputs: Uint8Array | null;
  /** Not selected by list(), which needs the outputs only. */
  inputs?: Uint8Array | null;
  prev_hash: string;
  hash: string;
}

/** The most urgent indicator of the cards of the advice row aliased `a` (see TopIndicator). */
const TOP_INDICATOR = `(SELECT CASE MAX(CASE json_extract(x.value, '$.indicator') WHEN 'critical' THEN 3 WHEN 'warning' THEN 2 WHEN 'info' THEN 1 ELSE 0 END)
  WHEN 3 THEN 'critical' WHEN 2 THEN 'warning' WHEN 1 THEN 'info' ELSE 'none' END FROM json_each(a.record, '$.cards') x)`;
const verdictOf = (v: 'responsiveness' | 'tolerance') => `COALESCE(json_extract(a.record, '$.advice.${v}.value'), 'none')`;
/** UTC day and ISO week (its Monday) of the advice row aliased `a`. */
const DAY = 'substr(a.recorded_at, 1, 10)';
const WEEK = `date(substr(a.recorded_at, 1, 10), '-6 days', 'weekday 1')`;
const RECORD_SQL: RecordSql = {
  topIndicator: TOP_INDICATOR,
  verdictOf,
  cardFeedback: 'SELECT 1 FROM advice_card c JOIN feedback f ON f.card_uuid = c.card_uuid WHERE c.advice_id = a.id',
};

/** Records read per batch by records(). */
const STREAM_BATCH = 500;

interface Waiter {
  resolve: (v: { seq: number; hash: string }) => void;
  reject: (e: unknown) => void;
}

/** An error from the writer thread, as the caller would have seen it on this thread (message, name, code). */
function writerError(e: WriterError): Error {
  const err = new Error(e.message) as Error & { code?: string };
  if (e.name) err.name = e.name;
  if (e.code) err.code = e.code;
  return err;
}

export class SqliteAuditStore implements AuditStore {
  readonly kind = 'sqlite';
  private db: Database.Database;

  constructor(readonly path: string) {
    if (path !== ':memory:') mkdirSync(dirname(path), { recursive: true });
    this.db = openAuditDb(path);
  }

  async init(): Promise<void> {
    this.migrate();
    const check = this.db.pragma('quick_check', { simple: true });
    if (check !== 'ok') throw new Error(`audit database ${this.path} failed its integrity check: ${String(check)}`);
    if (this.path !== ':memory:') this.startWriter();
  }

  /** The schema version this file has (PRAGMA user_version; 0 for a file written before versions were kept). */
  schemaVersion(): number {
    return Number(this.db.pragma('user_version', { simple: true }));
  }

  /**
   * Applies the migrations this file has not had (src/audit/sql/migrations.ts), in one IMMEDIATE transaction, and
   * records the version reached. A newer file than this Tidemark knows is refused rather than written to.
   */
  private migrate(): void {
    const have = this.schemaVersion();
    if (have > SCHEMA_VERSION)
      throw new Error(
        `audit database ${this.path} has schema version ${have}, newer than this Tidemark's ${SCHEMA_VERSION}: upgrade Tidemark`,
      );
    if (have === SCHEMA_VERSION) return;
    const target = {
      run: (sql: string) => void this.db.exec(sql),
      hasColumn: (table: string, column: string) =>
        (this.db.pragma(`table_info(${table})`) as Array<{ name: string }>).some((c) => c.name === column),
    };
    this.db
      .transaction(() => {
        for (const m of MIGRATIONS) if (m.version > have) m.sqlite(target);
        this.db.pragma(`user_version = ${SCHEMA_VERSION}`);
      })
      .immediate();
  }

  // ------------------------------------------------------------ appends on the writer thread (file databases)

  private writer: Worker | undefined;
  private nextId = 0;
  private readonly waiting = new Map<number, Waiter>();
  private drained: (() => void) | undefined;
  private closing = false;

  private startWriter(): Worker {
    const w = new Worker(new URL(WRITER_ENTRY, import.meta.url), { workerData: { path: this.path } });
    w.on('message', (m: WriterOut) => {
      if (m.type === 'done') {
        this.countCommit(m.results.filter((r) => r.ok).length);
        for (const r of m.results) {
          const waiter = this.waiting.get(r.id);
          if (!waiter) continue;
          this.waiting.delete(r.id);
          if (r.ok) waiter.resolve({ seq: r.seq, hash: r.hash });
          else waiter.reject(writerError(r.error));
        }
        this.settled();
      } else if (m.type === 'fatal') {
        this.failAll(writerError(m.error));
      }
    });
    w.on('error', (e) => this.failAll(e));
    w.on('exit', () => {
      if (this.writer === w) this.writer = undefined;
      // Whatever was in flight has no acknowledgement: it may or may not have committed, so no advice is given.
      this.failAll(new Error('the audit writer thread stopped'));
    });
    w.unref(); // an idle writer does not keep the process alive; it is ref'd while appends wait (see append)
    this.writer = w;
    return w;
  }

  private commits = 0;
  private committed = 0;

  /** One group commit of `records` records (none: the transaction failed and nothing of it was stored). */
  private countCommit(records: number): void {
    if (records === 0) return;
    this.commits += 1;
    this.committed += records;
  }

  commitStats(): { commits: number; records: number } {
    return { commits: this.commits, records: this.committed };
  }

  private failAll(e: unknown): void {
    for (const [id, waiter] of this.waiting) {
      this.waiting.delete(id);
      waiter.reject(e);
    }
    this.settled();
  }

  private settled(): void {
    if (this.waiting.size) return;
    this.writer?.unref();
    const drained = this.drained;
    this.drained = undefined;
    drained?.();
  }

  /**
   * Group commit: the writer thread commits the records that arrive while it is busy in one IMMEDIATE
   * transaction (one WAL fsync), each chained to the one before it. The promise settles only after the
   * transaction holding this record has committed, so a record is durable before its caller answers.
   */
  async append(rec: AdviceRecord): Promise<{ seq: number; hash: string }> {
    if (this.closing || !this.db.open) throw new TypeError('The database connection is not open');
    if (this.path === ':memory:') return this.appendHere(rec);
    const w = this.writer ?? this.startWriter();
    const id = (this.nextId += 1);
    const prepared = prepareRecord(rec);
    return new Promise((resolve, reject) => {
      try {
        w.postMessage({ type: 'append', id, prepared } satisfies WriterIn);
      } catch (e) {
        reject(e);
        return;
      }
      this.waiting.set(id, { resolve, reject });
      w.ref();
    });
  }

  // ------------------------------------------------------------ appends on this thread (':memory:')

  private pending: Array<{ prepared: PreparedRecord } & Waiter> = [];
  private appendBatch?: (batch: readonly PreparedRecord[]) => AppendResult[];

  private appendHere(rec: AdviceRecord): Promise<{ seq: number; hash: string }> {
    const prepared = prepareRecord(rec);
    return new Promise((resolve, reject) => {
      this.pending.push({ prepared, resolve, reject });
      if (this.pending.length === 1) setImmediate(() => this.flushHere());
    });
  }

  /** Writes and commits what is pending (synchronously), then settles each caller's promise. */
  private flushHere(): void {
    while (this.pending.length) {
      const batch = this.pending.splice(0, MAX_BATCH);
      let done: AppendResult[];
      try {
        this.appendBatch ??= createBatchAppender(this.db);
        done = this.appendBatch(batch.map((p) => p.prepared));
      } catch (e) {
        // BEGIN or COMMIT failed: nothing of this batch was stored.
        for (const p of batch) p.reject(e);
        continue;
      }
      this.countCommit(done.filter((r) => r.ok).length);
      batch.forEach((p, i) => {
        const r = done[i];
        if (r?.ok) p.resolve({ seq: r.seq, hash: r.hash });
        else p.reject(r ? r.error : new Error('audit append lost'));
      });
    }
  }

  async get(id: string): Promise<StoredAdvice | undefined> {
    const row = this.db.prepare('SELECT seq, record, format, outputs, inputs, prev_hash, hash FROM advice WHERE id = ?').get(id) as
      AdviceRow | undefined;
    return row ? storedAdviceOf(row) : undefined;
  }

  async list(q: AdviceQuery): Promise<{ items: AdviceSummary[]; nextCursor?: string }> {
    const w = adviceFilters(new Where('sqlite'), q, 'a.');
    if (q.cursor) w.add((p) => `a.seq < ${p}`, Number(q.cursor));
    recordFilters(w, q, RECORD_SQL);
    const rows = this.db
      .prepare(
        `SELECT a.seq, a.record, a.format, a.outputs, a.prev_hash, a.hash FROM advice a ${w.sql} ORDER BY a.seq DESC LIMIT ${w.param(q.limit + 1)}`,
      )
      .all(...w.args) as AdviceRow[];
    const page = rows.slice(0, q.limit);
    // Summaries need the outputs only: the inputs are not read.
    const records = page.map((r) => ({ ...decodeRow(r, { inputs: false }), seq: r.seq }));
    const counts = this.feedbackCounts(records.map((r) => r.id));
    const items = records.map((r) => summarize(r, counts));
    const last = page[page.length - 1];
    return rows.length > q.limit && last ? { items, nextCursor: String(last.seq) } : { items };
  }

  async overview(q: OverviewQuery): Promise<OverviewAggregates> {
    const filters = adviceFilters(new Where('sqlite'), q, 'a.');
    const { args } = filters;
    const w = filters.sql;
    const all = <T>(sql: string) => this.db.prepare(sql).all(...args) as T[];
    const answersByDay = all<OverviewAggregates['answersByDay'][number]>(
      `SELECT ${DAY} AS day, a.service AS service, ${TOP_INDICATOR} AS indicator, COUNT(*) AS answers FROM advice a ${w} GROUP BY 1, 2, 3`,
    );
    const feedbackByWeek = all<OverviewAggregates['feedbackByWeek'][number]>(
      `WITH per_card AS (
         SELECT ${WEEK} AS week, c.card_kind AS kind, c.card_uuid AS card,
           MAX(CASE f.outcome WHEN 'overridden' THEN 2 WHEN 'accepted' THEN 1 ELSE 0 END) AS o
         FROM advice_card c JOIN advice a ON a.id = c.advice_id LEFT JOIN feedback f ON f.card_uuid = c.card_uuid ${w}
         GROUP BY c.card_uuid, week, kind)
       SELECT week, kind AS cardKind, COUNT(*) AS cards, SUM(o = 1) AS accepted, SUM(o = 2) AS overridden, SUM(o = 0) AS noFeedback
       FROM per_card GROUP BY week, kind`,
    );
    const overrideReasonsByWeek = all<OverviewAggregates['overrideReasonsByWeek'][number]>(
      `SELECT ${WEEK} AS week, COALESCE(f.reason_code, '(comment only)') AS reasonCode, COALESCE(MAX(f.reason_display), '') AS reasonDisplay, COUNT(DISTINCT f.card_uuid) AS cards
       FROM feedback f JOIN advice_card c ON c.card_uuid = f.card_uuid JOIN advice a ON a.id = c.advice_id
       ${w ? `${w} AND` : 'WHERE'} f.outcome = 'overridden' GROUP BY 1, 2`,
    );
    const verdictsByWeek = all<OverviewAggregates['verdictsByWeek'][number]>(
      `SELECT ${WEEK} AS week, ${verdictOf('responsiveness')} AS responsiveness, ${verdictOf('tolerance')} AS tolerance, COUNT(*) AS answers FROM advice a ${w} GROUP BY 1, 2, 3`,
    );
    // SQLite has no percentile function: nearest rank from ROW_NUMBER and the day's count (⌈p·n⌉ = (p%·n + 99) / 100 in integers).
    const latencyByDay = all<OverviewAggregates['latencyByDay'][number]>(
      `WITH l AS (SELECT ${DAY} AS day, CAST(json_extract(a.record, '$.timings.totalMs') AS REAL) AS ms FROM advice a ${w}),
       r AS (SELECT day, ms, ROW_NUMBER() OVER (PARTITION BY day ORDER BY ms) AS rn, COUNT(*) OVER (PARTITION BY day) AS n FROM l WHERE ms IS NOT NULL)
       SELECT day, MAX(n) AS answers, MIN(CASE WHEN rn >= (n * 50 + 99) / 100 THEN ms END) AS p50Ms, MIN(CASE WHEN rn >= (n * 99 + 99) / 100 THEN ms END) AS p99Ms
       FROM r GROUP BY day`,
    );
    return normaliseOverview({ answersByDay, feedbackByWeek, overrideReasonsByWeek, verdictsByWeek, latencyByDay });
  }

  /** Cards accepted and cards overridden per advice (distinct cards, as feedbackStats counts them; not feedback rows). */
  private feedbackCounts(adviceIds: string[]): Map<string, { accepted: number; overridden: number }> {
    if (!adviceIds.length) return new Map();
    const rows = this.db
      .prepare(
        `SELECT c.advice_id AS advice_id, f.outcome AS outcome, COUNT(DISTINCT f.card_uuid) AS n FROM feedback f JOIN advice_card c ON c.card_uuid = f.card_uuid
         WHERE c.advice_id IN (${adviceIds.map(() => '?').join(',')}) GROUP BY c.advice_id, f.outcome`,
      )
      .all(...adviceIds) as Array<{ advice_id: string; outcome: string; n: number }>;
    return feedbackCountsOf(rows);
  }

  /**
   * Keyset paging by seq (no statement stays open between batches: better-sqlite3 forbids other statements on a
   * connection while one iterates, and the caller may do anything between two records).
   */
  async *records(q: RecordStreamQuery): AsyncGenerator<StoredAdvice> {
    const w = new Where('sqlite');
    w.param(0); // the keyset bound, set per batch below
    adviceFilters(w.raw('seq > ?'), q);
    const batch = Math.max(1, Math.min(q.batchSize ?? STREAM_BATCH, 10_000));
    const stmt = this.db.prepare(
      `SELECT seq, record, format, outputs, inputs, prev_hash, hash FROM advice ${w.sql} ORDER BY seq LIMIT ${batch}`,
    );
    let after = q.afterSeq ?? 0;
    for (;;) {
      w.args[0] = after;
      const rows = stmt.all(...w.args) as AdviceRow[];
      for (const row of rows) {
        after = row.seq;
        yield storedAdviceOf(row);
      }
      if (rows.length < batch) return;
    }
  }

  async cardOwner(cardUuid: string): Promise<CardOwner | undefined> {
    // COALESCE evaluates json_extract only for a row written before the issuer column.
    const r = this.db
      .prepare(
        `SELECT c.advice_id, c.card_kind, c.service, COALESCE(a.issuer, json_extract(a.record, '$.client.issuer')) AS issuer
         FROM advice_card c JOIN advice a ON a.id = c.advice_id WHERE c.card_uuid = ?`,
      )
      .get(cardUuid) as { advice_id: string; card_kind: string; service: string; issuer: string | null } | undefined;
    return r ? ownerOf(r) : undefined;
  }

  async addFeedback(rows: FeedbackRow[]): Promise<{ stored: number; duplicates: number }> {
    const ins = this.db.prepare(
      `INSERT OR IGNORE INTO feedback (feedback_key, card_uuid, outcome, accepted_suggestions, reason_system, reason_code, reason_display, user_comment, outcome_timestamp, received_at, service)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    );
    const tx = this.db.transaction((all: FeedbackRow[]) => {
      let stored = 0;
      for (const f of all) {
        const info = ins.run(
          feedbackKey(f),
          f.cardUuid,
          f.outcome,
          JSON.stringify(f.acceptedSuggestions),
          f.overrideReason?.system ?? null,
          f.overrideReason?.code ?? null,
          f.overrideReason?.display ?? null,
          f.userComment ?? null,
          f.outcomeTimestamp,
          f.receivedAt,
          f.service,
        );
        stored += info.changes;
      }
      return { stored, duplicates: all.length - stored };
    });
    return tx.immediate(rows);
  }

  async feedbackFor(adviceId: string): Promise<FeedbackRow[]> {
    const rows = this.db
      .prepare(
        `SELECT f.* FROM feedback f JOIN advice_card c ON c.card_uuid = f.card_uuid WHERE c.advice_id = ? ORDER BY f.outcome_timestamp, f.rowid`,
      )
      .all(adviceId) as Array<Record<string, string | null>>;
    return rows.map(rowToFeedback);
  }

  async feedbackStats(q: { from?: string; to?: string; service?: string }): Promise<FeedbackStats> {
    const w = new Where('sqlite')
      .maybe(q.service, (p) => `c.service = ${p}`)
      .maybe(q.from, (p) => `a.recorded_at >= ${p}`)
      .maybe(q.to, (p) => `a.recorded_at <= ${p}`);
    const sql = feedbackStatsSql((t) => t, '', w.sql, w.and);
    const kinds = this.db.prepare(sql.kinds).all(...w.args) as KindRow[];
    const reasons = this.db.prepare(sql.reasons).all(...w.args) as ReasonRow[];
    return feedbackStatsOf(kinds, reasons);
  }

  async verifyChain(): Promise<{ ok: boolean; checked: number; firstBadSeq?: number }> {
    let prev = GENESIS;
    let checked = 0;
    for (const row of this.db
      .prepare('SELECT seq, record, format, outputs, inputs, prev_hash, hash FROM advice ORDER BY seq')
      .iterate() as IterableIterator<AdviceRow>) {
      checked += 1;
      if (row.prev_hash !== prev || !rowHashMatches(prev, row, row.hash)) return { ok: false, checked, firstBadSeq: row.seq };
      prev = row.hash;
    }
    return { ok: true, checked };
  }

  async ping(): Promise<void> {
    this.db.prepare('SELECT 1').get();
  }

  async close(): Promise<void> {
    this.closing = true;
    const w = this.writer;
    if (w) {
      // Appends already handed to the writer are committed (and answered) first.
      if (this.waiting.size) await new Promise<void>((r) => (this.drained = r));
      this.writer = undefined;
      await new Promise<void>((resolve) => {
        const kill = setTimeout(() => void w.terminate(), 5000);
        w.once('exit', () => {
          clearTimeout(kill);
          resolve();
        });
        w.postMessage({ type: 'close' } satisfies WriterIn);
      });
    }
    if (this.db.open) {
      this.flushHere(); // in-memory appends still waiting for their group commit are written first
      this.db.close();
    }
  }
}
