/**
 * Events that make evidence old (docs/clinical-logic/index.md, "Events make evidence old"): a fluid of at least
 * `fluidEventMinMl` (default 100 mL) started, or a vasoactive started, stopped or changed in rate. A dynamic test or
 * a PPV/SVV taken before such an event no longer describes the patient and is set aside with that reason.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { Evidence } from './finding.js';
import { compareText, evidenceOfFluid, evidenceOfVasoactive, timeMs, usableTime } from './select.js';
import { fmt } from './text.js';
import { vasoactiveChangesBetween } from './vasoactive-changes.js';

export interface EvidenceEvent {
  kind: 'fluid' | 'vasoactive-change';
  at: string;
  atMs: number;
  /** "500 mL balanced-crystalloid started 2026-…", "norepinephrine rate changed at …". */
  text: string;
  evidence: Evidence;
}

/** All events, newest first (ties by reference). */
export function evidenceEvents(s: PatientSnapshot, now: Date, fluidEventMinMl: number): EvidenceEvent[] {
  const out: EvidenceEvent[] = [];
  for (const f of s.fluids) {
    if (f.volumeMl < fluidEventMinMl || !usableTime(f.start, now)) continue;
    if (f.status !== 'completed' && f.status !== 'in-progress') continue;
    out.push({ kind: 'fluid', at: f.start, atMs: timeMs(f.start), text: `${fmt(f.volumeMl)} mL ${f.display || 'IV fluid'} started at ${f.start}`, evidence: evidenceOfFluid(f, now) });
  }
  for (const c of vasoactiveChangesBetween(s.vasoactives, -Infinity, now.getTime())) {
    out.push({ kind: 'vasoactive-change', at: c.at, atMs: c.atMs, text: `${c.drug.drug} ${c.kind} at ${c.at}`, evidence: evidenceOfVasoactive(c.drug, now) });
  }
  return out.sort((a, b) => b.atMs - a.atMs || compareText(a.evidence.ref, b.evidence.ref));
}
