// Secrets and PHI: the fhirAuthorization token is used for the call only (never logged, never stored), and a
// patient's name never reaches the logs. CDS Hooks 2.0 §Security: treat the access token as transient.
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import express from 'express';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as b from '../../examples/lib/fhir-builders.js';
import { basicResources, NOW, orderSelectRequest, PID, prefetchOf } from '../helpers/hook-fixtures.js';
import { AUDIT_HEADERS, get, post, startService, type Running } from '../helpers/server.js';

const TOKEN = 'tok-PLANTED-9f8e7d6c5b4a-secret';
const NAME_FAMILY = 'Quarringtonova';
const NAME_GIVEN = 'Zebedina';

let s: Running;
let fhir: Server;
let fhirUrl = '';
const seenAuth: string[] = [];

beforeAll(async () => {
  const app = express();
  app.use((req, res) => {
    seenAuth.push(String(req.headers.authorization));
    if (req.path.startsWith('/Patient/')) res.json(b.patient(PID, 'female', '1958-04-11', NAME_FAMILY, NAME_GIVEN));
    else if (req.path === '/Observation' && String(req.query['code'] ?? '').includes('2518-9'))
      res.status(500).json({
        resourceType: 'OperationOutcome',
        issue: [{ severity: 'error', code: 'exception', diagnostics: `patient ${NAME_GIVEN} ${NAME_FAMILY} failed` }],
      });
    else res.json(b.searchset([]));
  });
  fhir = await new Promise((r) => {
    const x = app.listen(0, '127.0.0.1', () => r(x));
  });
  fhirUrl = `http://127.0.0.1:${(fhir.address() as AddressInfo).port}`;
  s = await startService({ TIDEMARK_LOG_LEVEL: 'trace' }, { now: () => NOW });
});
afterAll(async () => {
  await s.stop();
  await new Promise<void>((r) => fhir.close(() => r()));
});

describe('log and audit secrecy', () => {
  it('the token is used, then found nowhere; the name is in no log line', async () => {
    // Prefetch carries the Patient with a name; vitals come prefetched; the rest is queried with the token.
    const full = prefetchOf(basicResources());
    const prefetch = { patient: { ...b.patient(PID, 'female', '1958-04-11', NAME_FAMILY, NAME_GIVEN) }, vitals: full['vitals'] };
    const r1 = await post(`${s.url}/cds-services/bolus-review-select`, orderSelectRequest({ prefetch, fhirServer: fhirUrl, token: TOKEN }));
    expect(r1.status).toBe(200);
    // A bad request that carries the token too (its body is refused, so the token must not leak into an error).
    const bad = orderSelectRequest({ prefetch, fhirServer: fhirUrl, token: TOKEN }) as Record<string, any>;
    bad['hookInstance'] = `not-a-uuid ${NAME_FAMILY}`;
    const r2 = await post(`${s.url}/cds-services/bolus-review-select`, bad);
    expect(r2.status).toBe(400);
    expect(JSON.stringify(r2.body)).not.toContain(TOKEN);
    // And one call whose Authorization header is a planted bearer (trial mode ignores it, but it must not be logged).
    await post(`${s.url}/cds-services/bolus-review-select`, orderSelectRequest({ prefetch: full }), { authorization: `Bearer ${TOKEN}` });
    await get(`${s.url}/audit/advice?limit=5`, AUDIT_HEADERS);

    expect(seenAuth).toContain(`Bearer ${TOKEN}`); // the token was really used against the FHIR server
    expect(s.logLines.length).toBeGreaterThan(0);
    for (const line of s.logLines) {
      expect(line).not.toContain(TOKEN);
      expect(line).not.toContain(NAME_FAMILY);
      expect(line).not.toContain(NAME_GIVEN);
    }
    // Every file of the SQLite database (main, WAL, SHM) byte for byte.
    const dir = dirname(s.dbPath);
    const files = readdirSync(dir);
    expect(files.length).toBeGreaterThan(0);
    for (const f of files) expect(readFileSync(join(dir, f)).includes(Buffer.from(TOKEN))).toBe(false);
  });
});
