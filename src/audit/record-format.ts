/**
 * How a record becomes a stored row and back (docs/decisions/0006-store-what-was-received.md).
 *
 * Format 1 (Tidemark 0.1.0 to 0.3.0 before format 2): the record's JSON text in `record`, snapshot included; hashed by chain.ts.
 * Format 2 (0.3.0, a record that carries its inputs):
 * - `outputs`: the record without its snapshot and inputs (cards as sent, advice and findings, gathering outcomes,
 *   timings), JSON, Brotli-compressed;
 * - `inputs`: the inputs as received (request body, FHIR answers, the assessment's clock), JSON, Brotli-compressed;
 * - `record`: a small JSON index of what SQL reads (card indicators, verdicts, timings, issuer), at the same
 *   paths as in a format-1 record, so the console's aggregates read both formats alike.
 * Its chain hash is sha256(previous hash ‖ index text ‖ sha256(outputs) ‖ sha256(inputs)), hex digests, over the
 * bytes as stored: a verifier needs sha256 and nothing else, and one chain runs across both formats.
 * Brotli at quality 1 (Node's zlib, RFC 7932): the fastest setting; measured in docs/benchmarks.md.
 */
import { createHash } from 'node:crypto';
import { promisify } from 'node:util';
import { brotliCompress, brotliCompressSync, brotliDecompressSync, constants } from 'node:zlib';
import { chainHashOfText, parseRecordText, recordText, storedHashMatches } from './chain.js';
import type { AdviceRecord, RecordInputs, StoredAdvice } from './types.js';

export const FORMAT_RECEIVED = 2;

/** A record as the columns it is stored in. */
export interface StoredParts {
  format: 1 | 2;
  /** Format 1: the record's JSON text; format 2: the index. */
  text: string;
  outputs?: Uint8Array;
  inputs?: Uint8Array;
}

/** A row as both stores read it (`format` NULL for rows written before the column). */
export interface StoredRow {
  record: string;
  format?: number | null;
  outputs?: Uint8Array | null;
  inputs?: Uint8Array | null;
}

/** A stored blob as the database drivers bind it: a Buffer over the same bytes (one that crossed threads is wrapped, not copied). */
export const asBuffer = (b: Uint8Array | undefined): Buffer | null => (b ? Buffer.from(b.buffer, b.byteOffset, b.byteLength) : null);

const BROTLI = { params: { [constants.BROTLI_PARAM_QUALITY]: 1 } };

const compress = (text: string): Uint8Array => brotliCompressSync(Buffer.from(text, 'utf8'), BROTLI);
const compressAsync = promisify(brotliCompress);
const decompress = (bytes: Uint8Array): string => brotliDecompressSync(bytes).toString('utf8');

/**
 * A record serialised but not yet compressed: the texts of its columns (the inputs still an object, below). Made on
 * the service's thread (JSON.stringify of objects it holds); compressing them (about 0.3 ms for the benchmark's
 * record, docs/benchmarks.md) is left to whoever writes the row: the SQLite writer thread, or zlib's thread pool for
 * PostgreSQL.
 */
export interface SerialisedRecord {
  format: 1 | 2;
  text: string;
  outputsText?: string;
  /**
   * The inputs, as an object: they are strings (the body, the FHIR answers) in a few small objects, which cross to
   * the SQLite writer thread as one copy each (structured clone), so they are serialised there, not here, sparing the
   * service's thread the JSON-escaping of the whole request body a second time.
   */
  inputs?: RecordInputs;
}

/** The record's column texts: format 2 when it carries its inputs, else format 1 (its JSON text). */
export function serialiseRecord(rec: AdviceRecord): SerialisedRecord {
  const inputs = rec.inputs;
  if (!inputs) return { format: 1, text: recordText(rec) };
  const { snapshot: _snapshot, inputs: _inputs, ...outputs } = rec;
  return { format: 2, text: indexText(rec), outputsText: recordText(outputs as AdviceRecord), inputs };
}

/** The stored columns of a serialised record, compressed on this thread. */
export function compressRecord(s: SerialisedRecord): StoredParts {
  if (s.format === 1 || s.outputsText === undefined || s.inputs === undefined) return { format: 1, text: s.text };
  return { format: 2, text: s.text, outputs: compress(s.outputsText), inputs: compress(JSON.stringify(s.inputs)) };
}

/** The same, compressed on zlib's thread pool (the PostgreSQL store, whose appends run on the event loop). */
export async function compressRecordAsync(s: SerialisedRecord): Promise<StoredParts> {
  if (s.format === 1 || s.outputsText === undefined || s.inputs === undefined) return { format: 1, text: s.text };
  const [outputs, inputs] = await Promise.all([
    compressAsync(Buffer.from(s.outputsText), BROTLI),
    compressAsync(Buffer.from(JSON.stringify(s.inputs)), BROTLI),
  ]);
  return { format: 2, text: s.text, outputs, inputs };
}

/** The record as stored, all on this thread: format 2 when it carries its inputs, else format 1 (its JSON text). */
export function encodeRecord(rec: AdviceRecord): StoredParts {
  return compressRecord(serialiseRecord(rec));
}

/** What SQL reads of a record, at the paths of a format-1 record: cards' indicators, verdicts, timings, issuer. */
export function indexText(rec: AdviceRecord): string {
  return JSON.stringify({
    format: FORMAT_RECEIVED,
    cards: rec.cards.map((c) => ({ indicator: c.indicator })),
    ...(rec.advice ? { advice: { responsiveness: verdict(rec.advice.responsiveness), tolerance: verdict(rec.advice.tolerance) } } : {}),
    timings: rec.timings,
    ...(rec.client?.issuer !== undefined ? { client: { issuer: rec.client.issuer } } : {}),
  });
}

const verdict = (v: { value?: string } | undefined): { value?: string } => (v?.value !== undefined ? { value: v.value } : {});

const hex = (b: Uint8Array): string => createHash('sha256').update(b).digest('hex');

/** The chain hash of a stored row from the previous hash. */
export function storedHash(prevHash: string, parts: StoredParts): string {
  if (parts.format === 1 || !parts.outputs || !parts.inputs) return chainHashOfText(prevHash, parts.text);
  return createHash('sha256')
    .update(prevHash, 'utf8')
    .update(parts.text, 'utf8')
    .update(hex(parts.outputs))
    .update(hex(parts.inputs))
    .digest('hex');
}

const formatOf = (row: StoredRow): 1 | 2 => (row.format === FORMAT_RECEIVED ? 2 : 1);

/** Whether a stored row's hash is the one its stored bytes give (format 1 also by 0.1.0's rule, chain.ts). */
export function rowHashMatches(prevHash: string, row: StoredRow, hash: string): boolean {
  if (formatOf(row) === 1) return storedHashMatches(prevHash, row.record, hash);
  if (!row.outputs || !row.inputs) return false;
  return storedHash(prevHash, { format: 2, text: row.record, outputs: row.outputs, inputs: row.inputs }) === hash;
}

/**
 * A stored row read back as the record it holds (a format-2 row: its outputs with its inputs, no snapshot). A list of
 * summaries needs only the outputs: with `inputs: false` the inputs column is neither read nor decompressed.
 */
export function decodeRow(row: StoredRow, opts: { inputs: boolean } = { inputs: true }): AdviceRecord & { format: 1 | 2 } {
  if (formatOf(row) === 1) return { ...parseRecordText(row.record), format: 1 };
  if (!row.outputs || (opts.inputs && !row.inputs)) throw new Error('a stored record of format 2 lacks its outputs or inputs');
  const rec = parseRecordText(decompress(row.outputs));
  if (!opts.inputs || !row.inputs) return { ...rec, format: 2 };
  return { ...rec, inputs: JSON.parse(decompress(row.inputs)) as RecordInputs, format: 2 };
}

/** A stored row with its chain columns as a StoredAdvice. */
export function storedAdviceOf(row: StoredRow & { seq: number | string; prev_hash: string; hash: string }): StoredAdvice {
  return { ...decodeRow(row), seq: Number(row.seq), prevHash: row.prev_hash, hash: row.hash };
}
