// End to end: every invented scenario (examples/scenarios/) through the real app over real HTTP, against the
// embedded FHIR R4 server (@medplum/fhir-router + MemoryRepository), by both routes a CDS client can take:
// fhirServer + fhirAuthorization with no prefetch, and a full prefetch built from the service's own templates.
// Checks, with their outside references: the FHIR R4 validator (src/fhir/validator.ts) on every chart; the FHIR
// search semantics of each prefetch template (token OR lists, reference Patient/id, _sort=-date, _count, paging);
// the CDS Hooks 2.0 card schema (src/hooks/schemas.ts); and the direction a careful intensivist would give
// (each scenario's `expect`, the clinical reasoning in docs/clinical-logic/).
import type { Bundle, Condition, FhirResource, MedicationRequest, Observation } from 'fhir/r4.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SCENARIOS, hookContext, scenarioBundle, serviceIdFor } from '../../examples/scenarios/index.js';
import { mismatches, observedVerdicts } from '../../examples/scenarios/expectations.js';
import { runScenario, type RouteKind, type RunTargets, type ScenarioRun } from '../../examples/scenarios/run.js';
import type { BuiltScenario, Scenario } from '../../examples/scenarios/types.js';
import { nonUtcTimes, startEmbeddedFhir, type EmbeddedFhir } from '../../src/devserver/embedded-fhir.js';
import { resolvePrefetchTemplate } from '../../src/hooks/prefetch-tokens.js';
import { cardSchema } from '../../src/hooks/schemas.js';
import { checkCdsResponse } from '../helpers/cds-conformance.js';
import { loadCatalogue } from '../../src/cards/catalogue.js';
import { PREFETCH } from '../../src/hooks/services.js';
import { validateFhir } from '../../src/fhir/validator.js';
import { get, startService, type Running } from '../helpers/server.js';
import type { AdviceRecord } from '../../src/audit/types.js';
import { snapshotOfRecord } from '../../src/hooks/rebuild.js';

/** Pinned clock: the charts are written relative to it and the service judges ages against it. */
const NOW = new Date('2026-11-20T14:00:00Z');
const FHIR_TOKEN = 'e2e-fhir-token-6f1c2a';
const AUDIT_TOKEN = 'e2e-audit-token-0123456789abcdef';
const ROUTES: readonly RouteKind[] = ['fhir-server', 'prefetch'];
const GATHER_PROBLEMS = ['unavailable', 'http-error', 'timeout', 'network-error', 'not-fhir', 'truncated'];

const built = new Map<string, BuiltScenario>(SCENARIOS.map((s) => [s.id, s.build(NOW)]));
const chart = (s: Scenario) => built.get(s.id) as BuiltScenario;
const runs = new Map<string, ScenarioRun>();
const runOf = (s: Scenario, r: RouteKind) => runs.get(`${s.id}/${r}`) as ScenarioRun;

let fhir: EmbeddedFhir;
let svc: Running;
const made = new Map<string, AdviceRecord>();
let targets: RunTargets;

beforeAll(async () => {
  fhir = await startEmbeddedFhir({ requireToken: FHIR_TOKEN });
  for (const s of SCENARIOS) await fhir.load(scenarioBundle(chart(s)));
  // This file checks what is gathered and concluded, not how fast: a generous FHIR budget keeps the first, cold
  // searches of the embedded server (and a loaded CI machine) from ending as timeouts. Budget faults are tested in
  // tests/integration/fhir-faults.test.ts.
  svc = await startService({ TIDEMARK_AUDIT_TOKEN: AUDIT_TOKEN, TIDEMARK_FHIR_BUDGET_MS: '15000' }, { now: () => NOW });
  targets = { serviceUrl: svc.url, fhirBaseUrl: fhir.baseUrl, fhirToken: FHIR_TOKEN, auditToken: AUDIT_TOKEN };
  // The records as made, before the store: their snapshots are what the stored inputs must rebuild exactly.
  const append = svc.svc.store.append.bind(svc.svc.store);
  svc.svc.store.append = (rec) => {
    made.set(rec.id, rec);
    return append(rec);
  };
  // One call at a time: each run finds its own audit record as the newest of its patient and service.
  for (const s of SCENARIOS) for (const r of ROUTES) runs.set(`${s.id}/${r}`, await runScenario(targets, s, chart(s), r));
});

afterAll(async () => {
  await svc?.stop();
  await fhir?.close();
});

describe('the scenarios as data', () => {
  it('at least eight scenarios, unique ids, unique patients, unique resource ids across all charts', () => {
    expect(SCENARIOS.length).toBeGreaterThanOrEqual(8);
    expect(new Set(SCENARIOS.map((s) => s.id)).size).toBe(SCENARIOS.length);
    expect(new Set(SCENARIOS.map((s) => s.patientId)).size).toBe(SCENARIOS.length);
    const keys = SCENARIOS.flatMap((s) => chart(s).resources.map((r) => `${r.resourceType}/${r.id ?? ''}`));
    expect(new Set(keys).size).toBe(keys.length);
  });

  it('covers the required situations: each expected verdict and both order hooks, and a non-fluid order', () => {
    const e = SCENARIOS.map((s) => s.expect);
    for (const v of ['likely', 'unlikely', 'indeterminate']) expect(e.some((x) => x.responsiveness === v)).toBe(true);
    for (const v of ['adequate', 'limited', 'poor', 'not-known']) expect(e.some((x) => x.tolerance === v)).toBe(true);
    for (const v of ['info', 'warning', 'critical', 'no-card']) expect(e.some((x) => x.indicator === v)).toBe(true);
    expect(new Set(SCENARIOS.map((s) => chart(s).hook))).toEqual(new Set(['order-select', 'order-sign']));
  });

  it.each(SCENARIOS.map((s) => [s.id, s] as const))('%s: chart Bundle and draft orders pass the FHIR R4 validator', (_id, s) => {
    const b = chart(s);
    expect(validateFhir(scenarioBundle(b))).toEqual([]);
    for (const d of b.draftOrders) expect(validateFhir(d)).toEqual([]);
    expect(b.resources.filter((r) => r.resourceType === 'Patient').map((r) => r.id)).toEqual([s.patientId]);
    expect(b.resources.some((r) => r.resourceType === 'Encounter' && r.id === s.encounterId)).toBe(true);
  });

  it.each(SCENARIOS.map((s) => [s.id, s] as const))('%s: every date-time is UTC (Z) and at or before now', (_id, s) => {
    const bundle = scenarioBundle(chart(s));
    expect(nonUtcTimes(bundle)).toEqual([]);
    const times = JSON.stringify(bundle).match(/"\d{4}-\d{2}-\d{2}T[^"]+"/g) ?? [];
    expect(times.length).toBeGreaterThan(10);
    for (const t of times) expect(Date.parse(JSON.parse(t) as string)).toBeLessThanOrEqual(NOW.getTime());
  });
});

// ---------------------------------------------------------------- the embedded FHIR server

const fhirGet = (path: string, token: string = FHIR_TOKEN) =>
  get(`${fhir.baseUrl}/${path}`, token ? { authorization: `Bearer ${token}` } : {});

/** All pages of a search, following link[next]. */
async function searchAll(path: string): Promise<{ ids: string[]; pages: number; first: Bundle }> {
  let res = await fhirGet(path);
  expect(res.status).toBe(200);
  const first = res.body as Bundle;
  const ids: string[] = [];
  let pages = 0;
  for (;;) {
    const b = res.body as Bundle;
    expect(b.resourceType).toBe('Bundle');
    pages += 1;
    ids.push(...(b.entry ?? []).map((e) => e.resource?.id ?? ''));
    const next = b.link?.find((l) => l.relation === 'next')?.url;
    if (!next) break;
    res = await get(next, { authorization: `Bearer ${FHIR_TOKEN}` });
  }
  return { ids, pages, first };
}

const codesOf = (query: string): Set<string> =>
  new Set(decodeURIComponent(new URLSearchParams(query.split('?')[1]).get('code') ?? '').split(','));
const effectiveOf = (o: Observation) => o.effectiveDateTime ?? o.effectivePeriod?.end ?? o.effectivePeriod?.start ?? '';

/** What a conforming server must return for a prefetch key, from the chart itself, newest first where sorted. */
function expectedFor(query: string, resources: FhirResource[], patientId: string): string[] {
  const mine = resources.filter((r) => (r as { subject?: { reference?: string } }).subject?.reference === `Patient/${patientId}`);
  if (query.startsWith('Observation?')) {
    const codes = codesOf(query);
    return mine
      .filter(
        (r): r is Observation => r.resourceType === 'Observation' && (r.code.coding ?? []).some((c) => codes.has(`${c.system}|${c.code}`)),
      )
      .sort((a, b) => effectiveOf(b).localeCompare(effectiveOf(a)))
      .map((o) => o.id ?? '');
  }
  if (query.startsWith('Condition?')) {
    return mine
      .filter((r): r is Condition => r.resourceType === 'Condition' && r.clinicalStatus?.coding?.[0]?.code === 'active')
      .map((r) => r.id ?? '')
      .sort();
  }
  if (query.startsWith('MedicationAdministration?')) {
    return mine
      .filter((r) => r.resourceType === 'MedicationAdministration')
      .sort((a, b) =>
        ((b as { effectivePeriod?: { start?: string } }).effectivePeriod?.start ?? '').localeCompare(
          (a as { effectivePeriod?: { start?: string } }).effectivePeriod?.start ?? '',
        ),
      )
      .map((r) => r.id ?? '');
  }
  if (query.startsWith('MedicationRequest?')) {
    return mine
      .filter((r): r is MedicationRequest => r.resourceType === 'MedicationRequest' && r.status === 'active')
      .map((r) => r.id ?? '')
      .sort();
  }
  throw new Error(`no expectation for ${query}`);
}

describe('embedded FHIR server: the prefetch templates return the right resources', () => {
  it.each(SCENARIOS.map((s) => [s.id, s] as const))(
    '%s: each template (Patient/id reads, token OR lists, _sort, _count, status filters)',
    async (_id, s) => {
      const b = chart(s);
      const ctx = hookContext(s, b);
      for (const [key, q] of Object.entries(PREFETCH)) {
        const resolved = resolvePrefetchTemplate(q.template, b.hook, ctx);
        expect(resolved.ok, key).toBe(true);
        const query = (resolved as { value: string }).value;
        if (!query.includes('?')) {
          const res = await fhirGet(query);
          expect(res.status, key).toBe(200);
          expect(res.body.id, key).toBe(key === 'patient' ? s.patientId : s.encounterId);
          continue;
        }
        const got = await searchAll(query);
        const want = expectedFor(query, b.resources, s.patientId);
        const sorted = /_sort=-/.test(query);
        // Ties in time may come in either order: compare sets, and for sorted keys the order of the times.
        expect(new Set(got.ids), `${key}: ${query}`).toEqual(new Set(want));
        expect(got.ids.length, key).toBe(want.length);
        if (sorted && key !== 'fluidsGiven') {
          // The embedded server orders an effectivePeriod by its start (a server may choose; Tidemark does not rely on it).
          const byId = new Map(b.resources.map((r) => [r.id, r]));
          const sortKey = (o: Observation) => o.effectiveDateTime ?? o.effectivePeriod?.start ?? '';
          const times = got.ids.map((id) => sortKey(byId.get(id) as Observation));
          expect(times, `${key} newest first`).toEqual([...times].sort().reverse());
        }
        const count = Number(new URLSearchParams(query.split('?')[1]).get('_count') ?? 20);
        expect((got.first.entry ?? []).length, `${key} honours _count`).toBeLessThanOrEqual(count);
      }
    },
  );

  it('pages with link[next] when a page is full, and the pages add up to the whole result', async () => {
    const s = SCENARIOS[0] as Scenario;
    const hr = `Observation?patient=Patient/${s.patientId}&code=http://loinc.org|8867-4&_sort=-date`;
    const whole = await searchAll(`${hr}&_count=500`);
    const paged = await searchAll(`${hr}&_count=7`);
    expect(whole.ids.length).toBeGreaterThan(14);
    expect(paged.pages).toBe(Math.ceil(whole.ids.length / 7));
    expect(paged.ids).toEqual(whole.ids);
  });

  it('answers what it cannot do correctly with a 400 OperationOutcome instead of a silently empty Bundle', async () => {
    const s = SCENARIOS[0] as Scenario;
    for (const q of [
      `Observation?patient=${s.patientId}`,
      `Observation?patient=Patient/${s.patientId}&no-such-param=1`,
      `Observation?patient=Patient/${s.patientId}&value-quantity=gt5`,
      `Observation?patient=Patient/${s.patientId}&_include=Observation:patient`,
    ]) {
      const res = await fhirGet(q);
      expect(res.status, q).toBe(400);
      expect(res.body.resourceType, q).toBe('OperationOutcome');
    }
  });

  it('serves a CapabilityStatement at /metadata that passes the FHIR R4 validator, and requires the bearer token', async () => {
    const cap = await fhirGet('metadata');
    expect(cap.status).toBe(200);
    expect(cap.body.resourceType).toBe('CapabilityStatement');
    expect(validateFhir(cap.body)).toEqual([]);
    expect((await fhirGet(`Patient/${(SCENARIOS[0] as Scenario).patientId}`, '')).status).toBe(401);
    expect((await fhirGet(`Patient/${(SCENARIOS[0] as Scenario).patientId}`, 'wrong-token')).status).toBe(401);
  });
});

// ---------------------------------------------------------------- Tidemark over real HTTP, both routes

describe.each(ROUTES.map((r) => [r] as const))('Tidemark via %s', (route) => {
  it.each(SCENARIOS.map((s) => [s.id, s] as const))('%s: 200, valid cards, audited, no gathering failure', (_id, s) => {
    const run = runOf(s, route);
    expect(run.status, JSON.stringify(run.body).slice(0, 300)).toBe(200);
    expect(run.serviceId).toBe(serviceIdFor(chart(s).hook));
    const cards = run.body.cards ?? [];
    for (const c of cards) expect(cardSchema.safeParse(c).error?.issues ?? []).toEqual([]);
    expect(checkCdsResponse(run.body)).toEqual([]);
    for (const c of cards as Array<{ suggestions?: Array<{ actions?: Array<{ resource?: unknown }> }> }>) {
      for (const sug of c.suggestions ?? [])
        for (const a of sug.actions ?? []) if (a.resource) expect(validateFhir(a.resource)).toEqual([]);
    }
    if (s.expect.indicator === 'no-card') expect(cards).toEqual([]);
    else expect(cards.length).toBeGreaterThanOrEqual(1);
    expect(run.record?.['outcome']).toBe('answered');
    const gathering = (run.record?.['gathering'] ?? []) as Array<{ key: string; source: string; status: string; detail?: string }>;
    expect(gathering.map((g) => g.key).sort()).toEqual(Object.keys(PREFETCH).sort());
    expect(gathering.filter((g) => GATHER_PROBLEMS.includes(g.status))).toEqual([]);
    expect(new Set(gathering.map((g) => g.source))).toEqual(new Set([route]));
    if (route === 'prefetch') expect(run.prefetchQueries?.filter((q) => q.status !== 200)).toEqual([]);
  });

  it.each(SCENARIOS.map((s) => [s.id, s] as const))('%s: the direction a careful intensivist would give', (_id, s) => {
    const run = runOf(s, route);
    expect(mismatches(s.expect, observedVerdicts(run.record, run.body.cards ?? []))).toEqual([]);
  });
});

// ---------------------------------------------------------------- the pop-up (issue 16 §1)

/** Every code key of the catalogue with a hyphen or a slash (a word never is one): none may reach a prescriber. */
function catalogueCodes(): string[] {
  const c = loadCatalogue().catalogue;
  const keys = new Set<string>();
  const walk = (o: unknown) => {
    if (!o || typeof o !== 'object' || Array.isArray(o)) return;
    for (const [k, v] of Object.entries(o)) {
      if (/[-/]/.test(k)) keys.add(k);
      walk(v);
    }
  };
  walk(c);
  for (const k of c.overrideReasons.map((r) => r.code)) keys.add(k);
  return [...keys];
}
const CODES = catalogueCodes();
/** Markdown escapes undone, so that an escaped id or code is still found. */
const plain = (d: string) => d.replace(/\\(.)/g, '$1');
const measured: Array<{ id: string; chars: number; lines: number }> = [];

describe.each(ROUTES.map((r) => [r] as const))('the pop-up via %s', (route) => {
  it('the check has codes to look for (so it can fail)', () => {
    expect(CODES).toEqual(
      expect.arrayContaining(['controlled-no-effort', 'likely/adequate', 'smaller-aliquot', 'passive-leg-raise', 'not-known']),
    );
  });

  it.each(SCENARIOS.map((s) => [s.id, s] as const))(
    '%s: within 900 characters and 12 lines, no FHIR id, no resource id, no raw code',
    (_id, s) => {
      const run = runOf(s, route);
      const ids = chart(s)
        .resources.map((r) => r.id ?? '')
        .filter((id) => id.length >= 4);
      for (const card of (run.body.cards ?? []) as Array<{ detail?: string; summary: string; suggestions?: Array<{ label: string }> }>) {
        const d = card.detail ?? '';
        const lines = d.split('\n').filter((l) => l.trim()).length;
        if (route === 'prefetch') measured.push({ id: s.id, chars: d.length, lines });
        expect(d.length).toBeLessThanOrEqual(900);
        expect(lines).toBeLessThanOrEqual(12);
        const text = plain(d).replace(/\]\([^)]*\)/g, ']'); // our own link's URL carries the advice id, not a FHIR id
        expect(text).not.toMatch(/\b(Observation|Patient|Encounter|Condition|MedicationAdministration|MedicationRequest|ServiceRequest)\//);
        for (const id of ids) expect(text, id).not.toContain(id);
        for (const code of CODES)
          expect(text, code).not.toMatch(new RegExp(`(^|[^\\w-])${code.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&')}($|[^\\w-])`));
        for (const t of [card.summary, ...(card.suggestions ?? []).map((x) => x.label)])
          for (const code of CODES) expect(t, code).not.toContain(code);
        expect(d).toMatch(/Advisory only/);
      }
    },
  );

  it('the sizes measured over all scenarios stay within the limits', () => {
    if (route !== 'prefetch') return;
    expect(measured.length).toBeGreaterThanOrEqual(SCENARIOS.length - 1);
    expect(Math.max(...measured.map((m) => m.chars))).toBeLessThanOrEqual(900);
    expect(Math.max(...measured.map((m) => m.lines))).toBeLessThanOrEqual(12);
  });
});

describe('a FHIR server that caps its pages', () => {
  it('Tidemark follows link[next] and gives the same answer as with one page', async () => {
    const capped = await startEmbeddedFhir({ requireToken: FHIR_TOKEN, maxCount: 40 });
    try {
      const s = SCENARIOS[0] as Scenario;
      await capped.load(scenarioBundle(chart(s)));
      const run = await runScenario({ ...targets, fhirBaseUrl: capped.baseUrl }, s, chart(s), 'fhir-server');
      expect(run.status).toBe(200);
      const gathering = (run.record?.['gathering'] ?? []) as Array<{ key: string; status: string; pages?: number; count: number }>;
      const vitals = gathering.find((g) => g.key === 'vitals');
      expect(vitals?.status).toBe('ok');
      expect(vitals?.pages).toBeGreaterThan(1);
      expect(vitals?.count).toBe(
        chart(s).resources.filter(
          (r) =>
            r.resourceType === 'Observation' &&
            codesOf(
              (resolvePrefetchTemplate(PREFETCH['vitals']?.template ?? '', 'order-select', hookContext(s, chart(s))) as { value: string })
                .value,
            ).has(`${r.code.coding?.[0]?.system}|${r.code.coding?.[0]?.code}`),
        ).length,
      );
      const one = runOf(s, 'fhir-server');
      expect(observedVerdicts(run.record, run.body.cards ?? [])).toEqual(observedVerdicts(one.record, one.body.cards ?? []));
    } finally {
      await capped.close();
    }
  });
});

describe('the audit record keeps the inputs as received (decision 0006)', () => {
  it.each(SCENARIOS.flatMap((s) => ROUTES.map((r) => [`${s.id}/${r}`, s, r] as const)))(
    '%s: the stored inputs rebuild the snapshot the rules saw, and the stored body holds no FHIR token',
    async (_name, s, r) => {
      const id = String(runOf(s, r).record?.['id'] ?? '');
      const original = made.get(id);
      expect(original?.snapshot).toBeDefined();
      const stored = (await svc.svc.store.get(id))!;
      expect(stored.format).toBe(2);
      expect(stored.snapshot).toBeUndefined();
      expect(stored.inputs?.request.asReceived).toBe(true);
      expect(stored.inputs?.request.body).not.toContain(FHIR_TOKEN);
      // The fhir-server route reads everything from the FHIR server; the prefetch route reads nothing there.
      if (r === 'prefetch') expect(stored.inputs?.fhir).toEqual([]);
      else expect(stored.inputs?.fhir.length).toBeGreaterThan(0);
      expect(await snapshotOfRecord(stored)).toEqual(original?.snapshot);
    },
  );
});

describe('both routes see the same chart', () => {
  it.each(SCENARIOS.map((s) => [s.id, s] as const))('%s: same verdicts, indicator and card summaries', (_id, s) => {
    const a = runOf(s, 'fhir-server');
    const b = runOf(s, 'prefetch');
    expect(observedVerdicts(b.record, b.body.cards ?? [])).toEqual(observedVerdicts(a.record, a.body.cards ?? []));
    expect((b.body.cards ?? []).map((c) => c['summary'])).toEqual((a.body.cards ?? []).map((c) => c['summary']));
  });
});
