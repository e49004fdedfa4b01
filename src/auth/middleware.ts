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
  res
    .status(401)
    .set('WWW-Authenticate', 'Bearer')
    .set('Cache-Control', 'no-store')
    .type('application/json')
    .send(UNAUTHORIZED_JSON);
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
    const result = await verifier.verify(req.get('authorization'), audienceFor(publicUrl, path));
    if (!result.ok) {
      log.warn(
        { reason: result.reason, ...(result.issuer !== undefined && { issuer: result.issuer }), method: req.method, path },
        'cds client refused',
      );
      refuse(res);
      return;
    }
    const client: ClientIdentity =
      result.tenant === undefined ? { issuer: result.issuer, jti: result.jti } : { issuer: result.issuer, tenant: result.tenant, jti: result.jti };
    res.locals['client'] = client;
    next();
  };
}

export interface RequireAuditAccessOptions {
  /** Static bearer token for the audit API (TIDEMARK_AUDIT_TOKEN), at least 16 characters. */
  auditToken?: string | undefined;
  /** Verifier for audit-scoped JWTs from trusted issuers; aud must be `{publicUrl}/audit`. */
  verifier?: ClientVerifier | undefined;
  publicUrl: string | undefined;
  /** Scope the JWT must carry; defaults to `tidemark.audit`. */
  requiredScope?: string;
  log?: WarnLogger;
}

const digest = (s: string): Buffer => createHash('sha256').update(s, 'utf8').digest();

/**
 * Guards the audit API. It accepts either the configured static token (compared in constant time) or a
 * JWT with the audit scope. With neither configured it refuses everything, trial mode or not.
 */
export function requireAuditAccess(opts: RequireAuditAccessOptions): RequestHandler {
  const { auditToken, verifier, publicUrl, log } = opts;
  const requiredScope = opts.requiredScope ?? AUDIT_SCOPE;
  if (auditToken !== undefined && auditToken.length < 16) throw new Error('audit token must be at least 16 characters');
  const expected = auditToken === undefined ? undefined : digest(auditToken);
  const jwtAudience = publicUrl === undefined ? undefined : audienceFor(publicUrl, '/audit');
  const jwtUsable = verifier !== undefined && verifier.issuerCount > 0 && jwtAudience !== undefined;
  if (expected === undefined && !jwtUsable) log?.warn({ audit: 'closed' }, 'no audit credential configured: the audit API refuses every call');

  return async (req, res, next) => {
    const path = pathOf(req);
    const denied = (reason: string, issuer?: string): void => {
      log?.warn({ reason, ...(issuer !== undefined && { issuer }), method: req.method, path }, 'audit access refused');
      refuse(res);
    };
    if (expected === undefined && !jwtUsable) return denied('no audit credential configured');

    const header = req.get('authorization');
    if (header === undefined || header === '') return denied('missing authorization');
    const m = /^Bearer +(\S+)$/i.exec(header);
    const presented = m?.[1];
    if (presented === undefined) return denied('not a bearer credential');

    if (expected !== undefined && timingSafeEqual(digest(presented), expected)) {
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
