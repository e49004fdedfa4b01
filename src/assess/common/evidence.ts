/** The evidence types the finding, the picker and the events share: a leaf, so those three need not import each other's types. */
import type { FhirRef } from '../../snapshot/types.js';

/** One piece of evidence a finding used: which resource, which value, when. */
export interface Evidence {
  ref: FhirRef;
  /** Measurement kind or a description (e.g. 'heartRate', 'plr:cardiacOutput'). */
  kind: string;
  value: number | string;
  unit?: string;
  effective: string;
  ageMinutes: number;
}

/** An event that sets evidence taken before it aside (src/assess/common/events.ts). */
export interface EvidenceEvent {
  kind: 'fluid' | 'vasoactive-change';
  /** For a vasoactive change: which kind (a start sorts before a rate change at the same moment). */
  change?: 'started' | 'stopped' | 'rate changed';
  at: string;
  atMs: number;
  /** "500 mL balanced-crystalloid started 2026-…", "norepinephrine rate changed at …". */
  text: string;
  evidence: Evidence;
  /** For a rate change: the entry before it, cited too (the change is read from the pair). */
  previous?: Evidence;
}

/** What the picker (src/assess/common/select.ts) found for one kind in its window. */
export type Selection<T> =
  | { state: 'fresh'; item: T; ageMinutes: number; windowMin: number }
  | { state: 'stale'; item: T; ageMinutes: number; windowMin: number }
  | { state: 'set-aside'; item: T; ageMinutes: number; windowMin: number; event: EvidenceEvent }
  | { state: 'invalid'; item: T; ageMinutes: number; windowMin: number; detail: string }
  | { state: 'missing'; windowMin: number };

export type Unusable<T> = Exclude<Selection<T>, { state: 'fresh' }>;
