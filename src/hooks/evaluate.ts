/**
 * One CDS Hooks call from parsed body to audited answer, as six stages exported here and composed by
 * evaluateHook: parse the call, gather, snapshot, advise, compose, record. The HTTP route only parses and
 * serialises; I/O happens in gather (FHIR) and record (the audit store), the rest is pure. The benchmark
 * (bench/stages.ts) times these same functions through `observe`.
 */
import { randomUUID } from 'node:crypto';
import type { FhirResource } from 'fhir/r4.js';
import type { z } from 'zod';
import { assess } from '../assess/assess.js';
import type { Thresholds } from '../assess/thresholds.js';
import type { Advice } from '../assess/types.js';
import type { AuditStore, AdviceRecord } from '../audit/types.js';
import type { Catalogue } from '../cards/catalogue.js';
import { composeCards } from '../cards/compose.js';
import { renderCard } from '../cards/render.js';
import type { fhirFetcher } from '../fhir/fetcher.js';
import { gather } from './gather.js';
import { inputsOf, receivedBody } from './received.js';
import type { GatherOptions, GatherOutcome, Gathered } from './gather-types.js';
import type { SiteMap } from '../fhir/site-map.js';
import type { PatientSnapshot } from '../snapshot/types.js';
import { buildSnapshot } from '../snapshot/normalize.js';
import { OutcomeError, outcomeError, zodIssues } from './outcome-error.js';
import { HOOK_CONTEXT_SCHEMAS, hookRequestSchema, type Card, type HookName, type HookRequest, type HookResponse } from './schemas.js';
import type { ServiceDefinition } from './services.js';

/** The stages of one call, in order; `observe` is told each one's wall time. */
export type Stage = 'parse' | 'gather' | 'snapshot' | 'advise' | 'compose' | 'record';

export interface EvaluateDeps {
  store: AuditStore;
  catalogue: Catalogue;
  thresholds: Thresholds;
  rulesVersion: string;
  gatherOptions: GatherOptions;
  publicUrl: string;
  now: () => Date;
  makeFetcher?: typeof fhirFetcher;
  /** The site's IANA time zone for the times on the cards (TIDEMARK_TIME_ZONE); UTC when not given. */
  timeZone?: string;
  /** The signed link to an advice's reasoning page, put on its cards; none when links are off. */
  adviceLink?: (adviceId: string) => { label: string; url: string } | undefined;
  /** The site's ConceptMaps and unit hints (src/fhir/site-map.ts); none by default. */
  siteMap?: SiteMap;
  /** The FHIR server origins a trusted issuer's calls may name (its `fhirServers`); undefined: any. */
  fhirServersFor?: (issuer: string) => readonly string[] | undefined;
  log: { info(o: object, m?: string): void; warn(o: object, m?: string): void; error(o: object, m?: string): void };
  metrics?: { observeGather(o: GatherOutcome[]): void; observeAuditWrite(seconds: number, ok: boolean): void };
  /** Told the wall time of each stage of each call, ms (the benchmark's stage timing). */
  observe?: (stage: Stage, ms: number) => void;
}

export interface EvaluateResult {
  status: 200;
  body: HookResponse;
  adviceId: string;
}

/** A checked call: the request and its hook's context, typed by hook (the context schemas' z.infer). */
export type ParsedCall = { [H in HookName]: { req: HookRequest; hook: H; ctx: z.infer<(typeof HOOK_CONTEXT_SCHEMAS)[H]> } }[HookName];

/** The cards of one answer and, by card uuid, the card kind each was rendered from. */
export interface Composed {
  cards: Card[];
  cardKinds: Record<string, string>;
}

export async function evaluateHook(
  service: ServiceDefinition,
  body: unknown,
  deps: EvaluateDeps,
  client?: AdviceRecord['client'],
  /** The request body's text as it arrived, kept in the record (token replaced, src/hooks/received.ts). */
  bodyText?: string,
): Promise<EvaluateResult> {
  const t0 = performance.now();
  const call = timed(deps, 'parse', parseCall, service, body, deps, client?.issuer);
  const request = receivedBody(bodyText, body);
  const now = deps.now();
  const tG = performance.now();
  const gathered = await gatherData(call, service, deps);
  deps.observe?.('gather', performance.now() - tG);
  const adviceId = randomUUID();
  const base = { ...recordBase(call, service, deps, gathered, adviceId, client), inputs: inputsOf(now, request, gathered.exchanges) };
  const hookInstance = call.req.hookInstance;

  if (gathered.unobtainableRequired.length) {
    const missing = gathered.unobtainableRequired;
    const rec: AdviceRecord = {
      ...base,
      outcome: 'precondition-failed',
      findings: [],
      cards: [],
      cardKinds: {},
      timings: { totalMs: performance.now() - t0, gatherMs: gathered.ms, fhirWaitMs: gathered.fhirWaitMs, assessMs: 0 },
    };
    const refusal = unobtainable(gathered);
    return record(deps, rec).then(() => {
      deps.log.info(
        { hookInstance, cdsService: service.id, adviceId, missing },
        'required data could not be obtained from prefetch or the FHIR server',
      );
      throw refusal;
    });
  }

  const tA = performance.now();
  const snapshot = timed(deps, 'snapshot', snapshotOf, call, gathered, now, deps.siteMap);
  const advice = timed(deps, 'advise', advise, snapshot, now, deps, hookInstance);
  const { cards, cardKinds } = timed(deps, 'compose', compose, call, service, snapshot, advice, gathered, deps, adviceId);
  const assessMs = performance.now() - tA;
  const totalMs = performance.now() - t0;
  const rec: AdviceRecord = {
    ...base,
    outcome: 'answered',
    snapshot,
    findings: advice.findings,
    advice,
    cards,
    cardKinds,
    timings: { totalMs, gatherMs: gathered.ms, fhirWaitMs: gathered.fhirWaitMs, assessMs },
  };
  // Returned, not awaited, and no closure above holds the call's objects: they are not kept alive through the commit wait
  // (docs/benchmarks.md).
  return record(deps, rec).then(() => {
    deps.log.info({ hookInstance, cdsService: service.id, adviceId, cards: cards.length, ms: Math.round(totalMs) }, 'advice given');
    return { status: 200, body: { cards }, adviceId };
  });
}

/** `f(...args)`, its wall time told to `observe` when there is one. */
function timed<A extends unknown[], T>(deps: EvaluateDeps, stage: Stage, f: (...args: A) => T, ...args: A): T {
  if (!deps.observe) return f(...args);
  const t = performance.now();
  const out = f(...args);
  deps.observe(stage, performance.now() - t);
  return out;
}

/** Stage 1: the request and its context checked against the wire schemas and the service; a refusal is an OutcomeError. */
export function parseCall(
  service: ServiceDefinition,
  body: unknown,
  deps: Pick<EvaluateDeps, 'fhirServersFor' | 'log'>,
  issuer?: string,
): ParsedCall {
  const parsed = hookRequestSchema.safeParse(body);
  if (!parsed.success)
    throw outcomeError('invalid', 'invalid', 'the request is not a valid CDS Hooks 2.0 request', zodIssues(parsed.error.issues));
  const req = parsed.data;
  // req.hook is client text echoed here: hookRequestSchema caps it at MAX_NAME_LENGTH characters.
  if (req.hook !== service.hook)
    throw outcomeError('invalid', 'invalid', `service ${service.id} answers the ${service.hook} hook, not ${req.hook}`);
  refuseUnlistedFhirServer(req.fhirServer, issuer, deps, req.hookInstance);
  const hook: HookName = service.hook;
  const ctxParsed = HOOK_CONTEXT_SCHEMAS[hook].safeParse(req.context);
  if (!ctxParsed.success)
    throw outcomeError('invalid', 'invalid', `context is not a valid ${hook} context`, zodIssues(ctxParsed.error.issues, 'context'));
  if (req.prefetch) {
    const unknown = Object.keys(req.prefetch).filter((k) => !(k in service.prefetch));
    if (unknown.length)
      deps.log.info(
        { hookInstance: req.hookInstance, keys: unknown.slice(0, 20), unknownKeys: unknown.length },
        'ignoring prefetch keys this service did not ask for',
      );
  }
  // The schema was picked by `hook`, so the data is that hook's context; TypeScript cannot tie the two by itself.
  return { req, hook, ctx: ctxParsed.data } as ParsedCall;
}

/** Stage 2: the service's prefetch keys from the call's prefetch or its FHIR server (src/hooks/gather.ts). */
export async function gatherData(
  call: ParsedCall,
  service: ServiceDefinition,
  deps: Pick<EvaluateDeps, 'gatherOptions' | 'makeFetcher' | 'metrics'>,
): Promise<Gathered> {
  const gathered = await gather(call.req, service, deps.gatherOptions, deps.makeFetcher);
  deps.metrics?.observeGather(gathered.outcomes);
  return gathered;
}

/** Stage 3: the gathered resources as one normalised snapshot for the call's patient. */
export function snapshotOf(call: ParsedCall, gathered: Gathered, now: Date, siteMap?: SiteMap): PatientSnapshot {
  const { ctx } = call;
  return buildSnapshot(
    gathered.resources as FhirResource[],
    {
      patientId: ctx.patientId,
      ...(ctx.encounterId ? { encounterId: ctx.encounterId } : {}),
      ...(call.hook === 'order-select' ? { selections: call.ctx.selections } : {}),
      ...(call.hook !== 'patient-view' ? { draftOrders: draftEntries(call.ctx.draftOrders) } : {}),
    },
    now,
    siteMap,
  );
}

function draftEntries(b: { entry?: Array<{ resource?: unknown }> | undefined }): { entry?: Array<{ resource?: unknown }> } {
  return b.entry ? { entry: b.entry } : {};
}

/** Stage 4: the rules over the snapshot; a rule that failed is logged and left out. */
export function advise(
  snapshot: PatientSnapshot,
  now: Date,
  deps: Pick<EvaluateDeps, 'thresholds' | 'rulesVersion' | 'log'>,
  hookInstance: string,
): Advice {
  const advice = assess(snapshot, now, deps.thresholds, deps.rulesVersion);
  for (const e of advice.ruleErrors) deps.log.error({ hookInstance, ruleId: e.ruleId }, 'a rule failed; its findings are left out');
  return advice;
}

/** Stage 5: which cards, in the catalogue's words, each with the link to its reasoning page when links are on. */
export function compose(
  call: ParsedCall,
  service: ServiceDefinition,
  snapshot: PatientSnapshot,
  advice: Advice,
  gathered: Gathered,
  deps: Pick<EvaluateDeps, 'catalogue' | 'publicUrl' | 'adviceLink' | 'timeZone'>,
  adviceId: string,
): Composed {
  const { hook, ctx } = call;
  const purposes = Object.fromEntries(Object.entries(service.prefetch).map(([k, q]) => [k, q.purpose]));
  const models = composeCards({
    hook,
    advice,
    snapshot,
    gathering: gathered.outcomes,
    purposes,
    catalogue: deps.catalogue,
    ...(deps.timeZone ? { timeZone: deps.timeZone } : {}),
    context: { patientId: ctx.patientId, userId: ctx.userId, ...(ctx.encounterId ? { encounterId: ctx.encounterId } : {}) },
  });
  const link = deps.adviceLink?.(adviceId);
  const cards: Card[] = [];
  const cardKinds: Record<string, string> = {};
  for (const m of models) {
    const card = renderCard(m, deps.catalogue, { hook, publicUrl: deps.publicUrl, ...(link ? { adviceLink: link } : {}) });
    cards.push(card);
    if (card.uuid) cardKinds[card.uuid] = m.kind;
  }
  return { cards, cardKinds };
}

/**
 * Stage 6: the record appended to the audit store and its commit awaited. A failed write is logged and becomes
 * `not-stored`: no advice is given without its record.
 */
export async function record(deps: Pick<EvaluateDeps, 'store' | 'metrics' | 'log' | 'observe'>, rec: AdviceRecord): Promise<void> {
  const t = performance.now();
  try {
    await deps.store.append(rec);
    deps.metrics?.observeAuditWrite((performance.now() - t) / 1000, true);
  } catch (e) {
    deps.metrics?.observeAuditWrite((performance.now() - t) / 1000, false);
    deps.log.error({ hookInstance: rec.hookInstance, adviceId: rec.id, err: (e as Error).message }, 'audit write failed: no advice sent');
    throw outcomeError('not-stored', 'exception', 'the advice could not be stored for audit, so none is given; the order is not affected', [
      String((e as Error)?.message ?? e).slice(0, 200),
    ]);
  } finally {
    deps.observe?.('record', performance.now() - t);
  }
}

/** What every record of the call holds, whatever its outcome. */
function recordBase(
  call: ParsedCall,
  service: ServiceDefinition,
  deps: Pick<EvaluateDeps, 'now' | 'rulesVersion'>,
  gathered: Gathered,
  adviceId: string,
  client: AdviceRecord['client'] | undefined,
) {
  const { req, hook, ctx } = call;
  return {
    id: adviceId,
    recordedAt: deps.now().toISOString(),
    service: service.id,
    hook,
    hookInstance: req.hookInstance,
    userId: ctx.userId,
    patientId: ctx.patientId,
    ...(ctx.encounterId ? { encounterId: ctx.encounterId } : {}),
    rulesVersion: deps.rulesVersion,
    gathering: gathered.outcomes,
    ...(client ? { client } : {}),
  };
}

/** The refusal of a call whose required keys could not be gathered: one issue per key, saying why. */
function unobtainable(gathered: Gathered): OutcomeError {
  const missing = gathered.unobtainableRequired;
  return new OutcomeError(
    'unobtainable',
    gathered.outcomes
      .filter((o) => missing.includes(o.key))
      .map((o) => ({ type: 'incomplete' as const, text: `${o.key}: ${o.detail ?? o.status}` })),
  );
}

/**
 * A call may name only a FHIR server its issuer lists (`fhirServers`), so a client's token never goes elsewhere.
 * Refused before any request, with a log line (issuer and origin, no token); like other refusals of a request, it
 * leaves no advice record, since no data was read and no advice given.
 */
function refuseUnlistedFhirServer(
  fhirServer: string | undefined,
  issuer: string | undefined,
  deps: Pick<EvaluateDeps, 'fhirServersFor' | 'log'>,
  hookInstance: string,
): void {
  if (fhirServer === undefined || issuer === undefined) return;
  const allowed = deps.fhirServersFor?.(issuer);
  if (allowed === undefined) return;
  const origin = new URL(fhirServer).origin;
  if (allowed.includes(origin)) return;
  deps.log.warn({ hookInstance, issuer, fhirServerOrigin: origin }, 'fhirServer is not listed for this client: call refused');
  throw outcomeError(
    'forbidden',
    'forbidden',
    'fhirServer is not one of the FHIR servers this client may name (fhirServers in its issuer configuration)',
  );
}
