/**
 * The human pages: GET /advice/{id}?exp=…&sig=… (the reasoning page behind a card, reached by its signed link),
 * GET /docs/{page} (a doc as HTML; /docs/{page}.md stays the raw Markdown) and GET /pages/style.css.
 * Headers as strict as the API's (app.ts), except that a page may load its own stylesheet from this origin and be
 * framed by the configured EHR origins (CSP frame-ancestors; none by default).
 */
import { readFile } from 'node:fs/promises';
import { fileURLToPath } from 'node:url';
import type { Express, Response } from 'express';
import type { SiteMap } from '../fhir/site-map.js';
import { withSnapshot } from '../hooks/rebuild.js';
import type { AuditStore, StoredAdvice } from '../audit/types.js';
import type { Catalogue } from '../cards/catalogue.js';
import { docsPage, noticePage, PAGE_CSS, renderAdvicePage, STYLESHEET_PATH } from '../pages/index.js';
import type { LinkSigner } from './advice-link.js';

export interface PagesDeps {
  store: AuditStore;
  catalogue: Catalogue;
  thresholds: unknown;
  rulesVersion: string;
  now: () => Date;
  /** Absent: links are off and /advice/{id} answers 404. */
  signer?: LinkSigner;
  timeZone: string;
  /** EHR origins that may frame the pages. */
  frameAncestors: readonly string[];
  /** The site's ConceptMaps, to rebuild a stored record's snapshot from its inputs as the service read them. */
  siteMap?: SiteMap;
  log: { warn(o: object, m?: string): void; error(o: object, m?: string): void };
}

const DOCS_DIR = fileURLToPath(new URL('../../docs/', import.meta.url));
const ADVICE_ID = /^[A-Za-z0-9-]{1,64}$/;

/**
 * The reasoning page of one stored advice, with the running rules beside the record's: the signed link and the console
 * show the same page.
 */
export async function reasoningPageOf(
  record: StoredAdvice,
  deps: Pick<PagesDeps, 'catalogue' | 'thresholds' | 'rulesVersion' | 'timeZone' | 'siteMap'>,
): ReturnType<typeof renderAdvicePage> {
  // A record stored with its inputs holds no snapshot: rebuilt for the trend plots. A record whose inputs no longer
  // make a call is shown without the trend plots.
  const withTrends = await withSnapshot(record, deps.siteMap).catch(() => record);
  return renderAdvicePage({
    record: withTrends,
    words: deps.catalogue,
    cautions: deps.catalogue.cautions,
    running: { rulesVersion: deps.rulesVersion, thresholds: deps.thresholds },
    zone: deps.timeZone,
  });
}

/** CSP of the pages: only this origin, no script at all, framing by the listed origins only. */
export function pageCsp(frameAncestors: readonly string[]): string {
  return [
    "default-src 'self'",
    "script-src 'none'",
    "object-src 'none'",
    "base-uri 'none'",
    "form-action 'none'",
    `frame-ancestors ${frameAncestors.length ? frameAncestors.join(' ') : "'none'"}`,
  ].join('; ');
}

export function mountPages(app: Express, deps: PagesDeps): void {
  const csp = pageCsp(deps.frameAncestors);
  const send = (res: Response, status: number, page: string) => {
    res.setHeader('Content-Security-Policy', csp);
    // For browsers that predate CSP frame-ancestors, when no EHR may frame the pages.
    if (!deps.frameAncestors.length) res.setHeader('X-Frame-Options', 'DENY');
    res.status(status).type('text/html; charset=utf-8').send(page);
  };

  app.get(STYLESHEET_PATH, (_req, res) => {
    res.setHeader('Content-Security-Policy', csp);
    res.setHeader('Cache-Control', 'public, max-age=3600');
    res.type('text/css; charset=utf-8').send(PAGE_CSS);
  });

  app.get('/advice/:id', async (req, res) => {
    const id = String(req.params['id']);
    if (!deps.signer || !ADVICE_ID.test(id))
      return send(res, 404, noticePage('No such page', 'There is no reasoning page at this address.'));
    const check = deps.signer.verify(id, req.query['exp'], req.query['sig'], deps.now().getTime());
    if (check === 'expired')
      return send(
        res,
        403,
        noticePage(
          'This link has expired',
          `Links to a reasoning page are valid for ${Math.round((deps.signer.lifetimeMinutes / 60) * 10) / 10} h after the advice. Open the card again from the order to get a fresh link.`,
        ),
      );
    if (check === 'bad')
      return send(
        res,
        403,
        noticePage(
          'This link is not valid',
          'The link was changed or was not made by this Tidemark service. Open the card again from the order.',
        ),
      );
    const record = await deps.store.get(id);
    if (!record) return send(res, 404, noticePage('No such advice', 'No advice with this id is stored here.'));
    send(res, 200, await reasoningPageOf(record, deps));
  });

  // The screenshots the docs show (docs/img/*.png).
  app.get('/docs/img/:file', async (req, res, next) => {
    const file = String(req.params['file']);
    if (!/^[a-z0-9-]+\.png$/.test(file)) return next();
    try {
      const bytes = await readFile(`${DOCS_DIR}img/${file}`);
      res.setHeader('Content-Security-Policy', csp);
      res.type('image/png').send(bytes);
    } catch {
      next();
    }
  });

  // /docs/{page} and /docs/{folder}/{page} without ".md": the doc as an HTML page (the ".md" routes in app.ts stay raw).
  app.get(['/docs/:page', '/docs/:folder/:page'], async (req, res, next) => {
    const folder = req.params['folder'] === undefined ? '' : `${String(req.params['folder'])}/`;
    const page = `${folder}${String(req.params['page'])}`;
    if (!/^([a-z0-9-]+\/)?[a-z0-9-]+$/.test(page)) return next();
    let text: string;
    try {
      text = await readFile(`${DOCS_DIR}${page}.md`, 'utf8');
    } catch {
      return send(res, 404, noticePage('No such page', 'There is no documentation page at this address.'));
    }
    send(res, 200, docsPage(text, page));
  });
}
