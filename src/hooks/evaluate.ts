/**
 * evaluateHook: one CDS Hooks call from parsed body to audited response. The HTTP route only parses and
 * serialises; I/O happens in gather (FHIR) and the audit store, the rest is pure.
 */
import { randomUUID } from 'node:crypto';
import type { FhirResource } from 'fhir/r4.js';
import { assess } from '../assess/assess.js';
import type { Thresholds } from '../assess/thresholds.js';
import type { AuditStore, AdviceRecord } from '../audit/types.js';
import type { Catalogue } from '../cards/catalogue.js';
import { composeCards } from '../cards/compose.js';
import { renderCard } from '../cards/render.js';
import { gather, fhirFetcher, type GatherOptions, type GatherOutcome } from '../fhir/gather.js';
import type { SiteMap } from '../fhir/site-map.js';
import { HttpError, zodIssues } from '../http/errors.js';
import { buildSnapshot } from '../snapshot/normalize.js';
import { HOOK_CONTEXT_SCHEMAS, hookRequestSchema, type Card, type HookName, type HookResponse } from './schemas.js';
import type { ServiceDefinition } from './services.js';

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
}

export interface EvaluateResult {
  status: 200 | 412;
  body: HookResponse | Record<string, unknown>;
  adviceId: string;
}

export class AuditWriteError extends HttpError {
  constructor(cause: unknown) {
    super(500, 'exception', 'the advice could not be stored for audit, so none is given; the order is not affected', [String((cause as Error)?.message ?? cause).slice(0, 200)]);
  }
}

export async function evaluateHook(service: ServiceDefinition, body: unknown, deps: EvaluateDeps, client?: AdviceRecord['client']): Promise<EvaluateResult> {
  const t0 = performance.now();
  // The request is parsed, gathered, assessed and its record handed to the store in adviseAndStore, so that
  // nothing of the request, the snapshot or the record is held here while the commit is awaited (`body` is let go
  // too): on a loaded service, one call in flight per connection, the garbage collector need not copy them meanwhile.
  const started = adviseAndStore(service, body, deps, client, t0);
  body = undefined;
  const made = await started;
  await awaitAppend(deps, made.stored, made.hookInstance, made.adviceId);
  if (made.status === 412) {
    deps.log.info({ hookInstance: made.hookInstance, cdsService: service.id, adviceId: made.adviceId, missing: made.missing }, 'required data could not be obtained from prefetch or the FHIR server');
    return { status: 412, body: made.outcome, adviceId: made.adviceId };
  }
  deps.log.info({ hookInstance: made.hookInstance, cdsService: service.id, adviceId: made.adviceId, cards: made.cards.length, ms: Math.round(made.totalMs) }, 'advice given');
  return { status: 200, body: { cards: made.cards }, adviceId: made.adviceId };
}

type HookCtx = { userId: string; patientId: string; encounterId?: string; selections?: string[]; draftOrders?: { entry?: Array<{ resource?: unknown }> } };

/** What the answer needs once the record is stored: never the request, snapshot or record themselves. */
type Made = { stored: Stored; hookInstance: string; adviceId: string } & (
  | { status: 412; outcome: Record<string, unknown>; missing: string[] }
  | { status: 200; cards: Card[]; totalMs: number }
);

/**
 * Checks the request, gathers its data, makes the advice and its record and begins the store's append. Its frame
 * ends there, so what it made is unreachable while evaluateHook awaits the commit; only `Made` is returned.
 */
async function adviseAndStore(service: ServiceDefinition, body: unknown, deps: EvaluateDeps, client: AdviceRecord['client'] | undefined, t0: number): Promise<Made> {
  const parsed = hookRequestSchema.safeParse(body);
  if (!parsed.success) throw new HttpError(400, 'invalid', 'the request is not a valid CDS Hooks 2.0 request', zodIssues(parsed.error.issues));
  const req = parsed.data;
  // req.hook is client text echoed here: hookRequestSchema caps it at MAX_NAME_LENGTH characters (it was echoed whole).
  if (req.hook !== service.hook) throw new HttpError(400, 'invalid', `service ${service.id} answers the ${service.hook} hook, not ${req.hook}`);
  refuseUnlistedFhirServer(req.fhirServer, client?.issuer, deps, req.hookInstance);
  const hook: HookName = service.hook;
  const ctxParsed = HOOK_CONTEXT_SCHEMAS[hook].safeParse(req.context);
  if (!ctxParsed.success) throw new HttpError(400, 'invalid', `context is not a valid ${hook} context`, zodIssues(ctxParsed.error.issues, 'context'));
  const ctx = ctxParsed.data as HookCtx;
  if (req.prefetch) {
    const unknown = Object.keys(req.prefetch).filter((k) => !(k in service.prefetch));
    if (unknown.length) deps.log.info({ hookInstance: req.hookInstance, keys: unknown.slice(0, 20), unknownKeys: unknown.length }, 'ignoring prefetch keys this service did not ask for');
  }
  const now = deps.now();
  const gathered = await gather(req, service, deps.gatherOptions, deps.makeFetcher);
  deps.metrics?.observeGather(gathered.outcomes);
  const adviceId = randomUUID();

  const base = {
    id: adviceId, recordedAt: new Date().toISOString(), service: service.id, hook, hookInstance: req.hookInstance,
    userId: ctx.userId, patientId: ctx.patientId, ...(ctx.encounterId ? { encounterId: ctx.encounterId } : {}),
    rulesVersion: deps.rulesVersion, gathering: gathered.outcomes, ...(client ? { client } : {}),
  };

  if (gathered.unobtainableRequired.length) {
    const missing = gathered.unobtainableRequired;
    const outcome = {
      resourceType: 'OperationOutcome',
      issue: gathered.outcomes
        .filter((o) => missing.includes(o.key))
        .map((o) => ({ severity: 'error', code: 'incomplete', details: { text: `${o.key}: ${o.detail ?? o.status}` } })),
    };
    const rec: AdviceRecord = { ...base, outcome: 'precondition-failed', findings: [], cards: [], cardKinds: {}, timings: { totalMs: performance.now() - t0, gatherMs: gathered.ms, fhirWaitMs: gathered.fhirWaitMs, assessMs: 0 } };
    return { status: 412, stored: startAppend(deps, rec), hookInstance: req.hookInstance, adviceId, outcome, missing };
  }

  const tA = performance.now();
  const snapshot = buildSnapshot(gathered.resources as FhirResource[], {
    patientId: ctx.patientId, ...(ctx.encounterId ? { encounterId: ctx.encounterId } : {}),
    ...(ctx.selections ? { selections: ctx.selections } : {}), ...(ctx.draftOrders ? { draftOrders: ctx.draftOrders } : {}),
  }, now, deps.siteMap);
  const advice = assess(snapshot, now, deps.thresholds, deps.rulesVersion);
  for (const e of advice.ruleErrors) deps.log.error({ hookInstance: req.hookInstance, ruleId: e.ruleId }, 'a rule failed; its findings are left out');
  const purposes = Object.fromEntries(Object.entries(service.prefetch).map(([k, q]) => [k, q.purpose]));
  const models = composeCards({
    hook, advice, snapshot, gathering: gathered.outcomes, purposes, catalogue: deps.catalogue, ...(deps.timeZone ? { timeZone: deps.timeZone } : {}),
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
  const assessMs = performance.now() - tA;
  const totalMs = performance.now() - t0;
  const rec: AdviceRecord = {
    ...base, outcome: 'answered', snapshot, findings: advice.findings, advice, cards, cardKinds,
    timings: { totalMs, gatherMs: gathered.ms, fhirWaitMs: gathered.fhirWaitMs, assessMs },
  };
  return { status: 200, stored: startAppend(deps, rec), hookInstance: req.hookInstance, adviceId, cards, totalMs };
}

/**
 * A call may name only a FHIR server its issuer lists (`fhirServers`), so a client's token never goes elsewhere.
 * Refused before any request, with a 403 and a log line (issuer and origin, no token); like other refusals of a
 * request, it leaves no advice record, since no data was read and no advice given.
 */
function refuseUnlistedFhirServer(fhirServer: string | undefined, issuer: string | undefined, deps: EvaluateDeps, hookInstance: string): void {
  if (fhirServer === undefined || issuer === undefined) return;
  const allowed = deps.fhirServersFor?.(issuer);
  if (allowed === undefined) return;
  const origin = new URL(fhirServer).origin;
  if (allowed.includes(origin)) return;
  deps.log.warn({ hookInstance, issuer, fhirServerOrigin: origin }, 'fhirServer is not listed for this client: call refused');
  throw new HttpError(403, 'forbidden', 'fhirServer is not one of the FHIR servers this client may name (fhirServers in its issuer configuration)');
}

interface Stored { done: Promise<unknown>; startedAt: number }

/** The store's append of a record, begun now (its text is made here); a store that throws at once gives a rejection. */
function startAppend(deps: EvaluateDeps, rec: AdviceRecord): Stored {
  const startedAt = performance.now();
  let done: Promise<unknown>;
  try {
    done = deps.store.append(rec);
  } catch (e) {
    done = Promise.reject(e);
  }
  done.catch(() => undefined); // handled in awaitAppend, a few microtasks later
  return { done, startedAt };
}

async function awaitAppend(deps: EvaluateDeps, stored: Stored, hookInstance: string, adviceId: string): Promise<void> {
  const t = stored.startedAt;
  try {
    await stored.done;
    deps.metrics?.observeAuditWrite((performance.now() - t) / 1000, true);
  } catch (e) {
    deps.metrics?.observeAuditWrite((performance.now() - t) / 1000, false);
    deps.log.error({ hookInstance, adviceId, err: (e as Error).message }, 'audit write failed: no advice sent');
    throw new AuditWriteError(e);
  }
}
