/**
 * The audit console: GET /console (overview), /console/advice (list), /console/advice/{id} (a record's reasoning
 * page with its feedback), /console/impact (GET form, POST run), POST /console/sign-in and /console/sign-out,
 * GET /console/style.css. Everything it shows comes from the audit store interface; the pages are rendered by
 * src/console/ (pure). Access: a console session (console-session.ts), or, when a request carries an
 * Authorization header, the audit API's own guard (a bearer from a single-sign-on proxy in front, or the audit
 * token): docs/audit.md. No script on any page; CSP `default-src 'self'`, forms to this origin only, no framing.
 */
import express, { type Express, type NextFunction, type Request, type RequestHandler, type Response } from 'express';
import { z } from 'zod';
import { MAX_IMPACT_PAGE, impactPage as runImpactPage, impactRequestSchema } from '../audit/impact-request.js';
import { auditInstant } from '../audit/shared.js';
import type { AuditStore } from '../audit/types.js';
import { staticTokenMatcher } from '../auth/middleware.js';
import type { Catalogue } from '../cards/catalogue.js';
import type { SiteMap } from '../fhir/site-map.js';
import { dayRange } from '../console/range.js';
import {
  consoleNotice,
  impactPage,
  listPage,
  overviewPage,
  recordPage,
  signInPage,
  type Chrome,
  type ImpactForm,
  type ListFilters,
} from '../console/render.js';
import { CONSOLE_CSS } from '../console/style.js';
import { ConsoleSessions, SignInLimiter, sameText } from './console-session.js';
import { reasoningPageOf } from './pages.js';
import { blankAsAbsent, recordFilterFields, recordFilterQuery } from './record-filters.js';

export interface ConsoleDeps {
  store: AuditStore;
  catalogue: Catalogue;
  catalogueDigest?: string;
  siteMap?: SiteMap;
  thresholds: unknown;
  rulesVersion: string;
  now: () => Date;
  timeZone: string;
  publicUrl: string;
  /** The audit token (TIDEMARK_AUDIT_TOKEN): what sign-in accepts. Absent: sign-in is off (the proxy path stays). */
  auditToken?: string;
  /** The audit API's guard, for requests that carry an Authorization header. */
  auditAuth: RequestHandler;
  sessionMinutes: number;
  bodyLimit: string;
  log: { info(o: object, m?: string): void; warn(o: object, m?: string): void };
}

/** Failed sign-ins allowed per client address and minute. */
export const SIGN_IN_FAILURES_PER_MINUTE = 5;

export const CONSOLE_CSP =
  "default-src 'self'; script-src 'none'; object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'";

const ADVICE_ID = /^[A-Za-z0-9-]{1,64}$/;
const optional = blankAsAbsent;
const listQuery = z.object({
  from: z.string().optional(),
  to: z.string().optional(),
  service: optional(z.string().min(1).max(64)),
  patient: optional(z.string().regex(/^[A-Za-z0-9\-.]{1,64}$/)),
  ...recordFilterFields,
  cursor: optional(z.string().regex(/^\d{1,15}$/)),
});
const LIST_PAGE = 50;

type Access = { chrome: Chrome };

export function mountConsole(app: Express, deps: ConsoleDeps): void {
  const nowMs = () => deps.now().getTime();
  const sessions = new ConsoleSessions(deps.sessionMinutes, deps.publicUrl, nowMs);
  const limiter = new SignInLimiter(SIGN_IN_FAILURES_PER_MINUTE, 60_000, nowMs);
  const matches = deps.auditToken ? staticTokenMatcher(deps.auditToken) : undefined;
  const form = express.urlencoded({ extended: false, limit: deps.bodyLimit, parameterLimit: 20 });
  const send = (res: Response, status: number, body: string) => {
    res.setHeader('Content-Security-Policy', CONSOLE_CSP);
    res.setHeader('X-Frame-Options', 'DENY');
    res.status(status).type('text/html; charset=utf-8').send(body);
  };

  /** Lets a request in with a session or through the audit guard (an Authorization header); else to sign-in. */
  const guard: RequestHandler = (req, res, next) => {
    const found = sessions.find(req);
    if (found.session) {
      (res.locals as { console?: Access }).console = { chrome: { csrf: found.session.csrf, session: true } };
      return next();
    }
    if (req.get('authorization')) {
      return deps.auditAuth(req, res, () => {
        (res.locals as { console?: Access }).console = { chrome: { csrf: sessions.formToken(req, res), session: false } };
        next();
      });
    }
    if (req.method === 'GET') return res.redirect(303, found.expired ? '/console/sign-in?ended=1' : '/console/sign-in');
    return send(
      res,
      401,
      consoleNotice(
        'Not signed in',
        found.expired ? 'Your console session has ended. Sign in again.' : 'Sign in to use the audit console.',
      ),
    );
  };
  const accessOf = (res: Response): Access => (res.locals as { console: Access }).console;
  /** The POST's CSRF field against the session's token (or, on the proxy path, the double-submit cookie). */
  const csrfOk = (req: Request, res: Response): boolean => {
    const presented = (req.body as Record<string, unknown> | undefined)?.['csrf'];
    const a = accessOf(res);
    if (a.chrome.session) return typeof presented === 'string' && sameText(presented, a.chrome.csrf);
    return sessions.formTokenMatches(req, presented);
  };
  const wrap =
    (fn: (req: Request, res: Response) => Promise<void>): RequestHandler =>
    (req, res, next: NextFunction) => {
      fn(req, res).catch(next);
    };

  app.get('/console/style.css', (_req, res) => {
    res.setHeader('Content-Security-Policy', CONSOLE_CSP);
    res.setHeader('Cache-Control', 'public, max-age=3600');
    res.type('text/css; charset=utf-8').send(CONSOLE_CSS);
  });

  app.get('/console/sign-in', (req, res) => {
    if (sessions.find(req).session) return res.redirect(303, '/console');
    send(
      res,
      200,
      signInPage({
        csrf: sessions.formToken(req, res),
        available: !!matches,
        ...(req.query['ended'] ? { message: 'Your console session has ended. Sign in again.' } : {}),
      }),
    );
  });

  app.post('/console/sign-in', form, (req, res) => {
    const addr = req.socket.remoteAddress ?? 'unknown';
    const body = (req.body ?? {}) as Record<string, unknown>;
    const again = (status: number, message: string) =>
      send(res, status, signInPage({ csrf: sessions.formToken(req, res), available: !!matches, message }));
    // A sign-in form from another site (login CSRF) lacks the double-submit token: refused before the credential is looked at.
    if (!sessions.formTokenMatches(req, body['csrf'])) {
      deps.log.warn({ console: 'sign-in refused', reason: 'form token missing or wrong' }, 'console sign-in refused');
      return again(403, 'This sign-in form has expired or did not come from this page. Try again.');
    }
    if (!matches) return again(403, 'Sign-in with the audit credential is not set up on this service.');
    if (limiter.blocked(addr)) {
      deps.log.warn({ console: 'sign-in refused', reason: 'too many failures' }, 'console sign-in refused');
      res.setHeader('Retry-After', '60');
      return again(429, 'Too many failed attempts from this address. Wait a minute and try again.');
    }
    const credential = typeof body['credential'] === 'string' ? body['credential'] : '';
    if (!matches(credential)) {
      limiter.fail(addr);
      deps.log.warn({ console: 'sign-in refused', reason: 'credential not accepted' }, 'console sign-in refused');
      // One answer for every wrong credential: nothing tells how close it came.
      return again(401, 'The credential was not accepted.');
    }
    sessions.create(res);
    deps.log.info({ console: 'signed in', minutes: deps.sessionMinutes }, 'console sign-in');
    res.redirect(303, '/console');
  });

  app.post('/console/sign-out', form, guard, (req, res) => {
    if (!csrfOk(req, res))
      return send(
        res,
        403,
        consoleNotice('Refused', "The form did not carry this session's token. Reload the page and try again.", accessOf(res).chrome),
      );
    sessions.end(req, res);
    res.redirect(303, '/console/sign-in');
  });

  app.get(
    '/console',
    guard,
    wrap(async (req, res) => {
      const { chrome } = accessOf(res);
      const r = dayRange(req.query['from'], req.query['to'], deps.now());
      const service =
        typeof req.query['service'] === 'string' && /^[A-Za-z0-9._-]{1,64}$/.test(req.query['service']) ? req.query['service'] : undefined;
      if (!r.ok) return send(res, 400, consoleNotice('Date range not usable', r.message, chrome));
      const [aggregates, chain] = await Promise.all([
        deps.store.overview({ from: r.range.fromInstant, to: r.range.toInstant, ...(service ? { service } : {}) }),
        deps.store.verifyChain(),
      ]);
      send(res, 200, await overviewPage({ chrome, range: r.range, aggregates, chain, ...(service ? { service } : {}) }));
    }),
  );

  app.get(
    '/console/advice',
    guard,
    wrap(async (req, res) => {
      const { chrome } = accessOf(res);
      const q = listQuery.safeParse(req.query);
      if (!q.success)
        return send(
          res,
          400,
          consoleNotice('Filters not usable', `Not usable: ${q.error.issues.map((i) => i.path.join('.')).join(', ')}.`, chrome),
        );
      const r = dayRange(q.data.from, q.data.to, deps.now());
      if (!r.ok) return send(res, 400, consoleNotice('Date range not usable', r.message, chrome));
      const d = q.data;
      const page = await deps.store.list({
        limit: LIST_PAGE,
        from: r.range.fromInstant,
        to: r.range.toInstant,
        ...(d.service ? { service: d.service } : {}),
        ...(d.patient ? { patientId: d.patient } : {}),
        ...recordFilterQuery(d),
        ...(d.cursor ? { cursor: d.cursor } : {}),
      });
      const filters: ListFilters = {
        from: r.range.from,
        to: r.range.to,
        ...(d.service ? { service: d.service } : {}),
        ...(d.patient ? { patient: d.patient } : {}),
        ...(d.indicator ? { indicator: d.indicator } : {}),
        ...(d.responsiveness ? { responsiveness: d.responsiveness } : {}),
        ...(d.tolerance ? { tolerance: d.tolerance } : {}),
        ...(d.feedback ? { feedback: d.feedback } : {}),
      };
      const qs = (extra: Record<string, string>) =>
        `/console/advice?${new URLSearchParams({ ...(filters as unknown as Record<string, string>), ...extra }).toString()}`;
      send(
        res,
        200,
        listPage({
          chrome,
          filters,
          items: page.items,
          zoneNote: 'Times in UTC.',
          ...(page.nextCursor ? { nextHref: qs({ cursor: page.nextCursor }) } : {}),
          ...(d.cursor ? { firstHref: qs({}) } : {}),
        }),
      );
    }),
  );

  app.get(
    '/console/advice/:id',
    guard,
    wrap(async (req, res) => {
      const { chrome } = accessOf(res);
      const id = String(req.params['id']);
      const record = ADVICE_ID.test(id) ? await deps.store.get(id) : undefined;
      if (!record) return send(res, 404, consoleNotice('No such advice', 'No advice with this id is stored here.', chrome));
      const reasoning = await reasoningPageOf(record, deps);
      send(res, 200, recordPage(reasoning, await deps.store.feedbackFor(record.id), record.cardKinds, chrome));
    }),
  );

  const emptyForm: ImpactForm = { thresholds: '{\n  "responsiveness": { "ppvThresholdPercent": 13 }\n}' };
  app.get(
    '/console/impact',
    guard,
    wrap(async (_req, res) => {
      send(res, 200, impactPage({ chrome: accessOf(res).chrome, form: emptyForm, maxPage: MAX_IMPACT_PAGE }));
    }),
  );

  app.post(
    '/console/impact',
    form,
    guard,
    wrap(async (req, res) => {
      const { chrome } = accessOf(res);
      if (!csrfOk(req, res))
        return send(
          res,
          403,
          consoleNotice('Refused', "The form did not carry this session's token. Reload the page and try again.", chrome),
        );
      const b = (req.body ?? {}) as Record<string, unknown>;
      const text = (k: string) => (typeof b[k] === 'string' && b[k] !== '' ? (b[k] as string) : undefined);
      const f: ImpactForm = {
        thresholds: text('thresholds') ?? '',
        ...(text('service') ? { service: text('service')! } : {}),
        ...(text('from') ? { from: text('from')! } : {}),
        ...(text('to') ? { to: text('to')! } : {}),
      };
      const refuse = (message: string) => send(res, 400, impactPage({ chrome, form: f, maxPage: MAX_IMPACT_PAGE, error: message }));
      let thresholds: unknown;
      try {
        thresholds = JSON.parse(f.thresholds);
      } catch (e) {
        return refuse(`The candidate thresholds are not valid JSON: ${(e as Error).message.slice(0, 200)}`);
      }
      const after = text('after');
      const parsed = impactRequestSchema.safeParse({
        thresholds,
        ...(f.service ? { service: f.service } : {}),
        ...(f.from ? { from: f.from } : {}),
        ...(f.to ? { to: f.to } : {}),
        ...(after !== undefined ? { after: /^\d{1,15}$/.test(after) ? Number(after) : after } : {}),
      });
      if (!parsed.success)
        return refuse(
          `Not usable: ${parsed.error.issues
            .slice(0, 5)
            .map((i) => `${i.path.join('.') || 'thresholds'}: ${i.message}`)
            .join('; ')}.`,
        );
      const p = parsed.data;
      const page = await runImpactPage(
        deps.store,
        {
          ...p,
          ...(p.from ? { from: auditInstant(p.from) as string } : {}),
          ...(p.to ? { to: auditInstant(p.to, true) as string } : {}),
        },
        {
          catalogue: deps.catalogue,
          ...(deps.catalogueDigest ? { catalogueDigest: deps.catalogueDigest } : {}),
          ...(deps.siteMap ? { siteMap: deps.siteMap } : {}),
        },
      );
      if (!page.ok) return refuse(`The candidate thresholds are not usable: ${page.message.slice(0, 1000)}`);
      send(res, 200, impactPage({ chrome, form: f, maxPage: MAX_IMPACT_PAGE, report: page.body.report }));
    }),
  );
}
