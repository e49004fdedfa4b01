/**
 * A remote JWKS (RFC 7517 §5) fetched from one configured URL, cached, and refetched on an unknown
 * `kid` at most once per cooldown window (CDS Hooks best practice: cache the JWKS, refetch on an
 * unknown kid). Written as a small wrapper over jose's createLocalJWKSet instead of
 * createRemoteJWKSet so the clock is injectable and the rate limit is testable.
 *
 * Only URLs from the configuration ever reach this module; a `jku` header is matched against the
 * allowlist before any fetch (see client-verifier.ts).
 */
import { createLocalJWKSet, errors, type CryptoKey, type FlattenedJWSInput, type JSONWebKeySet, type JWSHeaderParameters } from 'jose';

/** Fetches and parses a JWKS document. Throws on any transport or HTTP error. */
export type FetchJwks = (url: string, signal: AbortSignal) => Promise<unknown>;

export interface RemoteKeySetOptions {
  /** Least time between two fetches while keys are cached (unknown-kid refetch), ms. */
  cooldownMs?: number;
  /** Cached keys are used for at most this long before a refresh, ms. */
  maxAgeMs?: number;
  /** Least time between attempts while no usable keys are cached (endpoint down), ms. */
  failureBackoffMs?: number;
  /** Fetch timeout, ms. */
  timeoutMs?: number;
}

const MAX_JWKS_BYTES = 256 * 1024;
const MAX_KEYS = 64;

/** Raised when no usable key set can be had; the verifier turns it into 'jwks unavailable'. */
export class KeySetUnavailableError extends Error {
  override name = 'KeySetUnavailableError';
  readonly code = 'TIDEMARK_JWKS_UNAVAILABLE';
}

/** Default fetcher: GET with a timeout, no redirects, 200 only, body capped at 256 KiB. */
export const fetchJwksOverHttp: FetchJwks = async (url, signal) => {
  const res = await fetch(url, {
    method: 'GET',
    redirect: 'error',
    signal,
    headers: { accept: 'application/jwk-set+json, application/json' },
  });
  if (res.status !== 200) {
    await res.body?.cancel();
    throw new KeySetUnavailableError(`JWKS endpoint answered HTTP ${res.status}`);
  }
  const declared = Number(res.headers.get('content-length') ?? '0');
  if (declared > MAX_JWKS_BYTES) {
    await res.body?.cancel();
    throw new KeySetUnavailableError('JWKS document too large');
  }
  const reader = res.body?.getReader();
  if (reader === undefined) throw new KeySetUnavailableError('JWKS response has no body');
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > MAX_JWKS_BYTES) {
      await reader.cancel();
      throw new KeySetUnavailableError('JWKS document too large');
    }
    chunks.push(value);
  }
  return JSON.parse(Buffer.concat(chunks).toString('utf8')) as unknown;
};

/** Keeps public EC and RSA signature keys only; anything else in a published set is ignored. */
export function publicSignatureKeys(doc: unknown): JSONWebKeySet {
  if (typeof doc !== 'object' || doc === null || !Array.isArray((doc as { keys?: unknown }).keys)) {
    throw new KeySetUnavailableError('JWKS document has no keys array');
  }
  const keys = (doc as { keys: unknown[] }).keys
    .filter((k): k is Record<string, unknown> => typeof k === 'object' && k !== null && !Array.isArray(k))
    .filter((k) => (k['kty'] === 'EC' || k['kty'] === 'RSA') && !('d' in k) && typeof k['kid'] === 'string')
    .slice(0, MAX_KEYS);
  return { keys } as JSONWebKeySet;
}

type KeyResolver = ReturnType<typeof createLocalJWKSet>;

export class RemoteKeySet {
  readonly url: string;
  readonly #fetch: FetchJwks;
  readonly #nowMs: () => number;
  readonly #cooldownMs: number;
  readonly #maxAgeMs: number;
  readonly #failureBackoffMs: number;
  readonly #timeoutMs: number;
  #keys: KeyResolver | undefined;
  #fetchedAt = Number.NEGATIVE_INFINITY;
  #lastAttemptAt = Number.NEGATIVE_INFINITY;
  #inflight: Promise<void> | undefined;

  constructor(url: string, fetchJwks: FetchJwks, nowMs: () => number, opts: RemoteKeySetOptions = {}) {
    this.url = url;
    this.#fetch = fetchJwks;
    this.#nowMs = nowMs;
    this.#cooldownMs = opts.cooldownMs ?? 30_000;
    this.#maxAgeMs = opts.maxAgeMs ?? 600_000;
    this.#failureBackoffMs = opts.failureBackoffMs ?? 5_000;
    this.#timeoutMs = opts.timeoutMs ?? 5_000;
  }

  /** A jose key resolver: pass `(header, token) => set.getKey(header, token)` to jwtVerify. */
  async getKey(header: JWSHeaderParameters, token: FlattenedJWSInput): Promise<CryptoKey> {
    if (this.#inflight) await this.#inflight.catch(() => undefined);
    if (!this.#usable()) {
      if (this.#nowMs() - this.#lastAttemptAt >= this.#failureBackoffMs) await this.#reload().catch(() => undefined);
      if (!this.#usable() || this.#keys === undefined) throw new KeySetUnavailableError('no usable JWKS');
    }
    const keys = this.#keys;
    if (keys === undefined) throw new KeySetUnavailableError('no usable JWKS');
    try {
      return await keys(header, token);
    } catch (e) {
      if (!(e instanceof errors.JWKSNoMatchingKey)) throw e;
      // Unknown kid: perhaps the client rotated its keys. Refetch, but not more than once per cooldown.
      if (this.#nowMs() - this.#lastAttemptAt < this.#cooldownMs) throw e;
      await this.#reload().catch(() => undefined);
      const fresh = this.#keys;
      if (fresh === undefined || fresh === keys) throw e;
      return fresh(header, token);
    }
  }

  #usable(): boolean {
    return this.#keys !== undefined && this.#nowMs() - this.#fetchedAt < this.#maxAgeMs;
  }

  /** One fetch in flight per URL; concurrent callers share it. */
  #reload(): Promise<void> {
    if (this.#inflight) return this.#inflight;
    this.#lastAttemptAt = this.#nowMs();
    const attempt = (async () => {
      const doc = await this.#fetch(this.url, AbortSignal.timeout(this.#timeoutMs));
      this.#keys = createLocalJWKSet(publicSignatureKeys(doc));
      this.#fetchedAt = this.#nowMs();
    })();
    this.#inflight = attempt;
    attempt
      .finally(() => {
        if (this.#inflight === attempt) this.#inflight = undefined;
      })
      .catch(() => undefined);
    return attempt;
  }
}
