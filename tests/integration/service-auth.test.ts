// The real service wiring of CDS client authentication (CDS Hooks 2.0 §Trusting CDS Clients): secure by default,
// a trusted issuer from the config file is let in on the exact URL it calls, and the audit API needs its own
// credential. The guard's own failure cases are in tests/integration/auth.test.ts.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { randomUUID } from 'node:crypto';
import { calculateJwkThumbprint, exportJWK, generateKeyPair, SignJWT } from 'jose';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { basicResources, NOW, orderSelectRequest, prefetchOf } from '../helpers/hook-fixtures.js';
import { get, post, startService, type Running } from '../helpers/server.js';

const ISS = 'https://records.harbourside.example.org/cds-client';
const PUBLIC = 'https://cds.harbourside.example.org/tidemark';
let secure: Running;
let locked: Running;
let privateKey: Awaited<ReturnType<typeof generateKeyPair>>['privateKey'];
let kid = '';

beforeAll(async () => {
  const pair = await generateKeyPair('ES384', { extractable: true });
  privateKey = pair.privateKey;
  const jwk = { ...(await exportJWK(pair.publicKey)), alg: 'ES384', use: 'sig' };
  kid = await calculateJwkThumbprint(jwk);
  const dir = mkdtempSync(join(tmpdir(), 'tm-auth-'));
  const file = join(dir, 'config.json');
  writeFileSync(file, JSON.stringify({ issuers: [{ iss: ISS, jwks: { keys: [{ ...jwk, kid }] } }] }));
  secure = await startService(
    { TIDEMARK_TRIAL_MODE: 'false', TIDEMARK_CONFIG_FILE: file, TIDEMARK_PUBLIC_URL: PUBLIC },
    { now: () => NOW },
  );
  locked = await startService({ TIDEMARK_TRIAL_MODE: 'false' }, { now: () => NOW });
});
afterAll(async () => {
  await secure.stop();
  await locked.stop();
});

const token = (aud: string) =>
  new SignJWT({})
    .setProtectedHeader({ alg: 'ES384', kid, typ: 'JWT' })
    .setIssuer(ISS)
    .setAudience(aud)
    .setIssuedAt()
    .setExpirationTime('5m')
    .setJti(randomUUID())
    .sign(privateKey);

describe('service authentication', () => {
  it('with no issuer configured and no trial mode, every CDS call is refused (401) and /readyz says why', async () => {
    expect((await get(`${locked.url}/cds-services`)).status).toBe(401);
    const r = await post(`${locked.url}/cds-services/bolus-review-select`, orderSelectRequest({ prefetch: prefetchOf(basicResources()) }));
    expect(r.status).toBe(401);
    expect(r.body.issue[0].code).toBe('login');
    expect((await get(`${locked.url}/readyz`)).body.warnings.join(' ')).toMatch(/no trusted issuers/);
  });

  it('a trusted issuer gets in with aud = the public URL of the endpoint called, and only there', async () => {
    const hookUrl = `${PUBLIC}/cds-services/bolus-review-select`;
    const ok = await post(
      `${secure.url}/cds-services/bolus-review-select`,
      orderSelectRequest({ prefetch: prefetchOf(basicResources()) }),
      { authorization: `Bearer ${await token(hookUrl)}` },
    );
    expect(ok.status).toBe(200);
    expect(ok.body.cards).toHaveLength(1);
    // The discovery audience does not open the service endpoint.
    const wrong = await post(
      `${secure.url}/cds-services/bolus-review-select`,
      orderSelectRequest({ prefetch: prefetchOf(basicResources()) }),
      { authorization: `Bearer ${await token(`${PUBLIC}/cds-services`)}` },
    );
    expect(wrong.status).toBe(401);
    expect((await get(`${secure.url}/cds-services`, { authorization: `Bearer ${await token(`${PUBLIC}/cds-services`)}` })).status).toBe(
      200,
    );
    // The same token twice is a replay.
    const once = await token(hookUrl);
    expect(
      (
        await post(`${secure.url}/cds-services/bolus-review-select`, orderSelectRequest({ prefetch: prefetchOf(basicResources()) }), {
          authorization: `Bearer ${once}`,
        })
      ).status,
    ).toBe(200);
    expect(
      (
        await post(`${secure.url}/cds-services/bolus-review-select`, orderSelectRequest({ prefetch: prefetchOf(basicResources()) }), {
          authorization: `Bearer ${once}`,
        })
      ).status,
    ).toBe(401);
  });

  it('the verified issuer is kept in the audit record, never the token', async () => {
    const t = await token(`${PUBLIC}/cds-services/bolus-review-select`);
    await post(`${secure.url}/cds-services/bolus-review-select`, orderSelectRequest({ prefetch: prefetchOf(basicResources()) }), {
      authorization: `Bearer ${t}`,
    });
    const rec = (await secure.svc.store.list({ limit: 1 })).items[0]!;
    const full = await secure.svc.store.get(rec.id);
    expect(full?.client?.issuer).toBe(ISS);
    expect(JSON.stringify(full)).not.toContain(t.split('.')[2]);
  });

  it('a CDS client token does not open the audit API', async () => {
    expect((await get(`${secure.url}/audit/advice`, { authorization: `Bearer ${await token(`${PUBLIC}/audit`)}` })).status).toBe(401);
  });

  it('/metrics counts requests by service and status', async () => {
    const m = await get(`${secure.url}/metrics`);
    expect(m.status).toBe(200);
    expect(String(m.body)).toMatch(
      /tidemark_http_requests_total\{route="\/cds-services\/:id",service="bolus-review-select",status="200"\} \d+/,
    );
    expect(String(m.body)).toMatch(/tidemark_audit_write_duration_seconds_bucket/);
  });
});
