/**
 * One contract for both audit adapters: the same cases run against a real SQLite file and a real
 * PostgreSQL schema. PostgreSQL must be reachable (CI starts it): if it is not, these tests fail.
 * Connection: TIDEMARK_TEST_PG_URL, default postgres://postgres@127.0.0.1:5432/test.
 * All ids, patients and texts below are invented.
 */
import { createHash, randomUUID } from 'node:crypto';
import { brotliCompressSync, brotliDecompressSync } from 'node:zlib';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import pg from 'pg';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { chainHash, GENESIS } from '../../src/audit/chain.js';
import { openAuditStore } from '../../src/audit/open-store.js';
import { PostgresAuditStore } from '../../src/audit/postgres-store.js';
import { SqliteAuditStore } from '../../src/audit/sqlite-store.js';
import type { AdviceRecord, AnsweredRecord, AuditStore, FeedbackRow } from '../../src/audit/types.js';

const PG_URL = process.env['TIDEMARK_TEST_PG_URL'] ?? 'postgres://postgres@127.0.0.1:5432/test';
/** Unique per test file run, so parallel files and earlier crashed runs never collide. */
const RUN = `tm_audit_${process.pid}_${randomUUID().slice(0, 8)}`;

// ---------------------------------------------------------------- fixtures

const T0 = Date.parse('2031-03-04T05:06:07.000Z');
const at = (minutes: number): string => new Date(T0 + minutes * 60_000).toISOString();

interface AdviceOpts {
  at?: number;
  patientId?: string | null;
  service?: string;
  /** Card kinds; one card (with a fresh uuid) per entry. */
  kinds?: string[];
  totalMs?: number;
}

/** An invented advice record with one card per kind. */
function adviceRecord(o: AdviceOpts = {}): AnsweredRecord {
  const kinds = o.kinds ?? ['volume-ok'];
  const cards = kinds.map((k, i) => ({
    uuid: randomUUID(),
    summary: `Invented card ${i + 1} — réponse probable, Δ 12 %`,
    indicator: i === 0 ? ('warning' as const) : ('info' as const),
    source: { label: 'Tidemark test catalogue' },
    detail: `Kind **${k}**.\nLine two with "quotes" and a tab\t.`,
  }));
  const patientId = o.patientId === undefined ? 'pt-alder' : o.patientId;
  const rec: Omit<AnsweredRecord, 'snapshot' | 'advice'> = {
    id: randomUUID(),
    recordedAt: at(o.at ?? 0),
    service: o.service ?? 'bolus-select',
    hook: 'order-select',
    hookInstance: randomUUID(),
    userId: 'Practitioner/inv-clinician-7',
    ...(patientId !== null ? { patientId, encounterId: `enc-${patientId}` } : {}),
    outcome: 'answered',
    rulesVersion: '0.1.0+cards.ab12cd34',
    findings: [
      {
        ruleId: 'perfusion.map',
        topic: 'perfusion',
        sign: 'map',
        hypoperfusion: true,
        contextOnly: false,
        status: 'assessed',
        text: 'MAP 58 mmHg, below target 65 mmHg',
        values: { mapMmHg: 58.333333333333336, belowTarget: true, tiny: 1e-7 },
        evidence: [
          {
            ref: 'Observation/inv-bp-1',
            kind: 'meanArterialPressure',
            value: 58.333333333333336,
            unit: 'mm[Hg]',
            effective: at(-5),
            ageMinutes: 5,
          },
        ],
      },
    ],
    cards,
    cardKinds: Object.fromEntries(cards.map((c, i) => [c.uuid, kinds[i] ?? 'volume-ok'])),
    gathering: [{ key: 'vitals', source: 'prefetch', status: 'ok', count: 3 }],
    timings: { totalMs: o.totalMs ?? 41.26, gatherMs: 20.5, fhirWaitMs: 0, assessMs: 3.75 },
    client: { issuer: 'https://ehr.invented.example', jti: randomUUID() },
  };
  // The store keeps whatever an answered record holds; a minimal snapshot and advice stand for the rules' output.
  const snapshot: AnsweredRecord['snapshot'] = {
    patient: { ref: `Patient/${patientId ?? 'none'}`, sex: 'unknown' },
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

const sha256Hex = (s: string | Buffer): string => createHash('sha256').update(s).digest('hex');

function cardsOf(r: AdviceRecord): string[] {
  return r.cards.map((c) => c.uuid ?? '');
}

function feedbackRow(cardUuid: string, over: Partial<FeedbackRow> = {}): FeedbackRow {
  return {
    cardUuid,
    outcome: 'accepted',
    acceptedSuggestions: [],
    outcomeTimestamp: at(30),
    receivedAt: at(31),
    service: 'bolus-select',
    ...over,
  };
}

// ---------------------------------------------------------------- harnesses

/** Opens adapters over one backing database, and touches stored rows directly (as an attacker would). */
interface Harness {
  name: string;
  setup(): Promise<void>;
  teardown(): Promise<void>;
  /** A new store, initialised, over empty tables. */
  fresh(): Promise<AuditStore>;
  recordText(seq: number): Promise<string>;
  setRecordText(seq: number, text: string): Promise<void>;
  /** A row's format and its stored blobs (format 2: outputs and inputs, Brotli-compressed JSON). */
  blobs(seq: number): Promise<{ format: number | null; outputs: Buffer | null; inputs: Buffer | null }>;
  setBlob(seq: number, column: 'outputs' | 'inputs', bytes: Buffer): Promise<void>;
  /** Overwrites a row's prev_hash and hash. */
  setChain(seq: number, prevHash: string, hash: string): Promise<void>;
  /** Deletes an advice row and its cards (and their feedback). */
  deleteAdvice(seq: number): Promise<void>;
  /** Drops advice.issuer, as the tables were before Tidemark 0.3 (the store must be closed). */
  dropIssuerColumn(): Promise<void>;
  /** A new store over the same tables, initialised, without emptying them. */
  reopen(): Promise<AuditStore>;
}

function sqliteHarness(): Harness {
  let dir = '';
  let path = '';
  let n = 0;
  const raw = <T>(fn: (db: Database.Database) => T): T => {
    const db = new Database(path);
    try {
      return fn(db);
    } finally {
      db.close();
    }
  };
  return {
    name: 'sqlite',
    async setup() {
      dir = mkdtempSync(join(tmpdir(), 'tidemark-audit-'));
    },
    async teardown() {
      rmSync(dir, { recursive: true, force: true });
    },
    async fresh() {
      n += 1;
      path = join(dir, `audit-${n}.sqlite`);
      const s = new SqliteAuditStore(path);
      await s.init();
      return s;
    },
    async recordText(seq) {
      return raw((db) => (db.prepare('SELECT record FROM advice WHERE seq = ?').get(seq) as { record: string }).record);
    },
    async setRecordText(seq, text) {
      raw((db) => db.prepare('UPDATE advice SET record = ? WHERE seq = ?').run(text, seq));
    },
    async blobs(seq) {
      return raw((db) => db.prepare('SELECT format, outputs, inputs FROM advice WHERE seq = ?').get(seq) as never);
    },
    async setBlob(seq, column, bytes) {
      raw((db) => db.prepare(`UPDATE advice SET ${column} = ? WHERE seq = ?`).run(bytes, seq));
    },
    async setChain(seq, prevHash, hash) {
      raw((db) => db.prepare('UPDATE advice SET prev_hash = ?, hash = ? WHERE seq = ?').run(prevHash, hash, seq));
    },
    async deleteAdvice(seq) {
      raw((db) => {
        const id = (db.prepare('SELECT id FROM advice WHERE seq = ?').get(seq) as { id: string }).id;
        db.prepare('DELETE FROM feedback WHERE card_uuid IN (SELECT card_uuid FROM advice_card WHERE advice_id = ?)').run(id);
        db.prepare('DELETE FROM advice_card WHERE advice_id = ?').run(id);
        db.prepare('DELETE FROM advice WHERE id = ?').run(id);
      });
    },
    async dropIssuerColumn() {
      // As Tidemark 0.2.0 left a file: no issuer column, no card index, no schema version recorded.
      raw((db) => db.exec('ALTER TABLE advice DROP COLUMN issuer; DROP INDEX IF EXISTS advice_card_advice; PRAGMA user_version = 0'));
    },
    async reopen() {
      const s = new SqliteAuditStore(path);
      await s.init();
      return s;
    },
  };
}

/** An admin connection that fails loudly (not a skip) when PostgreSQL is not there. */
async function connectAdmin(): Promise<pg.Client> {
  const c = new pg.Client({ connectionString: PG_URL, connectionTimeoutMillis: 5000 });
  try {
    await c.connect();
  } catch (e) {
    throw new Error(
      `PostgreSQL is required for the audit contract tests and could not be reached at ${PG_URL} (${(e as Error).message}). ` +
        'Start PostgreSQL or set TIDEMARK_TEST_PG_URL.',
      { cause: e },
    );
  }
  return c;
}

function postgresHarness(): Harness {
  const schema = `${RUN}_contract`;
  let admin: pg.Client | undefined;
  const q = async (text: string, values: unknown[] = []): Promise<pg.QueryResult> => {
    if (!admin) throw new Error('postgres harness not set up');
    return admin.query(text, values);
  };
  return {
    name: 'postgres',
    async setup() {
      admin = await connectAdmin();
    },
    async teardown() {
      if (!admin) return;
      await admin.query(`DROP SCHEMA IF EXISTS "${schema}" CASCADE`);
      await admin.end();
    },
    async fresh() {
      await q(`DROP SCHEMA IF EXISTS "${schema}" CASCADE`);
      const s = new PostgresAuditStore(PG_URL, { schema, poolSize: 4 });
      await s.init();
      return s;
    },
    async recordText(seq) {
      return String((await q(`SELECT record FROM "${schema}".advice WHERE seq = $1`, [seq])).rows[0]?.record);
    },
    async setRecordText(seq, text) {
      await q(`UPDATE "${schema}".advice SET record = $1 WHERE seq = $2`, [text, seq]);
    },
    async blobs(seq) {
      return (await q(`SELECT format, outputs, inputs FROM "${schema}".advice WHERE seq = $1`, [seq])).rows[0] as never;
    },
    async setBlob(seq, column, bytes) {
      await q(`UPDATE "${schema}".advice SET ${column} = $1 WHERE seq = $2`, [bytes, seq]);
    },
    async setChain(seq, prevHash, hash) {
      await q(`UPDATE "${schema}".advice SET prev_hash = $1, hash = $2 WHERE seq = $3`, [prevHash, hash, seq]);
    },
    async deleteAdvice(seq) {
      const id = String((await q(`SELECT id FROM "${schema}".advice WHERE seq = $1`, [seq])).rows[0]?.id);
      await q(`DELETE FROM "${schema}".feedback WHERE card_uuid IN (SELECT card_uuid FROM "${schema}".advice_card WHERE advice_id = $1)`, [
        id,
      ]);
      await q(`DELETE FROM "${schema}".advice_card WHERE advice_id = $1`, [id]);
      await q(`DELETE FROM "${schema}".advice WHERE id = $1`, [id]);
    },
    async dropIssuerColumn() {
      // As Tidemark 0.2.0 left a schema: no issuer column, no schema version recorded.
      await q(`ALTER TABLE "${schema}".advice DROP COLUMN issuer`);
      await q(`DROP TABLE IF EXISTS "${schema}".schema_version`);
    },
    async reopen() {
      const s = new PostgresAuditStore(PG_URL, { schema, poolSize: 4 });
      await s.init();
      return s;
    },
  };
}

// ---------------------------------------------------------------- the contract

describe.each([sqliteHarness(), postgresHarness()])('audit store contract: $name', (h) => {
  let store: AuditStore;
  const opened: AuditStore[] = [];
  const open = async (): Promise<void> => {
    store = await h.fresh();
    opened.push(store);
  };

  beforeAll(() => h.setup());
  afterEach(async () => {
    for (const s of opened.splice(0)) await s.close();
  });
  afterAll(() => h.teardown());

  async function appendAll(recs: AdviceRecord[]): Promise<number[]> {
    const seqs: number[] = [];
    for (const r of recs) seqs.push((await store.append(r)).seq);
    return seqs;
  }

  it('reports its kind, answers ping, and init is idempotent', async () => {
    await open();
    expect(store.kind).toBe(h.name);
    await store.ping();
    await store.init();
    await store.init();
  });

  it('append then get round-trips the record, with seq, hash and prevHash', async () => {
    await open();
    const r1 = adviceRecord({ at: 1 });
    const r2 = adviceRecord({ at: 2, patientId: null });
    const a1 = await store.append(r1);
    const a2 = await store.append(r2);
    expect(a2.seq).toBeGreaterThan(a1.seq);
    // The stored text is the record's JSON, and the chain is sha256(previous hash + that text) as docs/audit.md
    // states it, recomputed here with node:crypto alone: both adapters give the same hashes for the same records.
    const t1 = await h.recordText(a1.seq);
    const t2 = await h.recordText(a2.seq);
    expect(t1).toBe(JSON.stringify(r1));
    expect(a1.hash).toBe(sha256Hex(GENESIS + t1));
    expect(a2.hash).toBe(sha256Hex(a1.hash + t2));
    expect(await store.get(r1.id)).toEqual({ ...r1, seq: a1.seq, hash: a1.hash, prevHash: GENESIS, format: 1 });
    expect(await store.get(r2.id)).toEqual({ ...r2, seq: a2.seq, hash: a2.hash, prevHash: a1.hash, format: 1 });
    expect(await store.get('no-such-advice')).toBeUndefined();
  });

  it('stores a record that carries its inputs as format 2: no snapshot, outputs and inputs compressed, the hash over the stored bytes', async () => {
    await open();
    const r1 = adviceRecord({ at: 1 });
    const inputs = {
      now: at(1),
      request: { body: '{"hook":"order-select","note":"Ünïcode ✓ \\u0000"}', asReceived: true },
      fhir: [
        {
          url: 'https://fhir.invented.example/r4/Observation?patient=pt-alder',
          status: 200,
          body: '{"resourceType":"Bundle","type":"searchset"}',
        },
        { url: 'https://fhir.invented.example/r4/Condition?patient=pt-alder', failure: { status: 'timeout' as const, detail: 'budget' } },
      ],
    };
    const base2 = adviceRecord({ at: 2 });
    const verdicts = {
      responsiveness: { value: 'likely', rationale: 'invented', decidingRules: [] },
      tolerance: { value: 'limited', rationale: 'invented', decidingRules: [] },
    } as unknown as Pick<AnsweredRecord['advice'], 'responsiveness' | 'tolerance'>;
    const r2: AnsweredRecord = { ...base2, advice: { ...base2.advice, ...verdicts }, inputs };
    const a1 = await store.append(r1);
    const a2 = await store.append(r2);
    const row = await h.blobs(a2.seq);
    expect(row.format).toBe(2);
    const index = await h.recordText(a2.seq);
    // The index holds only what SQL reads, at the paths of a format-1 record.
    expect(JSON.parse(index)).toEqual({
      format: 2,
      cards: r2.cards.map((c) => ({ indicator: c.indicator })),
      advice: { responsiveness: { value: 'likely' }, tolerance: { value: 'limited' } },
      timings: r2.timings,
      client: { issuer: r2.client?.issuer },
    });
    // The blobs are RFC 7932 Brotli, read here with node:zlib alone: the inputs exactly as given, the outputs without the snapshot.
    const outputs = Buffer.from(row.outputs ?? []);
    const stored = Buffer.from(row.inputs ?? []);
    expect(JSON.parse(brotliDecompressSync(stored).toString('utf8'))).toEqual(inputs);
    const out = JSON.parse(brotliDecompressSync(outputs).toString('utf8')) as Record<string, unknown>;
    expect(out['snapshot']).toBeUndefined();
    expect(out['inputs']).toBeUndefined();
    expect(out['cards']).toEqual(r2.cards);
    // hash = sha256(previous hash ‖ index ‖ sha256(outputs) ‖ sha256(inputs)), hex digests (docs/audit.md).
    expect(a2.hash).toBe(sha256Hex(a1.hash + index + sha256Hex(outputs) + sha256Hex(stored)));
    const { snapshot: _s, ...withoutSnapshot } = r2;
    expect(await store.get(r2.id)).toEqual({ ...withoutSnapshot, seq: a2.seq, hash: a2.hash, prevHash: a1.hash, format: 2 });
    // Read back by the stream and the list as well.
    const streamed = [];
    for await (const r of store.records({})) streamed.push(r);
    expect(streamed.map((r) => r.format)).toEqual([1, 2]);
    expect(streamed[1]?.inputs).toEqual(inputs);
    expect((await store.list({ limit: 5 })).items[0]).toMatchObject({
      id: r2.id,
      cardCount: r2.cards.length,
      responsiveness: 'likely',
      tolerance: 'limited',
    });
    expect((await store.list({ limit: 5, tolerance: 'limited' })).items.map((i) => i.id)).toEqual([r2.id]);
    expect(await store.verifyChain()).toEqual({ ok: true, checked: 2 });
  });

  it('a changed byte in a format-2 record (index, outputs or inputs) breaks the chain at that record', async () => {
    for (const part of ['index', 'outputs', 'inputs'] as const) {
      await open();
      const inputs = { now: at(0), request: { body: '{"hook":"order-select"}', asReceived: true }, fhir: [] };
      const seqs = await appendAll([0, 1, 2].map((i) => ({ ...adviceRecord({ at: i }), inputs })));
      const target = seqs[1] ?? -1;
      expect(await store.verifyChain()).toEqual({ ok: true, checked: 3 });
      if (part === 'index') {
        await h.setRecordText(target, (await h.recordText(target)).replace('"format":2', '"format":2 '));
      } else {
        const row = await h.blobs(target);
        const text = brotliDecompressSync(Buffer.from(row[part] ?? [])).toString('utf8');
        await h.setBlob(target, part, brotliCompressSync(Buffer.from(text.replace('order-select', 'order-sign'))));
      }
      expect(await store.verifyChain(), part).toEqual({ ok: false, checked: 2, firstBadSeq: target });
    }
  });

  it('refuses a duplicate advice id or a reused card uuid, keeping nothing of the refused record', async () => {
    await open();
    const r1 = adviceRecord();
    await store.append(r1);
    await expect(store.append({ ...adviceRecord(), id: r1.id })).rejects.toThrow();
    const reuse = adviceRecord();
    const reused = cardsOf(r1)[0] ?? '';
    await expect(store.append({ ...reuse, cardKinds: { [reused]: 'data-gap' } })).rejects.toThrow();
    expect(await store.get(reuse.id)).toBeUndefined();
    expect(await store.cardOwner(reused)).toEqual({
      adviceId: r1.id,
      cardKind: 'volume-ok',
      service: 'bolus-select',
      issuer: 'https://ehr.invented.example',
    });
    const r2 = adviceRecord();
    await store.append(r2);
    expect(await store.verifyChain()).toEqual({ ok: true, checked: 2 });
  });

  it('stores the findings once when the advice carries the same list, and reads the record back whole', async () => {
    await open();
    const base = adviceRecord();
    const rec: AdviceRecord = {
      ...base,
      advice: { rulesVersion: base.rulesVersion, now: at(0), findings: base.findings, ruleErrors: [] },
    };
    const a = await store.append(rec);
    const text = await h.recordText(a.seq);
    expect(text.split('"ruleId":"perfusion.map"')).toHaveLength(2); // one copy of the finding, not two
    expect(JSON.parse(text).advice).toEqual({ rulesVersion: base.rulesVersion, now: at(0), ruleErrors: [] });
    expect(a.hash).toBe(sha256Hex(GENESIS + text));
    const back = await store.get(rec.id);
    expect(back?.advice?.findings).toEqual(base.findings);
    expect(back).toEqual({ ...rec, seq: a.seq, hash: a.hash, prevHash: GENESIS, format: 1 });
    // A record whose advice holds other findings than its own list is stored as given.
    const other: AdviceRecord = { ...adviceRecord(), advice: { rulesVersion: 'r', now: at(0), findings: [], ruleErrors: [] } };
    await store.append(other);
    expect((await store.get(other.id))?.advice?.findings).toEqual([]);
    expect(await store.verifyChain()).toEqual({ ok: true, checked: 2 });
  });

  it('still verifies records written under the 0.1.0 rule (hash over canonical JSON), and a changed byte in a new one', async () => {
    await open();
    const recs = [adviceRecord({ at: 0 }), adviceRecord({ at: 1 }), adviceRecord({ at: 2 })];
    const seqs = await appendAll(recs);
    // Rewrite the first two as 0.1.0 wrote them: hash_n = sha256(hash_n-1 + canonicalJson(record_n)).
    let prev = GENESIS;
    for (const [i, r] of recs.slice(0, 2).entries()) {
      const hash = chainHash(prev, r);
      await h.setChain(seqs[i] ?? -1, prev, hash);
      prev = hash;
    }
    // The third, written under today's rule, now follows the second's legacy hash.
    const t3 = await h.recordText(seqs[2] ?? -1);
    await h.setChain(seqs[2] ?? -1, prev, sha256Hex(prev + t3));
    expect(await store.verifyChain()).toEqual({ ok: true, checked: 3 });
    // Whitespace changes no meaning but does change the text that the new rule hashed: it shows.
    await h.setRecordText(seqs[2] ?? -1, t3.replace('{', '{ '));
    expect(await store.verifyChain()).toEqual({ ok: false, checked: 3, firstBadSeq: seqs[2] });
  });

  it('verifies an intact chain and names the first record whose text was changed', async () => {
    await open();
    expect(await store.verifyChain()).toEqual({ ok: true, checked: 0 });
    const seqs = await appendAll([0, 1, 2, 3, 4].map((i) => adviceRecord({ at: i })));
    expect(await store.verifyChain()).toEqual({ ok: true, checked: 5 });
    const target = seqs[2] ?? -1;
    const text = await h.recordText(target);
    expect(text).toContain('"mapMmHg":58.333333333333336');
    await h.setRecordText(target, text.replace('"mapMmHg":58.333333333333336', '"mapMmHg":68.333333333333336'));
    expect(await store.verifyChain()).toEqual({ ok: false, checked: 3, firstBadSeq: target });
  });

  it('reports (does not throw on) a record whose text is no longer JSON', async () => {
    await open();
    const seqs = await appendAll([adviceRecord(), adviceRecord(), adviceRecord()]);
    await h.setRecordText(seqs[1] ?? -1, '{"truncated":');
    expect(await store.verifyChain()).toEqual({ ok: false, checked: 2, firstBadSeq: seqs[1] });
  });

  it('shows a removed record at the record after it', async () => {
    await open();
    const seqs = await appendAll([adviceRecord(), adviceRecord(), adviceRecord()]);
    await h.deleteAdvice(seqs[1] ?? -1);
    expect(await store.verifyChain()).toEqual({ ok: false, checked: 2, firstBadSeq: seqs[2] });
  });

  it('lists newest first and filters by patient, service and recorded time (inclusive bounds)', async () => {
    await open();
    const recs = [
      adviceRecord({ at: 0, patientId: 'pt-alder', service: 'bolus-select' }),
      adviceRecord({ at: 1, patientId: 'pt-birch', service: 'bolus-select' }),
      adviceRecord({ at: 2, patientId: 'pt-alder', service: 'fluid-overview' }),
      adviceRecord({ at: 3, patientId: 'pt-alder', service: 'bolus-select' }),
      adviceRecord({ at: 4, patientId: null, service: 'fluid-overview', totalMs: 123.456 }),
    ];
    const seqs = await appendAll(recs);
    const ids = async (q: Parameters<AuditStore['list']>[0]): Promise<string[]> => (await store.list(q)).items.map((i) => i.id);
    const id = (i: number): string => recs[i]?.id ?? '';

    expect(await ids({ limit: 10 })).toEqual([id(4), id(3), id(2), id(1), id(0)]);
    expect(await ids({ limit: 10, patientId: 'pt-alder' })).toEqual([id(3), id(2), id(0)]);
    expect(await ids({ limit: 10, service: 'fluid-overview' })).toEqual([id(4), id(2)]);
    expect(await ids({ limit: 10, from: at(1), to: at(3) })).toEqual([id(3), id(2), id(1)]);
    expect(await ids({ limit: 10, to: at(0) })).toEqual([id(0)]);
    expect(await ids({ limit: 10, from: at(4) })).toEqual([id(4)]);
    expect(await ids({ limit: 10, patientId: 'pt-alder', service: 'bolus-select', from: at(1) })).toEqual([id(3)]);
    expect(await ids({ limit: 10, patientId: 'pt-nobody' })).toEqual([]);

    const page = await store.list({ limit: 1 });
    const r4 = recs[4];
    if (!r4) throw new Error('fixture');
    expect(page.items).toEqual([
      {
        id: r4.id,
        seq: seqs[4],
        recordedAt: r4.recordedAt,
        service: 'fluid-overview',
        hook: 'order-select',
        hookInstance: r4.hookInstance,
        outcome: 'answered',
        rulesVersion: r4.rulesVersion,
        cardCount: 1,
        indicators: ['warning'],
        latencyMs: 123.5,
        feedback: { accepted: 0, overridden: 0 },
      },
    ]);
    expect(page.nextCursor).toBe(String(seqs[4]));
  });

  it('pages with a cursor: newest first, no duplicates or gaps, and no cursor after the last page', async () => {
    await open();
    const seqs = await appendAll(Array.from({ length: 23 }, (_, i) => adviceRecord({ at: i, patientId: i % 2 ? 'pt-cedar' : 'pt-alder' })));
    const walk = async (q: { limit: number; patientId?: string }): Promise<{ seqs: number[]; pages: number[] }> => {
      const seen: number[] = [];
      const pages: number[] = [];
      let cursor: string | undefined;
      for (;;) {
        const res = await store.list({ ...q, ...(cursor ? { cursor } : {}) });
        seen.push(...res.items.map((i) => i.seq));
        pages.push(res.items.length);
        if (!res.nextCursor) return { seqs: seen, pages };
        cursor = res.nextCursor;
      }
    };
    const all = await walk({ limit: 5 });
    expect(all.pages).toEqual([5, 5, 5, 5, 3]);
    expect(all.seqs).toEqual([...seqs].reverse());

    // Twelve records match, so a limit of 6 ends exactly at a page boundary: limit+1 shows there is no third page.
    const alder = await walk({ limit: 6, patientId: 'pt-alder' });
    expect(alder.pages).toEqual([6, 6]);
    expect(alder.seqs).toEqual(seqs.filter((_, i) => i % 2 === 0).reverse());
  });

  it('streams records oldest first across batch boundaries, with filters, a resume point and an early stop', async () => {
    await open();
    const recs = Array.from({ length: 11 }, (_, i): AdviceRecord => {
      const answered = adviceRecord({ at: i, service: i % 3 === 0 ? 'fluid-overview' : 'bolus-select' });
      const { snapshot: _s, advice: _a, ...rest } = answered;
      return i === 5 ? { ...rest, outcome: 'precondition-failed' } : answered;
    });
    const seqs = await appendAll(recs);
    const walk = async (q: Parameters<AuditStore['records']>[0]): Promise<number[]> => {
      const out: number[] = [];
      for await (const r of store.records(q)) out.push(r.seq);
      return out;
    };
    // Batches of 4 over 11 records: 4 + 4 + 3; batches of 11: one full batch, then an empty one.
    expect(await walk({ batchSize: 4 })).toEqual(seqs);
    expect(await walk({ batchSize: 11 })).toEqual(seqs);
    expect(await walk({ batchSize: 4, outcome: 'answered' })).toEqual(seqs.filter((_, i) => i !== 5));
    expect(await walk({ batchSize: 2, service: 'fluid-overview' })).toEqual([seqs[0], seqs[3], seqs[6], seqs[9]]);
    expect(await walk({ batchSize: 3, from: at(2), to: at(7) })).toEqual(seqs.slice(2, 8));
    expect(await walk({ batchSize: 3, afterSeq: seqs[7] ?? 0 })).toEqual(seqs.slice(8));
    expect(await walk({ service: 'none-such' })).toEqual([]);

    // A record read this way is the stored record, as get() reads it.
    const first = (await store.records({ batchSize: 1 })[Symbol.asyncIterator]().next()).value;
    expect(first).toEqual(await store.get(recs[0]?.id ?? ''));

    // Stopping early leaves the store usable; other calls between two records are fine.
    let n = 0;
    for await (const r of store.records({ batchSize: 3 })) {
      expect((await store.get(r.id))?.seq).toBe(r.seq);
      expect((await store.list({ limit: 1 })).items).toHaveLength(1);
      if ((n += 1) === 5) break;
    }
    expect(n).toBe(5);
    expect(await store.verifyChain()).toMatchObject({ ok: true, checked: 11 });
  });

  it('finds the advice and kind of a card', async () => {
    await open();
    const r = adviceRecord({ kinds: ['volume-ok', 'data-gap'], service: 'bolus-sign' });
    await store.append(r);
    const [c1, c2] = cardsOf(r);
    expect(await store.cardOwner(c1 ?? '')).toEqual({
      adviceId: r.id,
      cardKind: 'volume-ok',
      service: 'bolus-sign',
      issuer: 'https://ehr.invented.example',
    });
    expect(await store.cardOwner(c2 ?? '')).toEqual({
      adviceId: r.id,
      cardKind: 'data-gap',
      service: 'bolus-sign',
      issuer: 'https://ehr.invented.example',
    });
    expect(await store.cardOwner(randomUUID())).toBeUndefined();
  });

  it('keeps the issuer that received the cards in its own column; a record without a client has none', async () => {
    await open();
    const other = { ...adviceRecord(), client: { issuer: 'https://records.other-invented.example', tenant: 'ward-3' } };
    const { client: _none, ...anonymous } = adviceRecord();
    await appendAll([other, anonymous]);
    expect((await store.cardOwner(cardsOf(other)[0] ?? ''))?.issuer).toBe('https://records.other-invented.example');
    expect(await store.cardOwner(cardsOf(anonymous)[0] ?? '')).toEqual({
      adviceId: anonymous.id,
      cardKind: 'volume-ok',
      service: 'bolus-select',
    });
  });

  it('adds the issuer column to tables made before it; their records stay readable, verifiable and attributable from their text', async () => {
    await open();
    const old = adviceRecord();
    const { client: _none, ...older } = adviceRecord();
    await appendAll([old, older]);
    await store.close();
    await h.dropIssuerColumn();
    store = await h.reopen();
    opened.push(store);
    // The old rows have an empty column: the issuer comes from the hashed record text, or is absent if it names none.
    expect((await store.cardOwner(cardsOf(old)[0] ?? ''))?.issuer).toBe('https://ehr.invented.example');
    expect((await store.cardOwner(cardsOf(older)[0] ?? ''))?.issuer).toBeUndefined();
    expect(await store.get(old.id)).toMatchObject({ id: old.id, client: old.client });
    const fresh = { ...adviceRecord(), client: { issuer: 'https://records.other-invented.example' } };
    await store.append(fresh);
    expect((await store.cardOwner(cardsOf(fresh)[0] ?? ''))?.issuer).toBe('https://records.other-invented.example');
    expect(await store.verifyChain()).toEqual({ ok: true, checked: 3 });
  });

  it('stores feedback idempotently and counts duplicates', async () => {
    await open();
    const r = adviceRecord({ kinds: ['volume-ok', 'data-gap'] });
    await store.append(r);
    const [c1, c2] = cardsOf(r) as [string, string];
    const f1 = feedbackRow(c1, { acceptedSuggestions: ['sugg-b', 'sugg-a'], outcomeTimestamp: at(10) });
    const f2 = feedbackRow(c2, {
      outcome: 'overridden',
      outcomeTimestamp: at(11),
      overrideReason: { system: 'https://tidemark.invented.example/override', code: 'already-given', display: 'Bolus already given' },
      userComment: 'given in theatre',
    });
    expect(await store.addFeedback([f1, f2])).toEqual({ stored: 2, duplicates: 0 });
    expect(await store.addFeedback([f1, f2])).toEqual({ stored: 0, duplicates: 2 });
    // The same feedback received again later, suggestions in another order: still a duplicate.
    expect(await store.addFeedback([{ ...f1, receivedAt: at(50), acceptedSuggestions: ['sugg-a', 'sugg-b'] }])).toEqual({
      stored: 0,
      duplicates: 1,
    });
    // A repeat inside one batch is stored once.
    const f3 = feedbackRow(c1, { outcomeTimestamp: at(12) });
    expect(await store.addFeedback([f3, f3])).toEqual({ stored: 1, duplicates: 1 });
    expect(await store.feedbackFor(r.id)).toEqual([f1, f2, f3]);
    // The list counts cards (c1 has two accepted feedbacks: one card), as feedbackStats does.
    const listed = await store.list({ limit: 1 });
    expect(listed.items[0]?.feedback).toEqual({ accepted: 1, overridden: 1 });
  });

  it('refuses a feedback batch naming an unknown card, storing none of it', async () => {
    await open();
    const r = adviceRecord();
    await store.append(r);
    const good = feedbackRow(cardsOf(r)[0] ?? '');
    await expect(store.addFeedback([good, feedbackRow(randomUUID())])).rejects.toThrow();
    expect(await store.feedbackFor(r.id)).toEqual([]);
    expect(await store.addFeedback([good])).toEqual({ stored: 1, duplicates: 0 });
  });

  it('returns feedback for one advice ordered by outcome time, then arrival', async () => {
    await open();
    const r = adviceRecord({ kinds: ['volume-ok', 'tolerance-limit', 'tolerance-limit'] });
    const other = adviceRecord();
    await appendAll([r, other]);
    const [c1, c2, c3] = cardsOf(r) as [string, string, string];
    const late1 = feedbackRow(c3, { outcome: 'overridden', outcomeTimestamp: at(20), overrideReason: { code: 'fluid-restricted' } });
    const late2 = feedbackRow(c2, { outcome: 'overridden', outcomeTimestamp: at(20), userComment: 'discussed on rounds' });
    const early = feedbackRow(c1, { outcomeTimestamp: at(15) });
    await store.addFeedback([late1, early, feedbackRow(cardsOf(other)[0] ?? '')]);
    await store.addFeedback([late2]);
    expect(await store.feedbackFor(r.id)).toEqual([early, late1, late2]);
    expect(await store.feedbackFor('no-such-advice')).toEqual([]);
  });

  it('computes feedback statistics per card kind and override reason, with filters', async () => {
    await open();
    const a1 = adviceRecord({ at: 0, service: 'bolus-select', kinds: ['volume-ok', 'data-gap'] });
    const a2 = adviceRecord({ at: 1, service: 'bolus-select', kinds: ['volume-ok', 'perfusion-note'] });
    const a3 = adviceRecord({ at: 2, service: 'bolus-sign', kinds: ['volume-ok', 'tolerance-limit', 'tolerance-limit'] });
    await appendAll([a1, a2, a3]);
    const [a1c1, a1c2] = cardsOf(a1) as [string, string];
    const [a2c1] = cardsOf(a2) as [string];
    const [a3c1, a3c2, a3c3] = cardsOf(a3) as [string, string, string];
    const given = { system: 'https://tidemark.invented.example/override', code: 'already-given', display: 'Bolus already given' };
    await store.addFeedback([
      feedbackRow(a1c1, { outcomeTimestamp: at(5) }),
      feedbackRow(a1c1, { outcomeTimestamp: at(6) }), // the same card accepted twice still counts one card
      feedbackRow(a1c2, { outcome: 'overridden', overrideReason: { code: 'other-plan', display: 'Another plan' } }),
      feedbackRow(a2c1, { outcome: 'overridden', overrideReason: given }),
      feedbackRow(a3c1, { outcome: 'overridden', overrideReason: given, service: 'bolus-sign' }),
      feedbackRow(a3c2, { outcome: 'overridden', userComment: 'discussed on rounds', service: 'bolus-sign' }),
      feedbackRow(a3c3, {
        outcome: 'overridden',
        overrideReason: { code: 'fluid-restricted', display: 'Fluid restricted' },
        service: 'bolus-sign',
      }),
    ]);

    expect(await store.feedbackStats({})).toEqual({
      byKind: [
        { cardKind: 'data-gap', cards: 1, accepted: 0, overridden: 1, overrideRate: 1 },
        { cardKind: 'perfusion-note', cards: 1, accepted: 0, overridden: 0, overrideRate: 0 },
        { cardKind: 'tolerance-limit', cards: 2, accepted: 0, overridden: 2, overrideRate: 1 },
        { cardKind: 'volume-ok', cards: 3, accepted: 1, overridden: 2, overrideRate: 0.667 },
      ],
      byReason: [
        { cardKind: 'volume-ok', reasonCode: 'already-given', reasonDisplay: 'Bolus already given', count: 2 },
        { cardKind: 'data-gap', reasonCode: 'other-plan', reasonDisplay: 'Another plan', count: 1 },
        { cardKind: 'tolerance-limit', reasonCode: 'fluid-restricted', reasonDisplay: 'Fluid restricted', count: 1 },
        { cardKind: 'tolerance-limit', reasonCode: '(comment only)', reasonDisplay: '', count: 1 },
      ],
    });

    // The list counts cards, as the statistics do (not feedback rows): a1's card accepted twice counts once.
    const listed = (await store.list({ limit: 10 })).items;
    expect(Object.fromEntries(listed.map((i) => [i.id, i.feedback]))).toEqual({
      [a1.id]: { accepted: 1, overridden: 1 },
      [a2.id]: { accepted: 0, overridden: 1 },
      [a3.id]: { accepted: 0, overridden: 3 },
    });
    const stats = await store.feedbackStats({});
    const sum = (xs: Array<{ accepted: number; overridden: number }>) =>
      xs.reduce((t, x) => ({ accepted: t.accepted + x.accepted, overridden: t.overridden + x.overridden }), { accepted: 0, overridden: 0 });
    expect(sum(listed.map((i) => i.feedback))).toEqual(sum(stats.byKind));

    expect(await store.feedbackStats({ service: 'bolus-select' })).toEqual({
      byKind: [
        { cardKind: 'data-gap', cards: 1, accepted: 0, overridden: 1, overrideRate: 1 },
        { cardKind: 'perfusion-note', cards: 1, accepted: 0, overridden: 0, overrideRate: 0 },
        { cardKind: 'volume-ok', cards: 2, accepted: 1, overridden: 1, overrideRate: 0.5 },
      ],
      byReason: [
        { cardKind: 'data-gap', reasonCode: 'other-plan', reasonDisplay: 'Another plan', count: 1 },
        { cardKind: 'volume-ok', reasonCode: 'already-given', reasonDisplay: 'Bolus already given', count: 1 },
      ],
    });

    // from/to select by the advice's recorded time, inclusive.
    expect(await store.feedbackStats({ from: at(1), to: at(1) })).toEqual({
      byKind: [
        { cardKind: 'perfusion-note', cards: 1, accepted: 0, overridden: 0, overrideRate: 0 },
        { cardKind: 'volume-ok', cards: 1, accepted: 0, overridden: 1, overrideRate: 1 },
      ],
      byReason: [{ cardKind: 'volume-ok', reasonCode: 'already-given', reasonDisplay: 'Bolus already given', count: 1 }],
    });
    expect((await store.feedbackStats({ from: at(2) })).byKind.map((k) => k.cardKind)).toEqual(['tolerance-limit', 'volume-ok']);
    expect(await store.feedbackStats({ to: at(-1) })).toEqual({ byKind: [], byReason: [] });
  });

  describe('the console overview and the list filters (computed in SQL)', () => {
    // An invented trail with counts known by construction. 2031-03-02 is a Sunday (ISO week of Monday 2031-02-24),
    // 2031-03-03 a Monday and 2031-03-09 the Sunday of that week, 2031-03-10 the next Monday.
    let made = 0;
    const rec = (
      iso: string,
      o: {
        service?: string;
        kinds?: string[];
        indicators?: Array<'info' | 'warning' | 'critical'>;
        ms: number;
        verdicts?: [string, string];
        failed?: boolean;
      },
    ): AdviceRecord => {
      const r = adviceRecord({ service: o.service ?? 'bolus-select', kinds: o.kinds ?? ['volume-ok'], totalMs: o.ms });
      r.recordedAt = iso;
      r.cards.forEach((c, i) => (c.indicator = o.indicators?.[i] ?? c.indicator));
      // Every other record is stored as received (format 2): the aggregates read both formats alike.
      if ((made += 1) % 2 === 0) r.inputs = { now: iso, request: { body: '{}', asReceived: true }, fhir: [] };
      if (o.failed) {
        const { snapshot: _s, advice: _a, ...rest } = r;
        return { ...rest, outcome: 'precondition-failed' };
      }
      if (o.verdicts) {
        r.advice = {
          rulesVersion: r.rulesVersion,
          now: iso,
          findings: [],
          ruleErrors: [],
          responsiveness: { value: o.verdicts[0], rationale: 'invented', decidingRules: [] },
          tolerance: { value: o.verdicts[1], rationale: 'invented', decidingRules: [] },
        } as unknown as NonNullable<AdviceRecord['advice']>;
      }
      return r;
    };
    const r1 = rec('2031-03-02T08:00:00.000Z', { ms: 10, verdicts: ['likely', 'adequate'] });
    const r2 = rec('2031-03-02T09:00:00.000Z', { ms: 30, kinds: ['volume-ok', 'check-tolerance'], verdicts: ['likely', 'limited'] });
    const r3 = rec('2031-03-02T23:59:59.999Z', { ms: 20, service: 'fluid-overview', kinds: [], failed: true });
    const r4 = rec('2031-03-03T00:00:00.000Z', { ms: 4, verdicts: ['unlikely', 'poor'] });
    const r5 = rec('2031-03-03T01:00:00.000Z', { ms: 100, indicators: ['critical'], verdicts: ['likely', 'adequate'] });
    const r6to8 = [1, 2, 3].map((ms, i) => rec(`2031-03-03T0${2 + i}:00:00.000Z`, { ms, verdicts: ['likely', 'adequate'] }));
    const r9 = rec('2031-03-09T12:00:00.000Z', { ms: 7.25, indicators: ['info'], verdicts: ['indeterminate', 'not-known'] });
    // 100 answers on one day with latencies 1..100 ms: nearest rank gives p50 = 50 and p99 = 99 (interpolation would not).
    const hundred = Array.from({ length: 100 }, (_, i) =>
      rec(`2031-03-10T10:${String(Math.floor(i / 2)).padStart(2, '0')}:0${i % 2}.000Z`, {
        ms: 100 - i,
        service: 'fluid-overview',
        kinds: [],
      }),
    );
    const all = [r1, r2, r3, r4, r5, ...r6to8, r9, ...hundred];

    async function seeded(): Promise<void> {
      await open();
      await appendAll(all);
      const [c1] = cardsOf(r1) as [string];
      const [c2a, c2b] = cardsOf(r2) as [string, string];
      const [c4] = cardsOf(r4) as [string];
      const notHypo = { code: 'not-hypovolaemic', display: 'Judged not hypovolaemic' };
      await store.addFeedback([
        feedbackRow(c1),
        feedbackRow(c2a, { outcome: 'overridden', overrideReason: notHypo }),
        // accepted and then overridden: counts once, as overridden
        feedbackRow(c2b, { outcomeTimestamp: at(40) }),
        feedbackRow(c2b, { outcome: 'overridden', userComment: 'changed my mind', outcomeTimestamp: at(41) }),
        feedbackRow(c4, { outcome: 'overridden', overrideReason: notHypo }),
      ]);
    }

    it('answers per day by service and indicator, feedback per card kind per week, reasons, verdict mix, latency percentiles', async () => {
      await seeded();
      expect(await store.overview({})).toEqual({
        answersByDay: [
          { day: '2031-03-02', service: 'bolus-select', indicator: 'warning', answers: 2 },
          { day: '2031-03-02', service: 'fluid-overview', indicator: 'none', answers: 1 },
          { day: '2031-03-03', service: 'bolus-select', indicator: 'critical', answers: 1 },
          { day: '2031-03-03', service: 'bolus-select', indicator: 'warning', answers: 4 },
          { day: '2031-03-09', service: 'bolus-select', indicator: 'info', answers: 1 },
          { day: '2031-03-10', service: 'fluid-overview', indicator: 'none', answers: 100 },
        ],
        feedbackByWeek: [
          { week: '2031-02-24', cardKind: 'check-tolerance', cards: 1, accepted: 0, overridden: 1, noFeedback: 0 },
          { week: '2031-02-24', cardKind: 'volume-ok', cards: 2, accepted: 1, overridden: 1, noFeedback: 0 },
          { week: '2031-03-03', cardKind: 'volume-ok', cards: 6, accepted: 0, overridden: 1, noFeedback: 5 },
        ],
        overrideReasonsByWeek: [
          { week: '2031-02-24', reasonCode: '(comment only)', reasonDisplay: '', cards: 1 },
          { week: '2031-02-24', reasonCode: 'not-hypovolaemic', reasonDisplay: 'Judged not hypovolaemic', cards: 1 },
          { week: '2031-03-03', reasonCode: 'not-hypovolaemic', reasonDisplay: 'Judged not hypovolaemic', cards: 1 },
        ],
        verdictsByWeek: [
          { week: '2031-02-24', responsiveness: 'likely', tolerance: 'adequate', answers: 1 },
          { week: '2031-02-24', responsiveness: 'likely', tolerance: 'limited', answers: 1 },
          { week: '2031-02-24', responsiveness: 'none', tolerance: 'none', answers: 1 },
          { week: '2031-03-03', responsiveness: 'indeterminate', tolerance: 'not-known', answers: 1 },
          { week: '2031-03-03', responsiveness: 'likely', tolerance: 'adequate', answers: 4 },
          { week: '2031-03-03', responsiveness: 'unlikely', tolerance: 'poor', answers: 1 },
          { week: '2031-03-10', responsiveness: 'none', tolerance: 'none', answers: 100 },
        ],
        latencyByDay: [
          { day: '2031-03-02', answers: 3, p50Ms: 20, p99Ms: 30 },
          { day: '2031-03-03', answers: 5, p50Ms: 3, p99Ms: 100 },
          { day: '2031-03-09', answers: 1, p50Ms: 7.3, p99Ms: 7.3 },
          { day: '2031-03-10', answers: 100, p50Ms: 50, p99Ms: 99 },
        ],
      });
      // Bounds on the recorded time (inclusive) and the service.
      const week = await store.overview({ from: '2031-03-03T00:00:00.000Z', to: '2031-03-09T23:59:59.999Z', service: 'bolus-select' });
      expect(week.answersByDay.map((d) => [d.day, d.indicator, d.answers])).toEqual([
        ['2031-03-03', 'critical', 1],
        ['2031-03-03', 'warning', 4],
        ['2031-03-09', 'info', 1],
      ]);
      expect(week.latencyByDay).toEqual([
        { day: '2031-03-03', answers: 5, p50Ms: 3, p99Ms: 100 },
        { day: '2031-03-09', answers: 1, p50Ms: 7.3, p99Ms: 7.3 },
      ]);
      expect(week.feedbackByWeek).toEqual([
        { week: '2031-03-03', cardKind: 'volume-ok', cards: 6, accepted: 0, overridden: 1, noFeedback: 5 },
      ]);
      expect((await store.overview({ service: 'fluid-overview' })).feedbackByWeek).toEqual([]);
      expect(await store.overview({ to: '2031-03-01T00:00:00.000Z' })).toEqual({
        answersByDay: [],
        feedbackByWeek: [],
        overrideReasonsByWeek: [],
        verdictsByWeek: [],
        latencyByDay: [],
      });
    });

    it('the list filters by most urgent indicator, verdicts and feedback outcome, newest first, and carries the verdicts', async () => {
      await seeded();
      const ids = async (q: Omit<Parameters<AuditStore['list']>[0], 'limit'>): Promise<string[]> =>
        (await store.list({ limit: 200, ...q })).items.map((i) => i.id);
      expect(await ids({ indicator: 'critical' })).toEqual([r5.id]);
      expect(await ids({ indicator: 'warning', from: '2031-03-02T00:00:00.000Z', to: '2031-03-02T23:59:59.999Z' })).toEqual([r2.id, r1.id]);
      expect(await ids({ indicator: 'none' })).toHaveLength(101);
      expect(await ids({ responsiveness: 'likely', tolerance: 'adequate' })).toEqual(
        [...r6to8]
          .reverse()
          .map((r) => r.id)
          .concat([r5.id, r1.id]),
      );
      expect(await ids({ responsiveness: 'none', service: 'fluid-overview', to: '2031-03-03T00:00:00.000Z' })).toEqual([r3.id]);
      expect(await ids({ feedback: 'overridden' })).toEqual([r4.id, r2.id]);
      expect(await ids({ feedback: 'accepted' })).toEqual([r2.id, r1.id]);
      const none = await ids({ feedback: 'none' });
      expect(none).toHaveLength(all.length - 3);
      expect(none).not.toContain(r1.id);
      expect(await ids({ feedback: 'overridden', indicator: 'warning', responsiveness: 'unlikely' })).toEqual([r4.id]);
      // Filters and the cursor together: pages of 2 over the five likely/adequate answers.
      const p1 = await store.list({ limit: 2, responsiveness: 'likely', tolerance: 'adequate' });
      const p2 = await store.list({
        limit: 2,
        responsiveness: 'likely',
        tolerance: 'adequate',
        ...(p1.nextCursor ? { cursor: p1.nextCursor } : {}),
      });
      const p3 = await store.list({
        limit: 2,
        responsiveness: 'likely',
        tolerance: 'adequate',
        ...(p2.nextCursor ? { cursor: p2.nextCursor } : {}),
      });
      expect([...p1.items, ...p2.items, ...p3.items].map((i) => i.id)).toEqual(
        await ids({ responsiveness: 'likely', tolerance: 'adequate' }),
      );
      expect(p3.nextCursor).toBeUndefined();
      const [one] = (await store.list({ limit: 1, indicator: 'critical' })).items;
      expect(one).toMatchObject({ id: r5.id, responsiveness: 'likely', tolerance: 'adequate', indicators: ['critical'] });
      expect(
        (await store.list({ limit: 1, responsiveness: 'none', service: 'fluid-overview', to: '2031-03-03T00:00:00.000Z' })).items[0],
      ).not.toHaveProperty('responsiveness');
    });
  });

  it('closes cleanly, twice', async () => {
    await open();
    await store.close();
    await store.close();
  });
});

// ---------------------------------------------------------------- PostgreSQL: several replicas

describe('PostgreSQL audit store shared by several replicas', () => {
  let admin: pg.Client;
  const schemas: string[] = [];
  const stores: AuditStore[] = [];
  const newSchema = (label: string): string => {
    const s = `${RUN}_${label}`;
    schemas.push(s);
    return s;
  };

  beforeAll(async () => {
    admin = await connectAdmin();
  });
  afterEach(async () => {
    await Promise.all(stores.splice(0).map((s) => s.close()));
  });
  afterAll(async () => {
    for (const s of schemas) await admin.query(`DROP SCHEMA IF EXISTS "${s}" CASCADE`);
    await admin.end();
  });

  const replicas = (schema: string, n: number): PostgresAuditStore[] => {
    const out = Array.from({ length: n }, () => new PostgresAuditStore(PG_URL, { schema, poolSize: 5 }));
    stores.push(...out);
    return out;
  };

  it('four replicas starting at once all initialise the same schema', async () => {
    const schema = newSchema('init');
    await Promise.all(replicas(schema, 4).map((s) => s.init()));
    const t = await admin.query(`SELECT table_name FROM information_schema.tables WHERE table_schema = $1 ORDER BY table_name`, [schema]);
    expect(t.rows.map((r: { table_name: string }) => r.table_name)).toEqual([
      'advice',
      'advice_card',
      'feedback',
      'jti_seen',
      'schema_version',
    ]);
  });

  it('four replicas appending 50 records each in parallel keep one linear chain', async () => {
    const schema = newSchema('concurrent');
    const rs = replicas(schema, 4);
    await rs[0]?.init();
    await Promise.all(rs.map((s) => s.init()));
    const results = await Promise.all(
      rs.flatMap((s, replica) =>
        Array.from({ length: 50 }, (_, i) =>
          s.append(adviceRecord({ at: i, patientId: `pt-replica-${replica}`, kinds: ['volume-ok', 'data-gap'] })),
        ),
      ),
    );
    expect(results).toHaveLength(200);
    expect(new Set(results.map((r) => r.seq)).size).toBe(200);
    expect(new Set(results.map((r) => r.hash)).size).toBe(200);
    const verifier = replicas(schema, 1)[0];
    expect(await verifier?.verifyChain()).toEqual({ ok: true, checked: 200 });

    // No fork: each record points at the one before it in seq order.
    const rows = (await admin.query(`SELECT seq, prev_hash, hash FROM "${schema}".advice ORDER BY seq`)).rows as Array<{
      prev_hash: string;
      hash: string;
    }>;
    expect(rows).toHaveLength(200);
    rows.forEach((row, i) => expect(row.prev_hash).toBe(i === 0 ? GENESIS : rows[i - 1]?.hash));
    const cards = await admin.query(`SELECT COUNT(*)::int AS n FROM "${schema}".advice_card`);
    expect(cards.rows[0]).toEqual({ n: 400 });
  });

  it('keeps the chains of two schemas apart', async () => {
    const [a] = replicas(newSchema('apart_a'), 1);
    const [b] = replicas(newSchema('apart_b'), 1);
    if (!a || !b) throw new Error('fixture');
    await Promise.all([a.init(), b.init()]);
    const ra = adviceRecord();
    await a.append(ra);
    const rb = adviceRecord();
    expect((await b.append(rb)).hash).toBe(sha256Hex(GENESIS + JSON.stringify(rb)));
    expect(await b.get(ra.id)).toBeUndefined();
  });

  it('runs as a role with only SELECT and INSERT (plus UPDATE, DELETE on jti_seen); an older schema must be updated by the owner first', async () => {
    const schema = newSchema('least');
    const role = `${RUN}_app`;
    const asApp = (() => {
      const u = new URL(PG_URL);
      u.username = role;
      return u.toString();
    })();
    await admin.query(`CREATE ROLE "${role}" LOGIN`);
    try {
      const [owner] = replicas(schema, 1);
      await owner?.init();
      const grant = async () => {
        await admin.query(`GRANT USAGE ON SCHEMA "${schema}" TO "${role}"`);
        await admin.query(`GRANT SELECT, INSERT ON ALL TABLES IN SCHEMA "${schema}" TO "${role}"`);
        await admin.query(`GRANT UPDATE, DELETE ON "${schema}".jti_seen TO "${role}"`);
      };
      await grant();
      const app = new PostgresAuditStore(asApp, { schema, poolSize: 2 });
      stores.push(app);
      await app.init();
      const rec = adviceRecord();
      await app.append(rec);
      expect((await app.cardOwner(cardsOf(rec)[0] ?? ''))?.issuer).toBe('https://ehr.invented.example');
      const cache = app.sharedReplayCache();
      expect(await cache.seen('https://ehr.invented.example jti-1', Date.now() / 1000 + 60)).toBe(false);
      expect(await cache.seen('https://ehr.invented.example jti-1', Date.now() / 1000 + 60)).toBe(true);
      const direct = new pg.Client({ connectionString: asApp });
      await direct.connect();
      await expect(direct.query(`UPDATE "${schema}".advice SET record = '{}'`)).rejects.toThrow(/permission denied/);
      await direct.end();

      // The schema as an older Tidemark made it: no issuer column, no jti_seen, no version. The app role cannot add them.
      await admin.query(`ALTER TABLE "${schema}".advice DROP COLUMN issuer`);
      await admin.query(`DROP TABLE "${schema}".jti_seen`);
      await admin.query(`DROP TABLE "${schema}".schema_version`);
      const before = new PostgresAuditStore(asApp, { schema, poolSize: 2 });
      stores.push(before);
      await expect(before.init()).rejects.toThrow(/audit store set-up failed at .*run the service once as the owner of the audit schema/);
      await owner?.init();
      await grant();
      const after = new PostgresAuditStore(asApp, { schema, poolSize: 2 });
      stores.push(after);
      await after.init();
      expect((await after.cardOwner(cardsOf(rec)[0] ?? ''))?.issuer).toBe('https://ehr.invented.example');
      expect(await after.verifyChain()).toEqual({ ok: true, checked: 1 });
    } finally {
      await Promise.all(stores.splice(0).map((st) => st.close()));
      await admin.query(`DROP SCHEMA IF EXISTS "${schema}" CASCADE`);
      await admin.query(`DROP OWNED BY "${role}"`);
      await admin.query(`DROP ROLE "${role}"`);
    }
  });

  it('refuses a schema name that is not a plain identifier', () => {
    expect(() => new PostgresAuditStore(PG_URL, { schema: 'x"; DROP TABLE y; --' })).toThrow(/schema name/);
  });
});

// ---------------------------------------------------------------- choosing the adapter

describe('openAuditStore', () => {
  it('opens the adapter the configuration names', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tidemark-open-'));
    try {
      const s = openAuditStore({ TIDEMARK_AUDIT_STORE: 'sqlite', TIDEMARK_SQLITE_PATH: join(dir, 'a.sqlite') });
      expect(s).toBeInstanceOf(SqliteAuditStore);
      await s.close();
      const p = openAuditStore({ TIDEMARK_AUDIT_STORE: 'postgres', TIDEMARK_SQLITE_PATH: 'unused', TIDEMARK_PG_URL: PG_URL });
      expect(p).toBeInstanceOf(PostgresAuditStore);
      expect(p.kind).toBe('postgres');
      await p.ping();
      await p.close();
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('needs a PostgreSQL URL for the postgres adapter', () => {
    expect(() => openAuditStore({ TIDEMARK_AUDIT_STORE: 'postgres', TIDEMARK_SQLITE_PATH: 'unused', TIDEMARK_PG_URL: undefined })).toThrow(
      /TIDEMARK_PG_URL/,
    );
  });
});
