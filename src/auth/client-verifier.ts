/**
 * Verifies the JWT a CDS client sends with every call (CDS Hooks 2.0 §Trusting CDS Clients and the
 * CDS Hooks best-practices page; RFC 7515, RFC 7519, RFC 8725).
 *
 * Order of checks: Bearer scheme → header (typ, kid, alg pinned: `none` and HMAC are refused before
 * any key lookup) → iss in the allowlist → jku in that issuer's allowlist → key by kid → signature,
 * aud, exp, iat (age cap) → jti, tenant, scope → jti replay. The failure reason is a short fixed
 * string for the log; it never contains the token or any claim value.
 */
import {
  createLocalJWKSet,
  decodeJwt,
  decodeProtectedHeader,
  jwtVerify,
  type JWTPayload,
  type JSONWebKeySet,
  type JWTVerifyGetKey,
} from 'jose';
import { authConfigSchema, type AuthConfig, type TrustedIssuer } from './issuer-config.js';
import { fetchJwksOverHttp, RemoteKeySet, type FetchJwks, type RemoteKeySetOptions } from './jwks-source.js';
import { InMemoryReplayCache, type ReplayCache } from './replay-cache.js';

/** Who called, once the token checked out. */
export interface ClientIdentity {
  issuer: string;
  tenant?: string;
  jti: string;
}

export type VerifyResult =
  | ({ ok: true } & ClientIdentity)
  /** `issuer` is set only when the token named a configured issuer. */
  | { ok: false; reason: string; issuer?: string };

export interface VerifyOptions {
  /** A scope the token's space-separated `scope` claim must contain (used by the audit API). */
  requiredScope?: string;
}

export interface ClientVerifier {
  /**
   * @param authorizationHeader the raw `Authorization` header, or undefined when absent
   * @param audience the exact public URL of the endpoint being called (the expected `aud`)
   */
  verify(authorizationHeader: string | undefined, audience: string, opts?: VerifyOptions): Promise<VerifyResult>;
  /** Number of trusted issuers; 0 means every call is refused. */
  readonly issuerCount: number;
}

export interface ClientVerifierDeps {
  fetchJwks?: FetchJwks;
  now?: () => Date;
  replayCache?: ReplayCache;
  /** Cache and rate-limit settings for remote key sets (defaults: 30 s cooldown, 10 min max age). */
  keySet?: RemoteKeySetOptions;
}

/** Longest token accepted; headers are size-capped by Node anyway, this keeps parsing cheap. */
const MAX_TOKEN_CHARS = 8192;
const MAX_JTI_CHARS = 256;
/** RFC 6750 §2.1 b64token, as a JWS compact serialisation: three base64url parts. */
const BEARER = /^Bearer +([A-Za-z0-9_-]+\.[A-Za-z0-9_-]+\.[A-Za-z0-9_-]*)$/i;
const ANY_BEARER = /^Bearer +\S+$/i;

type Fail = { ok: false; reason: string; issuer?: string };
const fail = (reason: string, issuer?: string): Fail => (issuer === undefined ? { ok: false, reason } : { ok: false, reason, issuer });

/** Builds a verifier over the trusted issuers. `cfg` is validated again here so a bad value fails at start. */
export function createClientVerifier(cfg: AuthConfig, deps: ClientVerifierDeps = {}): ClientVerifier {
  const config = authConfigSchema.parse(cfg);
  const now = deps.now ?? (() => new Date());
  const nowMs = () => now().getTime();
  const replay = deps.replayCache ?? new InMemoryReplayCache({ nowMs });
  const fetchJwks = deps.fetchJwks ?? fetchJwksOverHttp;

  const issuers = new Map<string, TrustedIssuer>(config.issuers.map((i) => [i.iss, i]));
  // Every URL we may ever fetch is known now; nothing from a token can add one.
  const remote = new Map<string, RemoteKeySet>();
  const local = new Map<string, JWTVerifyGetKey>();
  for (const i of config.issuers) {
    for (const url of [i.jwksUrl, ...(i.allowedJku ?? [])]) {
      if (url !== undefined && !remote.has(url)) remote.set(url, new RemoteKeySet(url, fetchJwks, nowMs, deps.keySet));
    }
    if (i.jwks !== undefined) local.set(i.iss, createLocalJWKSet(i.jwks as JSONWebKeySet));
  }
  const remoteResolver = (url: string): JWTVerifyGetKey | undefined => {
    const set = remote.get(url);
    return set && ((header, token) => set.getKey(header, token));
  };

  async function verify(authorizationHeader: string | undefined, audience: string, opts: VerifyOptions = {}): Promise<VerifyResult> {
    if (issuers.size === 0) return fail('no trusted issuers configured');
    if (authorizationHeader === undefined || authorizationHeader === '') return fail('missing authorization');
    if (!ANY_BEARER.test(authorizationHeader)) return fail('not a bearer credential');
    if (authorizationHeader.length > MAX_TOKEN_CHARS) return fail('token too large');
    const token = BEARER.exec(authorizationHeader)?.[1];
    if (token === undefined) return fail('malformed token');

    let header: ReturnType<typeof decodeProtectedHeader>;
    let unverified: JWTPayload;
    try {
      header = decodeProtectedHeader(token);
      unverified = decodeJwt(token);
    } catch {
      return fail('malformed token');
    }
    // Pin the algorithm before anything else touches a key (RFC 8725 §3.1; CDS Hooks 2.0 §6).
    if (typeof header.alg !== 'string' || !(config.algorithms as readonly string[]).includes(header.alg)) return fail('alg not allowed');
    if (typeof header.typ !== 'string' || header.typ.toUpperCase() !== 'JWT') return fail('typ not JWT');
    if (typeof header.kid !== 'string' || header.kid === '') return fail('kid missing');

    if (typeof unverified.iss !== 'string') return fail('iss missing');
    const issuer = issuers.get(unverified.iss);
    if (issuer === undefined) return fail('unknown issuer');
    const iss = issuer.iss;

    let keys: JWTVerifyGetKey | undefined;
    if (header.jku !== undefined) {
      if (typeof header.jku !== 'string' || !(issuer.allowedJku ?? []).includes(header.jku)) return fail('jku not allowed', iss);
      keys = remoteResolver(header.jku);
    } else if (issuer.jwks !== undefined) {
      keys = local.get(iss);
    } else if (issuer.jwksUrl !== undefined) {
      keys = remoteResolver(issuer.jwksUrl);
    }
    if (keys === undefined) return fail('no key source', iss);

    let payload: JWTPayload;
    try {
      ({ payload } = await jwtVerify(token, keys, {
        algorithms: [...config.algorithms],
        issuer: iss,
        audience,
        typ: 'JWT',
        requiredClaims: ['exp', 'iat', 'jti'],
        clockTolerance: config.clockSkewSeconds,
        maxTokenAge: config.maxTokenAgeSeconds,
        currentDate: now(),
      }));
    } catch (e) {
      return fail(reasonFor(e), iss);
    }

    const { jti, tenant, exp, iat } = payload;
    if (typeof jti !== 'string' || jti === '' || jti.length > MAX_JTI_CHARS) return fail('jti invalid', iss);
    if (tenant !== undefined && typeof tenant !== 'string') return fail('tenant invalid', iss);
    if (issuer.tenants !== undefined && (tenant === undefined || !issuer.tenants.includes(tenant))) return fail('tenant not allowed', iss);
    if (opts.requiredScope !== undefined) {
      const scopes = typeof payload['scope'] === 'string' ? payload['scope'].split(' ') : [];
      if (!scopes.includes(opts.requiredScope)) return fail('scope missing', iss);
    }
    // jose has checked exp and iat are numbers. A token is dead at exp, and also once its iat is older
    // than the age cap, so the jti need be kept only until the earlier of the two (plus skew).
    const retainUntil = Math.min(exp as number, (iat as number) + config.maxTokenAgeSeconds) + config.clockSkewSeconds;
    let replayed: boolean;
    try {
      replayed = await replay.seen(`${iss} ${jti}`, retainUntil);
    } catch {
      return fail('replay cache unavailable', iss); // fail closed: a jti we cannot check is not accepted
    }
    if (replayed) return fail('jti replayed', iss);

    return tenant === undefined ? { ok: true, issuer: iss, jti } : { ok: true, issuer: iss, tenant, jti };
  }

  return {
    verify: async (h, aud, opts) => {
      try {
        return await verify(h, aud, opts);
      } catch {
        return fail('verification error');
      }
    },
    issuerCount: issuers.size,
  };
}

/** Maps jose's error codes to the short reasons we log. Claim names come from jose, never from the token. */
function reasonFor(e: unknown): string {
  const err = e as { code?: unknown; claim?: unknown; reason?: unknown };
  switch (err.code) {
    case 'ERR_JWT_EXPIRED':
      return err.claim === 'iat' ? 'iat too old' : 'token expired';
    case 'ERR_JWT_CLAIM_VALIDATION_FAILED': {
      const claim = typeof err.claim === 'string' ? err.claim : 'claim';
      if (err.reason === 'missing') return `${claim} missing`;
      if (err.reason !== 'check_failed') return `${claim} invalid`;
      switch (claim) {
        case 'aud':
          return 'aud mismatch';
        case 'iss':
          return 'iss mismatch';
        case 'iat':
          return 'iat in future';
        case 'nbf':
          return 'not yet valid';
        case 'typ':
          return 'typ not JWT';
        default:
          return `${claim} invalid`;
      }
    }
    case 'ERR_JWS_SIGNATURE_VERIFICATION_FAILED':
      return 'bad signature';
    case 'ERR_JWKS_NO_MATCHING_KEY':
      return 'unknown kid';
    case 'ERR_JWKS_MULTIPLE_MATCHING_KEYS':
      return 'ambiguous kid';
    case 'ERR_JOSE_ALG_NOT_ALLOWED':
    case 'ERR_JOSE_NOT_SUPPORTED':
      return 'alg not allowed';
    case 'ERR_JWKS_TIMEOUT':
    case 'ERR_JWKS_INVALID':
    case 'TIDEMARK_JWKS_UNAVAILABLE':
      return 'jwks unavailable';
    case 'ERR_JWS_INVALID':
    case 'ERR_JWT_INVALID':
    case 'ERR_JWK_INVALID':
      return 'malformed token';
    default:
      return 'verification failed';
  }
}
