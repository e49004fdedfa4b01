/**
 * The card catalogue (cards/catalogue.json): card kinds, text templates, indicator rules, override reasons.
 * Data, not code, so clinicians can review and change wording without a release; validated with zod at
 * start-up; its digest is part of the rules version.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { z } from 'zod';
import { ADVICE_ACTIONS, ALTERNATIVES, HEADLINE_KEYS } from '../assess/advice/types.js';
import { NEXT_TESTS } from '../assess/types.js';
import { CODED_ANSWERS } from '../fhir/codes.js';

const text = z.string().min(1);

/** An object with exactly these keys, each a text: a missing or unknown key stops start-up. */
function closedSet<K extends string>(keys: readonly K[], value: z.ZodType<string> = text): z.ZodType<Record<K, string>> {
  return z.strictObject(Object.fromEntries(keys.map((k) => [k, value])) as Record<K, z.ZodType<string>>) as unknown as z.ZodType<
    Record<K, string>
  >;
}

/** Suggestion kinds the composer can offer (closed set). */
export const SUGGESTION_KINDS = [
  'smaller-aliquot',
  'reassess-after-bolus',
  'passive-leg-raise',
  'mini-fluid-challenge',
  'tidal-volume-challenge',
  'end-expiratory-occlusion',
  'bedside-ultrasound',
  'withdraw-bolus',
] as const;
export type SuggestionKind = (typeof SUGGESTION_KINDS)[number];
const indicator = z.enum(['info', 'warning', 'critical']);
/** One line of the pop-up's detail (our own bound, well under the 900 characters of the whole detail). */
const line = text.max(160);

/** Wording of each answer code of each coded kind (closed sets: src/fhir/codes.ts CODED_ANSWERS): no code reaches a card. */
const answersSchema = z.strictObject(
  Object.fromEntries(Object.entries(CODED_ANSWERS).map(([kind, codes]) => [kind, closedSet(codes)])) as Record<
    keyof typeof CODED_ANSWERS,
    z.ZodType<Record<string, string>>
  >,
);

/** The pop-up card's words (src/cards/compose.ts builds its lines from these; docs/integration.md shows one). */
const popupSchema = z.strictObject({
  labels: z.strictObject({ responsiveness: text, tolerance: text, need: text }),
  responsiveness: z.strictObject({ likely: text, unlikely: text, indeterminate: text, unassessed: text }),
  confidence: z.strictObject({ high: text, moderate: text, low: text }),
  tolerance: z.strictObject({ adequate: text, limited: text, poor: text, 'not-known': text, unassessed: text }),
  coverage: text,
  need: z.strictObject({ present: text, absent: text, unknown: text }),
  earlyPhase: text,
  assumed: line,
  timeAssumed: text,
  settle: line,
  settleFallback: line,
  caution: line,
  reasoningLink: text,
  docsLink: text,
  orderProblem: line,
  notAvailable: line,
  dataMissing: line,
});

export const catalogueSchema = z
  .object({
    catalogueVersion: text,
    source: z.object({ label: text, topic: z.object({ system: text, code: text, display: text }).optional() }),
    cautions: z.array(text).min(1),
    phrases: z.object({
      responsiveness: z.strictObject({ likely: text, unlikely: text, indeterminate: text, unassessed: text }),
      tolerance: z.strictObject({ adequate: text, limited: text, poor: text, 'not-known': text, unassessed: text }),
      confidence: z.strictObject({ high: text, moderate: text, low: text }),
      need: z.strictObject({ present: text, absent: text, unknown: text }),
      phase: z.strictObject({ 'early-resuscitation': text, later: text }),
      overloadPercent: text,
      balanceMl: text,
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
          docsPage: text,
          overrideReasons: z.array(text).optional(),
        }),
      )
      .min(1),
    overrideReasons: z.array(z.object({ code: z.string().regex(/^[a-z][a-z0-9-]*$/), display: text })),
    /** Card headline per headline key of the advice (closed set: src/assess/advice/types.ts HEADLINE_KEYS). */
    headlines: closedSet(HEADLINE_KEYS, text.max(120)),
    /** Wording of each alternative code (closed set: ALTERNATIVES). */
    alternatives: closedSet(ALTERNATIVES),
    /** Wording of each next-test kind, as the card names it (closed set: NEXT_TESTS). */
    nextTests: closedSet(NEXT_TESTS),
    /** Suggestion wording per suggestion kind: label, action description, text of the FHIR resource. */
    suggestions: z.strictObject(
      Object.fromEntries(SUGGESTION_KINDS.map((k) => [k, z.object({ label: text.max(120), description: text, text })])) as Record<
        SuggestionKind,
        z.ZodObject<{ label: z.ZodString; description: z.ZodString; text: z.ZodString }>
      >,
    ),
    /** The pop-up card's words. */
    popup: popupSchema,
    /** Each test as the gap line names it, sentence start (closed set: NEXT_TESTS). */
    testNames: closedSet(NEXT_TESTS),
    /** Each test's positive and negative result at its published threshold, in the gap line's words. */
    testResults: z.strictObject(
      Object.fromEntries(NEXT_TESTS.map((k) => [k, z.strictObject({ positive: text, negative: text })])) as Record<
        (typeof NEXT_TESTS)[number],
        z.ZodObject<{ positive: z.ZodString; negative: z.ZodString }>
      >,
    ),
    /** What the advice would then be, per action (closed set: ADVICE_ACTIONS). */
    actionWords: closedSet(ADVICE_ACTIONS),
    /** What responsiveness would then be (patient view: no action). */
    verdictWords: z.strictObject({ likely: text, unlikely: text, indeterminate: text }),
    answers: answersSchema,
    overrideReasonSystem: z.url(),
  })
  .superRefine((c, ctx) => {
    const codes = new Set(c.overrideReasons.map((r) => r.code));
    for (const k of c.kinds) {
      for (const r of k.overrideReasons ?? [])
        if (!codes.has(r)) ctx.addIssue({ code: 'custom', message: `kind ${k.id}: unknown override reason ${r}` });
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
