/**
 * Small pure matchers for coded data: ICD-10 / ICD-10-CM codes against codes and ranges, and the shape of a
 * SNOMED CT concept identifier. No terminology server: Tidemark's value sets list their members (see
 * value-sets.ts), and these functions say whether one coding is one of them.
 */

/**
 * An ICD-10 code with its dot removed, upper case, or undefined when it does not have the shape of one.
 * ICD-10-CM codes are 3 to 7 characters: a letter, a digit, a digit or letter (the category), then up to four
 * letters or digits after the dot (ICD-10-CM Official Guidelines for Coding and Reporting, section I.A; the WHO
 * ICD-10 uses the same category form with one character after the dot). The dot is optional on input: feeds
 * send "I5022" as often as "I50.22".
 */
export function normaliseIcd10(code: string): string | undefined {
  const c = code.trim().toUpperCase();
  const m = /^([A-Z][0-9][0-9A-Z])(?:\.?([0-9A-Z]{1,4}))?$/.exec(c);
  if (!m) return undefined;
  return `${m[1]}${m[2] ?? ''}`;
}

/**
 * A rule of an ICD-10 value set. `code`: that code and every code below it in the hierarchy (I50 → I50.9,
 * I50.810…). `from`/`to`: every code from the first to the last at the level they are written, each with the
 * codes below it (K74.3–K74.6 takes K74.3, K74.4, K74.5, K74.60, K74.69, not K74.0 or K74.1).
 */
export type Icd10Rule = { code: string } | { from: string; to: string };

/** Whether an ICD-10 code (dots optional) falls under the rule. A code that is not ICD-10-shaped never matches. */
export function icd10Matches(rule: Icd10Rule, code: string): boolean {
  const c = normaliseIcd10(code);
  if (!c) return false;
  if ('code' in rule) {
    const r = normaliseIcd10(rule.code);
    return r !== undefined && c.startsWith(r);
  }
  const from = normaliseIcd10(rule.from);
  const to = normaliseIcd10(rule.to);
  if (!from || !to) return false;
  // Compare at the level each end is written: a code shorter than an end is above it in the hierarchy, not in it.
  if (c.length < from.length || c.length < to.length) return false;
  return c.slice(0, from.length) >= from && c.slice(0, to.length) <= to;
}

/**
 * Verhoeff check digit (Verhoeff J, Error detecting decimal codes, Mathematical Centre Tracts 29, 1969), the
 * check SNOMED CT puts at the end of every identifier (SNOMED CT Technical Implementation Guide /
 * Design Guide, "SCTID": item identifier, partition identifier, check digit).
 */
const D = [
  [0, 1, 2, 3, 4, 5, 6, 7, 8, 9],
  [1, 2, 3, 4, 0, 6, 7, 8, 9, 5],
  [2, 3, 4, 0, 1, 7, 8, 9, 5, 6],
  [3, 4, 0, 1, 2, 8, 9, 5, 6, 7],
  [4, 0, 1, 2, 3, 9, 5, 6, 7, 8],
  [5, 9, 8, 7, 6, 0, 4, 3, 2, 1],
  [6, 5, 9, 8, 7, 1, 0, 4, 3, 2],
  [7, 6, 5, 9, 8, 2, 1, 0, 4, 3],
  [8, 7, 6, 5, 9, 3, 2, 1, 0, 4],
  [9, 8, 7, 6, 5, 4, 3, 2, 1, 0],
] as const;
const P = [
  [0, 1, 2, 3, 4, 5, 6, 7, 8, 9],
  [1, 5, 7, 6, 2, 8, 3, 0, 9, 4],
  [5, 8, 0, 3, 7, 9, 6, 1, 4, 2],
  [8, 9, 1, 6, 0, 4, 3, 5, 2, 7],
  [9, 4, 5, 3, 1, 2, 6, 8, 7, 0],
  [4, 2, 8, 6, 5, 7, 3, 9, 0, 1],
  [2, 7, 9, 3, 8, 0, 6, 4, 1, 5],
  [7, 0, 4, 6, 9, 1, 3, 2, 5, 8],
] as const;

export function verhoeffValid(digits: string): boolean {
  if (!/^\d+$/.test(digits)) return false;
  let c = 0;
  const n = digits.length;
  for (let i = 0; i < n; i++) c = D[c]![P[i % 8]![Number(digits[n - 1 - i])]!]!;
  return c === 0;
}

/**
 * Whether `id` has the form of a SNOMED CT concept identifier: 6 to 18 digits, no leading zero, partition
 * identifier 00 (International Edition) or 10 (a concept in an extension namespace) before the check digit,
 * and a valid Verhoeff check digit. It says nothing about whether the concept exists.
 */
export function isSnomedConceptId(id: string): boolean {
  if (!/^[1-9]\d{5,17}$/.test(id)) return false;
  const partition = id.slice(-3, -1);
  return (partition === '00' || partition === '10') && verhoeffValid(id);
}
