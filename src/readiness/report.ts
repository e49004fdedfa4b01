/**
 * The data-readiness report (docs/integration.md): for one patient, what the services gathered and how Tidemark
 * read it, per marker; the codes on the record that no map covers; and which verdicts the real rules could reach.
 * Pure: the caller gathers (src/readiness/run.ts) and passes everything in; output goes to a writer.
 */
import type { FhirResource, Observation } from 'fhir/r4.js';
import type { Advice } from '../assess/types.js';
import {
  CODED_KINDS,
  CODED_OBSERVATION_CODES,
  DYNAMIC_TEST_CODES,
  DYNAMIC_TESTS,
  NUMERIC_KINDS,
  OBSERVATION_CODES,
} from '../fhir/codes.js';
import type { GatherOutcome } from '../hooks/gather-types.js';
import { siteCodeOf, type SiteMap } from '../fhir/site-map.js';
import type { PatientSnapshot } from '../snapshot/types.js';

/** One service run for the patient: what gather returned, the snapshot and the advice of the real rules. */
export interface ServiceRun {
  serviceId: string;
  hook: string;
  outcomes: readonly GatherOutcome[];
  resources: readonly FhirResource[];
  snapshot: PatientSnapshot;
  advice: Advice;
}

export interface MarkerLine {
  marker: string;
  /** read: at least one value was read; excluded: found, none usable; absent: not found at all. */
  status: 'read' | 'excluded' | 'absent';
  read?: { count: number; newestAgeMinutes: number; throughSiteMap: number };
  excluded?: Array<{ reason: string; count: number; example: string }>;
}

export interface UnmappedCode {
  system: string;
  code: string;
  display?: string;
  /** Observations carrying it. */
  count: number;
  /** When a map lists the code with an equivalence Tidemark does not read. */
  note?: string;
}

export interface ServiceSummary {
  serviceId: string;
  hook: string;
  gathering: Array<{ key: string; status: string; count: number; detail?: string }>;
  /** Whether the circulation needs more flow (signs of hypoperfusion), when the rules could say. */
  need: string | null;
  responsiveness: string | null;
  tolerance: string | null;
  /** Order hooks: the recommendation's action for the sample draft order, or null. */
  recommendation: string | null;
  rulesAssessed: number;
  rulesNotAssessed: number;
}

export interface PatientReadiness {
  patientId: string;
  /** The encounter the hook context named (the patient's newest in progress), when there is one. */
  encounterId?: string;
  /** The search without a code filter that finds unmapped codes: how many Observations it gave, or why none. */
  survey?: { count: number; problem?: string };
  markers: MarkerLine[];
  /** Resources left out before any marker was known (another patient's, malformed, an id that is not a FHIR id). */
  leftOut: Array<{ reason: string; count: number; example: string }>;
  unmapped: UnmappedCode[];
  services: ServiceSummary[];
}

const READ_CODES = new Set([...OBSERVATION_CODES, ...CODED_OBSERVATION_CODES, ...DYNAMIC_TEST_CODES].map((c) => `${c.system}|${c.code}`));

/** Whether Tidemark reads this Observation's code (its own codes or a site map), or one of its components'. */
function readable(o: Observation, siteMap: SiteMap): boolean {
  const codes = [o.code?.coding ?? [], ...(o.component ?? []).map((c) => c.code?.coding ?? [])];
  return codes.some((cs) => cs.some((c) => READ_CODES.has(`${c.system}|${c.code}`)) || siteCodeOf(siteMap, cs) !== undefined);
}

/**
 * The report for one patient. `runs`: one per service; `survey`: the patient's Observations from a search without a
 * code filter (the services' searches ask for known codes only, so a code no map covers is found there).
 */
export function patientReadiness(
  patientId: string,
  runs: readonly ServiceRun[],
  survey: readonly FhirResource[],
  siteMap: SiteMap,
): PatientReadiness {
  const seen = new Set<string>();
  const measurements: PatientSnapshot['measurements'] = [];
  const coded: PatientSnapshot['coded'] = [];
  const dynamic: PatientSnapshot['dynamicTests'] = [];
  const excluded: PatientSnapshot['excluded'] = [];
  const once = (id: string): boolean => {
    if (seen.has(id)) return false;
    seen.add(id);
    return true;
  };
  for (const r of runs) {
    measurements.push(...r.snapshot.measurements.filter((m) => once(`m|${m.ref}|${m.kind}|${m.effective}`)));
    coded.push(...r.snapshot.coded.filter((m) => once(`c|${m.ref}|${m.kind}`)));
    dynamic.push(...r.snapshot.dynamicTests.filter((m) => once(`d|${m.ref}`)));
    excluded.push(...r.snapshot.excluded.filter((e) => once(`x|${e.ref}|${e.kind ?? ''}|${e.reason}`)));
  }
  const byReason = (list: PatientSnapshot['excluded']) => {
    const out = new Map<string, { reason: string; count: number; example: string }>();
    for (const e of list) {
      const b = out.get(e.reason) ?? { reason: e.reason, count: 0, example: `${e.ref}: ${e.detail}` };
      b.count += 1;
      out.set(e.reason, b);
    }
    return [...out.values()];
  };
  const markers: MarkerLine[] = [...NUMERIC_KINDS, ...CODED_KINDS, ...DYNAMIC_TESTS].map((marker) => {
    const found = [
      ...measurements.filter((m) => m.kind === marker),
      ...coded.filter((m) => m.kind === marker),
      ...dynamic.filter((m) => m.kind === marker),
    ];
    const left = excluded.filter((e) => e.kind === marker);
    const line: MarkerLine = { marker, status: left.length ? 'excluded' : 'absent' };
    if (found.length) line.status = 'read';
    if (found.length) {
      line.read = {
        count: found.length,
        newestAgeMinutes: Math.min(...found.map((m) => m.ageMinutes)),
        throughSiteMap: measurements.filter((m) => m.kind === marker && m.readAs).length,
      };
    }
    if (left.length) line.excluded = byReason(left);
    return line;
  });

  const patientRef = `Patient/${patientId}`;
  const observations = new Map<string, Observation>();
  for (const r of [...runs.flatMap((x) => x.resources), ...survey]) {
    if (r.resourceType !== 'Observation') continue;
    const subject = r.subject?.reference;
    if (subject !== patientRef && !subject?.endsWith(`/${patientRef}`)) continue;
    observations.set(r.id ?? `(no id ${observations.size})`, r);
  }
  const unmapped = new Map<string, UnmappedCode>();
  for (const o of observations.values()) {
    if (readable(o, siteMap)) continue;
    const codings = (o.code?.coding ?? []).filter((c) => c.system || c.code);
    const list = codings.length ? codings : [{ system: '(none)', code: '(none)', display: o.code?.text }];
    for (const c of list) {
      const k = `${c.system ?? ''}|${c.code ?? ''}`;
      const u = unmapped.get(k) ?? { system: c.system ?? '', code: c.code ?? '', ...(c.display ? { display: c.display } : {}), count: 0 };
      const unread = siteMap.unread.get(k);
      if (unread) u.note = `${unread.at} says ${unread.equivalence}: not read (docs/integration.md)`;
      u.count += 1;
      unmapped.set(k, u);
    }
  }

  const services = runs.map((r): ServiceSummary => ({
    serviceId: r.serviceId,
    hook: r.hook,
    gathering: r.outcomes.map((o) => ({ key: o.key, status: o.status, count: o.count, ...(o.detail ? { detail: o.detail } : {}) })),
    need: r.advice.need?.value ?? null,
    responsiveness: r.advice.responsiveness?.value ?? null,
    tolerance: r.advice.tolerance?.value ?? null,
    recommendation: r.advice.recommendation?.action ?? null,
    rulesAssessed: r.advice.findings.filter((f) => f.status === 'assessed').length,
    rulesNotAssessed: r.advice.findings.filter((f) => f.status === 'not-assessed').length,
  }));
  return {
    patientId,
    markers,
    leftOut: byReason(excluded.filter((e) => !e.kind)),
    unmapped: [...unmapped.values()].sort((a, b) => b.count - a.count || (a.code < b.code ? -1 : 1)),
    services,
  };
}

export interface ReadinessReport {
  rulesVersion: string;
  now: string;
  patients: PatientReadiness[];
}

/**
 * Record text (a code, a display, a reason quoting one) as printed: control and bidi characters become "?" and it is
 * cut at 120 characters, so that a record cannot write over the terminal or forge lines of the report.
 */
const clean = (t: string): string => {
  const s = t.replace(/[\p{Cc}\u200e\u200f\u202a-\u202e\u2066-\u2069]/gu, '?');
  return s.length > 120 ? `${s.slice(0, 120)}…` : s;
};

function age(min: number): string {
  if (min < 120) return `${min} min`;
  return min < 2880 ? `${Math.round(min / 60)} h` : `${Math.round(min / 1440)} d`;
}

/** Writes the report as text (for people) or JSON (for machines) to `write`. */
export function writeReport(report: ReadinessReport, format: 'text' | 'json', write: (text: string) => void): void {
  if (format === 'json') return write(`${JSON.stringify(report, null, 2)}\n`);
  write(`Tidemark data-readiness report · rules ${report.rulesVersion} · ${report.now}\n`);
  for (const p of report.patients) {
    write(`\nPatient/${p.patientId}${p.encounterId ? ` · Encounter/${p.encounterId}` : ' · no encounter in progress'}\n`);
    const read = p.markers.filter((m) => m.status === 'read');
    const excl = p.markers.filter((m) => m.excluded?.length);
    const absent = p.markers.filter((m) => m.status === 'absent');
    write(`  Found and read (${read.length}):\n`);
    for (const m of read) {
      const r = m.read as NonNullable<MarkerLine['read']>;
      write(
        `    ${m.marker.padEnd(24)} ${String(r.count).padStart(4)} ${r.count === 1 ? 'value, ' : 'values,'} newest ${age(r.newestAgeMinutes)} old${r.throughSiteMap ? `, ${r.throughSiteMap} through a site map` : ''}\n`,
      );
    }
    write(`  Found but excluded (${excl.length}):\n`);
    for (const m of excl)
      for (const e of m.excluded ?? [])
        write(`    ${m.marker.padEnd(24)} ${String(e.count).padStart(4)} × ${e.reason}: ${clean(e.example)}\n`);
    if (p.leftOut.length) {
      write(`  Left out before reading (${p.leftOut.reduce((n, e) => n + e.count, 0)}):\n`);
      for (const e of p.leftOut) write(`    ${String(e.count).padStart(4)} × ${e.reason}: ${clean(e.example)}\n`);
    }
    let surveyed = '';
    if (p.survey?.problem) surveyed = `; the search of all Observations failed: ${p.survey.problem}, so this list may be incomplete`;
    else if (p.survey) surveyed = `; from the newest ${p.survey.count} Observations`;
    write(`  Present under a code no map covers (${p.unmapped.length}${surveyed}):\n`);
    for (const u of p.unmapped)
      write(
        `    ${clean(u.system)} | ${clean(u.code)}${u.display ? ` "${clean(u.display)}"` : ''} × ${u.count}${u.note ? ` (${u.note})` : ''}\n`,
      );
    write(`  Absent (${absent.length}): ${absent.map((m) => m.marker).join(', ') || '(none)'}\n`);
    for (const s of p.services) {
      const verdicts = [
        `need ${s.need ?? 'no verdict'}`,
        `responsiveness ${s.responsiveness ?? 'no verdict'}`,
        `tolerance ${s.tolerance ?? 'no verdict'}`,
      ];
      if (s.hook !== 'patient-view') verdicts.push(`sample order ${s.recommendation ?? 'no recommendation'}`);
      write(
        `  ${s.serviceId} (${s.hook}): ${verdicts.join(' · ')} · findings assessed ${s.rulesAssessed}, not assessed ${s.rulesNotAssessed}\n`,
      );
      const gaps = s.gathering.filter((g) => g.status !== 'ok' && g.status !== 'no-data');
      if (gaps.length)
        write(`    not gathered: ${gaps.map((g) => `${g.key} ${g.status}${g.detail ? ` (${clean(g.detail)})` : ''}`).join('; ')}\n`);
    }
  }
}
