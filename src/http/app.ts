/**
 * The express app factory (no listen). Routes parse, call one function, serialise; errors become an
 * OperationOutcome and a status in exactly one place (the error handler at the bottom).
 */
import { readFile } from 'node:fs/promises';
import { fileURLToPath } from 'node:url';
import express, { type NextFunction, type Request, type RequestHandler, type Response } from 'express';
import { z } from 'zod';
import type { AuditStore, StoredAdvice } from '../audit/types.js';
import type { SiteMap } from '../fhir/site-map.js';
import { withSnapshot } from '../hooks/rebuild.js';
import { evaluateHook, type EvaluateDeps } from '../hooks/evaluate.js';
import { recordFeedback } from '../hooks/feedback.js';
import { replay } from '../audit/replay.js';
import { impactPage, impactRequestSchema } from '../audit/impact-request.js';
import { auditInstant } from '../audit/shared.js';
import { discoveryDocument, findService, servicesFor } from '../hooks/services.js';
import { withDepthLimit } from './body-shape.js';
import { OutcomeError, outcomeError, zodIssues } from '../hooks/outcome-error.js';
import { httpOf, operationOutcome } from './errors.js';
import { recordFilterFields, recordFilterQuery } from './record-filters.js';

export interface AppDeps extends EvaluateDeps {
  store: AuditStore;
  bodyLimit: string;
  /** Verifies the CDS client (JWT); pass-through when absent. */
  cdsClientAuth?: RequestHandler;
  /** Guards the audit API; pass-through when absent. */
  auditAuth?: RequestHandler;
  /** Origins allowed to call from a browser (CORS); none by default. */
  corsOrigins?: readonly string[];
  /** Digest of the loaded card catalogue, for the rules version of a candidate in an impact run. */
  catalogueDigest?: string;
  /** Extra readiness warnings (e.g. trial mode). */
  readinessWarnings?: string[];
  /** The human pages (src/http/pages.ts), mounted before the raw /docs/*.md route. */
  pages?: (app: express.Express) => void;
  /** Extra routes mounted before the error handler (metrics). */
  extraRoutes?: (app: express.Express) => void;
  /** Wraps each request for metrics: called with route label and status when the response finishes. */
  onResponse?: (route: string, service: string, status: number, seconds: number) => void;
}

/** A request whose JSON body parser kept the bytes it read. */
type RawBodied = Request & { rawBody?: Buffer | undefined };

/** A stored record with its snapshot rebuilt from its inputs; inputs that no longer make a call are a 422. */
async function rebuilt(rec: StoredAdvice, siteMap: SiteMap | undefined): Promise<StoredAdvice> {
  try {
    return await withSnapshot(rec, siteMap);
  } catch (e) {
    throw outcomeError(
      'not-replayable',
      'not-supported',
      `the record's inputs could not be read again: ${String((e as Error).message).slice(0, 200)}`,
    );
  }
}

const DOCS_DIR = fileURLToPath(new URL('../../docs/', import.meta.url));
const pass: RequestHandler = (_req, _res, next) => next();

const auditQuerySchema = z.object({
  patient: z
    .string()
    .regex(/^[A-Za-z0-9\-.]{1,64}$/)
    .optional(),
  service: z.string().min(1).max(64).optional(),
  from: z.iso.datetime({ offset: true }).or(z.iso.date()).optional(),
  to: z.iso.datetime({ offset: true }).or(z.iso.date()).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
  cursor: z.string().regex(/^\d+$/).optional(),
  ...recordFilterFields,
});

export function createApp(deps: AppDeps): express.Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', false);
  // No ETag: every answer is computed for one call and sent with Cache-Control: no-store, so a hash of the body
  // (express hashes every JSON answer for it) would buy nothing.
  app.set('etag', false);
  const cds = deps.cdsClientAuth ?? pass;
  const audit = deps.auditAuth ?? pass;
  // A body nested deeper than MAX_JSON_DEPTH is a 400 right after parsing, before any code can recurse over it.
  // The body's bytes are kept as read (`verify`), for the audit record of a hook call (src/hooks/received.ts).
  const json = withDepthLimit(
    express.json({
      limit: deps.bodyLimit,
      type: ['application/json', 'application/fhir+json', 'application/*+json'],
      verify: (req, _res, buf) => {
        (req as RawBodied).rawBody = buf;
      },
    }),
  );

  app.use((req, res, next) => {
    res.setHeader('X-Content-Type-Options', 'nosniff');
    res.setHeader('Cache-Control', 'no-store');
    res.setHeader('Referrer-Policy', 'no-referrer');
    res.setHeader('Content-Security-Policy', "default-src 'none'; frame-ancestors 'none'");
    if (deps.onResponse) {
      const t = process.hrtime.bigint();
      res.on('finish', () => {
        const route = (req.route?.path as string | undefined) ?? 'unmatched';
        deps.onResponse?.(route, String(req.params?.['id'] ?? ''), res.statusCode, Number(process.hrtime.bigint() - t) / 1e9);
      });
    }
    next();
  });

  // CORS for browser-based CDS clients: allowlisted origins only (CDS Hooks 2.0 defers to OWASP).
  const origins = new Set(deps.corsOrigins ?? []);
  app.use((req, res, next) => {
    const origin = req.headers.origin;
    if (origin && origins.has(origin)) {
      res.setHeader('Access-Control-Allow-Origin', origin);
      res.setHeader('Vary', 'Origin');
      res.setHeader('Access-Control-Allow-Headers', 'Authorization, Content-Type');
      res.setHeader('Access-Control-Allow-Methods', 'GET, POST, OPTIONS');
      res.setHeader('Access-Control-Max-Age', '600');
    }
    if (req.method === 'OPTIONS') {
      res.status(origin && origins.has(origin) ? 204 : 403).end();
      return;
    }
    next();
  });

  app.get('/healthz', (_req, res) => {
    res.json({ status: 'alive' });
  });
  app.get('/readyz', async (_req, res) => {
    try {
      await deps.store.ping();
      res.json({
        status: 'ready',
        auditStore: deps.store.kind,
        rulesVersion: deps.rulesVersion,
        ...(deps.readinessWarnings?.length ? { warnings: deps.readinessWarnings } : {}),
      });
    } catch (e) {
      res.status(503).json(operationOutcome('transient', `audit store not reachable: ${(e as Error).message}`.slice(0, 200)));
    }
  });

  // With site maps, the searches also ask for the site codes read as Tidemark's (src/hooks/services.ts servicesFor).
  const services = servicesFor(deps.siteMap);
  app.get('/cds-services', cds, (_req, res) => {
    res.json(discoveryDocument(services));
  });

  app.post('/cds-services/:id', cds, json, async (req: Request, res: Response) => {
    const service = findService(String(req.params['id']), services);
    if (!service) throw outcomeError('not-found', 'not-found', `no CDS service with id "${String(req.params['id']).slice(0, 64)}"`);
    const raw = (req as RawBodied).rawBody;
    const pending = evaluateHook(service, req.body, deps, res.locals['client'] as never, raw?.toString('utf8'));
    req.body = undefined; // not held through the audit commit wait (docs/benchmarks.md)
    (req as RawBodied).rawBody = undefined;
    const result = await pending;
    res.status(result.status).json(result.body);
  });

  app.post('/cds-services/:id/feedback', cds, json, async (req: Request, res: Response) => {
    const service = findService(String(req.params['id']));
    if (!service) throw outcomeError('not-found', 'not-found', `no CDS service with id "${String(req.params['id']).slice(0, 64)}"`);
    // The caller the guard verified: feedback is taken only from the issuer that received the card.
    const result = await recordFeedback(
      service,
      req.body,
      deps.store,
      deps.now,
      res.locals['client'] as { issuer?: string; tenant?: string } | undefined,
    );
    res.status(200).json(result);
  });

  app.get('/audit/advice', audit, async (req: Request, res: Response) => {
    const q = auditQuerySchema.safeParse(req.query);
    if (!q.success) throw outcomeError('invalid', 'invalid', 'invalid audit query', zodIssues(q.error.issues, 'query'));
    const { patient, service, from, to, limit, cursor } = q.data;
    const page = await deps.store.list({
      limit,
      ...recordFilterQuery(q.data),
      ...(patient ? { patientId: patient } : {}),
      ...(service ? { service } : {}),
      ...(from ? { from: toInstant(from) } : {}),
      ...(to ? { to: toInstant(to, true) } : {}),
      ...(cursor ? { cursor } : {}),
    });
    res.json({
      items: page.items,
      ...(page.nextCursor
        ? { next: `/audit/advice?${new URLSearchParams({ ...stringsOf(req.query), cursor: page.nextCursor }).toString()}` }
        : {}),
    });
  });
  app.get('/audit/advice/:id', audit, async (req: Request, res: Response) => {
    const rec = await deps.store.get(String(req.params['id']));
    if (!rec) throw outcomeError('not-found', 'not-found', 'no advice record with that id');
    // A record stored as received holds no snapshot: it is rebuilt from the inputs and marked so (docs/audit.md).
    const shown = await withSnapshot(rec, deps.siteMap).catch(() => rec);
    res.json({
      ...shown,
      ...(shown.snapshot && !rec.snapshot ? { snapshotRebuilt: true } : {}),
      feedback: await deps.store.feedbackFor(rec.id),
    });
  });
  app.get('/audit/advice/:id/replay', audit, async (req: Request, res: Response) => {
    const rec = await deps.store.get(String(req.params['id']));
    if (!rec) throw outcomeError('not-found', 'not-found', 'no advice record with that id');
    const diff = replay(await rebuilt(rec, deps.siteMap), deps.thresholds, deps.rulesVersion);
    if (!diff) throw outcomeError('not-replayable', 'not-supported', 'this record has no snapshot to replay (a 412 answer)');
    res.json(diff);
  });
  app.get('/audit/feedback-stats', audit, async (req: Request, res: Response) => {
    const q = auditQuerySchema.pick({ service: true, from: true, to: true }).safeParse(req.query);
    if (!q.success) throw outcomeError('invalid', 'invalid', 'invalid audit query', zodIssues(q.error.issues, 'query'));
    res.json(
      await deps.store.feedbackStats({
        ...(q.data.service ? { service: q.data.service } : {}),
        ...(q.data.from ? { from: toInstant(q.data.from) } : {}),
        ...(q.data.to ? { to: toInstant(q.data.to, true) } : {}),
      }),
    );
  });
  app.post('/audit/impact', audit, json, async (req: Request, res: Response) => {
    const body = impactRequestSchema.safeParse(req.body);
    if (!body.success) throw outcomeError('invalid', 'invalid', 'invalid impact request', zodIssues(body.error.issues, 'body'));
    const { from, to } = body.data;
    const page = await impactPage(
      deps.store,
      { ...body.data, ...(from ? { from: toInstant(from) } : {}), ...(to ? { to: toInstant(to, true) } : {}) },
      {
        catalogue: deps.catalogue,
        ...(deps.catalogueDigest ? { catalogueDigest: deps.catalogueDigest } : {}),
        ...(deps.siteMap ? { siteMap: deps.siteMap } : {}),
      },
    );
    if (!page.ok) throw outcomeError('invalid', 'invalid', 'the candidate thresholds are invalid', [page.message.slice(0, 1000)]);
    res.json(page.body);
  });
  app.get('/audit/verify', audit, async (_req, res) => {
    res.json(await deps.store.verifyChain());
  });

  deps.pages?.(app);

  app.get(['/docs/:page', '/docs/:folder/:page'], async (req, res) => {
    const folder = req.params['folder'] === undefined ? '' : `${String(req.params['folder'])}/`;
    const page = `${folder}${String(req.params['page'])}`;
    if (!/^([a-z0-9-]+\/)?[a-z0-9-]+\.md$/.test(page)) throw outcomeError('not-found', 'not-found', 'no such page');
    try {
      res.type('text/markdown; charset=utf-8').send(await readFile(`${DOCS_DIR}${page}`, 'utf8'));
    } catch {
      throw outcomeError('not-found', 'not-found', 'no such page');
    }
  });

  deps.extraRoutes?.(app);

  app.use((_req, _res, next) => next(outcomeError('not-found', 'not-found', 'no such route')));
  // The one place errors become a status and an OperationOutcome (domain outcomes through httpOf).
  app.use((err: unknown, req: Request, res: Response, _next: NextFunction) => {
    const e = err as { type?: string; status?: number; message?: string };
    let status = 500;
    let body;
    if (err instanceof OutcomeError) {
      ({ status, body } = httpOf(err));
    } else if (e?.type === 'entity.parse.failed') {
      status = 400;
      body = operationOutcome('structure', 'the body is not valid JSON');
    } else if (e?.type === 'entity.too.large') {
      status = 413;
      body = operationOutcome('too-costly', `the body is larger than ${deps.bodyLimit}`);
    } else if (e?.type === 'charset.unsupported' || e?.type === 'encoding.unsupported') {
      status = 415;
      body = operationOutcome('not-supported', 'unsupported body encoding');
    } else if (typeof e?.status === 'number' && e.status >= 400 && e.status < 500) {
      status = e.status;
      body = operationOutcome('invalid', 'the request could not be read');
    } else {
      deps.log.error({ err: e?.message?.slice(0, 300), path: req.path }, 'unexpected error');
      body = operationOutcome('exception', 'internal error', 'fatal');
    }
    if (status >= 500) deps.log.error({ status, path: req.path }, 'request failed');
    res.status(status).type('application/json').json(body);
  });
  return app;
}

/** A validated from/to bound (an ISO date or date-time, checked by the query schema) as the audit store compares it. */
function toInstant(v: string, endOfDay = false): string {
  return auditInstant(v, endOfDay) as string;
}

function stringsOf(q: Request['query']): Record<string, string> {
  return Object.fromEntries(Object.entries(q).filter(([k, v]) => typeof v === 'string' && k !== 'cursor') as Array<[string, string]>);
}
