/**
 * The audit schema's migrations (src/audit/sql/migrations.ts) on both stores: a store written by Tidemark 0.2.0
 * opens, is brought up to the current version and keeps every record readable and verifiable; both dialects end
 * up with the same tables, columns and indexes (but for the differences the migrations name); a store newer
 * than this Tidemark is refused. PostgreSQL must be reachable (TIDEMARK_TEST_PG_URL, default
 * postgres://postgres@127.0.0.1:5432/test); each run uses schemas of its own. Records are invented.
 */
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chainHashOfText, GENESIS, recordText } from '../../src/audit/chain.js';
import { PostgresAuditStore } from '../../src/audit/postgres-store.js';
import { SCHEMA_VERSION } from '../../src/audit/sql/migrations.js';
import { SqliteAuditStore } from '../../src/audit/sqlite-store.js';
import type { AdviceRecord, AnsweredRecord, AuditStore } from '../../src/audit/types.js';

const PG_URL = process.env['TIDEMARK_TEST_PG_URL'] ?? 'postgres://postgres@127.0.0.1:5432/test';
const RUN = `tm_migr_${process.pid}_${randomUUID().slice(0, 8)}`;

/** The tables exactly as Tidemark 0.2.0 created them in SQLite (src/audit/sqlite-store.ts at 0.2.0). */
const SQLITE_0_2_0 = `
CREATE TABLE IF NOT EXISTS advice (
  seq INTEGER PRIMARY KEY AUTOINCREMENT, id TEXT NOT NULL UNIQUE, recorded_at TEXT NOT NULL, service TEXT NOT NULL, hook TEXT NOT NULL,
  hook_instance TEXT NOT NULL, patient_id TEXT, encounter_id TEXT, outcome TEXT NOT NULL, rules_version TEXT NOT NULL, record TEXT NOT NULL,
  prev_hash TEXT NOT NULL, hash TEXT NOT NULL
);
CREATE INDEX IF NOT EXISTS advice_patient_time ON advice (patient_id, recorded_at);
CREATE INDEX IF NOT EXISTS advice_time ON advice (recorded_at);
CREATE TABLE IF NOT EXISTS advice_card (card_uuid TEXT PRIMARY KEY, advice_id TEXT NOT NULL REFERENCES advice(id), card_kind TEXT NOT NULL, service TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS feedback (
  feedback_key TEXT PRIMARY KEY, card_uuid TEXT NOT NULL REFERENCES advice_card(card_uuid), outcome TEXT NOT NULL, accepted_suggestions TEXT NOT NULL,
  reason_system TEXT, reason_code TEXT, reason_display TEXT, user_comment TEXT, outcome_timestamp TEXT NOT NULL, received_at TEXT NOT NULL, service TEXT NOT NULL
);
CREATE INDEX IF NOT EXISTS feedback_card ON feedback (card_uuid);
`;

/** The same in PostgreSQL (src/audit/postgres-store.ts at 0.2.0); `s` is the quoted schema. */
const postgres020 = (s: string): string[] => [
  `CREATE TABLE ${s}.advice (
    seq BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY, id TEXT NOT NULL UNIQUE, recorded_at TEXT COLLATE "C" NOT NULL, service TEXT NOT NULL,
    hook TEXT NOT NULL, hook_instance TEXT NOT NULL, patient_id TEXT, encounter_id TEXT, outcome TEXT NOT NULL, rules_version TEXT NOT NULL,
    record TEXT NOT NULL, prev_hash TEXT NOT NULL, hash TEXT NOT NULL
  )`,
  `CREATE INDEX advice_patient_time ON ${s}.advice (patient_id, recorded_at)`,
  `CREATE INDEX advice_time ON ${s}.advice (recorded_at)`,
  `CREATE TABLE ${s}.advice_card (card_uuid TEXT PRIMARY KEY, advice_id TEXT NOT NULL REFERENCES ${s}.advice(id), card_kind TEXT COLLATE "C" NOT NULL, service TEXT NOT NULL)`,
  `CREATE INDEX advice_card_advice ON ${s}.advice_card (advice_id)`,
  `CREATE TABLE ${s}.feedback (
    feedback_key TEXT PRIMARY KEY, card_uuid TEXT NOT NULL REFERENCES ${s}.advice_card(card_uuid), outcome TEXT NOT NULL, accepted_suggestions TEXT NOT NULL,
    reason_system TEXT, reason_code TEXT COLLATE "C", reason_display TEXT, user_comment TEXT, outcome_timestamp TEXT COLLATE "C" NOT NULL,
    received_at TEXT NOT NULL, service TEXT NOT NULL, arrival BIGINT GENERATED ALWAYS AS IDENTITY
  )`,
  `CREATE INDEX feedback_card ON ${s}.feedback (card_uuid)`,
];

/** After the upgraded rows: a record of format 1 and one stored as received (format 2) join the same one chain. */
async function appendBothFormats(store: AuditStore): Promise<void> {
  await store.append(record(10));
  const received = { ...record(11), inputs: { now: '2026-06-01T09:00:00.000Z', request: { body: '{}', asReceived: true }, fhir: [] } };
  await store.append(received as AdviceRecord);
  expect((await store.get(received.id))?.format).toBe(2);
  expect(await store.verifyChain()).toEqual({ ok: true, checked: 5 });
}

function record(i: number): AdviceRecord {
  const uuid = randomUUID();
  const rec: Omit<AnsweredRecord, 'snapshot' | 'advice'> = {
    id: randomUUID(),
    recordedAt: new Date(Date.parse('2026-06-01T08:00:00Z') + i * 60_000).toISOString(),
    service: 'bolus-review-select',
    hook: 'order-select',
    hookInstance: randomUUID(),
    patientId: 'pt-heron-3',
    outcome: 'answered',
    rulesVersion: '0.2.0+rules.0a1b2c3d',
    findings: [],
    cards: [{ uuid, summary: 'Invented card', indicator: 'info', source: { label: 'Tidemark' } }],
    cardKinds: { [uuid]: 'volume-ok' },
    gathering: [],
    timings: { totalMs: 12, gatherMs: 1, fhirWaitMs: 0, assessMs: 3 },
    client: { issuer: 'https://ehr.heron-invented.example' },
  };
  const snapshot = {
    patient: { ref: 'Patient/pt-heron-3', sex: 'unknown' as const },
    now: rec.recordedAt,
    measurements: [],
    coded: [],
    dynamicTests: [],
    fluids: [],
    vasoactives: [],
    conditions: [],
    draftOrders: [],
    excluded: [],
  };
  return { ...rec, snapshot, advice: { rulesVersion: rec.rulesVersion, now: rec.recordedAt, findings: [], ruleErrors: [] } };
}

/** Rows as 0.2.0 wrote them: the record's text, chained by sha256(previous hash + text) (decision 0003). */
function rows020(n: number): Array<{ rec: AdviceRecord; text: string; prev: string; hash: string }> {
  let prev = GENESIS;
  return Array.from({ length: n }, (_, i) => {
    const rec = record(i);
    const text = recordText(rec);
    const hash = chainHashOfText(prev, text);
    const row = { rec, text, prev, hash };
    prev = hash;
    return row;
  });
}

describe('a SQLite store written by Tidemark 0.2.0', () => {
  let dir = '';
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'tidemark-migr-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('is brought to the current schema version; its records stay readable, verifiable and attributable', async () => {
    const path = join(dir, 'old.sqlite');
    const old = rows020(3);
    const db = new Database(path);
    db.exec(SQLITE_0_2_0);
    for (const r of old) {
      db.prepare(
        `INSERT INTO advice (id, recorded_at, service, hook, hook_instance, patient_id, encounter_id, outcome, rules_version, record, prev_hash, hash)
        VALUES (?, ?, ?, ?, ?, ?, NULL, ?, ?, ?, ?, ?)`,
      ).run(
        r.rec.id,
        r.rec.recordedAt,
        r.rec.service,
        r.rec.hook,
        r.rec.hookInstance,
        r.rec.patientId,
        r.rec.outcome,
        r.rec.rulesVersion,
        r.text,
        r.prev,
        r.hash,
      );
      for (const [uuid, kind] of Object.entries(r.rec.cardKinds))
        db.prepare('INSERT INTO advice_card VALUES (?, ?, ?, ?)').run(uuid, r.rec.id, kind, r.rec.service);
    }
    expect(db.pragma('user_version', { simple: true })).toBe(0);
    db.close();

    const store = new SqliteAuditStore(path);
    await store.init();
    try {
      expect(store.schemaVersion()).toBe(SCHEMA_VERSION);
      expect(await store.verifyChain()).toEqual({ ok: true, checked: 3 });
      expect(await store.get(old[1]!.rec.id)).toMatchObject({ id: old[1]!.rec.id, client: old[1]!.rec.client });
      // The issuer column is empty for the old rows: the card's issuer is read from the record's text.
      const uuid = Object.keys(old[0]!.rec.cardKinds)[0]!;
      expect((await store.cardOwner(uuid))?.issuer).toBe('https://ehr.heron-invented.example');
      await appendBothFormats(store);
    } finally {
      await store.close();
    }
    const check = new Database(path, { readonly: true });
    const columns = (check.pragma('table_info(advice)') as Array<{ name: string }>).map((c) => c.name);
    const indexes = (
      check.prepare("SELECT name FROM sqlite_master WHERE type = 'index' AND name NOT LIKE 'sqlite_%'").all() as Array<{ name: string }>
    ).map((r) => r.name);
    check.close();
    expect(columns).toContain('issuer');
    expect(indexes).toContain('advice_card_advice');
  });

  it('opening it again applies nothing twice', async () => {
    const path = join(dir, 'twice.sqlite');
    for (let i = 0; i < 2; i += 1) {
      const s = new SqliteAuditStore(path);
      await s.init();
      expect(s.schemaVersion()).toBe(SCHEMA_VERSION);
      await s.close();
    }
  });

  it('a file of a newer schema version is refused, not written to', async () => {
    const path = join(dir, 'newer.sqlite');
    const db = new Database(path);
    db.pragma(`user_version = ${SCHEMA_VERSION + 1}`);
    db.close();
    const s = new SqliteAuditStore(path);
    await expect(s.init()).rejects.toThrow(/newer than this Tidemark/);
    await s.close();
  });
});

describe('a PostgreSQL schema written by Tidemark 0.2.0, and the two dialects side by side', () => {
  let admin: pg.Client;
  const schemas: string[] = [];
  beforeAll(async () => {
    admin = new pg.Client({ connectionString: PG_URL, connectionTimeoutMillis: 5000 });
    await admin.connect();
  });
  afterAll(async () => {
    for (const s of schemas) await admin.query(`DROP SCHEMA IF EXISTS "${s}" CASCADE`);
    await admin.end();
  });

  it('is brought to the current schema version; its records stay readable, verifiable and attributable', async () => {
    const schema = `${RUN}_old`;
    schemas.push(schema);
    const s = `"${schema}"`;
    await admin.query(`CREATE SCHEMA ${s}`);
    for (const stmt of postgres020(s)) await admin.query(stmt);
    const old = rows020(3);
    for (const r of old) {
      await admin.query(
        `INSERT INTO ${s}.advice (id, recorded_at, service, hook, hook_instance, patient_id, outcome, rules_version, record, prev_hash, hash)
         VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11)`,
        [
          r.rec.id,
          r.rec.recordedAt,
          r.rec.service,
          r.rec.hook,
          r.rec.hookInstance,
          r.rec.patientId,
          r.rec.outcome,
          r.rec.rulesVersion,
          r.text,
          r.prev,
          r.hash,
        ],
      );
      for (const [uuid, kind] of Object.entries(r.rec.cardKinds))
        await admin.query(`INSERT INTO ${s}.advice_card VALUES ($1, $2, $3, $4)`, [uuid, r.rec.id, kind, r.rec.service]);
    }
    const store = new PostgresAuditStore(PG_URL, { schema, poolSize: 2 });
    try {
      expect(await store.schemaVersion()).toBe(0);
      await store.init();
      expect(await store.schemaVersion()).toBe(SCHEMA_VERSION);
      expect(await store.verifyChain()).toEqual({ ok: true, checked: 3 });
      const uuid = Object.keys(old[2]!.rec.cardKinds)[0]!;
      expect((await store.cardOwner(uuid))?.issuer).toBe('https://ehr.heron-invented.example');
      await appendBothFormats(store);
      expect(await store.sharedReplayCache().seen('https://ehr.heron-invented.example jti-9', Date.now() / 1000 + 60)).toBe(false);
    } finally {
      await store.close();
    }
  });

  it('both stores end with the same tables, columns and indexes, but for the differences the migrations name', async () => {
    const schema = `${RUN}_new`;
    schemas.push(schema);
    const pgStore = new PostgresAuditStore(PG_URL, { schema, poolSize: 2 });
    await pgStore.init();
    await pgStore.close();
    const dir = mkdtempSync(join(tmpdir(), 'tidemark-migr-'));
    try {
      const path = join(dir, 'new.sqlite');
      const lite = new SqliteAuditStore(path);
      await lite.init();
      await lite.close();
      const db = new Database(path, { readonly: true });
      const liteTables = (
        db.prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name").all() as Array<{
          name: string;
        }>
      ).map((r) => r.name);
      const liteColumns = Object.fromEntries(
        liteTables.map((t) => [t, (db.pragma(`table_info(${t})`) as Array<{ name: string }>).map((c) => c.name).sort()]),
      );
      const liteIndexes = (
        db.prepare("SELECT name FROM sqlite_master WHERE type = 'index' AND name NOT LIKE 'sqlite_%' ORDER BY name").all() as Array<{
          name: string;
        }>
      ).map((r) => r.name);
      db.close();

      const cols = await admin.query<{ table_name: string; column_name: string }>(
        'SELECT table_name, column_name FROM information_schema.columns WHERE table_schema = $1 ORDER BY table_name, column_name',
        [schema],
      );
      const pgColumns: Record<string, string[]> = {};
      for (const r of cols.rows) (pgColumns[r.table_name] ??= []).push(r.column_name);
      const idx = await admin.query<{ indexname: string }>(
        "SELECT indexname FROM pg_indexes WHERE schemaname = $1 AND indexname NOT LIKE '%_pkey' AND indexname NOT LIKE '%_key' ORDER BY indexname",
        [schema],
      );

      // Named differences: PostgreSQL's feedback.arrival is SQLite's rowid; the jti cache and the version table are
      // PostgreSQL's (SQLite keeps its version in PRAGMA user_version).
      const { jti_seen: _jti, schema_version: _version, ...pgShared } = pgColumns;
      pgShared['feedback'] = (pgShared['feedback'] ?? []).filter((c) => c !== 'arrival');
      expect(liteColumns).toEqual(Object.fromEntries(Object.entries(pgShared).map(([t, c]) => [t, [...c].sort()])));
      expect(liteIndexes).toEqual(idx.rows.map((r) => r.indexname));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
