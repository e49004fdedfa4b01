/**
 * CDS client authentication and audit-API access over real HTTP on 127.0.0.1: a key server publishes
 * real JWKS documents, a second server plays an attacker's jku target, and the service under test runs
 * the guards from src/auth. Every refusal checks the plain 401, the fixed body and the logged reason.
 * Issuers, tenants and ids are invented.
 */
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { Writable } from 'node:stream';
import express from 'express';
import { calculateJwkThumbprint, exportJWK, exportSPKI, generateKeyPair, SignJWT, type CryptoKey, type JWK, type JWTPayload } from 'jose';
import { pino } from 'pino';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createClientVerifier } from '../../src/auth/client-verifier.js';
import { authConfigSchema, publicJwkSchema, type AuthConfigInput } from '../../src/auth/issuer-config.js';
import { getAuditClient, getCdsClient, requireAuditAccess, requireCdsClient, UNAUTHORIZED_BODY } from '../../src/auth/middleware.js';
import { InMemoryReplayCache } from '../../src/auth/replay-cache.js';

const PUBLIC = 'https://cds.example.org/tidemark';
const SERVICE_ID = 'bolus-review';
const AUD_DISCOVERY = `${PUBLIC}/cds-services`;
const AUD_SERVICE = `${PUBLIC}/cds-services/${SERVICE_ID}`;
const AUD_FEEDBACK = `${PUBLIC}/cds-services/${SERVICE_ID}/feedback`;
const AUD_AUDIT = `${PUBLIC}/audit`;
const ISS_NORTH = 'https://ehr-north.example.org/cds-client'; // remote JWKS + one allowed jku
const ISS_SOUTH = 'https://ehr-south.example.org'; // static JWKS + tenant allowlist
const ISS_STRANGER = 'https://ehr-stranger.example.org';
const AUDIT_TOKEN = 'audit-0f3c9a7e52b14d6c8e21';

// ---------- test clock, logs, servers ----------
const clock = { ms: Math.floor(Date.now() / 1000) * 1000 };
const nowSec = () => Math.floor(clock.ms / 1000);
const now = () => new Date(clock.ms);

const logLines: string[] = [];
const log = pino(
  { level: 'warn' },
  new Writable({
    write(chunk: Buffer, _enc, cb) {
      logLines.push(chunk.toString('utf8'));
      cb();
    },
  }),
);
const minted: string[] = [];
const servers: Server[] = [];

async function listen(app: express.Express): Promise<string> {
  const server = await new Promise<Server>((resolve, reject) => {
    const s = app.listen(0, '127.0.0.1', (err?: Error) => (err ? reject(err) : resolve(s)));
  });
  servers.push(server);
  return `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
}

/** A JWKS host that counts hits per path. */
async function startKeyServer(sets: Map<string, JWK[]>) {
  const hits = new Map<string, number>();
  const app = express();
  app.get('/keys/:name', (req, res) => {
    const name = req.params.name;
    hits.set(name, (hits.get(name) ?? 0) + 1);
    const keys = sets.get(name);
    if (keys === undefined) res.status(404).end();
    else res.json({ keys });
  });
  const url = await listen(app);
  return { url, hits: (name: string) => hits.get(name) ?? 0, sets };
}

interface KeyPair {
  privateKey: CryptoKey;
  publicJwk: JWK & { kid: string };
  alg: 'ES384' | 'RS384';
}
async function makeKey(alg: 'ES384' | 'RS384'): Promise<KeyPair> {
  const { publicKey, privateKey } = await generateKeyPair(alg, { extractable: true });
  const jwk: JWK = { ...(await exportJWK(publicKey)), alg, use: 'sig' };
  const kid = await calculateJwkThumbprint(jwk);
  return { privateKey, publicJwk: { ...jwk, kid }, alg };
}

let northEs: KeyPair, northRs: KeyPair, northRotated: KeyPair, northJku: KeyPair, southEs: KeyPair, attacker: KeyPair;
let rsPublicPem: string;
let keyServer: Awaited<ReturnType<typeof startKeyServer>>;
let foreignServer: Awaited<ReturnType<typeof startKeyServer>>;
let issuers: AuthConfigInput['issuers'];

interface MintOptions {
  key?: KeyPair;
  kid?: string | null;
  typ?: string | null;
  jku?: string;
  iss?: string;
  aud?: string | string[];
  iat?: number | null;
  exp?: number | null;
  jti?: string | null;
  tenant?: string;
  scope?: string;
}
/** Signs a client token; null leaves a member out. Defaults: northEs, aud = service URL, 5 min life. */
async function mint(o: MintOptions = {}): Promise<string> {
  const key = o.key ?? northEs;
  const header: Record<string, string> = { alg: key.alg };
  if (o.typ !== null) header['typ'] = o.typ ?? 'JWT';
  if (o.kid !== null) header['kid'] = o.kid ?? key.publicJwk.kid;
  if (o.jku !== undefined) header['jku'] = o.jku;
  const claims: JWTPayload = {};
  if (o.tenant !== undefined) claims['tenant'] = o.tenant;
  if (o.scope !== undefined) claims['scope'] = o.scope;
  const jwt = new SignJWT(claims)
    .setProtectedHeader(header as { alg: string })
    .setIssuer(o.iss ?? ISS_NORTH)
    .setAudience(o.aud ?? AUD_SERVICE);
  if (o.iat !== null) jwt.setIssuedAt(o.iat ?? nowSec());
  if (o.exp !== null) jwt.setExpirationTime(o.exp ?? nowSec() + 300);
  if (o.jti !== null) jwt.setJti(o.jti ?? crypto.randomUUID());
  const token = await jwt.sign(key.privateKey);
  minted.push(token);
  return token;
}

const b64url = (v: unknown) => Buffer.from(JSON.stringify(v)).toString('base64url');
const basicClaims = () => ({ iss: ISS_NORTH, aud: AUD_SERVICE, iat: nowSec(), exp: nowSec() + 300, jti: crypto.randomUUID() });

interface ServiceOptions {
  trialMode?: boolean;
  issuers?: AuthConfigInput['issuers'];
  auditToken?: string;
  auditJwt?: boolean;
}
/** The service under test: the guards in front of trivial handlers that echo res.locals. */
async function startService(o: ServiceOptions = {}) {
  const verifier = createClientVerifier(authConfigSchema.parse({ issuers: o.issuers ?? issuers }), { now });
  const app = express();
  // Mounted router: the audience must come from originalUrl, not the router-relative url.
  app.use('/cds-services', requireCdsClient({ verifier, publicUrl: PUBLIC, trialMode: o.trialMode ?? false, log }));
  app.get('/cds-services', (_req, res) => res.json({ client: getCdsClient(res) }));
  app.post('/cds-services/:id', (_req, res) => res.json({ client: getCdsClient(res) }));
  app.post('/cds-services/:id/feedback', (_req, res) => res.json({ client: getCdsClient(res) }));
  app.use(
    '/audit',
    requireAuditAccess({
      auditToken: o.auditToken,
      verifier: o.auditJwt ? verifier : undefined,
      publicUrl: PUBLIC,
      requiredScope: 'tidemark.audit',
      log,
    }),
  );
  app.get('/audit/records', (_req, res) => res.json({ audit: getAuditClient(res) }));
  return { url: await listen(app) };
}

type Svc = Awaited<ReturnType<typeof startService>>;
const bearer = (t: string) => `Bearer ${t}`;
const callService = (svc: Svc, token?: string, path = `/cds-services/${SERVICE_ID}`) => {
  const r = request(svc.url).post(path);
  return token === undefined ? r.send({}) : r.set('Authorization', bearer(token)).send({});
};

/** Awaits the call and checks the refusal: plain 401, Bearer challenge, fixed body, logged reason. */
async function expectRefused(call: PromiseLike<request.Response>, reason: string, issuer?: string) {
  const before = logLines.length;
  const res = await call;
  expect(res.status).toBe(401);
  expect(res.headers['www-authenticate']).toBe('Bearer');
  expect(res.body).toEqual(UNAUTHORIZED_BODY);
  const lines = logLines.slice(before).map((l) => JSON.parse(l) as Record<string, unknown>);
  const hit = lines.find((l) => l['reason'] === reason);
  expect(hit, `log reasons: ${lines.map((l) => String(l['reason'])).join(', ')}`).toBeDefined();
  if (issuer !== undefined) expect(hit?.['issuer']).toBe(issuer);
  return hit;
}

let svc: Svc;

beforeAll(async () => {
  [northEs, northRs, northRotated, northJku, southEs, attacker] = await Promise.all([
    makeKey('ES384'),
    makeKey('RS384'),
    makeKey('ES384'),
    makeKey('ES384'),
    makeKey('ES384'),
    makeKey('ES384'),
  ]);
  const { publicKey } = await generateKeyPair('RS384', { extractable: true });
  rsPublicPem = await exportSPKI(publicKey);
  keyServer = await startKeyServer(
    new Map([
      ['north', [northEs.publicJwk, northRs.publicJwk]],
      ['north-jku', [northJku.publicJwk]],
    ]),
  );
  foreignServer = await startKeyServer(new Map([['evil', [attacker.publicJwk]]]));
  issuers = [
    { iss: ISS_NORTH, jwksUrl: `${keyServer.url}/keys/north`, allowedJku: [`${keyServer.url}/keys/north-jku`] },
    { iss: ISS_SOUTH, jwks: { keys: [publicJwkSchema.parse(southEs.publicJwk)] }, tenants: ['ward-7', 'ward-9'] },
  ];
  svc = await startService({ auditToken: AUDIT_TOKEN, auditJwt: true });
});

afterAll(async () => {
  await Promise.all(servers.map((s) => new Promise((r) => s.close(r))));
});

// ---------- configuration schema ----------
describe('authConfigSchema', () => {
  const jwks = () => ({ keys: [southEs.publicJwk] });
  it('applies the defaults and pins the algorithms', () => {
    const c = authConfigSchema.parse({ issuers: [{ iss: ISS_SOUTH, jwks: jwks() }] });
    expect(c.clockSkewSeconds).toBe(60);
    expect(c.maxTokenAgeSeconds).toBe(300);
    expect(c.algorithms).toEqual(['ES384', 'RS384']);
    expect(authConfigSchema.safeParse({ issuers: [], algorithms: ['HS256'] }).success).toBe(false);
    expect(authConfigSchema.safeParse({ issuers: [], algorithms: ['none'] }).success).toBe(false);
  });
  it('wants exactly one of jwksUrl and jwks', () => {
    expect(authConfigSchema.safeParse({ issuers: [{ iss: ISS_SOUTH }] }).success).toBe(false);
    expect(
      authConfigSchema.safeParse({ issuers: [{ iss: ISS_SOUTH, jwks: jwks(), jwksUrl: 'https://ehr-south.example.org/jwks' }] }).success,
    ).toBe(false);
  });
  it('refuses private key material, plain http off loopback, and a duplicated issuer', () => {
    const priv = { ...southEs.publicJwk, d: 'AAAA' };
    expect(authConfigSchema.safeParse({ issuers: [{ iss: ISS_SOUTH, jwks: { keys: [priv] } }] }).success).toBe(false);
    expect(authConfigSchema.safeParse({ issuers: [{ iss: ISS_SOUTH, jwksUrl: 'http://ehr-south.example.org/jwks' }] }).success).toBe(false);
    expect(
      authConfigSchema.safeParse({
        issuers: [
          { iss: ISS_SOUTH, jwks: jwks() },
          { iss: ISS_SOUTH, jwksUrl: 'https://ehr-south.example.org/jwks' },
        ],
      }).success,
    ).toBe(false);
  });
});

describe('InMemoryReplayCache', () => {
  it('remembers a jti until its expiry, then forgets and prunes it', () => {
    let t = 1_000_000_000_000;
    const cache = new InMemoryReplayCache({ nowMs: () => t });
    expect(cache.seen('a', t / 1000 + 10)).toBe(false);
    expect(cache.seen('a', t / 1000 + 10)).toBe(true);
    t += 11_000;
    expect(cache.seen('b', t / 1000 + 10)).toBe(false); // the call forgets 'a' first
    expect(cache.size).toBe(1);
    expect(cache.seen('a', t / 1000 + 10)).toBe(false);
  });

  it('forgets entries in expiry order whatever order they came in, and only those that expired', () => {
    let t = 1_000_000_000_000;
    const s = () => t / 1000;
    const cache = new InMemoryReplayCache({ nowMs: () => t });
    // Invented jti values with expiries out of order (clients with different token lifetimes).
    const lifetimes = [300, 20, 120, 5, 60, 240, 20, 1, 180, 90];
    lifetimes.forEach((life, i) => expect(cache.seen(`jti-${i}`, s() + life)).toBe(false));
    t += 61_000; // past 1, 5, 20, 20 and 60
    expect(cache.seen('late', s() + 600)).toBe(false);
    expect(cache.size).toBe(lifetimes.filter((life) => life > 61).length + 1);
    lifetimes.forEach((life, i) => {
      if (life > 61) expect(cache.seen(`jti-${i}`, s() + 600)).toBe(true);
    });
    t += 1_000_000;
    expect(cache.seen('last', s() + 1)).toBe(false);
    expect(cache.size).toBe(1);
  });

  it('answers as a plain map of jti to expiry would, over a random run (model check)', () => {
    let state = 42; // a fixed-seed linear congruential generator: the run is the same every time
    const rand = (n: number) => {
      state = (state * 1_103_515_245 + 12_345) % 2 ** 31;
      return state % n;
    };
    let t = 1_000_000_000_000;
    const cache = new InMemoryReplayCache({ nowMs: () => t });
    const model = new Map<string, number>();
    for (let step = 0; step < 5000; step += 1) {
      t += rand(3) * 1000;
      const now = t / 1000;
      const jti = `j${rand(400)}`;
      const until = now + rand(120) - 5; // some already expired when recorded
      const known = model.get(jti);
      const expected = known !== undefined && known > now;
      if (!expected) model.set(jti, until);
      expect(cache.seen(jti, until)).toBe(expected);
      const live = [...model.values()].filter((u) => u > now).length;
      expect(cache.size).toBeGreaterThanOrEqual(live);
    }
    t += 1_000_000;
    cache.seen('end', t / 1000 + 1);
    expect(cache.size).toBe(1);
  });

  it('refuses to record an expiry that is not a number', () => {
    const cache = new InMemoryReplayCache();
    expect(() => cache.seen('a', Number.NaN)).toThrow(TypeError);
    expect(cache.size).toBe(0);
  });
});

// ---------- accepted tokens ----------
describe('requireCdsClient accepts', () => {
  it('an ES384 token on the service URL (query string ignored)', async () => {
    const res = await callService(svc, await mint(), `/cds-services/${SERVICE_ID}?trace=1`);
    expect(res.status).toBe(200);
    expect(res.body.client).toMatchObject({ issuer: ISS_NORTH });
    expect(typeof res.body.client.jti).toBe('string');
  });
  it('an RS384 token on the discovery URL', async () => {
    const tok = await mint({ key: northRs, aud: AUD_DISCOVERY });
    const res = await request(svc.url).get('/cds-services').set('Authorization', bearer(tok));
    expect(res.status).toBe(200);
    expect(res.body.client.issuer).toBe(ISS_NORTH);
  });
  it('a token on the feedback URL, with aud given as an array', async () => {
    const res = await callService(svc, await mint({ aud: [AUD_FEEDBACK] }), `/cds-services/${SERVICE_ID}/feedback`);
    expect(res.status).toBe(200);
  });
  it('a static-JWKS issuer with an allowed tenant', async () => {
    const res = await callService(svc, await mint({ key: southEs, iss: ISS_SOUTH, tenant: 'ward-7' }));
    expect(res.status).toBe(200);
    expect(res.body.client).toMatchObject({ issuer: ISS_SOUTH, tenant: 'ward-7' });
  });
  it('an expired token still inside the clock skew', async () => {
    const res = await callService(svc, await mint({ iat: nowSec() - 100, exp: nowSec() - 30 }));
    expect(res.status).toBe(200);
  });
  it('a key from an allowed jku, fetched from that jku', async () => {
    const before = keyServer.hits('north-jku');
    const res = await callService(svc, await mint({ key: northJku, jku: `${keyServer.url}/keys/north-jku` }));
    expect(res.status).toBe(200);
    expect(keyServer.hits('north-jku')).toBe(before + 1);
  });
});

// ---------- refusals ----------
describe('requireCdsClient refuses', () => {
  it('a missing Authorization header', async () => {
    await expectRefused(callService(svc), 'missing authorization');
  });
  it('a non-Bearer scheme', async () => {
    const tok = await mint();
    await expectRefused(
      request(svc.url).post(`/cds-services/${SERVICE_ID}`).set('Authorization', `Basic ${tok}`).send({}),
      'not a bearer credential',
    );
  });
  it('a forged signature (another key under the same kid)', async () => {
    const tok = await mint({ key: attacker, kid: northEs.publicJwk.kid });
    await expectRefused(callService(svc, tok), 'bad signature', ISS_NORTH);
  });
  it('an expired token', async () => {
    await expectRefused(callService(svc, await mint({ iat: nowSec() - 200, exp: nowSec() - 61 })), 'token expired', ISS_NORTH);
  });
  it('a discovery token on the service URL, and the other way round', async () => {
    await expectRefused(callService(svc, await mint({ aud: AUD_DISCOVERY })), 'aud mismatch', ISS_NORTH);
    const tok = await mint({ aud: AUD_SERVICE });
    await expectRefused(request(svc.url).get('/cds-services').set('Authorization', bearer(tok)), 'aud mismatch', ISS_NORTH);
  });
  it('a service token on the feedback URL, and an aud without the public path prefix', async () => {
    await expectRefused(callService(svc, await mint({ aud: AUD_SERVICE }), `/cds-services/${SERVICE_ID}/feedback`), 'aud mismatch');
    await expectRefused(callService(svc, await mint({ aud: `https://cds.example.org/cds-services/${SERVICE_ID}` })), 'aud mismatch');
  });
  it('a replayed jti, also when re-signed under the same jti', async () => {
    const tok = await mint();
    expect((await callService(svc, tok)).status).toBe(200);
    await expectRefused(callService(svc, tok), 'jti replayed', ISS_NORTH);
    const jti = crypto.randomUUID();
    expect((await callService(svc, await mint({ jti }))).status).toBe(200);
    await expectRefused(callService(svc, await mint({ jti, iat: nowSec() - 1 })), 'jti replayed');
  });
  it('an unknown issuer, without logging the claimed issuer', async () => {
    const hit = await expectRefused(callService(svc, await mint({ iss: ISS_STRANGER })), 'unknown issuer');
    expect(hit?.['issuer']).toBeUndefined();
  });
  it('alg none (hand-built), before any key lookup', async () => {
    const fresh = await startService();
    const before = keyServer.hits('north');
    const tok = `${b64url({ alg: 'none', typ: 'JWT', kid: northEs.publicJwk.kid })}.${b64url(basicClaims())}.`;
    minted.push(tok);
    await expectRefused(callService(fresh, tok), 'alg not allowed');
    expect(keyServer.hits('north')).toBe(before);
  });
  it('HS256 with a shared secret, and HS384 keyed with the RSA public key (alg confusion)', async () => {
    const fresh = await startService();
    const before = keyServer.hits('north');
    const hs256 = await new SignJWT(basicClaims())
      .setProtectedHeader({ alg: 'HS256', typ: 'JWT', kid: northEs.publicJwk.kid })
      .sign(new TextEncoder().encode('a-shared-secret-of-thirty-two-by'));
    const hs384 = await new SignJWT(basicClaims())
      .setProtectedHeader({ alg: 'HS384', typ: 'JWT', kid: northRs.publicJwk.kid })
      .sign(new TextEncoder().encode(rsPublicPem));
    minted.push(hs256, hs384);
    await expectRefused(callService(fresh, hs256), 'alg not allowed');
    await expectRefused(callService(fresh, hs384), 'alg not allowed');
    expect(keyServer.hits('north')).toBe(before);
  });
  it('a missing kid, and a typ other than JWT', async () => {
    await expectRefused(callService(svc, await mint({ kid: null })), 'kid missing');
    await expectRefused(callService(svc, await mint({ typ: 'at+jwt' })), 'typ not JWT');
    await expectRefused(callService(svc, await mint({ typ: null })), 'typ not JWT');
  });
  it('an unknown kid, refetching the JWKS at most once per 30 s', async () => {
    const fresh = await startService();
    const base = keyServer.hits('north');
    expect((await callService(fresh, await mint())).status).toBe(200);
    expect(keyServer.hits('north')).toBe(base + 1);

    // Within the cooldown after the first fetch: no refetch at all.
    for (let i = 0; i < 3; i++) await expectRefused(callService(fresh, await mint({ key: northRotated })), 'unknown kid', ISS_NORTH);
    expect(keyServer.hits('north')).toBe(base + 1);

    // Past the cooldown: one refetch for a burst of unknown-kid calls, concurrent or not.
    clock.ms += 31_000;
    const burst = await Promise.all([0, 1, 2].map(async () => callService(fresh, await mint({ key: northRotated }))));
    expect(burst.map((r) => r.status)).toEqual([401, 401, 401]);
    for (let i = 0; i < 3; i++) await expectRefused(callService(fresh, await mint({ key: northRotated })), 'unknown kid');
    expect(keyServer.hits('north')).toBe(base + 2);

    // The client rotates its keys: the next refetch (after the cooldown) picks the new key up.
    keyServer.sets.get('north')?.push(northRotated.publicJwk);
    clock.ms += 31_000;
    expect((await callService(fresh, await mint({ key: northRotated }))).status).toBe(200);
    expect(keyServer.hits('north')).toBe(base + 3);
  });
  it('a jku not registered for the issuer, never fetching it', async () => {
    const evil = `${foreignServer.url}/keys/evil`;
    await expectRefused(callService(svc, await mint({ key: attacker, jku: evil })), 'jku not allowed', ISS_NORTH);
    // Near misses of the registered URL are not the registered URL.
    const jkuBefore = keyServer.hits('north-jku');
    await expectRefused(callService(svc, await mint({ key: northJku, jku: `${keyServer.url}/keys/north-jku?v=2` })), 'jku not allowed');
    await expectRefused(callService(svc, await mint({ key: northJku, jku: `${keyServer.url}/keys/north-jku/` })), 'jku not allowed');
    // An issuer without allowed jku values accepts none.
    await expectRefused(
      callService(svc, await mint({ key: southEs, iss: ISS_SOUTH, tenant: 'ward-7', jku: evil })),
      'jku not allowed',
      ISS_SOUTH,
    );
    expect(foreignServer.hits('evil')).toBe(0);
    expect(keyServer.hits('north-jku')).toBe(jkuBefore);
  });
  it('an iat older than the age cap, and an iat in the future', async () => {
    await expectRefused(callService(svc, await mint({ iat: nowSec() - 400, exp: nowSec() + 60 })), 'iat too old', ISS_NORTH);
    await expectRefused(callService(svc, await mint({ iat: nowSec() + 120, exp: nowSec() + 400 })), 'iat in future');
  });
  it('a missing jti, iat or exp', async () => {
    await expectRefused(callService(svc, await mint({ jti: null })), 'jti missing', ISS_NORTH);
    await expectRefused(callService(svc, await mint({ iat: null })), 'iat missing');
    await expectRefused(callService(svc, await mint({ exp: null })), 'exp missing');
  });
  it('a tenant not on the allowlist, or no tenant where one is required', async () => {
    await expectRefused(callService(svc, await mint({ key: southEs, iss: ISS_SOUTH, tenant: 'ward-3' })), 'tenant not allowed', ISS_SOUTH);
    await expectRefused(callService(svc, await mint({ key: southEs, iss: ISS_SOUTH })), 'tenant not allowed');
  });
  it('everything when no issuer is configured and trial mode is off', async () => {
    const closed = await startService({ issuers: [] });
    await expectRefused(callService(closed, await mint()), 'no trusted issuers configured');
    await expectRefused(request(closed.url).get('/cds-services'), 'no trusted issuers configured');
  });
});

describe('trial mode', () => {
  it('lets calls through without a token and says so in the log', async () => {
    const before = logLines.length;
    const trial = await startService({ trialMode: true, issuers: [] });
    expect(logLines.slice(before).some((l) => l.includes('trial mode'))).toBe(true);
    const res = await callService(trial);
    expect(res.status).toBe(200);
    expect(res.body.client).toEqual({ issuer: 'trial-mode' });
  });
  it('does not open the audit API', async () => {
    const trial = await startService({ trialMode: true, issuers: [] });
    await expectRefused(
      request(trial.url).get('/audit/records').set('Authorization', bearer(AUDIT_TOKEN)),
      'no audit credential configured',
    );
  });
});

// ---------- audit API ----------
describe('requireAuditAccess', () => {
  const audit = (s: Svc, token?: string) => {
    const r = request(s.url).get('/audit/records');
    return token === undefined ? r : r.set('Authorization', bearer(token));
  };
  it('refuses everything when no credential is configured', async () => {
    const closed = await startService();
    await expectRefused(audit(closed, AUDIT_TOKEN), 'no audit credential configured');
    await expectRefused(audit(closed, await mint({ aud: AUD_AUDIT, scope: 'tidemark.audit' })), 'no audit credential configured');
  });
  it('accepts the configured static token', async () => {
    const res = await audit(svc, AUDIT_TOKEN);
    expect(res.status).toBe(200);
    expect(res.body.audit).toEqual({ via: 'token' });
  });
  it('refuses a wrong static token, of equal or other length, and a missing one', async () => {
    await expectRefused(audit(svc, AUDIT_TOKEN.replace(/.$/, 'X')), 'audit token mismatch');
    await expectRefused(audit(svc, `${AUDIT_TOKEN}0`), 'audit token mismatch');
    await expectRefused(audit(svc), 'missing authorization');
  });
  it('refuses a trusted JWT without the audit scope', async () => {
    await expectRefused(audit(svc, await mint({ aud: AUD_AUDIT })), 'scope missing', ISS_NORTH);
    await expectRefused(audit(svc, await mint({ aud: AUD_AUDIT, scope: 'tidemark.auditor tidemark.read' })), 'scope missing');
  });
  it('refuses an audit-scoped JWT meant for a CDS endpoint', async () => {
    await expectRefused(audit(svc, await mint({ aud: AUD_SERVICE, scope: 'tidemark.audit' })), 'aud mismatch');
  });
  it('accepts a trusted JWT with the audit scope and aud {publicUrl}/audit', async () => {
    const res = await audit(svc, await mint({ aud: AUD_AUDIT, scope: 'tidemark.read tidemark.audit' }));
    expect(res.status).toBe(200);
    expect(res.body.audit).toMatchObject({ via: 'jwt', issuer: ISS_NORTH });
  });
});

// ---------- logs ----------
describe('logging', () => {
  it('never writes a token, or any part of its signature, to the log', () => {
    expect(logLines.length).toBeGreaterThan(20);
    expect(minted.length).toBeGreaterThan(30);
    const all = logLines.join('\n');
    for (const tok of minted) {
      expect(all.includes(tok)).toBe(false);
      const sig = tok.split('.')[2] ?? '';
      if (sig.length > 0) expect(all.includes(sig)).toBe(false);
    }
    expect(all.includes(AUDIT_TOKEN.slice(0, -1))).toBe(false);
  });
});
