/**
 * Used-`jti` memory (CDS Hooks 2.0 §Trusting CDS Clients: reject a repeated jti, keep used ones until
 * their exp). The interface is small so a shared store can replace the in-memory one: with the PostgreSQL
 * audit store every replica uses one table (src/audit/postgres-replay-cache.ts); with SQLite the memory is
 * this process's own.
 */

export interface ReplayCache {
  /**
   * Records `jti` as used until `expSeconds` (seconds since epoch) and reports whether it had already
   * been recorded and not yet expired. Must be atomic: of two concurrent calls with one jti, one sees true.
   * A shared cache answers asynchronously and throws when it cannot answer (the token is then refused).
   */
  seen(jti: string, expSeconds: number): boolean | Promise<boolean>;
}

/**
 * Single-process replay cache. Entries are dropped once expired; a sweep runs at most once per
 * `sweepEverySeconds`, so memory is bounded by the number of tokens accepted in one token lifetime.
 */
export class InMemoryReplayCache implements ReplayCache {
  readonly #entries = new Map<string, number>();
  readonly #nowMs: () => number;
  readonly #sweepEverySeconds: number;
  #lastSweep = Number.NEGATIVE_INFINITY;

  constructor(opts: { nowMs?: () => number; sweepEverySeconds?: number } = {}) {
    this.#nowMs = opts.nowMs ?? Date.now;
    this.#sweepEverySeconds = opts.sweepEverySeconds ?? 30;
  }

  seen(jti: string, expSeconds: number): boolean {
    const now = this.#nowMs() / 1000;
    if (now - this.#lastSweep >= this.#sweepEverySeconds) this.#sweep(now);
    const until = this.#entries.get(jti);
    if (until !== undefined && until > now) return true;
    this.#entries.set(jti, expSeconds);
    return false;
  }

  /** Number of remembered jti values (for tests and metrics). */
  get size(): number {
    return this.#entries.size;
  }

  #sweep(now: number): void {
    this.#lastSweep = now;
    for (const [jti, until] of this.#entries) if (until <= now) this.#entries.delete(jti);
  }
}
