/**
 * The audit hash chain: hash_n = sha256(hash_{n-1} + the stored JSON text of record n, UTF-8).
 *
 * Both stores keep a record's text exactly as written (SQLite TEXT, PostgreSQL text, never jsonb), so the text
 * itself is hashed: any changed byte shows, and a verifier needs nothing but sha256. Records written before
 * this rule (Tidemark 0.1.0) were hashed over canonicalJson of the record (keys sorted); verification still
 * accepts that hash for them (storedHashMatches), so an existing audit database keeps verifying.
 *
 * The stored text (recordText) leaves out one copy of the findings: the record carries them at its top level
 * and, inside the advice, again. parseRecordText puts them back, so a record reads back as it was given.
 */
import { createHash } from 'node:crypto';
import type { AdviceRecord } from './types.js';

export const GENESIS = '0'.repeat(64);

/**
 * JSON with object keys sorted, so the same record always hashes the same. It runs over every audit record before
 * the answer is sent, so it is done the fast way when it can: a copy of the value with its keys inserted in
 * sorted order, serialised by the engine's JSON.stringify in one pass (string concatenation here built a deep
 * rope that cost more to flatten for the hash than to build). A value whose copy could serialise differently
 * (a sparse array, a key that is an integer — engines put those first — or `__proto__`) takes the plain
 * recursive way; both give the same text.
 */
export function canonicalJson(v: unknown): string {
  let copy: unknown;
  try {
    copy = sortedCopy(v, new Map());
  } catch (e) {
    if (e !== IRREGULAR) throw e;
    return canonical(v);
  }
  return JSON.stringify(copy) ?? 'null';
}

const IRREGULAR = new Error('not copyable in sorted order');
const INTEGER_KEY = /^\d+$/;

/** The value with every object's keys inserted in sorted order; functions and symbols become null, as canonical() writes them. */
function sortedCopy(v: unknown, arrays: Map<unknown[], unknown[]>): unknown {
  if (typeof v === 'function' || typeof v === 'symbol') return null;
  if (v === null || typeof v !== 'object') return v;
  if (Array.isArray(v)) {
    const done = arrays.get(v);
    if (done) return done;
    const out = new Array<unknown>(v.length);
    for (let i = 0; i < v.length; i += 1) {
      const x: unknown = v[i];
      if (x === undefined && !(i in v)) throw IRREGULAR;
      out[i] = sortedCopy(x, arrays);
    }
    arrays.set(v, out);
    return out;
  }
  const o = v as Record<string, unknown>;
  const out: Record<string, unknown> = {};
  for (const k of Object.keys(o).sort()) {
    const c = k.charCodeAt(0);
    if ((c >= 48 && c <= 57 && INTEGER_KEY.test(k)) || k === '__proto__') throw IRREGULAR;
    const x = o[k];
    if (x !== undefined) out[k] = sortedCopy(x, arrays);
  }
  return out;
}

/** The reference form: recursive, one string. */
function canonical(v: unknown): string {
  if (v === null || typeof v !== 'object') return JSON.stringify(v) ?? 'null';
  if (Array.isArray(v)) {
    let s = '[';
    for (let i = 0; i < v.length; i += 1) {
      if (i > 0) s += ',';
      const x: unknown = v[i];
      // undefined → null as JSON.stringify does; a hole of a sparse array stays empty.
      if (x !== undefined) s += canonical(x);
      else if (i in v) s += 'null';
    }
    return `${s}]`;
  }
  const o = v as Record<string, unknown>;
  let s = '{';
  let first = true;
  for (const k of Object.keys(o).sort()) {
    const x = o[k];
    if (x === undefined) continue;
    s += `${first ? '' : ','}${JSON.stringify(k)}:${canonical(x)}`;
    first = false;
  }
  return `${s}}`;
}

/** The stored JSON text of a record: JSON.stringify, with `advice.findings` left out when it is the record's own `findings`. */
export function recordText(rec: AdviceRecord): string {
  const advice = rec.advice;
  if (advice && advice.findings === rec.findings) return JSON.stringify({ ...rec, advice: { ...advice, findings: undefined } });
  return JSON.stringify(rec);
}

/** A stored record text read back: `advice.findings` restored from the record's findings when the text left it out. */
export function parseRecordText(text: string): AdviceRecord {
  const rec = JSON.parse(text) as AdviceRecord;
  if (rec.advice && rec.advice.findings === undefined && Array.isArray(rec.findings)) rec.advice.findings = rec.findings;
  return rec;
}

/** The chain hash of a record from the previous hash and the record's stored text. */
export function chainHashOfText(prevHash: string, text: string): string {
  return createHash('sha256').update(prevHash, 'utf8').update(text, 'utf8').digest('hex');
}

/**
 * Whether a stored record's hash is the one its text gives: the hash of the text itself, or, for a record written
 * by Tidemark 0.1.0, the hash of canonicalJson of the parsed text. A text that no longer parses can match only the first.
 */
export function storedHashMatches(prevHash: string, text: string, hash: string): boolean {
  if (chainHashOfText(prevHash, text) === hash) return true;
  try {
    return chainHash(prevHash, JSON.parse(text) as AdviceRecord) === hash;
  } catch {
    return false;
  }
}

/** The hash rule of Tidemark 0.1.0: sha256(hash_{n-1} + canonicalJson(record_n)). Kept to verify records it wrote. */
export function chainHash(prevHash: string, rec: AdviceRecord): string {
  return createHash('sha256').update(prevHash).update(canonicalJson(rec)).digest('hex');
}
