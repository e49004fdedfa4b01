/**
 * The card pipeline in-process, as src/hooks/evaluate.ts runs it (snapshot → advice → card models → CDS cards), for
 * tests that change the advice by hand (a `whatIf` of their own) or feed hostile text without an HTTP round trip.
 */
import type { FhirResource } from 'fhir/r4.js';
import { assess } from '../../src/assess/assess.js';
import { resolveThresholds } from '../../src/assess/thresholds.js';
import type { Advice } from '../../src/assess/types.js';
import { loadCatalogue } from '../../src/cards/catalogue.js';
import { composeCards } from '../../src/cards/compose.js';
import { renderCard } from '../../src/cards/render.js';
import type { GatherOutcome } from '../../src/hooks/gather-types.js';
import type { Card, HookName } from '../../src/hooks/schemas.js';
import { buildSnapshot } from '../../src/snapshot/normalize.js';
import type { PatientSnapshot } from '../../src/snapshot/types.js';

export const catalogue = loadCatalogue().catalogue;
export const PUBLIC_URL = 'https://tidemark.example.test';
export const ADVICE_URL = `${PUBLIC_URL}/advice/adv-1?exp=1&sig=abc`;

export interface PipelineInput {
  resources: readonly FhirResource[];
  patientId: string;
  encounterId?: string;
  draftOrders?: readonly unknown[];
  hook?: HookName;
  now: Date;
  timeZone?: string;
  gathering?: GatherOutcome[];
  /** Change the advice before the cards are composed (e.g. a hand-built whatIf). */
  edit?: (a: Advice) => Advice;
}

export function snapshotOf(i: PipelineInput): PatientSnapshot {
  return buildSnapshot(
    i.resources as FhirResource[],
    {
      patientId: i.patientId,
      ...(i.encounterId ? { encounterId: i.encounterId } : {}),
      ...(i.draftOrders ? { draftOrders: { entry: i.draftOrders.map((resource) => ({ resource })) } } : {}),
    },
    i.now,
  );
}

export function cardsOf(i: PipelineInput): { advice: Advice; snapshot: PatientSnapshot; cards: Card[] } {
  const snapshot = snapshotOf(i);
  const raw = assess(snapshot, i.now, resolveThresholds(), 'test');
  const advice = i.edit ? i.edit(raw) : raw;
  const hook = i.hook ?? 'order-select';
  const models = composeCards({
    hook,
    advice,
    snapshot,
    gathering: i.gathering ?? [],
    purposes: { vitals: 'vital signs', labs: 'laboratory results' },
    catalogue,
    context: { patientId: i.patientId, userId: 'Practitioner/dr-test', ...(i.encounterId ? { encounterId: i.encounterId } : {}) },
    ...(i.timeZone ? { timeZone: i.timeZone } : {}),
  });
  const cards = models.map((m) =>
    renderCard(m, catalogue, { hook, publicUrl: PUBLIC_URL, adviceLink: { label: 'Full reasoning', url: ADVICE_URL } }),
  );
  return { advice, snapshot, cards };
}
