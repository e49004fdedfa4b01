/**
 * What to say: Advice + snapshot + gathering outcomes → card models (rendered by render.ts with the catalogue).
 * Decides which card kinds apply; never branches on clinical thresholds (those are in assess/).
 */
import type { Advice, Finding } from '../assess/types.js';
import type { GatherOutcome } from '../fhir/gather.js';
import type { HookName } from '../hooks/schemas.js';
import type { PatientSnapshot } from '../snapshot/types.js';
import type { Catalogue } from './catalogue.js';
import type { CardModel } from './render.js';
import { kindLabel } from './render.js';

const GATHER_PROBLEM = new Set(['unavailable', 'http-error', 'timeout', 'network-error', 'not-fhir', 'truncated']);

/** Why a gathering key failed, in a prescriber's words. */
function gatherWhy(o: GatherOutcome): string {
  switch (o.status) {
    case 'timeout': return 'the FHIR server did not answer within the time budget';
    case 'http-error': return `the FHIR server answered with an error (${o.httpStatus ?? '?'})`;
    case 'network-error': return 'the FHIR server could not be reached';
    case 'not-fhir': return 'the FHIR server sent something that is not FHIR';
    case 'truncated': return `only part of the data was read (${o.detail ?? 'paging stopped'})`;
    case 'unavailable': return o.detail ?? 'not sent and no FHIR server to ask';
    default: return o.detail ?? o.status;
  }
}

export interface ComposeInput {
  hook: HookName;
  advice: Advice;
  snapshot: PatientSnapshot;
  gathering: GatherOutcome[];
  purposes: Record<string, string>;
  catalogue: Catalogue;
}

export function gapsOf(advice: Advice, snapshot: PatientSnapshot, gathering: GatherOutcome[], purposes: Record<string, string>): CardModel['gaps'] {
  const gaps: CardModel['gaps'] = [];
  for (const o of gathering) if (GATHER_PROBLEM.has(o.status)) gaps.push({ what: `Data: ${purposes[o.key] ?? o.key}`, why: gatherWhy(o) });
  for (const f of advice.findings) if (f.status === 'not-assessed') gaps.push({ what: f.text.replace(/: not assessed.*$/, ''), why: f.reason ?? 'not assessed' });
  for (const e of snapshot.excluded) gaps.push({ what: `${e.kind ? kindLabel(e.kind) : 'Resource'} (${e.ref})`, why: `left out: ${e.detail}` });
  for (const e of advice.ruleErrors) gaps.push({ what: `Rule ${e.ruleId}`, why: 'failed on this data and was skipped' });
  return gaps;
}

function evidenceOf(findings: Finding[]): CardModel['evidence'] {
  return findings.filter((f) => f.status === 'assessed' && f.evidence.length).map((f) => ({ finding: f.text, evidence: f.evidence }));
}

/** True when the data the advice depends on could not be gathered at all. */
function nothingToGoOn(advice: Advice, gathering: GatherOutcome[]): GatherOutcome | undefined {
  const assessed = advice.findings.some((f) => f.status === 'assessed');
  if (assessed) return undefined;
  return gathering.find((o) => GATHER_PROBLEM.has(o.status));
}

export function composeCards(input: ComposeInput): CardModel[] {
  const { hook, advice, snapshot, gathering, purposes, catalogue } = input;
  const ph = catalogue.phrases;
  const orderHook = hook === 'order-select' || hook === 'order-sign';
  const fluidOrders = snapshot.draftOrders.filter((o) => o.selected && o.isFluid);
  if (orderHook && fluidOrders.length === 0) return []; // not a fluid bolus: no fluid card

  const gaps = gapsOf(advice, snapshot, gathering, purposes);
  const failed = nothingToGoOn(advice, gathering);
  if (failed) {
    return [{ kind: 'assessment-gap', vars: { gapReason: gatherWhy(failed) }, conclusion: [], evidence: [], gaps, order: [], suggestions: [] }];
  }

  const r = advice.responsiveness?.value ?? 'unassessed';
  const t = advice.tolerance?.value ?? 'unassessed';
  const responsivenessPhrase = ph.responsiveness[r];
  const tolerancePhrase = ph.tolerance[t];
  const conclusion: string[] = [];
  if (advice.responsiveness) conclusion.push(`${responsivenessPhrase}: ${advice.responsiveness.rationale}`);
  if (advice.tolerance) conclusion.push(`${tolerancePhrase[0]?.toUpperCase()}${tolerancePhrase.slice(1)}: ${advice.tolerance.rationale}`);
  if (advice.responsiveness?.nextTest) conclusion.push(`What would settle it: ${advice.responsiveness.nextTest}`);
  for (const f of advice.findings) if (f.status === 'assessed' && f.topic === 'perfusion') conclusion.push(f.text);

  const vars: Record<string, string> = {
    responsivenessPhrase,
    responsivenessPhraseLower: responsivenessPhrase.toLowerCase(),
    tolerancePhrase,
    tolerance: t,
    responsiveness: r,
    headline: 'review the evidence below before more volume',
    balancePhrase: '',
    indicator: 'info',
  };
  return [
    {
      kind: orderHook ? 'bolus-review' : 'fluid-overview',
      vars,
      conclusion,
      evidence: evidenceOf(advice.findings),
      gaps,
      order: fluidOrders.map((o) => `${o.display ?? 'IV fluid'}${o.volumeMl ? `, ${Math.round(o.volumeMl)} mL` : ''}${o.volumeProblem ? ` (${o.volumeProblem})` : ''}`),
      suggestions: [],
    },
  ];
}
