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
 * Single-process replay cache. Each call first forgets the entries that have expired, earliest first, from a
 * binary min-heap of (expiry, jti) kept beside the map: the work is in proportion to what expires (O(log n)
 * each), never a walk over every remembered jti, so no call pauses the event loop for a sweep. Memory is
 * bounded by the number of tokens accepted in one token lifetime.
 */
export class InMemoryReplayCache implements ReplayCache {
  readonly #entries = new Map<string, number>();
  /** The heap, as two parallel arrays: expiry (seconds) and the jti recorded with it. */
  readonly #untils: number[] = [];
  readonly #jtis: string[] = [];
  readonly #nowMs: () => number;

  constructor(opts: { nowMs?: () => number } = {}) {
    this.#nowMs = opts.nowMs ?? Date.now;
  }

  seen(jti: string, expSeconds: number): boolean {
    // NaN would never compare as expired and would stop the heap's purge behind it; the caller then refuses the token.
    if (Number.isNaN(expSeconds)) throw new TypeError('replay cache: expiry is not a number');
    const now = this.#nowMs() / 1000;
    this.#forgetExpired(now);
    const until = this.#entries.get(jti);
    if (until !== undefined && until > now) return true;
    this.#entries.set(jti, expSeconds);
    this.#push(expSeconds, jti);
    return false;
  }

  /** Number of remembered jti values (for tests and metrics). */
  get size(): number {
    return this.#entries.size;
  }

  #forgetExpired(now: number): void {
    while (this.#untils.length > 0 && (this.#untils[0] as number) <= now) {
      // Each map entry has one heap entry with the same expiry: a jti is recorded again only once its expiry has
      // passed, and by then this loop has already taken its earlier entry out of both.
      this.#entries.delete(this.#jtis[0] as string);
      this.#pop();
    }
  }

  #push(until: number, jti: string): void {
    const u = this.#untils;
    const j = this.#jtis;
    let i = u.length;
    u.push(until);
    j.push(jti);
    while (i > 0) {
      const parent = (i - 1) >> 1;
      if ((u[parent] as number) <= until) break;
      u[i] = u[parent] as number;
      j[i] = j[parent] as string;
      i = parent;
    }
    u[i] = until;
    j[i] = jti;
  }

  #pop(): void {
    const u = this.#untils;
    const j = this.#jtis;
    const lastUntil = u.pop() as number;
    const lastJti = j.pop() as string;
    const n = u.length;
    if (n === 0) return;
    let i = 0;
    for (;;) {
      const left = 2 * i + 1;
      if (left >= n) break;
      const right = left + 1;
      const child = right < n && (u[right] as number) < (u[left] as number) ? right : left;
      if ((u[child] as number) >= lastUntil) break;
      u[i] = u[child] as number;
      j[i] = j[child] as string;
      i = child;
    }
    u[i] = lastUntil;
    j[i] = lastJti;
  }
}
