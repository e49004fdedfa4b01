// Issue 13 items 6 and 2 with two replicas for real: two services built by src/service.ts on one PostgreSQL schema,
// each listening on its own port, called over HTTP with real ES384 JWTs. A token (jti) used on one replica is
// refused on the other (CDS Hooks 2.0 §Trusting CDS Clients: a jti is not to be accepted twice); audit reads and
// feedback follow the audit-reader and card-issuer rules on both. PostgreSQL must be reachable (as for the audit
// contract tests); the schema name is unique per run. Issuers and patients are invented.
import { randomUUID } from 'node:crypto';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { Writable } from 'node:stream';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PostgresAuditStore } from '../../src/audit/postgres-store.js';
import { createClientVerifier } from '../../src/auth/client-verifier.js';
import { authConfigSchema } from '../../src/auth/issuer-config.js';
import { listen } from '../../src/cli/listen.js';
import { loadConfig } from '../../src/config/config.js';
import { createLogger } from '../../src/log.js';
import { buildService, type Service } from '../../src/service.js';
import { ADVICE_CASES } from '../helpers/advice-fixtures.js';
import { NOW, orderSelectRequest, prefetchOf } from '../helpers/hook-fixtures.js';
import { makeIssuer, writeConfigFile, type TestIssuer } from '../helpers/issuers.js';
import { get, post } from '../helpers/server.js';

const PG_URL = process.env['TIDEMARK_TEST_PG_URL'] ?? 'postgres://postgres@127.0.0.1:5432/test';
const SCHEMA = `tm_replicas_${process.pid}_${randomUUID().slice(0, 8)}`;
const PUBLIC = 'https://cds.harbour-invented.example.org/tidemark';
const SERVICE = 'bolus-review-select';
const HOOK_AUD = `${PUBLIC}/cds-services/${SERVICE}`;
const AUDIT_AUD = `${PUBLIC}/audit`;

interface Replica {
  svc: Service;
  server: Server;
  url: string;
  logLines: string[];
}
const replicas: Replica[] = [];
const stores: PostgresAuditStore[] = [];
let north: TestIssuer;
let south: TestIssuer;
let reader: TestIssuer;
let admin: pg.Client;

async function startReplica(configFile: string): Promise<Replica> {
  const logLines: string[] = [];
  const sink = new Writable({
    write(chunk, _enc, cb) {
      logLines.push(...String(chunk).split('\n').filter(Boolean));
      cb();
    },
  });
  const cfg = loadConfig({
    PORT: '0',
    HOST: '127.0.0.1',
    TIDEMARK_TRIAL_MODE: 'false',
    TIDEMARK_CONFIG_FILE: configFile,
    TIDEMARK_PUBLIC_URL: PUBLIC,
    TIDEMARK_AUDIT_STORE: 'postgres',
    TIDEMARK_PG_URL: PG_URL,
    TIDEMARK_AUDIT_TOKEN: 'replica-audit-token-0123456789',
    TIDEMARK_LOG_LEVEL: 'info',
  });
  // Each replica has its own store object and connection pool, as two processes would; only the schema is shared.
  const svc = await buildService(cfg, {
    store: new PostgresAuditStore(PG_URL, { schema: SCHEMA, poolSize: 4 }),
    log: createLogger('info', sink),
    now: () => NOW,
  });
  const server = await listen(svc, cfg);
  const r = { svc, server, url: `http://127.0.0.1:${(server.address() as AddressInfo).port}`, logLines };
  replicas.push(r);
  return r;
}

let one: Replica;
let two: Replica;
beforeAll(async () => {
  [north, south, reader] = await Promise.all([
    makeIssuer('https://ehr.north-invented.example.org/cds'),
    makeIssuer('https://ehr.south-invented.example.org/cds'),
    makeIssuer('https://quality.harbour-invented.example.org/audit-desk'),
  ]);
  const file = writeConfigFile({ issuers: [north.entry, south.entry], auditReaders: [reader.entry] });
  [one, two] = await Promise.all([startReplica(file), startReplica(file)]);
  admin = new pg.Client({ connectionString: PG_URL });
  await admin.connect();
});
afterAll(async () => {
  for (const r of replicas) {
    await new Promise<void>((done) => r.server.close(() => done()));
    await r.svc.close();
  }
  for (const st of stores) await st.close();
  await admin?.query(`DROP SCHEMA IF EXISTS "${SCHEMA}" CASCADE`);
  await admin?.end();
});

const hookCall = (r: Replica, token: string) =>
  post(`${r.url}/cds-services/${SERVICE}`, orderSelectRequest({ prefetch: prefetchOf(ADVICE_CASES['smaller-aliquot']) }), {
    authorization: `Bearer ${token}`,
  });
const feedback = async (r: Replica, who: TestIssuer, items: unknown[]) =>
  post(
    `${r.url}/cds-services/${SERVICE}/feedback`,
    { feedback: items },
    { authorization: `Bearer ${await who.mint(`${HOOK_AUD}/feedback`)}` },
  );

describe('two replicas on one PostgreSQL schema', () => {
  it('each names the shared replay cache and the PostgreSQL store in its start-up line', () => {
    for (const r of [one, two]) {
      const line = r.logLines
        .map((l) => JSON.parse(l) as Record<string, unknown>)
        .find((l) => String(l['msg']).startsWith('Tidemark listening'));
      expect(line).toMatchObject({ publicUrl: PUBLIC, trustedIssuers: 2, auditReaders: 1, auditStore: 'postgres', replayCache: 'shared' });
    }
  });

  it('a token used on one replica is refused on the other, either way round', async () => {
    const t1 = await north.mint(HOOK_AUD);
    expect((await hookCall(one, t1)).status).toBe(200);
    expect((await hookCall(two, t1)).status).toBe(401);
    expect(two.logLines.some((l) => l.includes('"jti replayed"'))).toBe(true);
    const t2 = await north.mint(HOOK_AUD);
    expect((await hookCall(two, t2)).status).toBe(200);
    expect((await hookCall(one, t2)).status).toBe(401);
  });

  it('of one token sent to both replicas at once, exactly one call is answered', async () => {
    for (let round = 0; round < 3; round += 1) {
      const t = await north.mint(HOOK_AUD);
      const statuses = (await Promise.all([hookCall(one, t), hookCall(two, t), hookCall(one, t), hookCall(two, t)]))
        .map((r) => r.status)
        .sort();
      expect(statuses).toEqual([200, 401, 401, 401]);
    }
  });

  it("an audit reader's token is used once across replicas; a CDS client's audit-scoped token opens neither", async () => {
    const t = await reader.mint(AUDIT_AUD, { scope: 'tidemark.audit' });
    const first = await get(`${one.url}/audit/advice?limit=200`, { authorization: `Bearer ${t}` });
    expect(first.status).toBe(200);
    expect((await get(`${two.url}/audit/advice`, { authorization: `Bearer ${t}` })).status).toBe(401);
    // Records written through either replica are in the one trail.
    const fresh = await two.svc.store.list({ limit: 200 });
    expect(fresh.items.length).toBeGreaterThanOrEqual(first.body.items.length);
    for (const r of [one, two]) {
      expect(
        (await get(`${r.url}/audit/advice`, { authorization: `Bearer ${await north.mint(AUDIT_AUD, { scope: 'tidemark.audit' })}` }))
          .status,
      ).toBe(401);
      expect(
        (await get(`${r.url}/audit/verify`, { authorization: `Bearer ${await reader.mint(AUDIT_AUD, { scope: 'tidemark.audit' })}` })).body,
      ).toMatchObject({ ok: true });
    }
  });

  it('feedback on a card issued through one replica: only its issuer, on either replica, with the card own choices', async () => {
    const answer = await hookCall(one, await north.mint(HOOK_AUD));
    const card = answer.body.cards[0];
    const item = {
      card: card.uuid,
      outcome: 'overridden',
      overrideReason: { reason: card.overrideReasons[0] },
      outcomeTimestamp: '2026-11-20T14:10:00Z',
    };
    expect((await feedback(two, south, [item])).status).toBe(404);
    expect((await feedback(one, south, [item])).status).toBe(404);
    expect(
      (await feedback(two, north, [{ ...item, overrideReason: { reason: { ...card.overrideReasons[0], code: 'never-offered' } } }])).status,
    ).toBe(400);
    expect(await feedback(two, north, [item])).toEqual({ status: 200, body: { stored: 1, duplicates: 0 } });
    expect(await feedback(one, north, [item])).toEqual({ status: 200, body: { stored: 0, duplicates: 1 } });
  });
});

describe('the shared replay table', () => {
  it('remembers a key until it expires, then forgets it, and purges expired rows', async () => {
    const store = new PostgresAuditStore(PG_URL, { schema: SCHEMA, poolSize: 2 });
    stores.push(store);
    await store.init();
    const clock = { ms: Date.parse('2031-05-06T07:00:00Z') };
    const cache = store.sharedReplayCache({ nowMs: () => clock.ms, purgeEverySeconds: 60 });
    const t = clock.ms / 1000;
    const key = `https://ehr.north-invented.example.org/cds ${randomUUID()}`;
    expect(await cache.seen(key, t + 30)).toBe(false);
    expect(await cache.seen(key, t + 30)).toBe(true);
    clock.ms += 31_000;
    // Expired: accepted again (the token itself would be refused by exp/iat by then), and remembered anew.
    expect(await cache.seen(key, t + 90)).toBe(false);
    expect(await cache.seen(key, t + 90)).toBe(true);
    const other = `https://ehr.north-invented.example.org/cds ${randomUUID()}`;
    expect(await cache.seen(other, t + 40)).toBe(false);
    const count = async () =>
      Number((await admin.query(`SELECT COUNT(*)::int AS n FROM "${SCHEMA}".jti_seen WHERE forget_after <= $1`, [t + 40])).rows[0].n);
    expect(await count()).toBeGreaterThan(0);
    clock.ms += 61_000; // past both expiries and the purge interval: the next call deletes expired rows
    expect(await cache.seen(`https://ehr.north-invented.example.org/cds ${randomUUID()}`, t + 500)).toBe(false);
    expect(await count()).toBe(0);
  });

  it('a replay table that cannot be reached refuses the token: the check fails closed', async () => {
    const store = new PostgresAuditStore(PG_URL, { schema: SCHEMA, poolSize: 1 });
    await store.init();
    await store.close();
    const verifier = createClientVerifier(authConfigSchema.parse({ issuers: [north.entry] }), { replayCache: store.sharedReplayCache() });
    expect(await verifier.verify(`Bearer ${await north.mint(HOOK_AUD)}`, HOOK_AUD)).toEqual({
      ok: false,
      reason: 'replay cache unavailable',
      issuer: north.iss,
    });
  });
});
