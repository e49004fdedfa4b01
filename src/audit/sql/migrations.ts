/**
 * The audit schema as versioned migrations, both dialects side by side so that they cannot drift apart unseen
 * (tests/integration/audit-migrations.test.ts compares the tables, columns and indexes both stores end up with).
 * Each store applies, at start, the migrations its database has not had, in order, inside one transaction, and
 * records the version it reached: SQLite in `PRAGMA user_version`, PostgreSQL in `{schema}.schema_version`.
 *
 * A database written before the versions were recorded (Tidemark 0.2.0, or 0.3.0 work before this file) reads as
 * version 0; every statement is idempotent (IF NOT EXISTS, a column added only when missing), so applying the
 * migrations to it creates only what it lacks.
 *
 * The dialects differ only where the engines do: SQLite's rowid is the order feedback arrived in (PostgreSQL has
 * the column `arrival` for it), PostgreSQL compares sorted text in the "C" collation (SQLite's BINARY is byte order
 * already), and the jti replay cache is a PostgreSQL table (SQLite replicas do not share one).
 */
import { replayTableDdl } from '../postgres-replay-cache.js';

/** SQLite (better-sqlite3) runs a migration synchronously, inside one transaction. */
export interface SqliteTarget {
  run(sql: string): void;
  hasColumn(table: string, column: string): boolean;
}

export interface Migration {
  version: number;
  /** What it brings, for the log and the docs. */
  note: string;
  sqlite: (db: SqliteTarget) => void;
  /** The PostgreSQL statements; `s` is the quoted schema name. Each is idempotent. */
  postgres: (s: string) => string[];
}

function all(db: SqliteTarget, statements: readonly string[]): void {
  for (const stmt of statements) db.run(stmt);
}

export const MIGRATIONS: readonly Migration[] = [
  {
    version: 1,
    note: 'Tidemark 0.2.0: advice (the hash-chained records), advice_card (card uuid → kind), feedback',
    sqlite: (db) =>
      all(db, [
        `CREATE TABLE IF NOT EXISTS advice (
        seq INTEGER PRIMARY KEY AUTOINCREMENT, id TEXT NOT NULL UNIQUE, recorded_at TEXT NOT NULL, service TEXT NOT NULL, hook TEXT NOT NULL,
        hook_instance TEXT NOT NULL, patient_id TEXT, encounter_id TEXT, outcome TEXT NOT NULL, rules_version TEXT NOT NULL, record TEXT NOT NULL,
        prev_hash TEXT NOT NULL, hash TEXT NOT NULL
      )`,
        'CREATE INDEX IF NOT EXISTS advice_patient_time ON advice (patient_id, recorded_at)',
        'CREATE INDEX IF NOT EXISTS advice_time ON advice (recorded_at)',
        `CREATE TABLE IF NOT EXISTS advice_card (
        card_uuid TEXT PRIMARY KEY, advice_id TEXT NOT NULL REFERENCES advice(id), card_kind TEXT NOT NULL, service TEXT NOT NULL
      )`,
        `CREATE TABLE IF NOT EXISTS feedback (
        feedback_key TEXT PRIMARY KEY, card_uuid TEXT NOT NULL REFERENCES advice_card(card_uuid), outcome TEXT NOT NULL, accepted_suggestions TEXT NOT NULL,
        reason_system TEXT, reason_code TEXT, reason_display TEXT, user_comment TEXT, outcome_timestamp TEXT NOT NULL, received_at TEXT NOT NULL,
        service TEXT NOT NULL
      )`,
        'CREATE INDEX IF NOT EXISTS feedback_card ON feedback (card_uuid)',
      ]),
    postgres: (s) => [
      `CREATE TABLE IF NOT EXISTS ${s}.advice (
        seq BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY, id TEXT NOT NULL UNIQUE, recorded_at TEXT COLLATE "C" NOT NULL, service TEXT NOT NULL,
        hook TEXT NOT NULL, hook_instance TEXT NOT NULL, patient_id TEXT, encounter_id TEXT, outcome TEXT NOT NULL, rules_version TEXT NOT NULL,
        record TEXT NOT NULL, prev_hash TEXT NOT NULL, hash TEXT NOT NULL
      )`,
      `CREATE INDEX IF NOT EXISTS advice_patient_time ON ${s}.advice (patient_id, recorded_at)`,
      `CREATE INDEX IF NOT EXISTS advice_time ON ${s}.advice (recorded_at)`,
      `CREATE TABLE IF NOT EXISTS ${s}.advice_card (
        card_uuid TEXT PRIMARY KEY, advice_id TEXT NOT NULL REFERENCES ${s}.advice(id), card_kind TEXT COLLATE "C" NOT NULL, service TEXT NOT NULL
      )`,
      `CREATE INDEX IF NOT EXISTS advice_card_advice ON ${s}.advice_card (advice_id)`,
      `CREATE TABLE IF NOT EXISTS ${s}.feedback (
        feedback_key TEXT PRIMARY KEY, card_uuid TEXT NOT NULL REFERENCES ${s}.advice_card(card_uuid), outcome TEXT NOT NULL,
        accepted_suggestions TEXT NOT NULL, reason_system TEXT, reason_code TEXT COLLATE "C", reason_display TEXT, user_comment TEXT,
        outcome_timestamp TEXT COLLATE "C" NOT NULL, received_at TEXT NOT NULL, service TEXT NOT NULL, arrival BIGINT GENERATED ALWAYS AS IDENTITY
      )`,
      `CREATE INDEX IF NOT EXISTS feedback_card ON ${s}.feedback (card_uuid)`,
    ],
  },
  {
    version: 2,
    note: 'Tidemark 0.3.0: advice.issuer (the issuer that received the cards, for feedback); the card index in SQLite too; the shared jti cache',
    sqlite: (db) => {
      if (!db.hasColumn('advice', 'issuer')) db.run('ALTER TABLE advice ADD COLUMN issuer TEXT');
      // PostgreSQL had this index from the start; SQLite lacked it (feedback joins look cards up by advice).
      db.run('CREATE INDEX IF NOT EXISTS advice_card_advice ON advice_card (advice_id)');
    },
    postgres: (s) => [`ALTER TABLE ${s}.advice ADD COLUMN IF NOT EXISTS issuer TEXT`, replayTableDdl(s)],
  },
  {
    version: 3,
    note: 'Tidemark 0.3.0: advice.format, advice.outputs, advice.inputs (a record stored as received, docs/decisions/0006-store-what-was-received.md)',
    sqlite: (db) => {
      if (!db.hasColumn('advice', 'format')) db.run('ALTER TABLE advice ADD COLUMN format INTEGER');
      if (!db.hasColumn('advice', 'outputs')) db.run('ALTER TABLE advice ADD COLUMN outputs BLOB');
      if (!db.hasColumn('advice', 'inputs')) db.run('ALTER TABLE advice ADD COLUMN inputs BLOB');
    },
    postgres: (s) => [
      `ALTER TABLE ${s}.advice ADD COLUMN IF NOT EXISTS format INTEGER`,
      `ALTER TABLE ${s}.advice ADD COLUMN IF NOT EXISTS outputs BYTEA`,
      `ALTER TABLE ${s}.advice ADD COLUMN IF NOT EXISTS inputs BYTEA`,
    ],
  },
];

export const SCHEMA_VERSION = MIGRATIONS.reduce((v, m) => Math.max(v, m.version), 0);
