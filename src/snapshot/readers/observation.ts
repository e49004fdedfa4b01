/**
 * Observation → measurements (numeric, with canonical UCUM units), coded measurements (ventilation, rhythm, …) or
 * a dynamic test result (before/after components). Codes Tidemark reads itself come first; a site's own code is
 * read through the site's ConceptMaps. Everything of ours that cannot be used is left out with its reason.
 */
import type { Observation, ObservationComponent, Quantity } from 'fhir/r4.js';
import {
  CODED_ANSWERS,
  CODED_OBSERVATION_CODES,
  DYNAMIC_COMPONENT,
  DYNAMIC_MEASURED,
  DYNAMIC_MEASURED_UNITS,
  DYNAMIC_TEST_CODES,
  KIND_BOUNDS,
  OBSERVATION_CODES,
  TIDEMARK_ANSWERS,
  TIDEMARK_MARKERS,
  kindAtSite,
  type NumericKind,
} from '../../fhir/codes.js';
import { conceptText } from '../../fhir/medications.js';
import { siteCodeOf, type SiteCode, type SiteMap } from '../../fhir/site-map.js';
import { convert, MAX_UNIT_LENGTH, toCanonical } from '../../fhir/units.js';
import { rhythmAnswerOf } from '../../fhir/value-sets.js';
import { isoInstant } from '../time.js';
import type { DynamicTestResult, Exclusion, Measurement } from '../types.js';
import { exclusion, left, NOTHING, readTime, round2, type Read, type ReadContext } from './context.js';

const USABLE_STATUS: ReadonlySet<string> = new Set(['final', 'amended', 'corrected', 'preliminary']);
/**
 * Numeric kinds whose time may be a date alone (taken as the start of that day, UTC, and marked timeAssumed): a
 * weight or height is read for per-kg doses and the overload against admission weight, where a day is precise
 * enough (our own decision, docs/integration.md). Every other kind needs a clock time with its offset.
 */
const DATE_ONLY_KINDS: ReadonlySet<string> = new Set(['bodyWeight', 'bodyHeight']);

type Codings = ReadonlyArray<{ system?: string | undefined; code?: string | undefined }>;

/**
 * The kind of the first entry of `list` (in list order) that any of the codings names: the same answer as
 * `list.find((c) => codings.some((x) => x.system === c.system && x.code === c.code))?.kind`, by map lookups
 * instead of a scan of every code for every coding of every Observation.
 */
export function kindLookup<K extends string>(
  list: ReadonlyArray<{ system: string; code: string; kind: K }>,
): (codings: Codings) => K | undefined {
  const at = new Map<string, number>();
  list.forEach((c, i) => {
    const key = `${c.system}|${c.code}`;
    if (!at.has(key)) at.set(key, i);
  });
  return (codings) => {
    let best = -1;
    for (const x of codings) {
      if (x.system === undefined || x.code === undefined) continue;
      const i = at.get(`${x.system}|${x.code}`);
      if (i !== undefined && (best < 0 || i < best)) best = i;
    }
    return best < 0 ? undefined : list[best]?.kind;
  };
}
const NUMERIC_KIND_OF = kindLookup(OBSERVATION_CODES);
const CODED_KIND_OF = kindLookup(CODED_OBSERVATION_CODES);
const DYNAMIC_KIND_OF = kindLookup(DYNAMIC_TEST_CODES);
/** The first code listed for each numeric kind (what a measurement's `original` names when no coding of that kind is found). */
const CODE_OF_KIND = new Map<string, (typeof OBSERVATION_CODES)[number]>();
for (const c of OBSERVATION_CODES) if (!CODE_OF_KIND.has(c.kind)) CODE_OF_KIND.set(c.kind, c);
const KIND_OF_CODE = new Map(OBSERVATION_CODES.map((c) => [`${c.system}|${c.code}`, c.kind]));

/** The coding that was read as `kind` (so that `original` names the code the record carried, e.g. 2708-6, not 59408-5). */
function codingRead(codings: Codings, kind: NumericKind): { system: string; code: string } | undefined {
  const c = codings.find((x) => KIND_OF_CODE.get(`${x.system}|${x.code}`) === kind);
  return c?.system && c.code ? { system: c.system, code: c.code } : CODE_OF_KIND.get(kind);
}

/** The numeric kind of a code: a code Tidemark reads itself first, else a site code read through the site's maps. */
function numericOf(codings: Codings, siteMap: SiteMap): { kind: NumericKind | undefined; site: SiteCode | undefined } {
  const own = NUMERIC_KIND_OF(codings);
  const site = own ? undefined : siteCodeOf(siteMap, codings);
  return { kind: own ?? site?.kind, site };
}

interface Timed {
  iso: string;
  ageMinutes: number;
  periodStart: string | undefined;
  dateOnly: boolean;
}

export function readObservation(o: Observation, ref: string, ctx: ReadContext): Read {
  const codings = o.code?.coding ?? [];
  const numeric = numericOf(codings, ctx.siteMap);
  const numericKind = numeric.kind;
  const codedKind = CODED_KIND_OF(codings);
  const dynamicKind = DYNAMIC_KIND_OF(codings);
  const componentKinds = (o.component ?? []).map((c) => ({ c, ...numericOf(c.code?.coding ?? [], ctx.siteMap) }));
  const readable = numericKind || codedKind || dynamicKind || componentKinds.some((x) => x.kind);
  if (!readable) return NOTHING; // not one of ours: ignored (a search may return more than we asked)
  const kindName = numericKind ?? codedKind ?? dynamicKind ?? 'panel';
  if (o.status === 'entered-in-error') return left(ref, 'entered-in-error', 'status is entered-in-error', kindName);
  if (o.status === 'cancelled') return left(ref, 'cancelled', 'status is cancelled', kindName);
  if (!USABLE_STATUS.has(o.status)) return left(ref, 'no-value', `status ${String(o.status)} has no usable result`, kindName);
  const dateOk = DATE_ONLY_KINDS.has(kindName) && !componentKinds.some((x) => x.kind);
  const time = readTime(
    ctx,
    ref,
    o.effectiveDateTime ?? o.effectiveInstant ?? o.effectivePeriod?.end ?? o.effectivePeriod?.start,
    kindName,
    dateOk,
  );
  if (!time.ok) return { excluded: [time.excluded] };
  let periodStart: string | undefined;
  if (o.effectivePeriod?.start && o.effectivePeriod.end) {
    const start = isoInstant(o.effectivePeriod.start);
    if (!start) return left(ref, 'malformed', 'could not be read: the period start is not a date-time');
    periodStart = start.iso;
  }
  const at: Timed = { iso: time.iso, ageMinutes: time.ageMinutes, periodStart, dateOnly: time.dateOnly };

  if (dynamicKind) return readDynamic(o, ref, dynamicKind, at);
  if (codedKind) {
    const cc = o.valueCodeableConcept?.coding ?? [];
    const ours = cc.find((c) => c.system === TIDEMARK_ANSWERS && c.code && CODED_ANSWERS[codedKind].includes(c.code));
    // A rhythm may come as a SNOMED CT concept (src/fhir/value-sets/rhythm.json) instead of our answer code.
    const snomed = codedKind === 'heartRhythm' && !ours ? cc.find((c) => rhythmAnswerOf(c) !== undefined) : undefined;
    const answer = ours?.code ?? (snomed ? rhythmAnswerOf(snomed) : undefined);
    const orig = ours ?? snomed ?? cc[0];
    if (!answer || !orig)
      return left(
        ref,
        'unknown-answer',
        `answer ${cc.map((c) => `${c.system}|${c.code}`).join(', ') || '(none)'} is not one Tidemark reads`,
        codedKind,
      );
    const original = { system: orig.system ?? '', code: orig.code ?? '', ...(orig.display ? { display: orig.display } : {}) };
    return { coded: [{ kind: codedKind, answer, original, effective: at.iso, ageMinutes: at.ageMinutes, ref }] };
  }

  const measurements: Measurement[] = [];
  const excluded: Exclusion[] = [];
  const add = (kind: NumericKind, q: Quantity, read: { system: string; code: string } | SiteCode | undefined) => {
    const m = quantity(kind, q, ref, at, read, ctx.siteMap);
    if ('excluded' in m) excluded.push(m.excluded);
    else measurements.push(m.measurement);
  };
  // A whole-chest B-pattern count whose bodySite names one lung is that side's count (fhir/codes.ts kindAtSite).
  if (numericKind && o.valueQuantity)
    add(kindAtSite(numericKind, o.bodySite), o.valueQuantity, numeric.site ?? codingRead(codings, numericKind));
  else if (numericKind && !componentKinds.some((x) => x.kind)) {
    excluded.push(
      exclusion(
        ref,
        'no-value',
        o.dataAbsentReason ? `no value: ${conceptText(o.dataAbsentReason) || 'data absent'}` : 'no valueQuantity',
        numericKind,
      ),
    );
  }
  for (const { c, kind, site } of componentKinds) {
    if (!kind) continue;
    if (c.valueQuantity) add(kind, c.valueQuantity, site ?? codingRead(c.code?.coding ?? [], kind));
    else excluded.push(exclusion(ref, 'no-value', 'component has no valueQuantity', kind));
  }
  return { measurements, excluded };
}

function quantity(
  kind: NumericKind,
  q: Quantity,
  ref: string,
  at: Timed,
  read: { system: string; code: string } | SiteCode | undefined,
  siteMap: SiteMap,
): { measurement: Measurement } | { excluded: Exclusion } {
  const site = read && 'source' in read ? read : undefined;
  const code = read && 'source' in read ? read.source : read;
  if (typeof q.value !== 'number' || !Number.isFinite(q.value))
    return { excluded: exclusion(ref, 'no-value', 'value is not a number', kind) };
  if (q.comparator)
    return { excluded: exclusion(ref, 'censored-value', `value is ${q.comparator}${q.value}: a limit, not a measurement`, kind) };
  const unit = q.system === 'http://unitsofmeasure.org' && q.code ? q.code : (q.unit ?? q.code);
  const hinted = unit === undefined ? undefined : siteMap.unitHints.get(unit.trim());
  const conv = toCanonical(kind, q.value, hinted ?? unit);
  if (!conv.ok) return { excluded: exclusion(ref, conv.reason, conv.detail, kind) };
  const [lo, hi] = KIND_BOUNDS[kind];
  if (conv.value < lo || conv.value > hi)
    return { excluded: exclusion(ref, 'impossible-value', `${round2(conv.value)} ${conv.unit} is outside ${lo}–${hi}`, kind) };
  return {
    measurement: {
      kind,
      value: conv.value,
      unit: conv.unit,
      original: { value: q.value, unit: unit ?? '', code: code?.code ?? '', system: code?.system ?? '' },
      ...(site ? { readAs: { ...site.target, equivalence: site.equivalence, map: site.map } } : {}),
      ...(hinted ? { unitReadAs: hinted } : {}),
      effective: at.iso,
      ...(at.periodStart ? { periodStart: at.periodStart } : {}),
      ageMinutes: at.ageMinutes,
      ref,
      ...(at.dateOnly ? { timeAssumed: 'date-only' as const } : {}),
    },
  };
}

function readDynamic(o: Observation, ref: string, kind: DynamicTestResult['kind'], at: Timed): Read {
  const comp = (code: string): ObservationComponent | undefined =>
    (o.component ?? []).find((c) => (c.code?.coding ?? []).some((x) => x.system === TIDEMARK_MARKERS && x.code === code));
  const measuredCode = comp(DYNAMIC_COMPONENT.measured)?.valueCodeableConcept?.coding?.find((c) => c.system === TIDEMARK_ANSWERS)?.code;
  const measured = DYNAMIC_MEASURED.find((m) => m === measuredCode);
  if (!measured) return left(ref, 'unknown-answer', `measured-variable ${measuredCode ?? '(none)'} is not one Tidemark reads`, kind);
  const unit = DYNAMIC_MEASURED_UNITS[measured];
  const values: number[] = [];
  for (const code of [DYNAMIC_COMPONENT.before, DYNAMIC_COMPONENT.after]) {
    const q = comp(code)?.valueQuantity;
    if (!q || typeof q.value !== 'number' || !Number.isFinite(q.value))
      return left(ref, 'no-value', `component ${code} has no value`, kind);
    const v = convert(q.value, q.system === 'http://unitsofmeasure.org' && q.code ? q.code : (q.unit ?? q.code), unit);
    if (v === undefined)
      return left(
        ref,
        'incompatible-unit',
        `component ${code} unit "${(q.unit ?? q.code ?? '').slice(0, MAX_UNIT_LENGTH)}" cannot be converted to ${unit}`,
        kind,
      );
    if (v < 0 || v > 1000) return left(ref, 'impossible-value', `component ${code} value ${v} ${unit} is impossible`, kind);
    values.push(v);
  }
  return {
    dynamicTests: [
      { kind, measured, before: values[0] as number, after: values[1] as number, unit, effective: at.iso, ageMinutes: at.ageMinutes, ref },
    ],
  };
}
