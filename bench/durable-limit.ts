/**
 * The durable-audit limit, as a child process of bench/run.ts: the least a service can do that must not answer
 * before its record is durable (decision 0002). A bare express 5 app that parses the same body the same way the
 * service does, appends the body's raw text to SQLite (WAL, synchronous=FULL) chained by SHA-256 to the record
 * before it, and answers a fixed small JSON once the commit is on disk. No validation, no rules, no cards.
 *
 * Group commit: requests whose bodies were parsed in the same turn of the event loop are written in one
 * transaction (one WAL fsync) on the next turn; each waits for the commit that holds its own row. No Tidemark code.
 */
import { createHash } from 'node:crypto';
import type { IncomingMessage, Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import Database from 'better-sqlite3';
import express, { type Response } from 'express';
import { onStop, reportRss, send } from './ipc.js';

const path = process.env['BENCH_DURABLE_PATH'];
if (!path) throw new Error('BENCH_DURABLE_PATH is required');
const db = new Database(path);
db.pragma('journal_mode = WAL');
db.pragma('synchronous = FULL');
db.exec(
  'CREATE TABLE IF NOT EXISTS received (seq INTEGER PRIMARY KEY, at TEXT NOT NULL, body TEXT NOT NULL, prev TEXT NOT NULL, hash TEXT NOT NULL)',
);
const insert = db.prepare('INSERT INTO received (at, body, prev, hash) VALUES (?, ?, ?, ?)');
let prev = '0'.repeat(64);

interface Pending {
  body: string;
  res: Response;
}
let pending: Pending[] = [];
let batches = 0;
let rows = 0;
const commit = db.transaction((batch: Pending[]) => {
  for (const p of batch) {
    const at = new Date().toISOString();
    const hash = createHash('sha256').update(prev).update(at).update(p.body).digest('hex');
    insert.run(at, p.body, prev, hash);
    prev = hash;
  }
});
function flush(): void {
  const batch = pending;
  pending = [];
  try {
    commit(batch);
    batches += 1;
    rows += batch.length;
    for (const p of batch) p.res.status(200).json(answer);
  } catch (e) {
    for (const p of batch) p.res.status(500).json({ error: (e as Error).message });
  }
}

const app = express();
app.disable('x-powered-by');
const answer = { cards: [] };
// The same parser, limit and media types as the service; the raw text is kept as it was received.
const json = express.json({
  limit: '2mb',
  type: ['application/json', 'application/fhir+json', 'application/*+json'],
  verify: (req: IncomingMessage, _res, buf) => {
    (req as IncomingMessage & { rawText?: string }).rawText = buf.toString('utf8');
  },
});
app.post('/cds-services/:id', json, (req, res) => {
  const raw = (req as unknown as { rawText?: string }).rawText;
  if (!req.body || typeof req.body !== 'object' || raw === undefined) {
    res.status(400).json({ error: 'not a JSON object' });
    return;
  }
  if (pending.length === 0) setImmediate(flush);
  pending.push({ body: raw, res });
});
app.get('/batches', (_req, res) => {
  res.json({ batches, rows });
});

const server: Server = app.listen(0, '127.0.0.1', () => {
  reportRss();
  send({ type: 'ready', url: `http://127.0.0.1:${(server.address() as AddressInfo).port}` });
});
server.keepAliveTimeout = 30_000;
onStop(
  () =>
    new Promise<void>((r) => {
      server.close(() => {
        db.close();
        r();
      });
      server.closeAllConnections();
    }),
);
