// Group commit, counted (issue 18): the SQLite and PostgreSQL stores report how many transactions it committed and how many records
// they held, and /metrics exports both, so records per commit (the size of the groups) can be read under load.
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import { PostgresAuditStore } from '../../src/audit/postgres-store.js';
import { SqliteAuditStore } from '../../src/audit/sqlite-store.js';
import type { AnsweredRecord } from '../../src/audit/types.js';
import { createMetrics } from '../../src/http/metrics.js';

const dir = mkdtempSync(join(tmpdir(), 'tidemark-commits-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function record(i: number): AnsweredRecord {
  const uuid = randomUUID();
  const recordedAt = new Date(Date.parse('2031-05-01T10:00:00Z') + i * 1000).toISOString();
  return {
    id: randomUUID(),
    recordedAt,
    service: 'bolus-review-select',
    hook: 'order-select',
    hookInstance: randomUUID(),
    patientId: 'pt-wren-2',
    outcome: 'answered',
    rulesVersion: 'test',
    findings: [],
    cards: [{ uuid, summary: 'Invented', indicator: 'info', source: { label: 'Tidemark' } }],
    cardKinds: { [uuid]: 'volume-ok' },
    gathering: [],
    timings: { totalMs: 1, gatherMs: 0, fhirWaitMs: 0, assessMs: 0 },
    snapshot: {
      patient: { ref: 'Patient/pt-wren-2', sex: 'unknown' },
      now: recordedAt,
      measurements: [],
      coded: [],
      dynamicTests: [],
      fluids: [],
      vasoactives: [],
      conditions: [],
      draftOrders: [],
      excluded: [],
    },
    advice: { rulesVersion: 'test', now: recordedAt, findings: [], ruleErrors: [] },
  };
}

describe('the SQLite store counts its group commits', () => {
  it('in memory: one append awaited alone is one commit; twenty appended in one turn are one more', async () => {
    const store = new SqliteAuditStore(':memory:');
    await store.init();
    await store.append(record(0));
    expect(store.commitStats()).toEqual({ commits: 1, records: 1 });
    await Promise.all(Array.from({ length: 20 }, (_, i) => store.append(record(i + 1))));
    expect(store.commitStats()).toEqual({ commits: 2, records: 21 });
    await store.close();
  });

  it('on a file (the writer thread): every record is counted once, in no more commits than records', async () => {
    const store = new SqliteAuditStore(join(dir, 'audit.sqlite'));
    await store.init();
    for (let i = 0; i < 3; i += 1) await store.append(record(i));
    expect(store.commitStats()).toEqual({ commits: 3, records: 3 });
    await Promise.all(Array.from({ length: 40 }, (_, i) => store.append(record(i + 3))));
    const s = store.commitStats();
    expect(s.records).toBe(43);
    expect(s.commits).toBeGreaterThanOrEqual(4);
    expect(s.commits).toBeLessThanOrEqual(43);
    expect(await store.verifyChain()).toEqual({ ok: true, checked: 43 });
    await store.close();
  });
});

describe('the PostgreSQL store groups its appends too', () => {
  const PG_URL = process.env['TIDEMARK_TEST_PG_URL'] ?? 'postgres://postgres@127.0.0.1:5432/test';
  const schema = `tm_commits_${process.pid}_${randomUUID().slice(0, 8)}`;
  afterAll(async () => {
    const c = new pg.Client({ connectionString: PG_URL });
    await c.connect();
    await c.query(`DROP SCHEMA IF EXISTS "${schema}" CASCADE`);
    await c.end();
  });

  it('one append awaited alone is one commit; twenty appended in one turn are one more; a refused record undoes no other', async () => {
    const store = new PostgresAuditStore(PG_URL, { schema, poolSize: 4 });
    await store.init();
    await store.append(record(0));
    expect(store.commitStats()).toEqual({ commits: 1, records: 1 });
    await Promise.all(Array.from({ length: 20 }, (_, i) => store.append(record(i + 1))));
    expect(store.commitStats()).toEqual({ commits: 2, records: 21 });
    expect(store.batchesRedone).toBe(0); // the twenty went in by the one-statement insert
    // Five in one turn, the fourth with the id of the second: it alone is refused, in the same one transaction.
    const five = Array.from({ length: 5 }, (_, i) => record(30 + i));
    const dup = { ...(five[3] as AnsweredRecord), id: (five[1] as AnsweredRecord).id };
    const settled = await Promise.allSettled([five[0], five[1], five[2], dup, five[4]].map((r) => store.append(r as AnsweredRecord)));
    expect(settled.map((r) => r.status)).toEqual(['fulfilled', 'fulfilled', 'fulfilled', 'rejected', 'fulfilled']);
    expect(store.commitStats()).toEqual({ commits: 3, records: 25 });
    expect(store.batchesRedone).toBe(1); // refused as a whole, then record by record
    expect(await store.get(dup.id)).toMatchObject({ hookInstance: (five[1] as AnsweredRecord).hookInstance });
    expect(await store.verifyChain()).toEqual({ ok: true, checked: 25 });
    await store.close();
  });
});

describe('/metrics exports the counts', () => {
  it('as two gauges read at each scrape', async () => {
    let stats = { commits: 2, records: 5 };
    const m = createMetrics({ commitStats: () => stats });
    expect(await m.registry.metrics()).toMatch(/^tidemark_audit_commits 2$/m);
    stats = { commits: 3, records: 9 };
    const text = await m.registry.metrics();
    expect(text).toMatch(/^tidemark_audit_commits 3$/m);
    expect(text).toMatch(/^tidemark_audit_committed_records 9$/m);
  });

  it('a store that does not group its appends exports neither', async () => {
    expect(await createMetrics().registry.metrics()).not.toMatch(/tidemark_audit_commits/);
  });
});
