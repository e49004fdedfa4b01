/**
 * evaluateHook: one CDS Hooks call from parsed body to audited response. The HTTP route only parses and
 * serialises (conventions §1); I/O happens in gather (FHIR) and the audit store, the rest is pure.
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
  const parsed = hookRequestSchema.safeParse(body);
  if (!parsed.success) throw new HttpError(400, 'invalid', 'the request is not a valid CDS Hooks 2.0 request', zodIssues(parsed.error.issues));
  const req = parsed.data;
  if (req.hook !== service.hook) throw new HttpError(400, 'invalid', `service ${service.id} answers the ${service.hook} hook, not ${req.hook}`);
  const hook: HookName = service.hook;
  const ctxParsed = HOOK_CONTEXT_SCHEMAS[hook].safeParse(req.context);
  if (!ctxParsed.success) throw new HttpError(400, 'invalid', `context is not a valid ${hook} context`, zodIssues(ctxParsed.error.issues, 'context'));
  const ctx = ctxParsed.data as { userId: string; patientId: string; encounterId?: string; selections?: string[]; draftOrders?: { entry?: Array<{ resource?: unknown }> } };
  if (req.prefetch) {
    const unknown = Object.keys(req.prefetch).filter((k) => !(k in service.prefetch));
    if (unknown.length) deps.log.info({ hookInstance: req.hookInstance, keys: unknown }, 'ignoring prefetch keys this service did not ask for');
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
    const text = `required data could not be obtained from prefetch or the FHIR server: ${gathered.unobtainableRequired.join(', ')}`;
    const outcome = {
      resourceType: 'OperationOutcome',
      issue: gathered.outcomes
        .filter((o) => gathered.unobtainableRequired.includes(o.key))
        .map((o) => ({ severity: 'error', code: 'incomplete', details: { text: `${o.key}: ${o.detail ?? o.status}` } })),
    };
    const rec: AdviceRecord = { ...base, outcome: 'precondition-failed', findings: [], cards: [], cardKinds: {}, timings: { totalMs: performance.now() - t0, gatherMs: gathered.ms, fhirWaitMs: gathered.fhirWaitMs, assessMs: 0 } };
    await appendOrFail(deps, rec);
    deps.log.info({ hookInstance: req.hookInstance, service: service.id, adviceId, missing: gathered.unobtainableRequired }, text);
    return { status: 412, body: outcome, adviceId };
  }

  const tA = performance.now();
  const snapshot = buildSnapshot(gathered.resources as FhirResource[], {
    patientId: ctx.patientId, ...(ctx.encounterId ? { encounterId: ctx.encounterId } : {}),
    ...(ctx.selections ? { selections: ctx.selections } : {}), ...(ctx.draftOrders ? { draftOrders: ctx.draftOrders } : {}),
  }, now);
  const advice = assess(snapshot, now, deps.thresholds, deps.rulesVersion);
  for (const e of advice.ruleErrors) deps.log.error({ hookInstance: req.hookInstance, ruleId: e.ruleId }, 'a rule failed; its findings are left out');
  const purposes = Object.fromEntries(Object.entries(service.prefetch).map(([k, q]) => [k, q.purpose]));
  const models = composeCards({
    hook, advice, snapshot, gathering: gathered.outcomes, purposes, catalogue: deps.catalogue,
    context: { patientId: ctx.patientId, userId: ctx.userId, ...(ctx.encounterId ? { encounterId: ctx.encounterId } : {}) },
  });
  const cards: Card[] = [];
  const cardKinds: Record<string, string> = {};
  for (const m of models) {
    const card = renderCard(m, deps.catalogue, { hook, publicUrl: deps.publicUrl });
    cards.push(card);
    if (card.uuid) cardKinds[card.uuid] = m.kind;
  }
  const assessMs = performance.now() - tA;
  const rec: AdviceRecord = {
    ...base, outcome: 'answered', snapshot, findings: advice.findings, advice, cards, cardKinds,
    timings: { totalMs: performance.now() - t0, gatherMs: gathered.ms, fhirWaitMs: gathered.fhirWaitMs, assessMs },
  };
  await appendOrFail(deps, rec);
  deps.log.info({ hookInstance: req.hookInstance, service: service.id, adviceId, cards: cards.length, ms: Math.round(rec.timings.totalMs) }, 'advice given');
  return { status: 200, body: { cards }, adviceId };
}

async function appendOrFail(deps: EvaluateDeps, rec: AdviceRecord): Promise<void> {
  const t = performance.now();
  try {
    await deps.store.append(rec);
    deps.metrics?.observeAuditWrite((performance.now() - t) / 1000, true);
  } catch (e) {
    deps.metrics?.observeAuditWrite((performance.now() - t) / 1000, false);
    deps.log.error({ hookInstance: rec.hookInstance, adviceId: rec.id, err: (e as Error).message }, 'audit write failed: no advice sent');
    throw new AuditWriteError(e);
  }
}
