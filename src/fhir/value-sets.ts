/**
 * Tidemark's value sets, kept as data in value-sets/*.json and validated when this module loads (a bad edit
 * fails at start-up): conditions that change fluid advice (SNOMED CT concepts and ICD-10 / ICD-10-CM codes and
 * ranges), SNOMED CT rhythm concepts, and RxNorm fluids. Every entry names its source or says from-memory.
 * They are part of the rules version (src/config/rules-version.ts): changing one changes the output.
 */
import { z } from 'zod';
import { CODED_ANSWERS } from './codes.js';
import { icd10Matches, isSnomedConceptId, normaliseIcd10 } from './code-match.js';
import rawConditions from './value-sets/conditions.json' with { type: 'json' };
import rawRhythm from './value-sets/rhythm.json' with { type: 'json' };
import rawFluids from './value-sets/fluids.json' with { type: 'json' };

/** The condition groups, in the order the file lists them (and texts name them). */
export const CONDITION_GROUP_IDS = [
  'advanced-liver-disease',
  'heart-failure',
  'end-stage-kidney-disease',
  'ards',
  'right-ventricular-failure',
  'pulmonary-hypertension',
] as const;
export type ConditionGroupId = (typeof CONDITION_GROUP_IDS)[number];

/** What a group means for the rules: it lowers fluid tolerance; a high PPV/SVV is doubtful (false positives). */
export const CONDITION_EFFECTS = ['lowers-tolerance', 'high-ppv-doubtful'] as const;
export type ConditionEffect = (typeof CONDITION_EFFECTS)[number];

const sourced = { display: z.string().min(1), source: z.string().min(1) };
const snomedEntry = z.strictObject({
  code: z.string().refine(isSnomedConceptId, 'not a SNOMED CT concept id (form, partition or Verhoeff check digit)'),
  ...sourced,
});
const icdCode = z.string().refine((c) => normaliseIcd10(c) !== undefined, 'not an ICD-10 code');
const icdEntry = z.union([z.strictObject({ code: icdCode, ...sourced }), z.strictObject({ from: icdCode, to: icdCode, ...sourced })]);

function sourcesKnown(
  sources: Record<string, string>,
  entries: ReadonlyArray<{ source: string }>,
  ctx: z.RefinementCtx,
  where: string,
): void {
  for (const e of entries) if (!(e.source in sources)) ctx.addIssue({ code: 'custom', message: `${where}: unknown source "${e.source}"` });
}

function sourcesUsed(sources: Record<string, string>, entries: ReadonlyArray<{ source: string }>, ctx: z.RefinementCtx): void {
  for (const k of Object.keys(sources))
    if (!entries.some((e) => e.source === k)) ctx.addIssue({ code: 'custom', message: `source "${k}" is not used` });
}

const conditionSetsSchema = z
  .strictObject({
    provenance: z.string().min(1),
    version: z.string(),
    icd10Systems: z.array(z.url()).min(1),
    snomedSystem: z.url(),
    activeStatuses: z.array(z.string()).min(1),
    sources: z.record(z.string(), z.string().min(1)),
    sets: z
      .array(
        z.strictObject({
          id: z.enum(CONDITION_GROUP_IDS),
          label: z.string().min(1),
          why: z.string().min(1),
          effects: z.array(z.enum(CONDITION_EFFECTS)).min(1),
          /** The published source of each effect beyond lowering tolerance (required for high-ppv-doubtful). */
          effectSources: z.partialRecord(z.enum(CONDITION_EFFECTS), z.string().min(1)).optional(),
          /** Groups whose members count as members of this one too (right-ventricular failure is a heart failure). */
          includes: z.array(z.enum(CONDITION_GROUP_IDS)).optional(),
          snomed: z.array(snomedEntry),
          icd10: z.array(icdEntry),
        }),
      )
      .min(1),
  })
  .superRefine((v, ctx) => {
    const ids = v.sets.map((s) => s.id);
    if (new Set(ids).size !== ids.length) ctx.addIssue({ code: 'custom', message: 'a condition group is listed twice' });
    for (const id of CONDITION_GROUP_IDS)
      if (!ids.includes(id)) ctx.addIssue({ code: 'custom', message: `condition group ${id} is missing` });
    sourcesUsed(
      v.sources,
      v.sets.flatMap((s) => [...s.snomed, ...s.icd10]),
      ctx,
    );
    for (const s of v.sets) {
      sourcesKnown(v.sources, [...s.snomed, ...s.icd10], ctx, s.id);
      if (s.effects.includes('high-ppv-doubtful') && !s.effectSources?.['high-ppv-doubtful']) {
        ctx.addIssue({ code: 'custom', message: `${s.id}: high-ppv-doubtful needs its source in effectSources` });
      }
      for (const inc of s.includes ?? []) {
        const target = v.sets.find((x) => x.id === inc);
        if (inc === s.id || target?.includes?.length)
          ctx.addIssue({ code: 'custom', message: `${s.id}: includes must be one level deep and not itself` });
      }
    }
  });
export type ConditionSets = z.infer<typeof conditionSetsSchema>;
export type ConditionSet = ConditionSets['sets'][number];

/** Validates condition value sets (throws with the reasons): a bad edit of the file stops start-up. */
export function parseConditionSets(raw: unknown): ConditionSets {
  return conditionSetsSchema.parse(raw);
}

/** The condition value sets (value-sets/conditions.json). */
export const CONDITION_SETS: ConditionSets = parseConditionSets(rawConditions);

export interface ConditionGroupHit {
  id: ConditionGroupId;
  label: string;
  coding: string;
}

type Coding = { system: string; code: string };

function inOwnEntries(c: Coding, set: ConditionSet, sets: ConditionSets): boolean {
  if (c.system === sets.snomedSystem) return set.snomed.some((s) => s.code === c.code.trim());
  if (sets.icd10Systems.includes(c.system)) return set.icd10.some((r) => icd10Matches(r, c.code));
  return false;
}

/** Whether a coding is in a group: its own entries or those of the groups it includes. */
export function codingInGroup(c: Coding, set: ConditionSet, sets: ConditionSets = CONDITION_SETS): boolean {
  if (inOwnEntries(c, set, sets)) return true;
  return (set.includes ?? []).some((id) => {
    const inc = sets.sets.find((s) => s.id === id);
    return inc !== undefined && inOwnEntries(c, inc, sets);
  });
}

/** The groups the codings of one condition fall in, in file order, each with the first coding that matched. */
export function matchConditionGroups(codings: readonly Coding[], sets: ConditionSets = CONDITION_SETS): ConditionGroupHit[] {
  const hits: ConditionGroupHit[] = [];
  for (const set of sets.sets) {
    const hit = codings.find((c) => codingInGroup(c, set, sets));
    if (hit) hits.push({ id: set.id, label: set.label, coding: `${hit.system}|${hit.code}` });
  }
  return hits;
}

/** What the matcher reads of a condition (the snapshot's ConditionEntry has it). */
export interface ConditionLike {
  ref: string;
  codings: readonly Coding[];
  clinicalStatus: string;
}

export interface ActiveConditionGroup {
  id: ConditionGroupId;
  label: string;
  effects: readonly ConditionEffect[];
  /** The active conditions that fall in the group (references, in snapshot order). */
  refs: string[];
  /** The coding of each, `system|code`, same order as refs. */
  codings: string[];
}

/**
 * The groups present among the active conditions (clinical status in `activeStatuses`), in file order.
 * For the rules: `activeConditionGroups(snapshot.conditions).filter((g) => g.effects.includes('high-ppv-doubtful'))`.
 */
export function activeConditionGroups(conditions: readonly ConditionLike[], sets: ConditionSets = CONDITION_SETS): ActiveConditionGroup[] {
  const found = new Map<ConditionGroupId, ActiveConditionGroup>();
  for (const c of conditions) {
    if (!sets.activeStatuses.includes(c.clinicalStatus)) continue;
    for (const h of matchConditionGroups(c.codings, sets)) {
      const set = sets.sets.find((s) => s.id === h.id)!;
      const slot = found.get(h.id) ?? { id: h.id, label: set.label, effects: set.effects, refs: [], codings: [] };
      slot.refs.push(c.ref);
      slot.codings.push(h.coding);
      found.set(h.id, slot);
    }
  }
  return sets.sets.filter((s) => found.has(s.id)).map((s) => found.get(s.id)!);
}

// ---- Rhythm ----

const rhythmSchema = z
  .strictObject({
    provenance: z.string().min(1),
    version: z.string(),
    snomedSystem: z.url(),
    sources: z.record(z.string(), z.string().min(1)),
    concepts: z
      .array(
        z.strictObject({
          code: snomedEntry.shape.code,
          answer: z.string().refine((a) => CODED_ANSWERS.heartRhythm.includes(a), 'not a heart-rhythm answer of CODED_ANSWERS'),
          ...sourced,
        }),
      )
      .min(1),
  })
  .superRefine((v, ctx) => {
    sourcesKnown(v.sources, v.concepts, ctx, 'rhythm');
    sourcesUsed(v.sources, v.concepts, ctx);
  });

/** SNOMED CT rhythm concepts and the Tidemark answer (CODED_ANSWERS.heartRhythm) each is read as. */
export const RHYTHM_SET = rhythmSchema.parse(rawRhythm);
const RHYTHM_BY_CODE = new Map(RHYTHM_SET.concepts.map((c) => [c.code, c.answer]));

/** The Tidemark rhythm answer of a SNOMED CT coding, or undefined when it is not on the list. */
export function rhythmAnswerOf(c: { system?: string | undefined; code?: string | undefined }): string | undefined {
  return c.system === RHYTHM_SET.snomedSystem && c.code ? RHYTHM_BY_CODE.get(c.code.trim()) : undefined;
}

// ---- Fluids ----

export const FLUID_CLASSES = ['balanced-crystalloid', 'saline', 'albumin-iso', 'albumin-hyper', 'other-colloid', 'other'] as const;
export type FluidClass = (typeof FLUID_CLASSES)[number];
const fluidsSchema = z
  .strictObject({
    provenance: z.string().min(1),
    version: z.string(),
    rxnormSystem: z.url(),
    sources: z.record(z.string(), z.string().min(1)),
    fluids: z
      .array(
        z.strictObject({
          rxcui: z
            .string()
            .regex(/^\d{1,8}$/)
            .optional(),
          name: z.string().min(1),
          fluidClass: z.enum(FLUID_CLASSES),
          source: z.string().min(1),
        }),
      )
      .min(1),
  })
  .superRefine((v, ctx) => {
    sourcesKnown(v.sources, v.fluids, ctx, 'fluids');
    sourcesUsed(v.sources, v.fluids, ctx);
  });

/** RxNorm clinical drugs of the common fluids (value-sets/fluids.json); those without rxcui are known by name only. */
export const FLUID_SET = fluidsSchema.parse(rawFluids);

/** The raw value-set files, for the rules-version digest. */
export const VALUE_SETS = { conditions: rawConditions, rhythm: rawRhythm, fluids: rawFluids } as const;
