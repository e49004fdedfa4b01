/**
 * The filters on what a record says (its most urgent card indicator, its verdicts, its cards' feedback), as query
 * parameters: one schema for the console's advice list and the audit API's `GET /audit/advice`, and the store
 * query they make (AdviceQuery; SQL in src/audit/sql/where.ts `recordFilters`). `none`: the record has no such value.
 */
import { z } from 'zod';
import type { AdviceQuery, FeedbackFilter, TopIndicator } from '../audit/types.js';

/** A parameter sent empty (a form's blank choice) counts as absent. */
export const blankAsAbsent = <T extends z.ZodType>(t: T) => z.preprocess((v) => (v === '' ? undefined : v), t.optional());

export const recordFilterFields = {
  indicator: blankAsAbsent(z.enum(['critical', 'warning', 'info', 'none'])),
  responsiveness: blankAsAbsent(z.enum(['likely', 'unlikely', 'indeterminate', 'none'])),
  tolerance: blankAsAbsent(z.enum(['adequate', 'limited', 'poor', 'not-known', 'none'])),
  feedback: blankAsAbsent(z.enum(['accepted', 'overridden', 'none'])),
};

export interface RecordFilterValues {
  indicator?: string | undefined;
  responsiveness?: string | undefined;
  tolerance?: string | undefined;
  feedback?: string | undefined;
}

/** The filters given, as the store's query fields (absent ones left out). */
export function recordFilterQuery(d: RecordFilterValues): Pick<AdviceQuery, 'indicator' | 'responsiveness' | 'tolerance' | 'feedback'> {
  return {
    ...(d.indicator ? { indicator: d.indicator as TopIndicator } : {}),
    ...(d.responsiveness ? { responsiveness: d.responsiveness } : {}),
    ...(d.tolerance ? { tolerance: d.tolerance } : {}),
    ...(d.feedback ? { feedback: d.feedback as FeedbackFilter } : {}),
  };
}
