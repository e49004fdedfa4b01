/** The audit hash chain: hash_n = sha256(hash_{n-1} + canonical JSON of record n). */
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

/**
 * canonicalJson of a plain object, as parts whose concatenation is that text: `{"key":` and each value's
 * canonical JSON, keys sorted. For the hash of a large record: one string over 128 KB (a record with any
 * character beyond Latin-1 is stored two bytes a character) is a large heap object, and allocating one costs
 * more than building the text (about 1 ms on the benchmark machine); the parts stay small.
 */
export function canonicalJsonParts(o: Record<string, unknown>): string[] {
  const parts: string[] = [];
  for (const k of Object.keys(o).sort()) {
    const x = o[k];
    if (x === undefined) continue;
    parts.push(`${parts.length ? ',' : '{'}${JSON.stringify(k)}:`, canonicalJson(x));
  }
  parts.push(parts.length ? '}' : '{}');
  return parts;
}

/** The chain hash from the previous hash and a record's canonical JSON given in parts (canonicalJsonParts). */
export function chainHashOfParts(prevHash: string, parts: readonly string[]): string {
  const h = createHash('sha256').update(prevHash);
  for (const p of parts) h.update(p);
  return h.digest('hex');
}

export function chainHash(prevHash: string, rec: AdviceRecord): string {
  return createHash('sha256').update(prevHash).update(canonicalJson(rec)).digest('hex');
}
