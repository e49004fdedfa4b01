/**
 * Site code mapping: a hospital's own codes (flowsheet rows, IEEE 11073 device terms, local lab codes) read as
 * the codes Tidemark reads, through FHIR R4 ConceptMap resources listed in the configuration file, plus a small
 * explicit table of site unit text → UCUM code. Checked once at start (parseSiteMap); a bad map is refused with
 * the element at fault named. Pure: the files are read by src/config/config.ts.
 *
 * What a map may say (docs/integration.md):
 * - a group's `target` is LOINC or Tidemark's marker CodeSystem, and every target code is a numeric marker code
 *   Tidemark reads (src/fhir/codes.ts OBSERVATION_CODES, docs/codes.md). Coded markers and dynamic tests are not
 *   mapped: their answers and components are coded too, and one ConceptMap of Observation codes cannot say how.
 * - `equivalence` (FHIR R4 ConceptMapEquivalence): see READ_EQUIVALENCES. `unmatched` and `disjoint` are never read.
 * - no `dependsOn`/`product` (a target that depends on other elements cannot be read from the code alone) and no
 *   `group.unmapped` (every code read must be listed, never a fall-back).
 * - a map may not redefine a code Tidemark already reads, and one site code is read as one marker only.
 */
import type { ConceptMap, ConceptMapGroup } from 'fhir/r4.js';
import { CODED_OBSERVATION_CODES, DYNAMIC_TEST_CODES, LOINC, OBSERVATION_CODES, TIDEMARK_MARKERS, type NumericKind } from './codes.js';
import { MAX_UNIT_LENGTH, toUcum } from './units.js';
import { validateFhir } from './validator.js';

/**
 * Equivalences read, and why (FHIR R4 ConceptMapEquivalence, http://hl7.org/fhir/R4/valueset-concept-map-equivalence.html):
 * - `equal`, `equivalent`: the site code means the target.
 * - `wider`, `subsumes`: the target is wider in meaning than the site code (a radial-line systolic pressure read as
 *   systolic blood pressure): every value under the site code is a value of the target, so reading it is sound.
 * Not read: `narrower`, `specializes` (the site code is broader than the target: some of its values are not the
 * target; a "blood pressure, any site" row is not an arterial line), `inexact` and `relatedto` (the relation is not
 * said: the value may be another measurement), `unmatched`, `disjoint` (no target). They are accepted in a valid map,
 * left unread, and listed by the readiness report, so that a site sees why such a code gives no value.
 */
export const READ_EQUIVALENCES = ['equal', 'equivalent', 'wider', 'subsumes'] as const;
export const UNREAD_EQUIVALENCES = ['narrower', 'specializes', 'inexact', 'relatedto', 'unmatched', 'disjoint'] as const;
export type ReadEquivalence = (typeof READ_EQUIVALENCES)[number];

/** One site code read as a Tidemark code. */
export interface SiteCode {
  source: { system: string; code: string; display?: string };
  target: { system: string; code: string };
  kind: NumericKind;
  equivalence: ReadEquivalence;
  /** The ConceptMap's url, else its place in the configuration (`conceptMaps[0]`). */
  map: string;
  /** Where the target is in the configuration, e.g. `conceptMaps[0].group[1].element[3].target[0]`. */
  at: string;
}

/** A site code that a map lists but Tidemark does not read, with the equivalence that says why. */
export interface UnreadSiteCode {
  source: { system: string; code: string };
  equivalence: string;
  at: string;
}

export interface SiteMap {
  /** `system|code` of a site code → how it is read. */
  read: ReadonlyMap<string, SiteCode>;
  /** `system|code` of a site code listed with an unread equivalence only. */
  unread: ReadonlyMap<string, UnreadSiteCode>;
  /** Site unit text (exactly as sent, trimmed) → UCUM code. */
  unitHints: ReadonlyMap<string, string>;
  /** The maps and hints as configured: what the rules version digests. */
  configured: { conceptMaps: readonly unknown[]; unitHints: Readonly<Record<string, string>> };
}

export const EMPTY_SITE_MAP: SiteMap = {
  read: new Map(),
  unread: new Map(),
  unitHints: new Map(),
  configured: { conceptMaps: [], unitHints: {} },
};

export class SiteMapError extends Error {
  override name = 'SiteMapError';
}

const TARGET_SYSTEMS: ReadonlySet<string> = new Set([LOINC, TIDEMARK_MARKERS]);
const NUMERIC_TARGET = new Map(OBSERVATION_CODES.map((c) => [`${c.system}|${c.code}`, c.kind]));
/** Every Observation code Tidemark reads of itself: a map may not redefine one. */
const BUILT_IN = new Map<string, string>(
  [...OBSERVATION_CODES, ...CODED_OBSERVATION_CODES, ...DYNAMIC_TEST_CODES].map((c) => [`${c.system}|${c.code}`, c.kind]),
);
/**
 * A site system or code goes into the services' FHIR searches (`code=system|code,…`), so it may not hold what a
 * FHIR token search would need escaped (`,` `|` `$` `\`, FHIR R4 Search §2.1.1.7) nor URL syntax (`&` `#` `?` `%`)
 * nor white space: our own rule, so that the search asks for exactly the listed code.
 */
const SEARCHABLE = /^[^\s,|$\\&#?%]{1,200}$/;
/** Unit text in a hint: 1–64 characters, no control character (our own bound, as MAX_UNIT_LENGTH). */
const UNIT_TEXT = /^[^\p{Cc}]+$/u;

const key = (system: string, code: string) => `${system}|${code}`;

function fail(at: string, why: string): never {
  throw new SiteMapError(`${at}: ${why}`);
}

/**
 * Checks the configured maps and unit hints and builds the look-ups. Throws SiteMapError naming the element at
 * fault (`conceptMaps[0].group[1].element[3].target[0].code: …`).
 */
export function parseSiteMap(
  conceptMaps: readonly unknown[] = [],
  unitHints: Readonly<Record<string, string>> = {},
  names: readonly string[] = [],
): SiteMap {
  const read = new Map<string, SiteCode>();
  const unread = new Map<string, UnreadSiteCode>();
  conceptMaps.forEach((raw, i) => {
    const where = `conceptMaps[${i}]`;
    const named = names[i] ? ` (${names[i]})` : '';
    if (!raw || typeof raw !== 'object' || (raw as { resourceType?: unknown }).resourceType !== 'ConceptMap')
      fail(where, `is not a FHIR ConceptMap${named}`);
    const problems = validateFhir(raw);
    if (problems.length) fail(where, `is not a valid FHIR R4 ConceptMap${named}: ${problems.slice(0, 3).join('; ')}`);
    const cm = raw as ConceptMap;
    const mapName = cm.url ?? where;
    (cm.group ?? []).forEach((g: ConceptMapGroup, gi) => {
      const gAt = `${where}.group[${gi}]`;
      if (!g.source || !SEARCHABLE.test(g.source))
        fail(`${gAt}.source`, 'a source system (URI) is required, without spaces or , | $ \\ & # ? %');
      if (!g.target || !TARGET_SYSTEMS.has(g.target))
        fail(
          `${gAt}.target`,
          `must be ${LOINC} or ${TIDEMARK_MARKERS} (the codes Tidemark reads), not ${JSON.stringify(g.target ?? null)}`,
        );
      if (g.unmapped) fail(`${gAt}.unmapped`, 'is not supported: every site code Tidemark reads must be listed as an element');
      g.element.forEach((e, ei) => {
        const eAt = `${gAt}.element[${ei}]`;
        if (!e.code || !SEARCHABLE.test(e.code)) fail(`${eAt}.code`, 'a site code is required, without spaces or , | $ \\ & # ? %');
        const src = key(g.source as string, e.code as string);
        const own = BUILT_IN.get(src);
        if (own) fail(`${eAt}.code`, `${src} is already read by Tidemark as ${own}; a map may not redefine it`);
        if (!e.target?.length) fail(`${eAt}.target`, 'at least one target is required (say unmatched if the code has none)');
        (e.target ?? []).forEach((t, ti) => {
          const tAt = `${eAt}.target[${ti}]`;
          if (t.dependsOn?.length)
            fail(`${tAt}.dependsOn`, 'is not supported: a target that depends on other elements cannot be read from the code alone');
          if (t.product?.length) fail(`${tAt}.product`, 'is not supported');
          const eq = t.equivalence as string;
          if (!(READ_EQUIVALENCES as readonly string[]).includes(eq)) {
            if (!(UNREAD_EQUIVALENCES as readonly string[]).includes(eq))
              fail(`${tAt}.equivalence`, `${JSON.stringify(eq ?? null)} is not a FHIR R4 ConceptMap equivalence`);
            if (eq !== 'unmatched' && eq !== 'disjoint') checkTarget(g.target as string, t.code, tAt);
            if (!read.has(src) && !unread.has(src))
              unread.set(src, { source: { system: g.source as string, code: e.code as string }, equivalence: eq, at: tAt });
            return;
          }
          const kind = checkTarget(g.target as string, t.code, tAt);
          const before = read.get(src);
          if (before && before.kind !== kind) fail(tAt, `${src} would be read as ${kind}, but ${before.at} reads it as ${before.kind}`);
          unread.delete(src);
          if (!before) {
            read.set(src, {
              source: { system: g.source as string, code: e.code as string, ...(e.display ? { display: e.display } : {}) },
              target: { system: g.target as string, code: t.code as string },
              kind,
              equivalence: eq as ReadEquivalence,
              map: mapName,
              at: tAt,
            });
          }
        });
      });
    });
  });
  return { read, unread, unitHints: parseUnitHints(unitHints), configured: { conceptMaps: [...conceptMaps], unitHints: { ...unitHints } } };

  function checkTarget(system: string, code: string | undefined, at: string): NumericKind {
    if (!code) return fail(`${at}.code`, 'a target code is required for this equivalence');
    const kind = NUMERIC_TARGET.get(key(system, code));
    if (!kind) return fail(`${at}.code`, `${system}|${code} is not a numeric marker code Tidemark reads (docs/codes.md)`);
    return kind;
  }
}

/** Unit hints: the exact text a site sends → the UCUM code it means, each checked with the UCUM library. */
function parseUnitHints(hints: Readonly<Record<string, string>>): Map<string, string> {
  const out = new Map<string, string>();
  for (const [text, ucum] of Object.entries(hints)) {
    const at = `unitHints[${JSON.stringify(text)}]`;
    const t = text.trim();
    if (!t || t.length > MAX_UNIT_LENGTH || !UNIT_TEXT.test(t))
      throw new SiteMapError(`${at}: unit text must be 1-${MAX_UNIT_LENGTH} characters with no control character`);
    if (typeof ucum !== 'string' || toUcum(ucum) !== ucum)
      throw new SiteMapError(`${at}: ${JSON.stringify(ucum)} is not a UCUM code (give the code itself, e.g. mm[Hg], /min, %)`);
    const already = toUcum(t);
    if (already !== undefined && already !== ucum)
      throw new SiteMapError(`${at}: "${t}" is already read as the UCUM unit ${already}; a hint may not change what it means`);
    if (out.has(t)) throw new SiteMapError(`${at}: the same unit text is listed twice`);
    out.set(t, ucum);
  }
  return out;
}

/** The first coding (in record order) that a map reads, and how. */
export function siteCodeOf(
  map: SiteMap,
  codings: ReadonlyArray<{ system?: string | undefined; code?: string | undefined }>,
): SiteCode | undefined {
  if (map.read.size === 0) return undefined;
  for (const c of codings) {
    if (c.system === undefined || c.code === undefined) continue;
    const hit = map.read.get(key(c.system, c.code));
    if (hit) return hit;
  }
  return undefined;
}
