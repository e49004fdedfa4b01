/**
 * PostgreSQL audit store: the shared store when several service replicas run behind a load balancer.
 * Same tables and the same answers as the SQLite adapter (sqlite-store.ts), in one schema of our own.
 *
 * Why it is built this way:
 * - The hash chain must stay linear however many replicas append at once, so each append takes a
 *   transaction-scoped advisory lock keyed on the schema, reads the last hash, inserts, and commits
 *   (the lock is released at commit). seq is an identity column taken under that lock, so seq order is chain order.
 * - The record is kept as the JSON text that was hashed (a text column, not jsonb, which would reorder
 *   keys and normalise numbers), so verifyChain recomputes the same hash from the same bytes.
 * - Text that is compared or sorted (recorded_at, card_kind, reason_code, outcome_timestamp) uses the "C"
 *   collation: byte order, as SQLite's BINARY, whatever the database's default collation is.
 */
import { createHash } from 'node:crypto';
import pg from 'pg';
import type { PoolClient } from 'pg';
import { GENESIS } from './chain.js';
import {
  asBuffer,
  compressRecordAsync,
  decodeRow,
  rowHashMatches,
  serialiseRecord,
  storedAdviceOf,
  storedHash,
  type StoredParts,
} from './record-format.js';
import { PostgresReplayCache, type PostgresReplayCacheOptions } from './postgres-replay-cache.js';
import { feedbackKey, MAX_BATCH, normaliseOverview, ownerOf, summarize } from './shared.js';
import { MIGRATIONS, SCHEMA_VERSION } from './sql/migrations.js';
import { feedbackCountsOf, feedbackStatsOf, feedbackStatsSql, rowToFeedback, type KindRow, type ReasonRow } from './sql/rows.js';
import { adviceFilters, recordFilters, Where } from './sql/where.js';
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

export interface PostgresAuditStoreOptions {
  /** Schema that holds the tables (default `tidemark`). Letters, digits and underscores only. */
  schema?: string;
  /** Connections in this replica's pool (default 10). */
  poolSize?: number;
  /** Called when an idle pooled connection fails (e.g. the server restarted); the pool replaces it. */
  onError?: (err: Error) => void;
}

const SCHEMA_NAME = /^[A-Za-z_][A-Za-z0-9_]{0,62}$/;
const VERIFY_PAGE = 500;

/** A signed 64-bit advisory lock key from a purpose and the schema name: the same in every replica. */
function lockKey(purpose: string, schema: string): string {
  return createHash('sha256').update(`tidemark-audit:${purpose}:${schema}`).digest().readBigInt64BE(0).toString();
}

interface AdviceRow {
  seq: string;
  record: string;
  format: number | null;
  outputs: Uint8Array | null;
  /** Not selected by list(), which needs the outputs only. */
  inputs?: Uint8Array | null;
  prev_hash: string;
  hash: string;
}

// The record text read as json (not jsonb, which refuses a \u0000 anywhere in the text), for the advice row aliased `a`.
/** The most urgent indicator of the answer's cards (see TopIndicator). */
const TOP_INDICATOR = `(SELECT CASE MAX(CASE x->>'indicator' WHEN 'critical' THEN 3 WHEN 'warning' THEN 2 WHEN 'info' THEN 1 ELSE 0 END)
  WHEN 3 THEN 'critical' WHEN 2 THEN 'warning' WHEN 1 THEN 'info' ELSE 'none' END FROM json_array_elements(a.record::json -> 'cards') x)`;
const verdictOf = (v: 'responsiveness' | 'tolerance') => `COALESCE(a.record::json #>> '{advice,${v},value}', 'none')`;
/** UTC day and ISO week (its Monday) of the advice row `a`, as text; date arithmetic only, no time zone involved. */
const DAY = 'substr(a.recorded_at, 1, 10)';
const WEEK = `to_char(substr(a.recorded_at, 1, 10)::date - (extract(isodow FROM substr(a.recorded_at, 1, 10)::date)::int - 1), 'YYYY-MM-DD')`;

/**
 * A failed set-up statement, rethrown naming it and the way out: a role with only SELECT and INSERT cannot create
 * what a newer Tidemark adds to an older schema (jti_seen, advice.issuer); the owner role runs the service once.
 */
const explain =
  (stmt: string) =>
  (e: unknown): never => {
    throw new Error(
      `audit store set-up failed at "${stmt.replace(/\s+/g, ' ').slice(0, 80)}" (${(e as Error).message}): run the service once as the owner of the audit schema to create or update its tables`,
    );
  };

export class PostgresAuditStore implements AuditStore {
  readonly kind = 'postgres';
  readonly schema: string;
  private readonly pool: pg.Pool;
  /** Quoted schema identifier for SQL text. */
  private readonly s: string;
  private readonly chainLock: string;
  private readonly initLock: string;
  private closed = false;

  constructor(connectionString: string, opts: PostgresAuditStoreOptions = {}) {
    const schema = opts.schema ?? 'tidemark';
    if (!SCHEMA_NAME.test(schema))
      throw new Error(`audit schema name ${JSON.stringify(schema)} must be letters, digits and underscores (at most 63)`);
    this.schema = schema;
    this.s = `"${schema}"`;
    this.chainLock = lockKey('chain', schema);
    this.initLock = lockKey('init', schema);
    this.pool = new pg.Pool({ connectionString, max: opts.poolSize ?? 10, application_name: 'tidemark-audit' });
    // Without a listener an idle connection's error would crash the process; the next query reports it instead.
    this.pool.on('error', (err) => opts.onError?.(err));
  }

  private async tx<T>(fn: (c: PoolClient) => Promise<T>): Promise<T> {
    const c = await this.pool.connect();
    try {
      await c.query('BEGIN');
      const out = await fn(c);
      await c.query('COMMIT');
      c.release();
      return out;
    } catch (e) {
      try {
        await c.query('ROLLBACK');
        c.release();
      } catch (rollbackError) {
        c.release(rollbackError as Error); // a broken connection is dropped, not returned to the pool
      }
      throw e;
    }
  }

  async init(): Promise<void> {
    await this.tx(async (c) => {
      // Serialises two replicas starting at once: CREATE ... IF NOT EXISTS alone can still race.
      await c.query('SELECT pg_advisory_xact_lock($1::bigint)', [this.initLock]);
      const found = await c.query('SELECT 1 FROM pg_namespace WHERE nspname = $1', [this.schema]);
      // Only create the schema when it is absent, so a pre-created schema needs no CREATE right on the database.
      if (!found.rowCount) await c.query(`CREATE SCHEMA ${this.s}`);
      // Likewise the migrations run only when the schema's recorded version is behind this Tidemark's, so a role
      // with no CREATE right on the schema (only SELECT and INSERT on the tables: append-only) can start against
      // tables the owner role has brought up to date.
      const have = await this.schemaVersionIn(c);
      if (have > SCHEMA_VERSION)
        throw new Error(`audit schema ${this.schema} has version ${have}, newer than this Tidemark's ${SCHEMA_VERSION}: upgrade Tidemark`);
      if (have === SCHEMA_VERSION) return;
      const statements = [
        ...MIGRATIONS.filter((m) => m.version > have).flatMap((m) => m.postgres(this.s)),
        `CREATE TABLE IF NOT EXISTS ${this.s}.schema_version (version INTEGER NOT NULL)`,
        `DELETE FROM ${this.s}.schema_version`,
        `INSERT INTO ${this.s}.schema_version (version) VALUES (${SCHEMA_VERSION})`,
      ];
      for (const stmt of statements) await c.query(stmt).catch(explain(stmt));
    });
  }

  /** The schema version recorded in this schema (0 when written before versions were kept, or not there yet). */
  async schemaVersion(): Promise<number> {
    const c = await this.pool.connect();
    try {
      return await this.schemaVersionIn(c);
    } finally {
      c.release();
    }
  }

  private async schemaVersionIn(c: PoolClient): Promise<number> {
    const t = await c.query("SELECT 1 FROM information_schema.tables WHERE table_schema = $1 AND table_name = 'schema_version'", [
      this.schema,
    ]);
    if (!t.rowCount) return 0;
    const r = await c.query<{ version: number }>(`SELECT MAX(version) AS version FROM ${this.s}.schema_version`);
    return Number(r.rows[0]?.version ?? 0);
  }

  /**
   * Group commit, as the SQLite store does it: appends that arrive while this replica's previous batch is being
   * written go together into the next transaction, which takes the chain lock once, reads the last hash once and
   * commits once (one WAL flush). Each record runs in a SAVEPOINT of its own, so one that is refused (duplicate id,
   * reused card uuid) leaves nothing behind and does not undo the others. Every caller's promise settles only after
   * the transaction holding its record has committed (decision 0002). The texts are compressed on zlib's thread
   * pool before the record joins the queue, so no lock is held while compressing.
   */
  async append(rec: AdviceRecord): Promise<{ seq: number; hash: string }> {
    if (this.closed) throw new Error('the audit store is closed');
    const parts = await compressRecordAsync(serialiseRecord(rec));
    return new Promise((resolve, reject) => {
      this.queue.push({ rec, parts, resolve, reject });
      if (!this.flushing) void this.flush();
    });
  }

  private readonly queue: Array<{
    rec: AdviceRecord;
    parts: StoredParts;
    resolve: (v: { seq: number; hash: string }) => void;
    reject: (e: unknown) => void;
  }> = [];
  private flushing: Promise<void> | undefined;
  private commits = 0;
  private committed = 0;
  /** Batches whose one-statement insert was refused and that were appended record by record instead. */
  batchesRedone = 0;

  /** Group commits so far and the records they committed (this replica's; tidemark_audit_commits at /metrics). */
  commitStats(): { commits: number; records: number } {
    return { commits: this.commits, records: this.committed };
  }

  /** Starts writing after the current turn, so that appends made in one turn of the event loop go in one batch. */
  private flush(): Promise<void> {
    this.flushing = (async () => {
      await new Promise<void>((r) => setImmediate(r));
      while (this.queue.length) {
        const batch = this.queue.splice(0, MAX_BATCH);
        let results: Array<{ ok: true; seq: number; hash: string } | { ok: false; error: unknown }>;
        try {
          results = await this.tx((c) => this.appendBatch(c, batch));
        } catch (e) {
          // BEGIN, the lock or COMMIT failed: nothing of this batch was stored.
          for (const b of batch) b.reject(e);
          continue;
        }
        const ok = results.filter((r) => r.ok).length;
        if (ok) {
          this.commits += 1;
          this.committed += ok;
        }
        batch.forEach((b, i) => {
          const r = results[i];
          if (r?.ok) b.resolve({ seq: r.seq, hash: r.hash });
          else b.reject(r ? r.error : new Error('audit append lost'));
        });
      }
    })().finally(() => {
      this.flushing = undefined;
    });
    return this.flushing;
  }

  /**
   * One batch under the chain lock. First all of it in one statement per table (arrays through unnest, rows
   * inserted in the batch's order, so `seq` order is chain order), inside a savepoint; if that is refused (a
   * duplicate id, a reused card uuid), the savepoint is rolled back and the records go one by one, each in a savepoint
   * of its own, so only the refused ones are left out and the chain links the rest.
   */
  private async appendBatch(
    c: PoolClient,
    batch: ReadonlyArray<{ rec: AdviceRecord; parts: StoredParts }>,
  ): Promise<Array<{ ok: true; seq: number; hash: string } | { ok: false; error: unknown }>> {
    await c.query('SELECT pg_advisory_xact_lock($1::bigint)', [this.chainLock]);
    // A new statement, so its snapshot is taken after the lock: it sees the last committed append.
    const last = await c.query<{ hash: string }>(`SELECT hash FROM ${this.s}.advice ORDER BY seq DESC LIMIT 1`);
    const first = last.rows[0]?.hash ?? GENESIS;
    if (batch.length > 1) {
      await c.query('SAVEPOINT whole_batch');
      try {
        const out = await this.insertRows(c, batch, first);
        await c.query('RELEASE SAVEPOINT whole_batch');
        return out;
      } catch {
        await c.query('ROLLBACK TO SAVEPOINT whole_batch');
        this.batchesRedone += 1;
      }
    }
    let prev = first;
    const out: Array<{ ok: true; seq: number; hash: string } | { ok: false; error: unknown }> = [];
    for (const one of batch) {
      await c.query('SAVEPOINT one_record');
      try {
        const [r] = await this.insertRows(c, [one], prev);
        await c.query('RELEASE SAVEPOINT one_record');
        if (!r) throw new Error('audit append lost');
        prev = r.hash;
        out.push(r);
      } catch (e) {
        await c.query('ROLLBACK TO SAVEPOINT one_record');
        out.push({ ok: false, error: e });
      }
    }
    return out;
  }

  /** Inserts the records chained from `prev`, in order, with their cards: two statements whatever their number. */
  private async insertRows(
    c: PoolClient,
    recs: ReadonlyArray<{ rec: AdviceRecord; parts: StoredParts }>,
    prev: string,
  ): Promise<Array<{ ok: true; seq: number; hash: string }>> {
    const cols: unknown[][] = Array.from({ length: 16 }, () => []);
    const hashes: string[] = [];
    let p = prev;
    for (const { rec, parts } of recs) {
      // The hash covers exactly the bytes stored (src/audit/record-format.ts).
      const hash = storedHash(p, parts);
      const row = [
        rec.id,
        rec.recordedAt,
        rec.service,
        rec.hook,
        rec.hookInstance,
        rec.patientId ?? null,
        rec.encounterId ?? null,
        rec.outcome,
        rec.rulesVersion,
        parts.text,
        p,
        hash,
        rec.client?.issuer ?? null,
        parts.format === 1 ? null : parts.format,
        asBuffer(parts.outputs),
        asBuffer(parts.inputs),
      ];
      row.forEach((v, i) => cols[i]?.push(v));
      hashes.push(hash);
      p = hash;
    }
    // Thirteen text columns, then format, outputs and inputs.
    const types = [...Array<string>(13).fill('text'), 'int', 'bytea', 'bytea'];
    const ins = await c.query<{ id: string; seq: string }>(
      `INSERT INTO ${this.s}.advice (id, recorded_at, service, hook, hook_instance, patient_id, encounter_id, outcome, rules_version, record, prev_hash, hash, issuer,
         format, outputs, inputs)
       SELECT c1, c2, c3, c4, c5, c6, c7, c8, c9, c10, c11, c12, c13, c14, c15, c16
       FROM unnest(${types.map((t, i) => `$${i + 1}::${t}[]`).join(', ')}) WITH ORDINALITY AS u(c1, c2, c3, c4, c5, c6, c7, c8, c9, c10, c11, c12, c13, c14, c15, c16, n)
       ORDER BY n RETURNING id, seq`,
      cols,
    );
    const cards = recs.flatMap(({ rec }) => Object.entries(rec.cardKinds).map(([uuid, kind]) => [uuid, rec.id, kind, rec.service]));
    if (cards.length)
      await c.query(
        `INSERT INTO ${this.s}.advice_card (card_uuid, advice_id, card_kind, service) SELECT * FROM unnest($1::text[], $2::text[], $3::text[], $4::text[])`,
        [0, 1, 2, 3].map((i) => cards.map((row) => row[i])),
      );
    const seqOf = new Map(ins.rows.map((r) => [r.id, Number(r.seq)]));
    return recs.map(({ rec }, i) => ({ ok: true as const, seq: seqOf.get(rec.id) ?? Number.NaN, hash: hashes[i] ?? '' }));
  }

  async get(id: string): Promise<StoredAdvice | undefined> {
    const r = await this.pool.query<AdviceRow>(
      `SELECT seq, record, format, outputs, inputs, prev_hash, hash FROM ${this.s}.advice WHERE id = $1`,
      [id],
    );
    const row = r.rows[0];
    return row ? storedAdviceOf(row) : undefined;
  }

  async list(q: AdviceQuery): Promise<{ items: AdviceSummary[]; nextCursor?: string }> {
    const s = this.s;
    const w = adviceFilters(new Where('postgres'), q, 'a.');
    if (q.cursor) {
      const n = Number(q.cursor);
      // As in SQLite, a cursor that is not a number matches nothing (PostgreSQL would rank NaN above every seq).
      if (Number.isNaN(n)) return { items: [] };
      w.add((p) => `a.seq < ${p}::float8`, String(n));
    }
    recordFilters(w, q, {
      topIndicator: TOP_INDICATOR,
      verdictOf,
      cardFeedback: `SELECT 1 FROM ${s}.advice_card c JOIN ${s}.feedback f ON f.card_uuid = c.card_uuid WHERE c.advice_id = a.id`,
    });
    const r = await this.pool.query<AdviceRow>(
      `SELECT a.seq, a.record, a.format, a.outputs, a.prev_hash, a.hash FROM ${s}.advice a ${w.sql} ORDER BY a.seq DESC LIMIT ${w.param(q.limit + 1)}`,
      w.args,
    );
    // Summaries need the outputs only: the inputs are not read.
    const page = r.rows.slice(0, q.limit).map((row) => ({ ...decodeRow(row, { inputs: false }), seq: Number(row.seq) }));
    const counts = await this.feedbackCounts(page.map((p) => p.id));
    const items = page.map((p) => summarize(p, counts));
    const last = page[page.length - 1];
    return r.rows.length > q.limit && last ? { items, nextCursor: String(last.seq) } : { items };
  }

  async overview(q: OverviewQuery): Promise<OverviewAggregates> {
    const filters = adviceFilters(new Where('postgres'), q, 'a.');
    const { args } = filters;
    const w = filters.sql;
    const s = this.s;
    const all = async <T extends object>(sql: string): Promise<T[]> => (await this.pool.query<T>(sql, args)).rows;
    const [answersByDay, feedbackByWeek, overrideReasonsByWeek, verdictsByWeek, latencyByDay] = await Promise.all([
      all<OverviewAggregates['answersByDay'][number]>(
        `SELECT ${DAY} AS day, a.service AS service, ${TOP_INDICATOR} AS indicator, COUNT(*)::int AS answers FROM ${s}.advice a ${w} GROUP BY 1, 2, 3`,
      ),
      all<OverviewAggregates['feedbackByWeek'][number]>(
        `WITH per_card AS (
           SELECT ${WEEK} AS week, c.card_kind AS kind, c.card_uuid AS card,
             MAX(CASE f.outcome WHEN 'overridden' THEN 2 WHEN 'accepted' THEN 1 ELSE 0 END) AS o
           FROM ${s}.advice_card c JOIN ${s}.advice a ON a.id = c.advice_id LEFT JOIN ${s}.feedback f ON f.card_uuid = c.card_uuid ${w}
           GROUP BY c.card_uuid, 1, 2)
         SELECT week, kind AS "cardKind", COUNT(*)::int AS cards, COUNT(*) FILTER (WHERE o = 1)::int AS accepted,
           COUNT(*) FILTER (WHERE o = 2)::int AS overridden, COUNT(*) FILTER (WHERE o = 0)::int AS "noFeedback"
         FROM per_card GROUP BY week, kind`,
      ),
      all<OverviewAggregates['overrideReasonsByWeek'][number]>(
        `SELECT ${WEEK} AS week, COALESCE(f.reason_code, '(comment only)') AS "reasonCode", COALESCE(MAX(f.reason_display), '') AS "reasonDisplay", COUNT(DISTINCT f.card_uuid)::int AS cards
         FROM ${s}.feedback f JOIN ${s}.advice_card c ON c.card_uuid = f.card_uuid JOIN ${s}.advice a ON a.id = c.advice_id
         ${w ? `${w} AND` : 'WHERE'} f.outcome = 'overridden' GROUP BY 1, 2`,
      ),
      all<OverviewAggregates['verdictsByWeek'][number]>(
        `SELECT ${WEEK} AS week, ${verdictOf('responsiveness')} AS responsiveness, ${verdictOf('tolerance')} AS tolerance, COUNT(*)::int AS answers FROM ${s}.advice a ${w} GROUP BY 1, 2, 3`,
      ),
      // Nearest rank: percentile_disc(p) is the first value whose cumulative share reaches p, the value at rank ⌈p·n⌉.
      all<OverviewAggregates['latencyByDay'][number]>(
        `WITH l AS (SELECT ${DAY} AS day, (a.record::json #>> '{timings,totalMs}')::float8 AS ms FROM ${s}.advice a ${w})
         SELECT day, COUNT(*)::int AS answers, percentile_disc(0.5) WITHIN GROUP (ORDER BY ms) AS "p50Ms", percentile_disc(0.99) WITHIN GROUP (ORDER BY ms) AS "p99Ms"
         FROM l WHERE ms IS NOT NULL GROUP BY day`,
      ),
    ]);
    return normaliseOverview({ answersByDay, feedbackByWeek, overrideReasonsByWeek, verdictsByWeek, latencyByDay });
  }

  /** Cards accepted and cards overridden per advice (distinct cards, as feedbackStats counts them; not feedback rows). */
  private async feedbackCounts(adviceIds: string[]): Promise<Map<string, { accepted: number; overridden: number }>> {
    if (!adviceIds.length) return new Map();
    const r = await this.pool.query<{ advice_id: string; outcome: string; n: number }>(
      `SELECT c.advice_id, f.outcome, COUNT(DISTINCT f.card_uuid)::int AS n FROM ${this.s}.feedback f JOIN ${this.s}.advice_card c ON c.card_uuid = f.card_uuid
       WHERE c.advice_id = ANY($1::text[]) GROUP BY c.advice_id, f.outcome`,
      [adviceIds],
    );
    return feedbackCountsOf(r.rows);
  }

  /** Keyset paging by seq: one short query per batch, no cursor or connection held between batches. */
  async *records(q: RecordStreamQuery): AsyncGenerator<StoredAdvice> {
    const w = new Where('postgres');
    w.raw(`seq > ${w.param('0')}::bigint`); // the keyset bound, set per batch below
    adviceFilters(w, q);
    const batch = Math.max(1, Math.min(Math.trunc(q.batchSize ?? VERIFY_PAGE), 10_000));
    let after = String(Math.trunc(q.afterSeq ?? 0));
    for (;;) {
      w.args[0] = after;
      const r = await this.pool.query<AdviceRow>(
        `SELECT seq, record, format, outputs, inputs, prev_hash, hash FROM ${this.s}.advice ${w.sql} ORDER BY seq LIMIT ${batch}`,
        w.args,
      );
      for (const row of r.rows) {
        after = row.seq;
        yield storedAdviceOf(row);
      }
      if (r.rows.length < batch) return;
    }
  }

  async cardOwner(cardUuid: string): Promise<CardOwner | undefined> {
    // COALESCE evaluates the second argument only for a row written before the issuer column (json, not jsonb:
    // jsonb refuses a \u0000 anywhere in the text).
    const r = await this.pool.query<{ advice_id: string; card_kind: string; service: string; issuer: string | null }>(
      `SELECT c.advice_id, c.card_kind, c.service, COALESCE(a.issuer, a.record::json #>> '{client,issuer}') AS issuer
       FROM ${this.s}.advice_card c JOIN ${this.s}.advice a ON a.id = c.advice_id WHERE c.card_uuid = $1`,
      [cardUuid],
    );
    const row = r.rows[0];
    return row ? ownerOf(row) : undefined;
  }

  /** The jti replay cache every replica on this schema shares (src/audit/postgres-replay-cache.ts). */
  sharedReplayCache(opts: PostgresReplayCacheOptions = {}): PostgresReplayCache {
    return new PostgresReplayCache(this.pool, this.s, opts);
  }

  async addFeedback(rows: FeedbackRow[]): Promise<{ stored: number; duplicates: number }> {
    return this.tx(async (c) => {
      let stored = 0;
      for (const f of rows) {
        const r = await c.query(
          `INSERT INTO ${this.s}.feedback (feedback_key, card_uuid, outcome, accepted_suggestions, reason_system, reason_code, reason_display, user_comment, outcome_timestamp, received_at, service)
           VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11) ON CONFLICT (feedback_key) DO NOTHING`,
          [
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
          ],
        );
        stored += r.rowCount ?? 0;
      }
      return { stored, duplicates: rows.length - stored };
    });
  }

  async feedbackFor(adviceId: string): Promise<FeedbackRow[]> {
    const r = await this.pool.query<Record<string, string | null>>(
      `SELECT f.card_uuid, f.outcome, f.accepted_suggestions, f.reason_system, f.reason_code, f.reason_display, f.user_comment, f.outcome_timestamp, f.received_at, f.service
       FROM ${this.s}.feedback f JOIN ${this.s}.advice_card c ON c.card_uuid = f.card_uuid WHERE c.advice_id = $1 ORDER BY f.outcome_timestamp, f.arrival`,
      [adviceId],
    );
    return r.rows.map(rowToFeedback);
  }

  async feedbackStats(q: { from?: string; to?: string; service?: string }): Promise<FeedbackStats> {
    const w = new Where('postgres')
      .maybe(q.service, (p) => `c.service = ${p}`)
      .maybe(q.from, (p) => `a.recorded_at >= ${p}`)
      .maybe(q.to, (p) => `a.recorded_at <= ${p}`);
    const sql = feedbackStatsSql((t) => `${this.s}.${t}`, '::int', w.sql, w.and);
    const kinds = await this.pool.query<KindRow>(sql.kinds, w.args);
    const reasons = await this.pool.query<ReasonRow>(sql.reasons, w.args);
    return feedbackStatsOf(kinds.rows, reasons.rows);
  }

  async verifyChain(): Promise<{ ok: boolean; checked: number; firstBadSeq?: number }> {
    let prev = GENESIS;
    let checked = 0;
    let after = '0';
    // Pages by seq so a long chain is not held in memory at once.
    for (;;) {
      const r = await this.pool.query<AdviceRow>(
        `SELECT seq, record, format, outputs, inputs, prev_hash, hash FROM ${this.s}.advice WHERE seq > $1::bigint ORDER BY seq LIMIT ${VERIFY_PAGE}`,
        [after],
      );
      for (const row of r.rows) {
        checked += 1;
        if (row.prev_hash !== prev || !rowHashMatches(prev, row, row.hash)) return { ok: false, checked, firstBadSeq: Number(row.seq) };
        prev = row.hash;
        after = row.seq;
      }
      if (r.rows.length < VERIFY_PAGE) return { ok: true, checked };
    }
  }

  async ping(): Promise<void> {
    await this.pool.query('SELECT 1');
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    // Appends already taken are committed (or refused) before the pool ends.
    await this.flushing;
    await this.pool.end();
  }
}
