/**
 * Express guards: `requireCdsClient` for discovery, service and feedback calls, `requireAuditAccess`
 * for the audit API. A refusal is a plain 401 with `WWW-Authenticate: Bearer` (RFC 6750 §3) and a body
 * that tells a caller nothing about why; the reason goes to the log, without the token.
 */
import { createHash, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler, Response } from 'express';
import type { ClientIdentity, ClientVerifier } from './client-verifier.js';

/** The slice of a pino logger the guards use. */
export interface WarnLogger {
  warn(obj: Record<string, unknown>, msg: string): void;
}

/** What `requireCdsClient` leaves in `res.locals.client`. */
export type CdsClient = ClientIdentity | { issuer: 'trial-mode' };

/** What `requireAuditAccess` leaves in `res.locals.auditClient`. */
export type AuditClient = { via: 'token' } | ({ via: 'jwt' } & ClientIdentity);

/** The scope an audit-API JWT must carry (our own name). */
export const AUDIT_SCOPE = 'tidemark.audit';

/** Body of every 401: the same for every cause. */
export const UNAUTHORIZED_BODY = {
  resourceType: 'OperationOutcome',
  issue: [{ severity: 'error', code: 'login', details: { text: 'authentication required' } }],
} as const;

const UNAUTHORIZED_JSON = JSON.stringify(UNAUTHORIZED_BODY);

function refuse(res: Response): void {
  res.status(401).set('WWW-Authenticate', 'Bearer').set('Cache-Control', 'no-store').type('application/json').send(UNAUTHORIZED_JSON);
}

/** Path of the request as the client addressed it, without query string or fragment. */
function pathOf(req: Request): string {
  const url = req.originalUrl;
  const cut = url.search(/[?#]/);
  return cut === -1 ? url : url.slice(0, cut);
}

/** `{publicUrl}{path}` with exactly one slash between them. */
export function audienceFor(publicUrl: string, path: string): string {
  return publicUrl.replace(/\/+$/, '') + (path.startsWith('/') ? path : `/${path}`);
}

export interface RequireCdsClientOptions {
  verifier: ClientVerifier;
  /** Public base URL as clients call it (TIDEMARK_PUBLIC_URL). Without it, every verified call is refused. */
  publicUrl: string | undefined;
  /** Local trial mode: let calls through unverified. Must be an explicit choice; never in production. */
  trialMode: boolean;
  log: WarnLogger;
}

/** The verified caller of a CDS Hooks route, as set by `requireCdsClient`. */
export function getCdsClient(res: Response): CdsClient | undefined {
  return (res.locals as { client?: CdsClient }).client;
}

/** The verified caller of the audit API, as set by `requireAuditAccess`. */
export function getAuditClient(res: Response): AuditClient | undefined {
  return (res.locals as { auditClient?: AuditClient }).auditClient;
}

/**
 * Guards a CDS Hooks route; on success sets `res.locals.client`. The expected audience is `publicUrl`
 * + the path called, without the query (CDS Hooks 2.0: aud is the exact URL of the endpoint).
 */
export function requireCdsClient(opts: RequireCdsClientOptions): RequestHandler {
  const { verifier, publicUrl, trialMode, log } = opts;
  if (trialMode) {
    log.warn({ trialMode: true }, 'trial mode: CDS client tokens are NOT verified; never use this in production');
    return (_req, res, next) => {
      res.locals['client'] = { issuer: 'trial-mode' } satisfies CdsClient;
      next();
    };
  }
  if (verifier.issuerCount === 0) log.warn({ issuers: 0 }, 'no trusted CDS clients configured: every call will be refused');
  if (publicUrl === undefined) log.warn({ publicUrl: null }, 'TIDEMARK_PUBLIC_URL is not set: every call will be refused');

  return async (req, res, next) => {
    const path = pathOf(req);
    if (publicUrl === undefined) {
      log.warn({ reason: 'public url not configured', method: req.method, path }, 'cds client refused');
      refuse(res);
      return;
    }
    const audience = audienceFor(publicUrl, path);
    const result = await verifier.verify(req.get('authorization'), audience);
    if (!result.ok) {
      log.warn({ ...refusalFields(result, audience), method: req.method, path }, 'cds client refused');
      refuse(res);
      return;
    }
    const client: ClientIdentity =
      result.tenant === undefined
        ? { issuer: result.issuer, jti: result.jti }
        : { issuer: result.issuer, tenant: result.tenant, jti: result.jti };
    res.locals['client'] = client;
    next();
  };
}

/**
 * The log fields of a refusal: the reason, the issuer when it is a configured one, and on an audience mismatch
 * the audience we expected (our own URL, so an operator can fix TIDEMARK_PUBLIC_URL), never the token's.
 */
function refusalFields(result: { reason: string; issuer?: string }, audience: string): Record<string, string> {
  return {
    reason: result.reason,
    ...(result.issuer !== undefined && { issuer: result.issuer }),
    ...(result.reason === 'aud mismatch' && { expectedAudience: audience }),
  };
}

export interface RequireAuditAccessOptions {
  /** Static bearer token for the audit API (TIDEMARK_AUDIT_TOKEN), at least 16 characters. */
  auditToken?: string | undefined;
  /**
   * Verifier over the audit readers (the config file's `auditReaders`, not the CDS issuers); aud must be
   * `{publicUrl}/audit`.
   */
  verifier?: ClientVerifier | undefined;
  publicUrl: string | undefined;
  /** Scope the JWT must carry; defaults to `tidemark.audit`. */
  requiredScope?: string;
  log?: WarnLogger;
}

const digest = (s: string): Buffer => createHash('sha256').update(s, 'utf8').digest();

/** Matches a presented static token in constant time (over SHA-256 digests, so its length does not leak). */
export function staticTokenMatcher(token: string): (presented: string) => boolean {
  const expected = digest(token);
  return (presented) => timingSafeEqual(digest(presented), expected);
}

/** The credential of an `Authorization: Bearer <credential>` header, if that is its shape. */
const bearerCredential = (header: string): string | undefined => /^Bearer +(\S+)$/i.exec(header)?.[1];

/**
 * Guards the audit API. It accepts either the configured static token (compared in constant time) or a
 * JWT with the audit scope from an issuer the `verifier` trusts (in the service: the audit readers only, so a
 * CDS client's own token never opens it). With neither configured it refuses everything, trial mode or not.
 */
export function requireAuditAccess(opts: RequireAuditAccessOptions): RequestHandler {
  const { auditToken, verifier, publicUrl, log } = opts;
  const requiredScope = opts.requiredScope ?? AUDIT_SCOPE;
  if (auditToken !== undefined && auditToken.length < 16) throw new Error('audit token must be at least 16 characters');
  const expected = auditToken === undefined ? undefined : staticTokenMatcher(auditToken);
  const jwtAudience = publicUrl === undefined ? undefined : audienceFor(publicUrl, '/audit');
  const jwtUsable = verifier !== undefined && verifier.issuerCount > 0 && jwtAudience !== undefined;
  if (expected === undefined && !jwtUsable)
    log?.warn({ audit: 'closed' }, 'no audit credential configured: the audit API refuses every call');

  return async (req, res, next) => {
    const path = pathOf(req);
    const denied = (reason: string, issuer?: string): void => {
      log?.warn(
        { ...refusalFields(issuer === undefined ? { reason } : { reason, issuer }, jwtAudience ?? ''), method: req.method, path },
        'audit access refused',
      );
      refuse(res);
    };
    if (expected === undefined && !jwtUsable) return denied('no audit credential configured');

    const header = req.get('authorization');
    if (header === undefined || header === '') return denied('missing authorization');
    const presented = bearerCredential(header);
    if (presented === undefined) return denied('not a bearer credential');

    if (expected?.(presented)) {
      res.locals['auditClient'] = { via: 'token' } satisfies AuditClient;
      return next();
    }
    const looksLikeJwt = presented.split('.').length === 3;
    if (!jwtUsable || verifier === undefined || jwtAudience === undefined || !looksLikeJwt) return denied('audit token mismatch');

    const result = await verifier.verify(header, jwtAudience, { requiredScope });
    if (!result.ok) return denied(result.reason, result.issuer);
    const client: AuditClient =
      result.tenant === undefined
        ? { via: 'jwt', issuer: result.issuer, jti: result.jti }
        : { via: 'jwt', issuer: result.issuer, tenant: result.tenant, jti: result.jti };
    res.locals['auditClient'] = client;
    return next();
  };
}

export interface RequireMetricsAccessOptions {
  /** Bearer token /metrics requires (TIDEMARK_METRICS_TOKEN), at least 16 characters; absent, /metrics is open. */
  metricsToken?: string | undefined;
  log: WarnLogger;
}

/**
 * Guards /metrics with a static bearer token of its own (compared in constant time over SHA-256 digests, as the
 * audit token). Without one configured it lets every call through, as /healthz and /readyz do.
 */
export function requireMetricsAccess(opts: RequireMetricsAccessOptions): RequestHandler {
  const { metricsToken, log } = opts;
  if (metricsToken === undefined) return (_req, _res, next) => next();
  if (metricsToken.length < 16) throw new Error('metrics token must be at least 16 characters');
  const matches = staticTokenMatcher(metricsToken);
  return (req, res, next) => {
    const presented = bearerCredential(req.get('authorization') ?? '');
    if (presented !== undefined && matches(presented)) return next();
    log.warn(
      { reason: presented === undefined ? 'missing authorization' : 'metrics token mismatch', method: req.method, path: pathOf(req) },
      'metrics access refused',
    );
    refuse(res);
  };
}
