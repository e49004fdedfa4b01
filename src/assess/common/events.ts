/**
 * Events that make evidence old (docs/clinical-logic/index.md, "Events make evidence old"): a fluid of at least
 * `fluidEventMinMl` (default 100 mL) started, or a vasoactive started, stopped or changed in rate. A dynamic test or
 * a PPV/SVV taken before such an event no longer describes the patient and is set aside with that reason.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { EvidenceEvent } from './evidence.js';
import { compareText, evidenceOfFluid, evidenceOfVasoactive, timeMs, usableTime } from './select.js';
import { fmt } from './text.js';
import { vasoactiveChangesBetween } from './vasoactive-changes.js';

export type { EvidenceEvent };

/** All events, newest first (ties by reference). */
export function evidenceEvents(s: PatientSnapshot, now: Date, fluidEventMinMl: number): EvidenceEvent[] {
  const out: EvidenceEvent[] = [];
  for (const f of s.fluids) {
    if (f.volumeMl < fluidEventMinMl || !usableTime(f.start, now)) continue;
    if (f.status !== 'completed' && f.status !== 'in-progress') continue;
    out.push({
      kind: 'fluid',
      at: f.start,
      atMs: timeMs(f.start),
      text: `${fmt(f.volumeMl)} mL ${f.display || 'IV fluid'} started at ${f.start}`,
      evidence: evidenceOfFluid(f, now),
    });
  }
  for (const c of vasoactiveChangesBetween(s.vasoactives, -Infinity, now.getTime())) {
    out.push({
      kind: 'vasoactive-change',
      change: c.kind,
      at: c.at,
      atMs: c.atMs,
      text: `${c.drug.drug} ${c.kind} at ${c.at}`,
      evidence: evidenceOfVasoactive(c.drug, now),
      ...(c.previous ? { previous: evidenceOfVasoactive(c.previous, now) } : {}),
    });
  }
  // Ties: by reference, then a start before a rate change, so that the event named does not depend on whether a
  // second record of the same moment exists (a rate change is derived from a pair of records).
  return out.sort(
    (a, b) => b.atMs - a.atMs || compareText(a.evidence.ref, b.evidence.ref) || rank(a) - rank(b) || compareText(a.text, b.text),
  );
}

const CHANGE_RANK = { started: 0, stopped: 1, 'rate changed': 2 } as const;
function rank(e: EvidenceEvent): number {
  return e.change === undefined ? -1 : CHANGE_RANK[e.change];
}
