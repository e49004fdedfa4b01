// The snapshot's readers (src/snapshot/readers/): one per resource type, each a pure function of the resource and a
// read context that returns what it found and what it left out; buildSnapshot only merges and sorts (issue 15 item 3).
import type { MedicationRequest } from 'fhir/r4.js';
import { describe, expect, it } from 'vitest';
import * as b from '../../examples/lib/fhir-builders.js';
import { evidenceEvents } from '../../src/assess/common/events.js';
import { EMPTY_SITE_MAP } from '../../src/fhir/site-map.js';
import { buildSnapshot } from '../../src/snapshot/normalize.js';
import { readAdministration } from '../../src/snapshot/readers/administration.js';
import { readDraftOrders } from '../../src/snapshot/readers/draft-orders.js';
import type { ReadContext } from '../../src/snapshot/readers/context.js';
import { readActiveRequest } from '../../src/snapshot/readers/medication-request.js';
import { readObservation } from '../../src/snapshot/readers/observation.js';

const now = new Date('2026-11-20T14:00:00Z');
const P = 'pat-r1';
const t = (m: number) => b.minutesAgo(now, m);
const ctx: ReadContext = { now, nowMs: now.getTime(), patientRef: `Patient/${P}`, siteMap: EMPTY_SITE_MAP };

function noradrenalineOrder(id: string, authoredOn?: string): MedicationRequest {
  return {
    resourceType: 'MedicationRequest',
    id,
    status: 'active',
    intent: 'order',
    subject: { reference: `Patient/${P}` },
    medicationCodeableConcept: {
      coding: [{ system: 'http://www.nlm.nih.gov/research/umls/rxnorm', code: '7512', display: 'norepinephrine' }],
    },
    ...(authoredOn ? { authoredOn } : {}),
    dosageInstruction: [{ doseAndRate: [{ rateQuantity: { value: 0.1, unit: 'ug/kg/min' } }] }],
  };
}

describe('readers return what they found and what they left out', () => {
  it('an Observation: one measurement, nothing left out', () => {
    const r = readObservation(b.numeric('hr-1', P, 'heartRate', 92, t(10)), 'Observation/hr-1', ctx);
    expect(r.measurements).toEqual([expect.objectContaining({ kind: 'heartRate', value: 92, ageMinutes: 10, ref: 'Observation/hr-1' })]);
    expect(r.excluded ?? []).toEqual([]);
  });

  it('an Observation with a period start that is not a time is left out as malformed, with the reason', () => {
    const o = {
      ...b.numeric('uo-1', P, 'urineOutput', 40, t(10)),
      effectiveDateTime: undefined,
      effectivePeriod: { start: 'yesterday', end: t(10) },
    };
    const r = readObservation(o, 'Observation/uo-1', ctx);
    expect(r.measurements ?? []).toEqual([]);
    expect(r.excluded).toEqual([
      { ref: 'Observation/uo-1', reason: 'malformed', detail: 'could not be read: the period start is not a date-time' },
    ]);
  });

  it('an administration whose end is unusable still counts from its start; the end is left out with its reason', () => {
    const m = b.administration('ma-1', P, b.FLUIDS.lactatedRinger, 500, t(60), new Date(now.getTime() + 3600_000).toISOString());
    const r = readAdministration(m, 'MedicationAdministration/ma-1', ctx);
    expect(r.fluids).toEqual([expect.objectContaining({ volumeMl: 500, end: r.fluids?.[0]?.start })]);
    expect(r.excluded).toEqual([expect.objectContaining({ reason: 'future-time' })]);
  });

  it('the same resource read twice gives equal results (no state kept between calls)', () => {
    const o = b.numeric('lac-1', P, 'lactate', 3.1, t(30));
    expect(readObservation(o, 'Observation/lac-1', ctx)).toEqual(readObservation(o, 'Observation/lac-1', ctx));
  });
});

describe("a draft order's duration", () => {
  const order = (duration: number, durationUnit: string) => ({
    resourceType: 'MedicationRequest',
    id: 'mr-d',
    status: 'draft',
    intent: 'order',
    subject: { reference: `Patient/${P}` },
    medicationCodeableConcept: b.FLUIDS.lactatedRinger,
    dosageInstruction: [
      {
        route: { text: 'IV' },
        timing: { repeat: { duration, durationUnit } },
        doseAndRate: [{ doseQuantity: { value: 500, unit: 'mL', system: 'http://unitsofmeasure.org', code: 'mL' } }],
      },
    ],
  });
  it('is read in minutes (2 h → 120 min)', () => {
    expect(readDraftOrders({ draftOrders: { entry: [{ resource: order(2, 'h') }] } }).orders[0]?.durationMin).toBe(120);
  });
  it('longer than a week is not a plausible order and is not read (found by the fuzz test: 1e308 min broke the card times)', () => {
    const o = readDraftOrders({ draftOrders: { entry: [{ resource: order(1e308, 'min') }, { resource: order(8, 'd') }] } }).orders;
    expect(o.map((x) => x.durationMin)).toEqual([undefined, undefined]);
    expect(o[0]?.volumeMl).toBe(500);
  });
});

describe('an active vasoactive order without authoredOn', () => {
  it('has no start, rather than the time of the call', () => {
    const r = readActiveRequest(noradrenalineOrder('mr-1'), 'MedicationRequest/mr-1', ctx);
    expect(r.vasoactives).toEqual([
      { ref: 'MedicationRequest/mr-1', drug: 'norepinephrine', status: 'active', rate: { value: 0.1, unit: 'ug/kg/min' } },
    ]);
  });

  it('is not read as a dose change at this moment (which would set aside every test taken before it)', () => {
    const s = buildSnapshot(
      [noradrenalineOrder('mr-1'), b.dynamicTest('plr-1', P, 'plr', 'cardiacOutput', 5, 5.8, t(20))] as never,
      { patientId: P },
      now,
    );
    expect(s.vasoactives).toHaveLength(1);
    expect(evidenceEvents(s, now, 100).filter((e) => e.kind === 'vasoactive-change')).toEqual([]);
  });

  it('with authoredOn, starts then, and a start inside the span is a change', () => {
    const s = buildSnapshot([noradrenalineOrder('mr-2', t(15))] as never, { patientId: P }, now);
    expect(s.vasoactives[0]?.start).toBe(new Date(now.getTime() - 15 * 60_000).toISOString());
    expect(evidenceEvents(s, now, 100).filter((e) => e.kind === 'vasoactive-change')).toHaveLength(1);
  });
});
