/**
 * POST /audit/impact: one bounded page of the impact report (src/audit/impact.ts) for the console or a script.
 * The body names the candidate thresholds and optional filters; at most MAX_IMPACT_PAGE records are re-run per
 * request, oldest first. When more remain, the answer carries `next: { after }`: send the same body with that
 * `after` for the next page (the pages' counts add up; each page keeps its own examples).
 */
import { z } from 'zod';
import type { Catalogue } from '../cards/catalogue.js';
import type { SiteMap } from '../fhir/site-map.js';
import { rulesVersion } from '../config/rules-version.js';
import { candidateThresholds, impactOf, type ImpactReport } from './impact.js';
import type { AuditStore } from './types.js';

/** Records re-run per request at most (about a second or two of work here: docs/benchmarks.md). */
export const MAX_IMPACT_PAGE = 2000;

const when = z.iso.datetime({ offset: true }).or(z.iso.date());

export const impactRequestSchema = z.strictObject({
  /** Candidate thresholds: the shape of the configuration file's `thresholds`, validated as it is. */
  thresholds: z.record(z.string(), z.unknown()),
  service: z.string().min(1).max(64).optional(),
  from: when.optional(),
  to: when.optional(),
  limit: z.number().int().min(1).max(MAX_IMPACT_PAGE).default(MAX_IMPACT_PAGE),
  /** Resume after this record seq (from the previous page's `next.after`). */
  after: z.number().int().min(0).optional(),
});
export type ImpactRequest = z.infer<typeof impactRequestSchema>;

export async function impactPage(
  store: AuditStore,
  /** The request with `from` and `to` as instants (a date alone is the start, or the end, of that day in UTC). */
  req: ImpactRequest,
  ctx: { catalogue: Catalogue; catalogueDigest?: string; siteMap?: SiteMap },
): Promise<{ ok: true; body: { report: ImpactReport; next?: { after: number } } } | { ok: false; message: string }> {
  const cand = candidateThresholds(req.thresholds);
  if (!cand.ok) return cand;
  const records = store.records({
    outcome: 'answered',
    batchSize: Math.min(req.limit + 1, 500),
    ...(req.service ? { service: req.service } : {}),
    ...(req.from ? { from: req.from } : {}),
    ...(req.to ? { to: req.to } : {}),
    ...(req.after !== undefined ? { afterSeq: req.after } : {}),
  });
  const report = await impactOf(
    records,
    {
      thresholds: cand.thresholds,
      catalogue: ctx.catalogue,
      rulesVersion: rulesVersion(ctx.catalogueDigest ?? 'unknown', cand.thresholds, undefined, ctx.siteMap),
      ...(ctx.siteMap ? { siteMap: ctx.siteMap } : {}),
    },
    { maxRecords: req.limit },
  );
  return { ok: true, body: { report, ...(report.more && report.lastSeq !== undefined ? { next: { after: report.lastSeq } } : {}) } };
}
