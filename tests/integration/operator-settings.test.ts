// Issue 13 items 7 and 8: what docs/security.md and docs/configuration.md promise an operator, checked on the
// real service over HTTP with real JWTs (ES384 and RS384, RFC 7518 §3.4 and §3.3) and on its pino output.
// The token rules (clockSkewSeconds, maxTokenAgeSeconds, algorithms) come from the config file; /metrics can
// have a bearer token of its own; the public URL's default is warned about; the start-up line says where the
// service listens, the public URL, the trusted issuers and the audit store; trial mode stays on loopback.
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { networkInterfaces, tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listen } from '../../src/cli/listen.js';
import { loadConfig } from '../../src/config/config.js';
import { createLogger } from '../../src/log.js';
import { buildService } from '../../src/service.js';
import { basicResources, NOW, orderSelectRequest, prefetchOf } from '../helpers/hook-fixtures.js';
import { makeIssuer, writeConfigFile, type TestIssuer } from '../helpers/issuers.js';
import { get, post, startService, type Running } from '../helpers/server.js';

const PUBLIC = 'https://cds.lakeside-invented.example.org/tidemark';
const SERVICE = 'bolus-review-select';
const HOOK_AUD = `${PUBLIC}/cds-services/${SERVICE}`;
const METRICS_TOKEN = 'metrics-scrape-token-4f1e9a27c3';
const nowSec = () => Math.floor(Date.now() / 1000);

let es: TestIssuer;
let rs: TestIssuer;
let reader: TestIssuer;
let strict: Running; // the config file narrows the token rules
let plain: Running; // the defaults
let running: Running[] = [];
const started: Array<{ server: Server; close(): Promise<void> }> = [];

beforeAll(async () => {
  [es, rs, reader] = await Promise.all([
    makeIssuer('https://ehr.lakeside-invented.example.org/es'),
    makeIssuer('https://ehr.lakeside-invented.example.org/rs', 'RS384'),
    makeIssuer('https://quality.lakeside-invented.example.org/audit'),
  ]);
  const lists = { issuers: [es.entry, rs.entry], auditReaders: [reader.entry] };
  const env = { TIDEMARK_TRIAL_MODE: 'false', TIDEMARK_PUBLIC_URL: PUBLIC };
  strict = await startService(
    {
      ...env,
      TIDEMARK_CONFIG_FILE: writeConfigFile({ ...lists, algorithms: ['ES384'], clockSkewSeconds: 0, maxTokenAgeSeconds: 60 }),
      TIDEMARK_METRICS_TOKEN: METRICS_TOKEN,
    },
    { now: () => NOW },
  );
  plain = await startService({ ...env, TIDEMARK_CONFIG_FILE: writeConfigFile(lists) }, { now: () => NOW });
  running = [strict, plain];
});
afterAll(async () => {
  for (const r of running) await r.stop();
  for (const s of started) await s.close();
});

const call = (r: Running, token: string) =>
  post(`${r.url}/cds-services/${SERVICE}`, orderSelectRequest({ prefetch: prefetchOf(basicResources()) }), {
    authorization: `Bearer ${token}`,
  });
const reasonsSince = (r: Running, before: number) => r.logLines.slice(before).map((l) => JSON.parse(l) as Record<string, unknown>);

describe('token rules from the config file', () => {
  it('algorithms: ["ES384"] refuses an RS384 token the default accepts', async () => {
    const before = strict.logLines.length;
    expect((await call(strict, await rs.mint(HOOK_AUD))).status).toBe(401);
    expect(reasonsSince(strict, before).some((l) => l['reason'] === 'alg not allowed')).toBe(true);
    expect((await call(plain, await rs.mint(HOOK_AUD))).status).toBe(200);
    expect((await call(strict, await es.mint(HOOK_AUD))).status).toBe(200);
  });

  it('maxTokenAgeSeconds: 60 refuses a token issued 120 s ago (still before its exp) that the default 300 s accepts', async () => {
    const before = strict.logLines.length;
    expect((await call(strict, await es.mint(HOOK_AUD, { iat: nowSec() - 120 }))).status).toBe(401);
    expect(reasonsSince(strict, before).some((l) => l['reason'] === 'iat too old')).toBe(true);
    expect((await call(plain, await es.mint(HOOK_AUD, { iat: nowSec() - 120 }))).status).toBe(200);
  });

  it('clockSkewSeconds: 0 refuses a token expired 10 s ago that the default 60 s of leeway accepts', async () => {
    const expired = () => es.mint(HOOK_AUD, { iat: nowSec() - 40, expInSeconds: 30 });
    const before = strict.logLines.length;
    expect((await call(strict, await expired())).status).toBe(401);
    expect(reasonsSince(strict, before).some((l) => l['reason'] === 'token expired')).toBe(true);
    expect((await call(plain, await expired())).status).toBe(200);
  });

  it.each([
    [{ clockSkewSeconds: 1000 }, 'clockSkewSeconds'],
    [{ maxTokenAgeSeconds: 0 }, 'maxTokenAgeSeconds'],
    [{ algorithms: ['HS256'] }, 'algorithms'],
    [{ auditReaders: [{ iss: 'https://x.invented.example', jwksUrl: 'http://keys.invented.example/jwks' }] }, 'auditReaders'],
  ])('a bad value (%j) stops start-up naming %s', async (content, name) => {
    const cfg = loadConfig({ TIDEMARK_SQLITE_PATH: ':memory:', TIDEMARK_CONFIG_FILE: writeConfigFile(content) });
    await expect(buildService(cfg, { log: createLogger('silent') })).rejects.toThrow(new RegExp(`TIDEMARK_CONFIG_FILE ${name}`));
  });
});

describe('what the log tells an operator', () => {
  it('an aud mismatch names the audience expected (our URL), never the token', async () => {
    const before = plain.logLines.length;
    const token = await es.mint(`${PUBLIC}/cds-services`);
    expect((await call(plain, token)).status).toBe(401);
    const audit = await reader.mint(`${PUBLIC}/audit/advice`, { scope: 'tidemark.audit' });
    expect((await get(`${plain.url}/audit/advice`, { authorization: `Bearer ${audit}` })).status).toBe(401);
    const lines = reasonsSince(plain, before).filter((l) => l['reason'] === 'aud mismatch');
    expect(lines.map((l) => l['expectedAudience'])).toEqual([HOOK_AUD, `${PUBLIC}/audit`]);
    for (const l of plain.logLines) for (const t of [token, audit]) expect(l).not.toContain(t.split('.')[2]);
  });

  it('without TIDEMARK_PUBLIC_URL outside trial mode, start-up warns and names the default it uses', async () => {
    const unset = await startService({ TIDEMARK_TRIAL_MODE: 'false', PORT: '8089' });
    running.push(unset);
    const warn = unset.logLines
      .map((l) => JSON.parse(l) as Record<string, unknown>)
      .find((l) => String(l['msg']).startsWith('TIDEMARK_PUBLIC_URL is not set'));
    expect(warn).toMatchObject({ level: 40, publicUrl: 'http://localhost:8089' });
    expect((await get(`${unset.url}/readyz`)).body.warnings.join(' ')).toMatch(/TIDEMARK_PUBLIC_URL is not set/);
    // In trial mode the default is expected, and not warned about.
    const trial = await startService({ TIDEMARK_TRIAL_MODE: 'true' });
    running.push(trial);
    expect(trial.logLines.some((l) => l.includes('TIDEMARK_PUBLIC_URL is not set'))).toBe(false);
  });
});

describe('/metrics may have a credential of its own; /healthz, /readyz and /docs answer without one', () => {
  it('with TIDEMARK_METRICS_TOKEN set, /metrics wants exactly that bearer token', async () => {
    expect((await get(`${strict.url}/metrics`)).status).toBe(401);
    expect((await get(`${strict.url}/metrics`, { authorization: `Bearer ${METRICS_TOKEN}x` })).status).toBe(401);
    const ok = await get(`${strict.url}/metrics`, { authorization: `Bearer ${METRICS_TOKEN}` });
    expect(ok.status).toBe(200);
    expect(String(ok.body)).toMatch(/tidemark_http_requests_total/);
    for (const path of ['/healthz', '/readyz', '/docs/security.md']) expect((await get(`${strict.url}${path}`)).status).toBe(200);
    expect(strict.logLines.some((l) => l.includes(METRICS_TOKEN))).toBe(false);
    // Without the variable /metrics stays open (tests/integration/service-auth.test.ts scrapes it so).
    expect((await get(`${plain.url}/metrics`)).status).toBe(200);
  });
});

/** The service from src/service.ts started by the same listen() as `npm start`, its pino lines kept. */
async function serve(env: Record<string, string>) {
  const dir = mkdtempSync(join(tmpdir(), 'tm-listen-'));
  const logLines: string[] = [];
  const sink = new Writable({
    write(chunk, _enc, cb) {
      logLines.push(...String(chunk).split('\n').filter(Boolean));
      cb();
    },
  });
  const cfg = loadConfig({ PORT: '0', TIDEMARK_SQLITE_PATH: join(dir, 'audit.sqlite'), ...env });
  const svc = await buildService(cfg, { log: createLogger('info', sink) });
  const server = await listen(svc, cfg);
  const close = async () => {
    await new Promise<void>((r) => server.close(() => r()));
    await svc.close();
    rmSync(dir, { recursive: true, force: true });
  };
  started.push({ server, close });
  const startLine = logLines
    .map((l) => JSON.parse(l) as Record<string, unknown>)
    .find((l) => String(l['msg']).startsWith('Tidemark listening'));
  return { server, startLine, address: server.address() as AddressInfo };
}

describe('the start-up line and where the service listens', () => {
  it('names the address, the public URL, the number of trusted issuers and the audit store', async () => {
    const { startLine, address } = await serve({
      HOST: '127.0.0.1',
      TIDEMARK_PUBLIC_URL: PUBLIC,
      TIDEMARK_CONFIG_FILE: writeConfigFile({ issuers: [es.entry, rs.entry], auditReaders: [reader.entry] }),
    });
    expect(startLine).toMatchObject({
      level: 30,
      host: '127.0.0.1',
      port: address.port,
      publicUrl: PUBLIC,
      trustedIssuers: 2,
      auditReaders: 1,
      auditStore: 'sqlite',
      replayCache: 'per-process',
    });
    expect(startLine?.['msg']).toBe(
      `Tidemark listening on 127.0.0.1:${address.port}, public URL ${PUBLIC}, 2 trusted issuer(s), audit store sqlite`,
    );
  });

  it('trial mode listens on 127.0.0.1 unless HOST is set, and says so', async () => {
    expect(loadConfig({ TIDEMARK_TRIAL_MODE: 'true' }).HOST).toBe('127.0.0.1');
    expect(loadConfig({}).HOST).toBe('0.0.0.0');
    const trial = await serve({ TIDEMARK_TRIAL_MODE: 'true', TIDEMARK_AUDIT_TOKEN: 'local-trial-audit-token' });
    expect(trial.address.address).toBe('127.0.0.1');
    expect(trial.startLine).toMatchObject({ host: '127.0.0.1', trialMode: true });
    expect(String(trial.startLine?.['msg'])).toContain('trial mode: listening on 127.0.0.1 only (set HOST to listen elsewhere)');
    // Another address of this machine, if it has one, does not reach the trial service.
    const external = Object.values(networkInterfaces())
      .flat()
      .find((i) => i && i.family === 'IPv4' && !i.internal);
    if (external) await expect(fetch(`http://${external.address}:${trial.address.port}/healthz`)).rejects.toThrow();

    const chosen = await serve({ TIDEMARK_TRIAL_MODE: 'true', HOST: '0.0.0.0', TIDEMARK_AUDIT_TOKEN: 'local-trial-audit-token' });
    expect(chosen.address.address).toBe('0.0.0.0');
    expect(String(chosen.startLine?.['msg'])).not.toContain('listening on 127.0.0.1 only');
  });

  it('the `npm run trial` command itself (src/cli/serve.ts, environment as the script sets it, no HOST) listens on 127.0.0.1', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tm-trial-'));
    const { HOST: _host, ...env } = process.env;
    const child = spawn(process.execPath, ['--import', 'tsx', 'src/cli/serve.ts'], {
      env: {
        ...env,
        PORT: '0',
        TIDEMARK_TRIAL_MODE: 'true',
        TIDEMARK_AUDIT_TOKEN: 'local-trial-audit-token',
        TIDEMARK_SQLITE_PATH: join(dir, 'a.sqlite'),
        TIDEMARK_LOG_LEVEL: 'info',
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    try {
      const line = await new Promise<Record<string, unknown>>((resolve, reject) => {
        let buf = '';
        const timer = setTimeout(() => reject(new Error(`no start-up line: ${buf}`)), 20_000);
        child.stdout.on('data', (d: Buffer) => {
          buf += d.toString();
          const found = buf.split('\n').find((l) => l.includes('"Tidemark listening'));
          if (found) {
            clearTimeout(timer);
            resolve(JSON.parse(found) as Record<string, unknown>);
          }
        });
        child.on('exit', (code) => reject(new Error(`exited ${code}: ${buf}`)));
      });
      expect(line).toMatchObject({ host: '127.0.0.1', trialMode: true });
      expect(String(line['msg'])).toContain('trial mode: listening on 127.0.0.1 only');
    } finally {
      if (child.exitCode === null && child.signalCode === null) {
        const exited = new Promise((r) => child.once('exit', r));
        child.kill('SIGTERM');
        await exited;
      }
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
