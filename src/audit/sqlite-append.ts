/**
 * The append path of the SQLite audit store, shared by the store itself (an in-memory database) and by its
 * writer thread (src/audit/sqlite-writer.ts, every file database): how the connection is opened, how a record
 * becomes its stored text and hash input, and the group-commit transaction.
 */
import Database from 'better-sqlite3';
import { GENESIS } from './chain.js';
import { asBuffer, compressRecord, serialiseRecord, storedHash, type SerialisedRecord, type StoredParts } from './record-format.js';
import type { AdviceRecord } from './types.js';

/** WAL journal and synchronous=FULL: a committed record survives a process kill or power loss. */
export function openAuditDb(path: string): Database.Database {
  const db = new Database(path);
  // 16 KB pages for a new database (an existing one keeps its page size): a record of about 50 kB spans fewer
  // overflow pages and each commit writes fewer WAL frames (measured: docs/benchmarks.md). SQLite applies it only
  // before the first table exists.
  db.pragma('page_size = 16384');
  db.pragma('journal_mode = WAL');
  db.pragma('synchronous = FULL');
  db.pragma('foreign_keys = ON');
  db.pragma('busy_timeout = 5000');
  return db;
}

/** The columns of a record besides its text; `issuer` is the record's `client.issuer`. */
export type RecordMeta = Pick<
  AdviceRecord,
  'id' | 'recordedAt' | 'service' | 'hook' | 'hookInstance' | 'patientId' | 'encounterId' | 'outcome' | 'rulesVersion' | 'cardKinds'
> & {
  issuer?: string;
};

export interface PreparedRecord {
  meta: RecordMeta;
  /** The record's column texts (src/audit/record-format.ts), compressed by the appender; the chain hash covers the bytes stored. */
  serialised: SerialisedRecord;
}

/** `bytes`: about how many bytes the row holds (text in characters), for pacing checkpoints. */
export type AppendResult = { ok: true; seq: number; hash: string; bytes: number } | { ok: false; error: unknown };

export { MAX_BATCH } from './shared.js';

function metaOf(r: AdviceRecord): RecordMeta {
  return {
    id: r.id,
    recordedAt: r.recordedAt,
    service: r.service,
    hook: r.hook,
    hookInstance: r.hookInstance,
    ...(r.patientId !== undefined ? { patientId: r.patientId } : {}),
    ...(r.encounterId !== undefined ? { encounterId: r.encounterId } : {}),
    outcome: r.outcome,
    rulesVersion: r.rulesVersion,
    cardKinds: r.cardKinds,
    ...(r.client?.issuer !== undefined ? { issuer: r.client.issuer } : {}),
  };
}

/**
 * A record made ready to append, on the caller's thread: its columns and its column texts. Serialising here costs
 * this thread about what a structured clone of the record object would (docs/benchmarks.md) and spares the writer
 * thread reading that clone back; a string crosses to the writer in one copy. The writer compresses the texts (off
 * the event loop), hashes the bytes and binds them.
 */
export function prepareRecord(rec: AdviceRecord): PreparedRecord {
  return { meta: metaOf(rec), serialised: serialiseRecord(rec) };
}

/**
 * The group commit: one IMMEDIATE transaction (one WAL fsync under synchronous=FULL) for a batch of records, each
 * chained to the one before it. Each record runs in a SAVEPOINT of its own (a transaction function called inside
 * a transaction), so one that is refused (duplicate id, reused card uuid) leaves nothing behind and does not undo
 * the others. Throws when BEGIN or COMMIT fails: then nothing of the batch is stored. The texts are compressed
 * before BEGIN, so the write lock is held only for the inserts and the commit.
 */
export function createBatchAppender(db: Database.Database): (batch: readonly PreparedRecord[]) => AppendResult[] {
  const last = db.prepare('SELECT hash FROM advice ORDER BY seq DESC LIMIT 1');
  const insert = db.prepare(
    `INSERT INTO advice (id, recorded_at, service, hook, hook_instance, patient_id, encounter_id, outcome, rules_version, record, prev_hash, hash, issuer,
       format, outputs, inputs)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  const card = db.prepare('INSERT INTO advice_card (card_uuid, advice_id, card_kind, service) VALUES (?, ?, ?, ?)');
  const one = db.transaction(({ meta: r }: PreparedRecord, parts: StoredParts, prev: string) => {
    const hash = storedHash(prev, parts);
    const info = insert.run(
      r.id,
      r.recordedAt,
      r.service,
      r.hook,
      r.hookInstance,
      r.patientId ?? null,
      r.encounterId ?? null,
      r.outcome,
      r.rulesVersion,
      parts.text,
      prev,
      hash,
      r.issuer ?? null,
      parts.format === 1 ? null : parts.format,
      asBuffer(parts.outputs),
      asBuffer(parts.inputs),
    );
    for (const [uuid, kind] of Object.entries(r.cardKinds)) card.run(uuid, r.id, kind, r.service);
    const size = parts.text.length + (parts.outputs?.byteLength ?? 0) + (parts.inputs?.byteLength ?? 0);
    return { seq: Number(info.lastInsertRowid), hash, bytes: size };
  });
  const batchTx = db.transaction((batch: readonly PreparedRecord[], parts: ReadonlyArray<StoredParts | Error>, done: AppendResult[]) => {
    let prev = (last.get() as { hash: string } | undefined)?.hash ?? GENESIS;
    batch.forEach((p, i) => {
      const stored = parts[i];
      if (!stored || stored instanceof Error) return void done.push({ ok: false, error: stored ?? new Error('audit append lost') });
      try {
        const r = one(p, stored, prev);
        prev = r.hash;
        done.push({ ok: true, ...r });
      } catch (e) {
        done.push({ ok: false, error: e });
      }
    });
  });
  return (batch) => {
    const parts = batch.map((p) => {
      try {
        return compressRecord(p.serialised);
      } catch (e) {
        return e instanceof Error ? e : new Error(String(e));
      }
    });
    const done: AppendResult[] = [];
    batchTx.immediate(batch, parts, done);
    return done;
  };
}
