/**
 * FHIR R4 resources → one PatientSnapshot. Pure: the clock is passed in.
 * Every measurement gets its canonical unit, original value/unit, time, age and source reference.
 * Unknown codes are ignored quietly only when they are not ours to read; everything we do read but cannot
 * use (bad unit, impossible value, future time, entered-in-error…) is listed in `excluded` with a reason.
 */
import type {
  Condition, Encounter, FhirResource, MedicationAdministration, MedicationRequest, Observation, ObservationComponent, Patient, Quantity, ServiceRequest,
} from 'fhir/r4.js';
import {
  CODED_ANSWERS, CODED_OBSERVATION_CODES, DYNAMIC_COMPONENT, DYNAMIC_MEASURED, DYNAMIC_TEST_CODES, KIND_BOUNDS, OBSERVATION_CODES, TIDEMARK_ANSWERS, TIDEMARK_MARKERS,
  kindAtSite, type DynamicMeasured, type NumericKind,
} from '../fhir/codes.js';
import { classifyFluid, classifyVasoactive, conceptLabel, conceptText, fluidClassFromText, isIntravenous } from '../fhir/medications.js';
import { convert, MAX_UNIT_LENGTH, toCanonical } from '../fhir/units.js';
import { EMPTY_SITE_MAP, siteCodeOf, type SiteCode, type SiteMap } from '../fhir/site-map.js';
import { rhythmAnswerOf } from '../fhir/value-sets.js';
import { fhirDateTime, isoInstant, parseTimeMs } from './time.js';
import type {
  CodedMeasurement, ConditionEntry, DraftOrder, DynamicTestResult, Exclusion, FluidGiven, Measurement, PatientSnapshot, VasoactiveDrug,
} from './types.js';

/** A time this far past `now` is taken as clock skew between systems, not as a future time (common practice). */
const FUTURE_SKEW_MS = 5 * 60_000;

export interface SnapshotContext {
  patientId: string;
  encounterId?: string;
  /** order-select `selections` (Type/id); absent means every draft order is in focus (order-sign). */
  selections?: readonly string[];
  draftOrders?: { entry?: Array<{ resource?: unknown }> };
}

/** Canonical unit of each dynamic-test measured variable. */
const MEASURED_UNITS: Record<DynamicMeasured, string> = {
  cardiacOutput: 'L/min', cardiacIndex: 'L/min/m2', strokeVolume: 'mL', pulsePressure: 'mm[Hg]', vti: 'cm', ppv: '%', svv: '%',
};

/** A period start as an ISO instant; an unreadable one throws as `new Date(NaN).toISOString()` does (the resource is then excluded as malformed). */
function periodStartIso(raw: string): string {
  const t = isoInstant(raw);
  if (!t) throw new RangeError('Invalid time value');
  return t.iso;
}

/**
 * The kind of the first entry of `list` (in list order) that any of the codings names: the same answer as
 * `list.find((c) => codings.some((x) => x.system === c.system && x.code === c.code))?.kind`, by map lookups
 * instead of a scan of every code for every coding of every Observation.
 */
export function kindLookup<K extends string>(list: ReadonlyArray<{ system: string; code: string; kind: K }>): (codings: ReadonlyArray<{ system?: string | undefined; code?: string | undefined }>) => K | undefined {
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
function codingRead(codings: ReadonlyArray<{ system?: string | undefined; code?: string | undefined }>, kind: NumericKind): { system: string; code: string } | undefined {
  const c = codings.find((x) => KIND_OF_CODE.get(`${x.system}|${x.code}`) === kind);
  return c?.system && c.code ? { system: c.system, code: c.code } : CODE_OF_KIND.get(kind);
}

/**
 * Numeric kinds whose time may be a date alone (taken as the start of that day, UTC, and marked timeAssumed): a
 * weight or height is read for per-kg doses and the overload against admission weight, where a day is precise
 * enough (our own decision, docs/integration.md). Every other kind needs a clock time with its offset.
 */
const DATE_ONLY_KINDS: ReadonlySet<string> = new Set(['bodyWeight', 'bodyHeight']);

/** FHIR R4 id datatype: [A-Za-z0-9\-\.]{1,64} (FHIR R4, Datatypes "id"). */
const FHIR_ID = /^[A-Za-z0-9\-.]{1,64}$/;
/** The resource types buildSnapshot reads. */
const TYPES_READ: ReadonlySet<string> = new Set(['Patient', 'Encounter', 'Observation', 'Condition', 'MedicationAdministration', 'MedicationRequest']);
/** Longest reason kept for a left-out resource (our own bound). */
const MAX_DETAIL_LENGTH = 300;

/** `siteMap`: the site's ConceptMaps and unit hints, loaded and checked at start (src/fhir/site-map.ts); none by default. */
export function buildSnapshot(resources: readonly FhirResource[], ctx: SnapshotContext, now: Date, siteMap: SiteMap = EMPTY_SITE_MAP): PatientSnapshot {
  const nowMs = now.getTime();
  const patientRef = `Patient/${ctx.patientId}`;
  const excluded: Exclusion[] = [];
  const measurements: Measurement[] = [];
  const coded: CodedMeasurement[] = [];
  const dynamicTests: DynamicTestResult[] = [];
  const fluids: FluidGiven[] = [];
  const vasoactives: VasoactiveDrug[] = [];
  const conditions: ConditionEntry[] = [];
  let patient: PatientSnapshot['patient'] = { ref: patientRef, sex: 'unknown' };
  let encounter: PatientSnapshot['encounter'];

  const age = (iso: string) => Math.round((nowMs - parseTimeMs(iso)) / 60_000);
  // A reason may quote client text (a time, a reference, a code): at most MAX_DETAIL_LENGTH characters of it go into
  // the snapshot, which the audit record keeps (issue 13 item 5).
  const exclude = (ref: string, reason: Exclusion['reason'], detail: string, kind?: string) => {
    const d = detail.length > MAX_DETAIL_LENGTH ? `${detail.slice(0, MAX_DETAIL_LENGTH)}…` : detail;
    excluded.push(kind ? { ref, reason, detail: d, kind } : { ref, reason, detail: d });
  };
  /** Checks a time: returns the UTC ISO instant, or undefined after recording why it is unusable. */
  const checkTime = (ref: string, raw: string | undefined, kind?: string, dateOk = false): string | undefined => {
    if (!raw) return void exclude(ref, 'no-time', 'no effective time', kind);
    const t = fhirDateTime(raw);
    if (!t) return void exclude(ref, 'no-time', `"${raw}" is not a FHIR date-time (a date, or a date and time with seconds and an offset Z or ±hh:mm)`, kind);
    // A date without a clock time is used only where a day's precision is enough (DATE_ONLY_KINDS), taken as its start.
    if (t.precision !== 'second' && !(dateOk && t.precision === 'day')) return void exclude(ref, 'no-time', `"${raw}" has no clock time and offset`, kind);
    if (t.ms > nowMs + FUTURE_SKEW_MS) return void exclude(ref, 'future-time', `${raw} is in the future`, kind);
    return t.iso;
  };
  const belongs = (ref: string, subject: { reference?: string | undefined } | undefined): boolean => {
    if (subject?.reference === patientRef || subject?.reference?.endsWith(`/${patientRef}`)) return true;
    exclude(ref, 'other-patient', `subject ${subject?.reference ?? '(none)'} is not ${patientRef}`);
    return false;
  };

  for (const r of resources) {
    if (!r || typeof r !== 'object') continue;
    // An id that is not a FHIR id (1–64 of A-Z a-z 0-9 - .) would be copied into every finding's reference.
    if (r.id !== undefined && !FHIR_ID.test(r.id)) {
      if (TYPES_READ.has(r.resourceType)) exclude(`${r.resourceType}/(invalid id)`, 'malformed', `the id is not a FHIR id (1-64 of A-Z a-z 0-9 - .; ${String(r.id).length} characters)`);
      continue;
    }
    const ref = `${r.resourceType}/${r.id ?? '(no id)'}`;
    try {
      switch (r.resourceType) {
        case 'Patient':
          if (r.id === ctx.patientId) patient = readPatient(r, patientRef, now);
          break;
        case 'Encounter':
          if (!ctx.encounterId || r.id === ctx.encounterId) encounter = readEncounter(r, ref);
          break;
        case 'Observation':
          if (belongs(ref, r.subject)) readObservation(r, ref);
          break;
        case 'Condition':
          if (belongs(ref, r.subject)) readCondition(r, ref);
          break;
        case 'MedicationAdministration':
          if (belongs(ref, r.subject)) readAdministration(r, ref);
          break;
        case 'MedicationRequest':
          if (belongs(ref, r.subject)) readActiveRequest(r, ref);
          break;
        default:
          break;
      }
    } catch (e) {
      exclude(ref, 'malformed', `could not be read: ${(e as Error).message}`.slice(0, 200));
    }
  }

  /** The numeric kind of a code: a code Tidemark reads itself first, else a site code read through the site's maps. */
  function numericOf(codings: NonNullable<Observation['code']['coding']>): { kind: NumericKind | undefined; site: SiteCode | undefined } {
    const own = NUMERIC_KIND_OF(codings);
    const site = own ? undefined : siteCodeOf(siteMap, codings);
    return { kind: own ?? site?.kind, site };
  }

  function readObservation(o: Observation, ref: string): void {
    const codings = o.code?.coding ?? [];
    const numeric = numericOf(codings);
    const numericKind = numeric.kind;
    const codedKind = CODED_KIND_OF(codings);
    const dynamicKind = DYNAMIC_KIND_OF(codings);
    const componentKinds = (o.component ?? []).map((c) => ({ c, ...numericOf(c.code?.coding ?? []) }));
    const readable = numericKind || codedKind || dynamicKind || componentKinds.some((x) => x.kind);
    if (!readable) return; // not one of ours: ignored (a search may return more than we asked)
    const kindName = numericKind ?? codedKind ?? dynamicKind ?? 'panel';
    if (o.status === 'entered-in-error') return void exclude(ref, 'entered-in-error', 'status is entered-in-error', kindName);
    if (o.status === 'cancelled') return void exclude(ref, 'cancelled', 'status is cancelled', kindName);
    if (o.status !== 'final' && o.status !== 'amended' && o.status !== 'corrected' && o.status !== 'preliminary') {
      return void exclude(ref, 'no-value', `status ${String(o.status)} has no usable result`, kindName);
    }
    const rawTime = o.effectiveDateTime ?? o.effectiveInstant ?? o.effectivePeriod?.end ?? o.effectivePeriod?.start;
    const dateOk = DATE_ONLY_KINDS.has(kindName) && !componentKinds.some((x) => x.kind);
    const effective = checkTime(ref, rawTime, kindName, dateOk);
    if (!effective) return;
    const assumed = dateOk && rawTime !== undefined && fhirDateTime(rawTime)?.precision === 'day';
    const periodStart = o.effectivePeriod?.start && o.effectivePeriod.end ? periodStartIso(o.effectivePeriod.start) : undefined;

    if (dynamicKind) return readDynamic(o, ref, dynamicKind, effective);
    if (codedKind) {
      const cc = o.valueCodeableConcept?.coding ?? [];
      const ours = cc.find((c) => c.system === TIDEMARK_ANSWERS && c.code && CODED_ANSWERS[codedKind].includes(c.code));
      // A rhythm may come as a SNOMED CT concept (src/fhir/value-sets/rhythm.json) instead of our answer code.
      const snomed = codedKind === 'heartRhythm' && !ours ? cc.find((c) => rhythmAnswerOf(c) !== undefined) : undefined;
      const answer = ours?.code ?? (snomed ? rhythmAnswerOf(snomed) : undefined);
      const orig = ours ?? snomed ?? cc[0];
      if (!answer || !orig) return void exclude(ref, 'unknown-answer', `answer ${cc.map((c) => `${c.system}|${c.code}`).join(', ') || '(none)'} is not one Tidemark reads`, codedKind);
      coded.push({ kind: codedKind, answer, original: { system: orig.system ?? '', code: orig.code ?? '', ...(orig.display ? { display: orig.display } : {}) }, effective, ageMinutes: age(effective), ref });
      return;
    }
    // A whole-chest B-pattern count whose bodySite names one lung is that side's count (fhir/codes.ts kindAtSite).
    if (numericKind && o.valueQuantity) addQuantity(kindAtSite(numericKind, o.bodySite), o.valueQuantity, ref, effective, periodStart, numeric.site ?? codingRead(codings, numericKind), assumed);
    else if (numericKind && !componentKinds.some((x) => x.kind)) {
      exclude(ref, 'no-value', o.dataAbsentReason ? `no value: ${conceptText(o.dataAbsentReason) || 'data absent'}` : 'no valueQuantity', numericKind);
    }
    for (const { c, kind, site } of componentKinds) {
      if (!kind) continue;
      if (c.valueQuantity) addQuantity(kind, c.valueQuantity, ref, effective, periodStart, site ?? codingRead(c.code?.coding ?? [], kind));
      else exclude(ref, 'no-value', 'component has no valueQuantity', kind);
    }
  }

  function addQuantity(kind: NumericKind, q: Quantity, ref: string, effective: string, periodStart: string | undefined, read: { system: string; code: string } | SiteCode | undefined, dateOnly = false): void {
    const site = read && 'source' in read ? read : undefined;
    const code = read && 'source' in read ? read.source : read;
    if (typeof q.value !== 'number' || !Number.isFinite(q.value)) return void exclude(ref, 'no-value', 'value is not a number', kind);
    if (q.comparator) return void exclude(ref, 'censored-value', `value is ${q.comparator}${q.value}: a limit, not a measurement`, kind);
    const unit = q.system === 'http://unitsofmeasure.org' && q.code ? q.code : (q.unit ?? q.code);
    const hinted = unit === undefined ? undefined : siteMap.unitHints.get(unit.trim());
    const conv = toCanonical(kind, q.value, hinted ?? unit);
    if (!conv.ok) return void exclude(ref, conv.reason, conv.detail, kind);
    const [lo, hi] = KIND_BOUNDS[kind];
    if (conv.value < lo || conv.value > hi) return void exclude(ref, 'impossible-value', `${round(conv.value)} ${conv.unit} is outside ${lo}–${hi}`, kind);
    measurements.push({
      kind, value: conv.value, unit: conv.unit,
      original: { value: q.value, unit: unit ?? '', code: code?.code ?? '', system: code?.system ?? '' },
      ...(site ? { readAs: { ...site.target, equivalence: site.equivalence, map: site.map } } : {}), ...(hinted ? { unitReadAs: hinted } : {}),
      effective, ...(periodStart ? { periodStart } : {}), ageMinutes: age(effective), ref, ...(dateOnly ? { timeAssumed: 'date-only' as const } : {}),
    });
  }

  function readDynamic(o: Observation, ref: string, kind: DynamicTestResult['kind'], effective: string): void {
    const comp = (code: string): ObservationComponent | undefined =>
      (o.component ?? []).find((c) => (c.code?.coding ?? []).some((x) => x.system === TIDEMARK_MARKERS && x.code === code));
    const measuredCode = comp(DYNAMIC_COMPONENT.measured)?.valueCodeableConcept?.coding?.find((c) => c.system === TIDEMARK_ANSWERS)?.code;
    const measured = DYNAMIC_MEASURED.find((m) => m === measuredCode);
    if (!measured) return void exclude(ref, 'unknown-answer', `measured-variable ${measuredCode ?? '(none)'} is not one Tidemark reads`, kind);
    const unit = MEASURED_UNITS[measured];
    const values: number[] = [];
    for (const code of [DYNAMIC_COMPONENT.before, DYNAMIC_COMPONENT.after]) {
      const q = comp(code)?.valueQuantity;
      if (!q || typeof q.value !== 'number' || !Number.isFinite(q.value)) return void exclude(ref, 'no-value', `component ${code} has no value`, kind);
      const v = convert(q.value, q.system === 'http://unitsofmeasure.org' && q.code ? q.code : (q.unit ?? q.code), unit);
      if (v === undefined) return void exclude(ref, 'incompatible-unit', `component ${code} unit "${(q.unit ?? q.code ?? '').slice(0, MAX_UNIT_LENGTH)}" cannot be converted to ${unit}`, kind);
      if (v < 0 || v > 1000) return void exclude(ref, 'impossible-value', `component ${code} value ${v} ${unit} is impossible`, kind);
      values.push(v);
    }
    dynamicTests.push({ kind, measured, before: values[0] as number, after: values[1] as number, unit, effective, ageMinutes: age(effective), ref });
  }

  function readCondition(c: Condition, ref: string): void {
    const verification = c.verificationStatus?.coding?.[0]?.code;
    if (verification === 'entered-in-error') return void exclude(ref, 'entered-in-error', 'verificationStatus is entered-in-error');
    if (verification === 'refuted') return void exclude(ref, 'cancelled', 'verificationStatus is refuted');
    const clinicalStatus = c.clinicalStatus?.coding?.[0]?.code ?? 'unknown';
    const codings = (c.code?.coding ?? []).filter((x) => x.system && x.code).map((x) => ({ system: x.system as string, code: x.code as string, ...(x.display ? { display: x.display } : {}) }));
    conditions.push({ ref, codings, ...(c.code?.text ? { text: c.code.text } : {}), clinicalStatus, ...(c.onsetDateTime ? { onset: c.onsetDateTime } : {}) });
  }

  function readAdministration(m: MedicationAdministration, ref: string): void {
    const fluidClass = classifyFluid(m.medicationCodeableConcept);
    const vaso = fluidClass ? undefined : classifyVasoactive(m.medicationCodeableConcept);
    if (!fluidClass && !vaso) return;
    if (m.status === 'entered-in-error') return void exclude(ref, 'entered-in-error', 'status is entered-in-error', fluidClass ? 'fluid' : 'vasoactive');
    if (m.status === 'not-done' || m.status === 'stopped' && !fluidClass) return void exclude(ref, 'cancelled', `status is ${m.status}`, fluidClass ? 'fluid' : 'vasoactive');
    const startRaw = m.effectivePeriod?.start ?? m.effectiveDateTime;
    const start = checkTime(ref, startRaw, fluidClass ? 'fluid' : 'vasoactive');
    if (!start) return;
    const endRaw = m.effectivePeriod?.end ?? m.effectiveDateTime;
    const end = endRaw ? checkTime(ref, endRaw) : undefined;
    if (vaso) {
      const rate = m.dosage?.rateQuantity;
      vasoactives.push({
        ref, drug: vaso, start, ...(end && m.effectivePeriod?.end ? { end } : {}), status: m.status ?? 'unknown',
        ...(rate && typeof rate.value === 'number' ? { rate: { value: rate.value, unit: rate.unit ?? rate.code ?? '' } } : {}),
      });
      return;
    }
    if (m.status !== 'completed' && m.status !== 'in-progress' && m.status !== 'stopped') return void exclude(ref, 'no-value', `status ${String(m.status)}`, 'fluid');
    let volumeMl = convert(m.dosage?.dose?.value ?? NaN, m.dosage?.dose?.code ?? m.dosage?.dose?.unit, 'mL');
    if ((volumeMl === undefined || Number.isNaN(volumeMl)) && m.dosage?.rateQuantity && end && m.effectivePeriod?.end) {
      const perMin = convert(m.dosage.rateQuantity.value ?? NaN, m.dosage.rateQuantity.code ?? m.dosage.rateQuantity.unit, 'mL/min');
      if (perMin !== undefined) volumeMl = perMin * ((parseTimeMs(end) - parseTimeMs(start)) / 60_000);
    }
    if (volumeMl === undefined || !Number.isFinite(volumeMl)) return void exclude(ref, 'no-value', 'no volume (dosage.dose in mL, or rate over a period)', 'fluid');
    if (volumeMl <= 0 || volumeMl > 10_000) return void exclude(ref, 'impossible-value', `${round(volumeMl)} mL is not a plausible single administration`, 'fluid');
    fluids.push({
      ref, fluidClass: fluidClass as NonNullable<typeof fluidClass>, display: conceptLabel(m.medicationCodeableConcept) || 'IV fluid', volumeMl: roundMl(volumeMl),
      start, end: end ?? start, status: m.status, ageMinutes: age(end ?? start),
    });
  }

  function readActiveRequest(m: MedicationRequest, ref: string): void {
    if (m.status !== 'active') return;
    const vaso = classifyVasoactive(m.medicationCodeableConcept);
    if (!vaso) return;
    const start = m.authoredOn ? checkTime(ref, m.authoredOn, 'vasoactive') : undefined;
    const rate = m.dosageInstruction?.[0]?.doseAndRate?.[0]?.rateQuantity;
    vasoactives.push({
      ref, drug: vaso, start: start ?? now.toISOString(), status: 'active',
      ...(rate && typeof rate.value === 'number' ? { rate: { value: rate.value, unit: rate.unit ?? rate.code ?? '' } } : {}),
    });
  }

  measurements.sort((a, b) => (a.kind === b.kind ? parseTimeMs(b.effective) - parseTimeMs(a.effective) : a.kind < b.kind ? -1 : 1));
  coded.sort((a, b) => parseTimeMs(b.effective) - parseTimeMs(a.effective));
  dynamicTests.sort((a, b) => parseTimeMs(b.effective) - parseTimeMs(a.effective));
  fluids.sort((a, b) => parseTimeMs(b.end) - parseTimeMs(a.end));

  return {
    patient, ...(encounter ? { encounter } : {}), now: now.toISOString(),
    measurements, coded, dynamicTests, fluids, vasoactives, conditions,
    draftOrders: readDraftOrders(ctx, excluded),
    excluded,
  };
}

function readPatient(p: Patient, ref: string, now: Date): PatientSnapshot['patient'] {
  const sex = p.gender === 'male' || p.gender === 'female' || p.gender === 'other' ? p.gender : 'unknown';
  const out: PatientSnapshot['patient'] = { ref, sex };
  if (p.birthDate && /^\d{4}(-\d{2}(-\d{2})?)?$/.test(p.birthDate)) {
    out.birthDate = p.birthDate;
    const b = new Date(`${p.birthDate.length === 4 ? `${p.birthDate}-07-01` : p.birthDate.length === 7 ? `${p.birthDate}-15` : p.birthDate}T00:00:00Z`);
    let years = now.getUTCFullYear() - b.getUTCFullYear();
    if (now.getUTCMonth() < b.getUTCMonth() || (now.getUTCMonth() === b.getUTCMonth() && now.getUTCDate() < b.getUTCDate())) years -= 1;
    if (years >= 0 && years < 130) out.ageYears = years;
  }
  return out;
}

function readEncounter(e: Encounter, ref: string): PatientSnapshot['encounter'] {
  // The start of the stay dates the shock (phase rules count hours from it): a date alone is taken as the start of that day.
  const t = e.period?.start ? fhirDateTime(e.period.start) : undefined;
  const start = t && (t.precision === 'second' || t.precision === 'day') ? t.iso : undefined;
  return { ref, ...(start ? { start } : {}), ...(start && t?.precision === 'day' ? { timeAssumed: 'date-only' as const } : {}), ...(e.status ? { status: e.status } : {}) };
}

/** Reads the draft orders of order-select / order-sign. Non-fluid orders are kept (isFluid false) so the caller can tell. */
function readDraftOrders(ctx: SnapshotContext, excluded: Exclusion[]): DraftOrder[] {
  const out: DraftOrder[] = [];
  for (const e of ctx.draftOrders?.entry ?? []) {
    const r = e?.resource as (MedicationRequest | ServiceRequest | { resourceType?: string; id?: string }) | undefined;
    if (!r || typeof r !== 'object' || typeof r.resourceType !== 'string') continue;
    const id = typeof r.id === 'string' ? r.id : '';
    const ref = `${r.resourceType}/${id || '(no id)'}`;
    const selected = ctx.selections ? ctx.selections.includes(`${r.resourceType}/${id}`) : true;
    const base: DraftOrder = { ref, resourceType: r.resourceType, id, selected, isFluid: false, resource: r as Record<string, unknown> };
    try {
      if (r.resourceType === 'MedicationRequest') out.push(readFluidRequest(r as MedicationRequest, base));
      else if (r.resourceType === 'ServiceRequest') out.push(readFluidService(r as ServiceRequest, base));
      else out.push(base);
    } catch (err) {
      excluded.push({ ref, reason: 'malformed', detail: `draft order could not be read: ${(err as Error).message}`.slice(0, 200) });
      out.push(base);
    }
  }
  return out;
}

function readFluidRequest(m: MedicationRequest, base: DraftOrder): DraftOrder {
  const fluidClass = classifyFluid(m.medicationCodeableConcept);
  const dose = m.dosageInstruction?.[0];
  const iv = isIntravenous(dose?.route);
  if (!fluidClass || iv === false) return base;
  const order: DraftOrder = { ...base, isFluid: true, fluidClass, display: conceptLabel(m.medicationCodeableConcept) || 'IV fluid' };
  const dr = dose?.doseAndRate?.[0];
  const durationMin = durationMinutes(dose?.timing?.repeat?.duration, dose?.timing?.repeat?.durationUnit);
  if (durationMin !== undefined) order.durationMin = durationMin;
  const doseMl = dr?.doseQuantity ? convert(dr.doseQuantity.value ?? NaN, dr.doseQuantity.code ?? dr.doseQuantity.unit, 'mL') : undefined;
  if (doseMl !== undefined && Number.isFinite(doseMl) && doseMl > 0) return { ...order, volumeMl: roundMl(doseMl) };
  const rate = dr?.rateQuantity ? convert(dr.rateQuantity.value ?? NaN, dr.rateQuantity.code ?? dr.rateQuantity.unit, 'mL/min') : undefined;
  if (rate !== undefined && Number.isFinite(rate) && durationMin !== undefined) return { ...order, volumeMl: roundMl(rate * durationMin) };
  if (rate !== undefined) return { ...order, volumeProblem: 'a rate with no duration: a continuous infusion, not a bolus volume' };
  return { ...order, volumeProblem: 'no volume in dosageInstruction (doseQuantity in mL, or rate and duration)' };
}

function readFluidService(s: ServiceRequest, base: DraftOrder): DraftOrder {
  const text = [conceptText(s.code), ...(s.orderDetail ?? []).map(conceptText)].join(' ');
  const fluidClass = fluidClassFromText(text);
  if (!fluidClass) return base;
  const order: DraftOrder = { ...base, isFluid: true, fluidClass, display: conceptLabel(s.code) || 'IV fluid' };
  const q = s.quantityQuantity;
  const ml = q ? convert(q.value ?? NaN, q.code ?? q.unit, 'mL') : undefined;
  if (ml !== undefined && Number.isFinite(ml) && ml > 0) return { ...order, volumeMl: roundMl(ml) };
  return { ...order, volumeProblem: 'no volume in ServiceRequest.quantityQuantity (mL)' };
}

function durationMinutes(value: number | undefined, unit: string | undefined): number | undefined {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) return undefined;
  const per: Record<string, number> = { s: 1 / 60, min: 1, h: 60, d: 1440 };
  const f = unit ? per[unit] : undefined;
  return f === undefined ? undefined : value * f;
}

/** Volumes to 0.1 mL: unit conversion leaves binary fractions (249.99999…) that mean nothing clinically. */
function roundMl(v: number): number {
  return Math.round(v * 10) / 10;
}

function round(v: number): number {
  return Math.round(v * 100) / 100;
}
