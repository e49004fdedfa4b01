/** Runs the real app on 127.0.0.1 with a real SQLite audit file in a temp folder. */
import { mkdtempSync, rmSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import type { Server } from 'node:http';
import { loadConfig } from '../../src/config/config.js';
import { createLogger } from '../../src/log.js';
import { buildService, type Service, type ServiceOptions } from '../../src/service.js';

/** The audit API token the test service is configured with. */
export const TEST_AUDIT_TOKEN = 'test-audit-token-0123456789';
export const AUDIT_HEADERS = { authorization: `Bearer ${TEST_AUDIT_TOKEN}` };

export interface Running {
  url: string;
  svc: Service;
  dbPath: string;
  logLines: string[];
  stop(): Promise<void>;
}

export async function startService(env: Record<string, string> = {}, opts: ServiceOptions = {}): Promise<Running> {
  const dir = mkdtempSync(join(tmpdir(), 'tidemark-test-'));
  const dbPath = join(dir, 'audit.sqlite');
  const logLines: string[] = [];
  const sink = new Writable({
    write(chunk, _enc, cb) {
      logLines.push(...String(chunk).split('\n').filter(Boolean));
      cb();
    },
  });
  const cfg = loadConfig({
    TIDEMARK_SQLITE_PATH: dbPath,
    TIDEMARK_LOG_LEVEL: 'info',
    TIDEMARK_TRIAL_MODE: 'true',
    TIDEMARK_AUDIT_TOKEN: TEST_AUDIT_TOKEN,
    ...env,
  });
  const svc = await buildService(cfg, { log: createLogger('info', sink), ...opts });
  const server: Server = await new Promise((resolve) => {
    const s = svc.app.listen(0, '127.0.0.1', () => resolve(s));
  });
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  return {
    url,
    svc,
    dbPath,
    logLines,
    async stop() {
      await new Promise<void>((r) => server.close(() => r()));
      await svc.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

export async function post(url: string, body: unknown, headers: Record<string, string> = {}): Promise<{ status: number; body: any }> {
  const r = await fetch(url, {
    method: 'POST',
    headers: { 'content-type': 'application/json', ...headers },
    body: typeof body === 'string' ? body : JSON.stringify(body),
  });
  const text = await r.text();
  let parsed: unknown = text;
  try {
    parsed = JSON.parse(text);
  } catch {
    /* keep text */
  }
  return { status: r.status, body: parsed };
}

export async function get(url: string, headers: Record<string, string> = {}): Promise<{ status: number; body: any }> {
  const r = await fetch(url, { headers });
  const text = await r.text();
  let parsed: unknown = text;
  try {
    parsed = JSON.parse(text);
  } catch {
    /* keep text */
  }
  return { status: r.status, body: parsed };
}
