/**
 * Console sessions: after the audit credential is presented once (POST /console/sign-in), the browser holds a
 * session cookie with a random id of 32 bytes (crypto.randomBytes, base64url). The server keeps only the SHA-256 of
 * the id, its expiry and the session's CSRF token, in this process's memory: sign-out ends the session at once,
 * and a restart ends every session. With several replicas behind a balancer the console needs sticky routing, or
 * the single-sign-on proxy path (docs/audit.md).
 *
 * Cookie (RFC 6265bis): HttpOnly, SameSite=Strict, Path=/console, Max-Age = the lifetime; Secure and the `__Host-`
 * prefix unless the public URL is a loopback http address (a browser drops a Secure cookie over plain http).
 * CSRF: SameSite=Strict keeps the cookie off cross-site requests, and every POST also carries the session's token
 * in a hidden field, compared in constant time (OWASP CSRF prevention: synchroniser token). Before sign-in (and on
 * the proxy path, which has no session) a double-submit token is used instead: a random value in its own
 * SameSite=Strict cookie that the form must repeat.
 */
import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';
import type { Request, Response } from 'express';

export interface ConsoleSession {
  csrf: string;
  expiresAt: number;
}

/** Sessions held at most; the oldest is dropped first. Only a correct credential makes one. */
const MAX_SESSIONS = 5000;

const digest = (s: string): string => createHash('sha256').update(s, 'utf8').digest('base64url');
const token = (): string => randomBytes(32).toString('base64url');
const TOKEN_SHAPE = /^[A-Za-z0-9_-]{43}$/;

/** Constant-time equality of two short texts (over their digests, so their lengths do not leak). */
export function sameText(a: string, b: string): boolean {
  return timingSafeEqual(createHash('sha256').update(a).digest(), createHash('sha256').update(b).digest());
}

/** Loopback http (localhost, 127.0.0.0/8, [::1]): the only place a cookie goes without Secure. */
export function isLoopbackHttp(publicUrl: string): boolean {
  try {
    const u = new URL(publicUrl);
    return u.protocol === 'http:' && (u.hostname === 'localhost' || /^127\.\d+\.\d+\.\d+$/.test(u.hostname) || u.hostname === '[::1]');
  } catch {
    return false;
  }
}

/** The cookies of a request, by name (RFC 6265 §5.4 syntax; values are taken as they are). */
export function cookiesOf(req: Request): Map<string, string> {
  const out = new Map<string, string>();
  for (const part of (req.headers.cookie ?? '').split(';')) {
    const eq = part.indexOf('=');
    if (eq < 1) continue;
    const name = part.slice(0, eq).trim();
    if (!out.has(name)) out.set(name, part.slice(eq + 1).trim());
  }
  return out;
}

export class ConsoleSessions {
  private readonly sessions = new Map<string, ConsoleSession>();
  readonly cookieName: string;
  readonly csrfCookieName: string;
  private readonly secure: boolean;

  constructor(
    readonly lifetimeMinutes: number,
    publicUrl: string,
    private readonly now: () => number,
  ) {
    this.secure = !isLoopbackHttp(publicUrl);
    // __Host-: Secure, no Domain, Path=/ (RFC 6265bis §4.1.3.2); on loopback http the plain names.
    this.cookieName = this.secure ? '__Host-tidemark-console' : 'tidemark-console';
    this.csrfCookieName = this.secure ? '__Host-tidemark-console-form' : 'tidemark-console-form';
  }

  private cookie(name: string, value: string, maxAgeSeconds: number): string {
    // __Host- cookies must have Path=/; the plain ones are limited to the console's paths.
    return `${name}=${value}; Path=${this.secure ? '/' : '/console'}; Max-Age=${maxAgeSeconds}; HttpOnly; SameSite=Strict${this.secure ? '; Secure' : ''}`;
  }

  /** A new session: sets its cookie on the response, returns its CSRF token. */
  create(res: Response): string {
    const t = this.now();
    for (const [k, s] of this.sessions) if (s.expiresAt <= t) this.sessions.delete(k);
    while (this.sessions.size >= MAX_SESSIONS) this.sessions.delete(this.sessions.keys().next().value as string);
    const id = token();
    const csrf = token();
    this.sessions.set(digest(id), { csrf, expiresAt: t + this.lifetimeMinutes * 60_000 });
    res.append('Set-Cookie', this.cookie(this.cookieName, id, this.lifetimeMinutes * 60));
    return csrf;
  }

  /** The request's live session; `expired` when its cookie names one that has run out (it is then forgotten). */
  find(req: Request): { session?: ConsoleSession; expired?: true } {
    const id = cookiesOf(req).get(this.cookieName);
    if (id === undefined || !TOKEN_SHAPE.test(id)) return {};
    const key = digest(id);
    const s = this.sessions.get(key);
    if (!s) return {};
    if (s.expiresAt <= this.now()) {
      this.sessions.delete(key);
      return { expired: true };
    }
    return { session: s };
  }

  /** Ends the request's session (if any) and clears its cookie. */
  end(req: Request, res: Response): void {
    const id = cookiesOf(req).get(this.cookieName);
    if (id !== undefined) this.sessions.delete(digest(id));
    res.append('Set-Cookie', this.cookie(this.cookieName, '', 0));
  }

  /** The double-submit token of a request without a session (made and set as a cookie when it has none). */
  formToken(req: Request, res: Response): string {
    const have = cookiesOf(req).get(this.csrfCookieName);
    if (have !== undefined && TOKEN_SHAPE.test(have)) return have;
    const t = token();
    res.append('Set-Cookie', this.cookie(this.csrfCookieName, t, 12 * 3600));
    return t;
  }

  /** Whether a POST's `csrf` field matches the double-submit cookie. */
  formTokenMatches(req: Request, presented: unknown): boolean {
    const have = cookiesOf(req).get(this.csrfCookieName);
    return typeof presented === 'string' && have !== undefined && TOKEN_SHAPE.test(have) && sameText(presented, have);
  }

  get size(): number {
    return this.sessions.size;
  }
}

/**
 * Failed sign-ins per client address: at most `limit` in a sliding `windowMs`; further attempts are refused without
 * checking the credential until the window has passed. Kept small: addresses with no recent failure are dropped.
 */
export class SignInLimiter {
  private readonly failures = new Map<string, number[]>();
  constructor(
    private readonly limit: number,
    private readonly windowMs: number,
    private readonly now: () => number,
  ) {}

  blocked(addr: string): boolean {
    const t = this.now();
    const recent = (this.failures.get(addr) ?? []).filter((x) => x > t - this.windowMs);
    if (recent.length) this.failures.set(addr, recent);
    else this.failures.delete(addr);
    return recent.length >= this.limit;
  }

  fail(addr: string): void {
    const t = this.now();
    if (this.failures.size > 10_000) for (const [k, v] of this.failures) if (!v.some((x) => x > t - this.windowMs)) this.failures.delete(k);
    this.failures.set(addr, [...(this.failures.get(addr) ?? []), t].slice(-this.limit));
  }
}
