/**
 * Rule tolerance.conditions: active conditions that lower fluid tolerance — advanced liver disease, heart
 * failure, end-stage kidney disease or dialysis, ARDS, right-ventricular failure, pulmonary hypertension —
 * matched against Tidemark's value sets kept as data (src/fhir/value-sets/conditions.json: SNOMED CT concepts
 * with their common descendants, ICD-10 / ICD-10-CM codes and ranges, each entry with its source). Each is a
 * moderate limit: the diagnosis narrows the margin, the bedside markers show how much.
 */
import type { ConditionEntry, PatientSnapshot } from '../../snapshot/types.js';
import type { Evidence, ToleranceFinding } from '../common/finding.js';
import { CONDITION_SETS, matchConditionGroups, type ConditionGroupHit, type ConditionSets } from '../../fhir/value-sets.js';
import { ageMinutesRounded as ageMinutesAt } from '../common/select.js';
import { assessed, notAssessed } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';

export const CONDITIONS = 'tolerance.conditions';

export { CONDITION_SETS, type ConditionSets };
export {
  activeConditionGroups,
  CONDITION_GROUP_IDS,
  type ActiveConditionGroup,
  type ConditionEffect,
  type ConditionGroupId,
} from '../../fhir/value-sets.js';

const SOURCE = `Tidemark value sets v${CONDITION_SETS.version} (src/fhir/value-sets/conditions.json; each code with its source, some from memory); conservative fluids in ARDS: FACTT, N Engl J Med 2006;354:2564`;

/** Set ids an entry matches (SNOMED CT concepts as listed, ICD-10 codes and ranges; see src/fhir/code-match.ts). */
export function matchConditionSets(entry: ConditionEntry, sets: ConditionSets = CONDITION_SETS): ConditionGroupHit[] {
  return matchConditionGroups(entry.codings, sets);
}

export function conditionsRule(snapshot: PatientSnapshot, now: Date, _t: ToleranceThresholds): ToleranceFinding[] {
  const active = snapshot.conditions
    .filter((c) => CONDITION_SETS.activeStatuses.includes(c.clinicalStatus))
    .sort((a, b) => Number(a.ref > b.ref) - Number(a.ref < b.ref));
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
      evidence.push({
        ref: c.ref,
        kind: 'condition',
        value: hits.map((h) => h.coding).join(' '),
        effective: when,
        ageMinutes: ageMinutesAt(when, now),
      });
    }
  }
  if (matched.size === 0) {
    return [
      assessed({
        ruleId: CONDITIONS,
        domain: 'conditions',
        limit: 'none',
        text: `None of ${active.length} active condition(s) is on the lists that lower fluid tolerance`,
        values: { activeConditions: active.length, matchedSets: '' },
        evidence: [],
        source: SOURCE,
      }),
    ];
  }
  // Set order as in the JSON file, so that the text does not depend on the order of conditions.
  const ordered = CONDITION_SETS.sets.filter((s) => matched.has(s.id)).map((s) => ({ id: s.id, ...matched.get(s.id)! }));
  return [
    assessed({
      ruleId: CONDITIONS,
      domain: 'conditions',
      limit: 'moderate',
      text: `Recorded ${ordered.map((m) => m.label).join('; ')}: ${ordered.map((m) => m.why).join('; ')}`,
      values: { activeConditions: active.length, matchedSets: ordered.map((m) => m.id).join(',') },
      evidence,
      source: SOURCE,
    }),
  ];
}
