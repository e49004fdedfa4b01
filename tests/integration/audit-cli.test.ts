// The audit command line over a real SQLite audit file: verify (exit 1 once a record is tampered with),
// export (NDJSON, every record once), replay.
import { spawnSync } from 'node:child_process';
import { brotliCompressSync, brotliDecompressSync } from 'node:zlib';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ADVICE_CASES } from '../helpers/advice-fixtures.js';
import { NOW, orderSelectRequest, prefetchOf } from '../helpers/hook-fixtures.js';
import { post, startService, type Running } from '../helpers/server.js';

let s: Running;
const run = (...args: string[]) =>
  spawnSync(process.execPath, ['--import', 'tsx', 'src/cli/audit.ts', ...args], {
    env: { ...process.env, TIDEMARK_SQLITE_PATH: s.dbPath },
    encoding: 'utf8',
  });

beforeAll(async () => {
  s = await startService({}, { now: () => NOW });
  for (const c of Object.keys(ADVICE_CASES) as Array<keyof typeof ADVICE_CASES>) {
    await post(`${s.url}/cds-services/bolus-review-select`, orderSelectRequest({ prefetch: prefetchOf(ADVICE_CASES[c]) }));
  }
});
afterAll(async () => s.stop());

describe('npm run audit', () => {
  it('export writes every record once as NDJSON; replay reports no change under the same rules', () => {
    const r = run('export');
    expect(r.status).toBe(0);
    const lines = r.stdout
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l));
    expect(lines).toHaveLength(5);
    expect(new Set(lines.map((l) => l.id)).size).toBe(5);
    expect(lines[0].seq).toBeGreaterThan(lines[4].seq);
    const rep = run('replay', lines[0].id);
    expect(rep.status).toBe(0);
    expect(JSON.parse(rep.stdout)).toMatchObject({ adviceId: lines[0].id, changed: false });
  });

  it('verify passes, then fails with exit 1 when a stored record is changed', () => {
    const ok = run('verify');
    expect(ok.status).toBe(0);
    expect(ok.stdout).toMatch(/intact: 5 records/);
    const db = new Database(s.dbPath);
    // A record is stored as received (format 2): its outputs are Brotli-compressed JSON; one word changed in them.
    const row = db.prepare('SELECT format, outputs FROM advice WHERE seq = 3').get() as { format: number; outputs: Buffer };
    expect(row.format).toBe(2);
    const changed = brotliDecompressSync(row.outputs).toString('utf8').replace('smaller-aliquot', 'proceed-and-reassess');
    db.prepare('UPDATE advice SET outputs = ? WHERE seq = 3').run(brotliCompressSync(Buffer.from(changed)));
    db.close();
    const bad = run('verify');
    expect(bad.status).toBe(1);
    expect(bad.stdout).toMatch(/BROKEN at record seq 3/);
  });

  it('an unknown command prints the usage and exits 2', () => {
    expect(run('shred').status).toBe(2);
  });
});
