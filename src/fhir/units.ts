/**
 * Units: every measurement is converted to the canonical UCUM unit of its kind with @lhncbc/ucum-lhc
 * (the UCUM reference library from the U.S. National Library of Medicine).
 */
import ucum from '@lhncbc/ucum-lhc';
import { KIND_UNITS, type NumericKind } from './codes.js';

const utils = ucum.UcumLhcUtils.getInstance();

/**
 * The longest unit text handed to the library. UCUM codes met in practice are short (mm[Hg], mL/kg/h, 10*3/uL,
 * {beats}/min); 64 characters is our own bound (no standard gives one), far above any real code.
 */
export const MAX_UNIT_LENGTH = 64;

/**
 * UCUM expressions are built from printable 7-bit US-ASCII only, with no spaces (The Unified Code for Units of
 * Measure, §1–§2, character set and lexical rules; the ranges 33–126 from memory, and the library itself refuses
 * spaces and non-ASCII). A unit with anything else (a space, a line break, a control or bidi character, any non-ASCII
 * letter) is not UCUM and never reaches the library; the aliases above are looked up before this screen.
 */
const UCUM_TEXT = /^[\x21-\x7e]+$/;

/** Whether `unit` (already trimmed) may be shown to the library at all. */
function screenable(unit: string): boolean {
  return unit.length <= MAX_UNIT_LENGTH && UCUM_TEXT.test(unit);
}

const CONSOLE_METHODS = ['log', 'info', 'warn', 'error', 'debug', 'trace'] as const;
const silent = (): void => undefined;

/**
 * Runs one call into @lhncbc/ucum-lhc with the console silenced. The library (7.1.10) writes to the console itself,
 * bypassing our logger: UcumLhcUtils.getSpecifiedUnit calls console.log with the unit text when parsing throws
 * (source-cjs/ucumLhcUtils.js, "Unit requested for unit string …"), and UnitTables.getUnitsByDimension does when
 * no unit has a dimension (source-cjs/unitTables.js, "Unable to find unit with dimension …"; reached from
 * commensurable-unit look-ups). A unit text is client data (Observation.valueQuantity.unit), so printing it would
 * let a client forge log lines and put PHI in the service log. The screen above keeps such text from the library;
 * this is the second wall for whatever else makes it throw. The library's calls are synchronous, so nothing else
 * runs while the console is swapped, and the originals are put back in `finally`. What the library would have
 * said is dropped: the caller reports the unit as not UCUM.
 */
function quietly<T>(call: () => T): T {
  const saved = CONSOLE_METHODS.map((m) => console[m]);
  for (const m of CONSOLE_METHODS) console[m] = silent;
  try {
    return call();
  } finally {
    CONSOLE_METHODS.forEach((m, i) => (console[m] = saved[i] as typeof silent));
  }
}

/**
 * Molar masses for mass ↔ molar conversion.
 * Lactate 90.08 g/mol (Sepsis-3: lactate > 2 mmol/L ≈ > 18 mg/dL; Singer et al., JAMA 2016).
 * Creatinine 113.12 g/mol (gives the familiar 1 mg/dL = 88.4 µmol/L; common practice).
 * Albumin ≈ 66,500 g/mol (human serum albumin; from memory), for the rare molar report (LOINC 54347-0).
 */
const MOLAR_MASS: Partial<Record<NumericKind, number>> = { lactate: 90.08, creatinine: 113.12, albumin: 66_500 };

/**
 * Spellings that are common in device and lab feeds but are not UCUM, mapped to their UCUM code (common practice).
 * Anything not here must already be valid UCUM.
 */
const ALIASES: Record<string, string> = {
  mmhg: 'mm[Hg]',
  'mm hg': 'mm[Hg]',
  cmh2o: 'cm[H2O]',
  'cm h2o': 'cm[H2O]',
  bpm: '/min',
  'beats/min': '/min',
  'breaths/min': '/min',
  '/minute': '/min',
  'per min': '/min',
  lb: '[lb_av]',
  lbs: '[lb_av]',
  sec: 's',
  secs: 's',
  seconds: 's',
  ml: 'mL',
  l: 'L',
  'l/min': 'L/min',
  'ml/kg': 'mL/kg',
  'mg/dl': 'mg/dL',
  'g/dl': 'g/dL',
  'g/l': 'g/L',
  'mmol/l': 'mmol/L',
  'umol/l': 'umol/L',
  'µmol/l': 'umol/L',
  'μmol/l': 'umol/L',
  in: '[in_i]',
  inch: '[in_i]',
  inches: '[in_i]',
  ratio: '1',
  fraction: '1',
};

export type Conversion =
  { ok: true; value: number; unit: string } | { ok: false; reason: 'unknown-unit' | 'incompatible-unit'; detail: string };

/** The UCUM code for a unit as sent (Quantity.code when system is UCUM, else Quantity.unit), or undefined if unknown. */
export function toUcum(unit: string): string | undefined {
  const trimmed = unit.trim();
  const alias = ALIASES[trimmed.toLowerCase()];
  if (alias) return alias;
  if (trimmed === '' || !screenable(trimmed)) return undefined;
  const known = validated.get(trimmed);
  if (known !== undefined) return known ?? undefined;
  const v = quietly(() => utils.validateUnitString(trimmed, false));
  const code = v.status === 'valid' ? (v.ucumCode ?? trimmed) : undefined;
  // ucum-lhc's validation is the costly part of reading a quantity (docs/benchmarks.md) and its answer depends on the
  // text alone: remembered, up to a bound, since the texts come from clients.
  if (validated.size < MAX_VALIDATED) validated.set(trimmed, code ?? null);
  return code;
}

/** Unit texts already validated by ucum-lhc → their UCUM code (null: not a unit); at most MAX_VALIDATED (common practice). */
const validated = new Map<string, string | null>();
const MAX_VALIDATED = 2048;

/** A unit as quoted in a reason: at most MAX_UNIT_LENGTH characters of client text (the rest is cut, marked …). */
function quoted(unit: string): string {
  return `"${unit.length > MAX_UNIT_LENGTH ? `${unit.slice(0, MAX_UNIT_LENGTH)}…` : unit}"`;
}

const cache = new Map<string, number | null>();

/** Converts `value` in `unit` to the canonical unit of `kind`. Linear factors are cached; UCUM decides compatibility. */
export function toCanonical(kind: NumericKind, value: number, unit: string | undefined): Conversion {
  const target = KIND_UNITS[kind];
  // Counts and grades: an annotation-only unit ({grade}), "1" or no unit at all are the same dimensionless unit.
  if (target.startsWith('{')) {
    if (unit === undefined || unit.trim() === '' || unit.trim() === '1' || /^\{[^}]*\}$/.test(unit.trim()))
      return { ok: true, value, unit: target };
    return { ok: false, reason: 'incompatible-unit', detail: `${quoted(unit)} is not a count or grade` };
  }
  if (unit === undefined || unit.trim() === '') return { ok: false, reason: 'unknown-unit', detail: `no unit given (expected ${target})` };
  const from = toUcum(unit);
  if (!from) return { ok: false, reason: 'unknown-unit', detail: `${quoted(unit)} is not a UCUM unit` };
  if (from === target) return { ok: true, value, unit: target };
  const key = `${kind}|${from}`;
  let factor = cache.get(key);
  if (factor === undefined) {
    const mw = MOLAR_MASS[kind];
    const r = quietly(() => utils.convertUnitTo(from, 1, target, mw ? { molecularWeight: mw } : undefined));
    factor = r.status === 'succeeded' && typeof r.toVal === 'number' && Number.isFinite(r.toVal) ? r.toVal : null;
    cache.set(key, factor);
  }
  if (factor === null) return { ok: false, reason: 'incompatible-unit', detail: `${quoted(unit)} cannot be converted to ${target}` };
  return { ok: true, value: value * factor, unit: target };
}

/** Converts between two arbitrary UCUM units (used for volumes and rates of orders and administrations). */
export function convert(value: number, unit: string | undefined, target: string): number | undefined {
  if (unit === undefined) return undefined;
  const from = toUcum(unit);
  if (!from) return undefined;
  if (from === target) return value;
  const r = quietly(() => utils.convertUnitTo(from, value, target));
  return r.status === 'succeeded' && typeof r.toVal === 'number' && Number.isFinite(r.toVal) ? r.toVal : undefined;
}
