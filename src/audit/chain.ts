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
import { canonicalJson } from '../util/canonical-json.js';
import type { AdviceRecord } from './types.js';

export const GENESIS = '0'.repeat(64);

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
