/**
 * The jti replay cache shared by every replica that uses one PostgreSQL audit schema (CDS Hooks 2.0 §Trusting
 * CDS Clients: a jti is refused once seen, until the token could no longer pass anyway). One row per used
 * `iss jti` pair, keyed by its SHA-256 (fixed width, whatever the issuer URL's length), with the time it may be
 * forgotten.
 *
 * The check and the record are one statement: an INSERT that, on a key already present, overwrites the row only
 * when it has expired, and returns a row only when it inserted or overwrote. Of two replicas sending the same key
 * at once, PostgreSQL makes the second wait for the first's row and then take the conflict branch, so exactly one
 * of them is told "not seen". Expired rows are deleted by whichever replica finds the last purge over a minute old.
 */
import { createHash } from 'node:crypto';
import type pg from 'pg';
import type { ReplayCache } from '../auth/replay-cache.js';

export interface PostgresReplayCacheOptions {
  nowMs?: () => number;
  /** Least time between two purges of expired rows by this replica, seconds (default 60). */
  purgeEverySeconds?: number;
}

/** The table's DDL, for the audit store's schema set-up. `s` is the quoted schema name. */
export function replayTableDdl(s: string): string {
  return `CREATE TABLE IF NOT EXISTS ${s}.jti_seen (
      key_hash TEXT PRIMARY KEY,
      forget_after DOUBLE PRECISION NOT NULL
    )`;
}

export class PostgresReplayCache implements ReplayCache {
  readonly #pool: pg.Pool;
  readonly #table: string;
  readonly #nowMs: () => number;
  readonly #purgeEverySeconds: number;
  #lastPurge = Number.NEGATIVE_INFINITY;

  /** @param s the quoted schema name of the audit store */
  constructor(pool: pg.Pool, s: string, opts: PostgresReplayCacheOptions = {}) {
    this.#pool = pool;
    this.#table = `${s}.jti_seen`;
    this.#nowMs = opts.nowMs ?? Date.now;
    this.#purgeEverySeconds = opts.purgeEverySeconds ?? 60;
  }

  async seen(key: string, expSeconds: number): Promise<boolean> {
    const now = this.#nowMs() / 1000;
    if (now - this.#lastPurge >= this.#purgeEverySeconds) {
      this.#lastPurge = now;
      await this.#pool.query(`DELETE FROM ${this.#table} WHERE forget_after <= $1`, [now]);
    }
    const r = await this.#pool.query(
      `INSERT INTO ${this.#table} AS t (key_hash, forget_after) VALUES ($1, $2)
       ON CONFLICT (key_hash) DO UPDATE SET forget_after = EXCLUDED.forget_after WHERE t.forget_after <= $3
       RETURNING 1`,
      [createHash('sha256').update(key, 'utf8').digest('hex'), expSeconds, now],
    );
    return (r.rowCount ?? 0) === 0;
  }
}
