/** The audit hash chain: hash_n = sha256(hash_{n-1} + canonical JSON of record n). */
import { createHash } from 'node:crypto';
import type { AdviceRecord } from './types.js';

export const GENESIS = '0'.repeat(64);

/** JSON with object keys sorted, so the same record always hashes the same. */
export function canonicalJson(v: unknown): string {
  if (v === null || typeof v !== 'object') return JSON.stringify(v) ?? 'null';
  if (Array.isArray(v)) return `[${v.map((x) => canonicalJson(x === undefined ? null : x)).join(',')}]`;
  const o = v as Record<string, unknown>;
  return `{${Object.keys(o)
    .filter((k) => o[k] !== undefined)
    .sort()
    .map((k) => `${JSON.stringify(k)}:${canonicalJson(o[k])}`)
    .join(',')}}`;
}

export function chainHash(prevHash: string, rec: AdviceRecord): string {
  return createHash('sha256').update(prevHash).update(canonicalJson(rec)).digest('hex');
}
