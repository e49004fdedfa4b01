/**
 * The card catalogue (cards/catalogue.json): card kinds, text templates, indicator rules, override reasons.
 * Data, not code, so clinicians can review and change wording without a release; validated with zod at
 * start-up; its digest is part of the rules version.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { z } from 'zod';

const text = z.string().min(1);
const indicator = z.enum(['info', 'warning', 'critical']);

export const catalogueSchema = z
  .object({
    catalogueVersion: text,
    source: z.object({ label: text, topic: z.object({ system: text, code: text, display: text }).optional() }),
    cautions: z.array(text).min(1),
    phrases: z.object({
      responsiveness: z.object({ likely: text, unlikely: text, indeterminate: text, unassessed: text }),
      tolerance: z.object({ adequate: text, limited: text, poor: text, unassessed: text }),
    }),
    kinds: z
      .array(
        z.object({
          id: z.string().regex(/^[a-z][a-z0-9-]*$/),
          hooks: z.array(z.enum(['order-select', 'order-sign', 'patient-view'])).min(1),
          title: text,
          summary: text,
          /** Used when the full summary would be 140 characters or more. */
          shortSummary: text,
          indicatorRules: z.array(z.object({ if: z.record(z.string(), z.string()), then: indicator })),
          defaultIndicator: indicator,
          sections: z.array(z.enum(['conclusion', 'evidence', 'gaps', 'order', 'cautions'])).min(1),
          docsPage: text,
          overrideReasons: z.array(text).optional(),
        }),
      )
      .min(1),
    overrideReasons: z.array(z.object({ code: z.string().regex(/^[a-z][a-z0-9-]*$/), display: text })),
    /** Card headlines per advice cell ("likely/limited"), congestion ("congestion/likely") or unknown tolerance. */
    headlines: z.record(z.string().regex(/^[a-z-]+\/[a-z]+$/), text.max(120)),
    /** Suggestion wording per suggestion kind: label, action description, text of the FHIR resource. */
    suggestions: z.record(
      z.enum(['smaller-aliquot', 'reassess-after-bolus', 'passive-leg-raise', 'mini-fluid-challenge', 'bedside-ultrasound', 'withdraw-bolus']),
      z.object({ label: text.max(120), description: text, text }),
    ),
    overrideReasonSystem: z.url(),
    sectionTitles: z.record(z.string(), text),
  })
  .superRefine((c, ctx) => {
    const codes = new Set(c.overrideReasons.map((r) => r.code));
    for (const k of c.kinds) {
      for (const r of k.overrideReasons ?? []) if (!codes.has(r)) ctx.addIssue({ code: 'custom', message: `kind ${k.id}: unknown override reason ${r}` });
    }
    const ids = c.kinds.map((k) => k.id);
    if (new Set(ids).size !== ids.length) ctx.addIssue({ code: 'custom', message: 'card kind ids must be unique' });
  });
export type Catalogue = z.infer<typeof catalogueSchema>;
export type CardKind = Catalogue['kinds'][number];

export const DEFAULT_CATALOGUE_PATH = fileURLToPath(new URL('../../cards/catalogue.json', import.meta.url));

export interface LoadedCatalogue {
  catalogue: Catalogue;
  /** sha256 of the file's bytes, first 12 hex digits. */
  digest: string;
}

export function loadCatalogue(path = DEFAULT_CATALOGUE_PATH): LoadedCatalogue {
  const raw = readFileSync(path);
  const parsed = catalogueSchema.safeParse(JSON.parse(raw.toString('utf8')));
  if (!parsed.success) {
    throw new Error(`card catalogue ${path} is invalid: ${parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ')}`);
  }
  return { catalogue: parsed.data, digest: createHash('sha256').update(raw).digest('hex').slice(0, 12) };
}

export function findKind(c: Catalogue, id: string): CardKind {
  const k = c.kinds.find((x) => x.id === id);
  if (!k) throw new Error(`card kind ${id} is not in the catalogue`);
  return k;
}
