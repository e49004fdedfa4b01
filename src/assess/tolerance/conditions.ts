/**
 * Rule tolerance.conditions: active conditions that lower fluid tolerance — advanced liver disease, heart
 * failure, end-stage kidney disease or dialysis, ARDS — matched against Tidemark's own value sets kept as
 * data (condition-sets.json; SNOMED CT codes exactly, ICD-10 by prefix). Each is a moderate limit: the
 * diagnosis narrows the margin, the bedside markers show how much.
 */
import { z } from 'zod';
import type { ConditionEntry, PatientSnapshot } from '../../snapshot/types.js';
import type { Evidence, ToleranceFinding } from '../common/finding.js';
import rawSets from './condition-sets.json' with { type: 'json' };
import { assessed, notAssessed } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { ageMinutesRounded } from '../common/select.js';

export const CONDITIONS = 'tolerance.conditions';

const codeSchema = z.strictObject({ code: z.string().min(1), display: z.string() });
const conditionSetsSchema = z.strictObject({
  provenance: z.string().min(1),
  version: z.string(),
  icd10Systems: z.array(z.url()).min(1),
  snomedSystem: z.url(),
  activeStatuses: z.array(z.string()).min(1),
  sets: z.array(z.strictObject({
    id: z.string().regex(/^[a-z0-9-]+$/),
    label: z.string().min(1),
    why: z.string().min(1),
    snomed: z.array(codeSchema.extend({ code: z.string().regex(/^\d{6,18}$/) })),
    icd10Prefixes: z.array(codeSchema.extend({ code: z.string().regex(/^[A-Z]\d{2}(\.\d{1,4})?$/) })),
  })).min(1),
});
export type ConditionSets = z.infer<typeof conditionSetsSchema>;

/** The value sets, validated when the module loads so that a bad edit of the JSON fails at start-up. */
export const CONDITION_SETS: ConditionSets = conditionSetsSchema.parse(rawSets);

const SOURCE = `Tidemark value sets v${CONDITION_SETS.version} (condition-sets.json; codes from memory, to verify against SNOMED CT and ICD-10 releases); conservative fluids in ARDS: FACTT, N Engl J Med 2006;354:2564`;

function normIcd(code: string): string {
  return code.replace(/\./g, '').trim().toUpperCase();
}

/** Set ids an entry matches (SNOMED exact, ICD-10 by prefix). */
export function matchConditionSets(entry: ConditionEntry, sets: ConditionSets = CONDITION_SETS): Array<{ id: string; label: string; coding: string }> {
  const hits: Array<{ id: string; label: string; coding: string }> = [];
  for (const set of sets.sets) {
    const hit = entry.codings.find((c) =>
      (c.system === sets.snomedSystem && set.snomed.some((s) => s.code === c.code.trim())) ||
      (sets.icd10Systems.includes(c.system) && set.icd10Prefixes.some((p) => normIcd(c.code).startsWith(normIcd(p.code)))));
    if (hit) hits.push({ id: set.id, label: set.label, coding: `${hit.system}|${hit.code}` });
  }
  return hits;
}

export function conditionsRule(snapshot: PatientSnapshot, now: Date, _t: ToleranceThresholds): ToleranceFinding[] {
  const active = snapshot.conditions
    .filter((c) => CONDITION_SETS.activeStatuses.includes(c.clinicalStatus))
    .sort((a, b) => (a.ref < b.ref ? -1 : a.ref > b.ref ? 1 : 0));
  if (active.length === 0) {
    const reason = snapshot.conditions.length === 0 ? 'no conditions recorded' : 'no active condition recorded';
    return [notAssessed(CONDITIONS, 'conditions', 'Conditions that lower tolerance not assessed', reason, SOURCE)];
  }
  const matched = new Map<string, { label: string; why: string; entries: ConditionEntry[] }>();
  const evidence: Evidence[] = [];
  for (const c of active) {
    const hits = matchConditionSets(c);
    for (const h of hits) {
      const set = CONDITION_SETS.sets.find((s) => s.id === h.id)!;
      const slot = matched.get(h.id) ?? { label: set.label, why: set.why, entries: [] };
      slot.entries.push(c);
      matched.set(h.id, slot);
    }
    if (hits.length > 0) {
      const when = c.onset ?? snapshot.now;
      evidence.push({ ref: c.ref, kind: 'condition', value: hits.map((h) => h.coding).join(' '), effective: when, ageMinutes: ageMinutesRounded(when, now) });
    }
  }
  if (matched.size === 0) {
    return [assessed({
      ruleId: CONDITIONS, domain: 'conditions', limit: 'none',
      text: `None of ${active.length} active condition(s) is on the lists that lower fluid tolerance`,
      values: { activeConditions: active.length, matchedSets: '' }, evidence: [], source: SOURCE,
    })];
  }
  // Set order as in the JSON file, so that the text does not depend on the order of conditions.
  const ordered = CONDITION_SETS.sets.filter((s) => matched.has(s.id)).map((s) => ({ id: s.id, ...matched.get(s.id)! }));
  return [assessed({
    ruleId: CONDITIONS, domain: 'conditions', limit: 'moderate',
    text: `Recorded ${ordered.map((m) => m.label).join('; ')}: ${ordered.map((m) => m.why).join('; ')}`,
    values: { activeConditions: active.length, matchedSets: ordered.map((m) => m.id).join(',') },
    evidence, source: SOURCE,
  })];
}
