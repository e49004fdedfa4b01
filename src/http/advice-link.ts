/**
 * Signed, expiring links to the reasoning page of one piece of advice: GET /advice/{id}?exp={unix seconds}&sig={mac}.
 * mac = base64url(HMAC-SHA256(key, "{id}.{exp}")) (HMAC: RFC 2104; SHA-256: FIPS 180-4), compared in constant
 * time. Whoever holds the link may read the page until it expires, so the link is only ever put in a card.
 */
import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';

/** The card's link label (plain words; the page itself is described in docs/integration.md). */
export const ADVICE_LINK_LABEL = 'Full reasoning, trends and sources for this advice';

export interface LinkSigner {
  /** The link's query for this advice id, valid until nowMs + lifetime. */
  sign(adviceId: string, nowMs: number): { exp: number; sig: string };
  /** ok, expired (signature good, time past), or bad (tampered, malformed or signed with another key). */
  verify(adviceId: string, exp: unknown, sig: unknown, nowMs: number): 'ok' | 'expired' | 'bad';
  readonly lifetimeMinutes: number;
}

/** HMAC-SHA256 of `message` under `key`, as raw bytes. */
export function hmacSha256(key: string | Buffer, message: string | Buffer): Buffer {
  return createHmac('sha256', key).update(message).digest();
}

const SIG_SHAPE = /^[A-Za-z0-9_-]{43}$/; // 32 bytes in base64url without padding
const EXP_SHAPE = /^\d{1,12}$/;

export function createLinkSigner(key: string | Buffer, lifetimeMinutes: number): LinkSigner {
  const mac = (id: string, exp: number) => hmacSha256(key, `${id}.${exp}`);
  return {
    lifetimeMinutes,
    sign(adviceId, nowMs) {
      const exp = Math.floor(nowMs / 1000) + lifetimeMinutes * 60;
      return { exp, sig: mac(adviceId, exp).toString('base64url') };
    },
    verify(adviceId, exp, sig, nowMs) {
      if (typeof exp !== 'string' || typeof sig !== 'string' || !EXP_SHAPE.test(exp) || !SIG_SHAPE.test(sig)) return 'bad';
      // Compared as text, not as decoded bytes: base64url has several spellings of the same last byte (its low
      // padding bits), and a changed link must not pass for the original.
      const expected = Buffer.from(mac(adviceId, Number(exp)).toString('base64url'));
      const given = Buffer.from(sig);
      if (given.length !== expected.length || !timingSafeEqual(given, expected)) return 'bad';
      return Number(exp) * 1000 > nowMs ? 'ok' : 'expired';
    },
  };
}

/**
 * The signer the configuration asks for: the configured key; in trial mode without one, a random key for this
 * process (with a warning: links die with the process and do not work across replicas); otherwise none (links off).
 */
export function signerFromConfig(cfg: {
  TIDEMARK_LINK_KEY?: string | undefined;
  TIDEMARK_LINK_LIFETIME_MIN: number;
  TIDEMARK_TRIAL_MODE: boolean;
}): { signer?: LinkSigner; warning?: string } {
  if (cfg.TIDEMARK_LINK_KEY) return { signer: createLinkSigner(cfg.TIDEMARK_LINK_KEY, cfg.TIDEMARK_LINK_LIFETIME_MIN) };
  if (cfg.TIDEMARK_TRIAL_MODE) {
    return {
      signer: createLinkSigner(randomBytes(32), cfg.TIDEMARK_LINK_LIFETIME_MIN),
      warning:
        'TIDEMARK_LINK_KEY is not set: reasoning-page links are signed with a key made for this process; they stop working when it restarts',
    };
  }
  return { warning: 'TIDEMARK_LINK_KEY is not set: cards carry no link to a reasoning page' };
}

/** The absolute URL of the reasoning page for this advice. */
export function adviceLinkUrl(publicUrl: string, adviceId: string, q: { exp: number; sig: string }): string {
  return `${publicUrl.replace(/\/$/, '')}/advice/${encodeURIComponent(adviceId)}?${new URLSearchParams({ exp: String(q.exp), sig: q.sig }).toString()}`;
}
