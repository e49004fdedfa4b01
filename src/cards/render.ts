/**
 * Rendering: a CardModel (what to say, built from Advice) + the catalogue (how to say it) → a CDS Hooks
 * card. No clinical logic here; wording lives in cards/catalogue.json.
 */
import { randomUUID } from 'node:crypto';
import type { Card, Suggestion } from '../hooks/schemas.js';
import { formatAge } from './format.js';
import type { Evidence } from '../assess/types.js';
import { findKind, type Catalogue } from './catalogue.js';
import { fill, inline, md, table } from './markdown.js';

export interface CardModel {
  kind: string;
  /** Template variables (plain text; escaped here where they go into Markdown). */
  vars: Record<string, string>;
  conclusion: string[];
  evidence: Array<{ finding: string; evidence: Evidence[] }>;
  gaps: Array<{ what: string; why: string }>;
  order: string[];
  suggestions: Suggestion[];
  selectionBehavior?: 'at-most-one' | 'any';
}

const UNIT_DISPLAY: Record<string, string> = { 'mm[Hg]': 'mmHg', 'cm[H2O]': 'cmH2O', '{grade}': '', '{regions}': 'regions', 'L/min/m2': 'L/min/m²', 'mL/m2': 'mL/m²' };
export const unitDisplay = (u: string | undefined): string => (u === undefined ? '' : (UNIT_DISPLAY[u] ?? u));

const KIND_LABEL: Record<string, string> = {
  heartRate: 'Heart rate', systolicBp: 'Systolic BP', diastolicBp: 'Diastolic BP', meanBp: 'Mean arterial pressure', respiratoryRate: 'Respiratory rate',
  spo2: 'SpO2', fio2: 'FiO2', bodyWeight: 'Weight', bodyHeight: 'Height', cvp: 'CVP', rightAtrialPressure: 'Right atrial pressure', lactate: 'Lactate',
  albumin: 'Albumin', creatinine: 'Creatinine', urineOutput: 'Urine output', fluidIntake: 'Fluid intake', fluidOutput: 'Fluid output', fluidBalance: 'Fluid balance',
  cardiacOutput: 'Cardiac output', cardiacIndex: 'Cardiac index', strokeVolume: 'Stroke volume', strokeVolumeIndex: 'Stroke volume index', ppv: 'PPV', svv: 'SVV',
  ivcDiameterMax: 'IVC diameter (max)', ivcDiameterMin: 'IVC diameter (min)', capillaryRefill: 'Capillary refill time', tidalVolume: 'Tidal volume', peep: 'PEEP',
  intraAbdominalPressure: 'Intra-abdominal pressure', evlwi: 'EVLWI', portalPulsatility: 'Portal pulsatility fraction', edemaGrade: 'Oedema grade',
  bLineRegions: 'Lung ultrasound B-pattern', ventilationMode: 'Ventilation', heartRhythm: 'Rhythm', hepaticVeinPattern: 'Hepatic vein Doppler',
  renalVeinPattern: 'Intrarenal venous Doppler', lvFunction: 'LV function (echo)', chestStatus: 'Chest', plr: 'Passive leg raise',
  miniFluidChallenge: 'Mini fluid challenge', endExpiratoryOcclusion: 'End-expiratory occlusion', tidalVolumeChallenge: 'Tidal volume challenge',
};
const MEASURED_LABEL: Record<string, string> = { pulsePressure: 'pulse pressure', vti: 'VTI', cardiacOutput: 'cardiac output', cardiacIndex: 'cardiac index', strokeVolume: 'stroke volume', ppv: 'PPV', svv: 'SVV' };
/** "heartRate" → "Heart rate"; "plr:cardiacOutput" (a dynamic test and what it measured) → "Passive leg raise (cardiac output)". */
export function kindLabel(k: string): string {
  const [test, measured] = k.split(':');
  if (measured && test) return `${KIND_LABEL[test] ?? test} (${MEASURED_LABEL[measured] ?? KIND_LABEL[measured]?.toLowerCase() ?? measured})`;
  return KIND_LABEL[k] ?? k;
}

/** "2026-12-01 18:05Z" */
export function shortTime(iso: string): string {
  return iso.slice(0, 16).replace('T', ' ') + 'Z';
}

/**
 * The first `n` characters of escaped text, never ending inside an escape: not after the lone backslash of a
 * backslash escape, not inside an entity (&amp; &lt; &gt;), not after the first half of a surrogate pair.
 */
function cutEscaped(text: string, n: number): string {
  let t = text.slice(0, n);
  const slashes = /\\+$/.exec(t)?.[0].length ?? 0;
  if (slashes % 2 === 1) t = t.slice(0, -1);
  t = t.replace(/&(a|am|amp|l|lt|g|gt)?$/, '');
  return /[\ud800-\udbff]$/.test(t) ? t.slice(0, -1) : t;
}

export interface RenderContext {
  hook: string;
  publicUrl: string;
  /** The signed link to this advice's reasoning page (src/http/advice-link.ts), when links are on. */
  adviceLink?: { label: string; url: string };
}

export function renderCard(model: CardModel, cat: Catalogue, ctx: RenderContext): Card {
  const kind = findKind(cat, model.kind);
  // Variables can carry client text (the reason of an assessment-gap card quotes what a prefetch OperationOutcome
  // said): escaped in the summary as values are in the detail. Tidemark's own phrases hold nothing to escape.
  const summaryVars = Object.fromEntries(Object.entries(model.vars).map(([k, v]) => [k, inline(v)]));
  let summary = fill(kind.summary, summaryVars).replace(/\s+/g, ' ').trim();
  if (summary.length >= 140) summary = fill(kind.shortSummary, summaryVars).replace(/\s+/g, ' ').trim();
  if (summary.length >= 140) summary = `${cutEscaped(summary, 136)}…`;

  const parts: string[] = [];
  for (const section of kind.sections) {
    const title = cat.sectionTitles[section] ?? section;
    if (section === 'conclusion' && model.conclusion.length) parts.push(`**${title}**\n\n${model.conclusion.map((c) => `- ${md(c)}`).join('\n')}`);
    if (section === 'evidence' && model.evidence.length) {
      const rows = model.evidence.flatMap((f) =>
        f.evidence.map((e) => [md(kindLabel(e.kind)), md(`${e.value}${unitDisplay(e.unit) ? ` ${unitDisplay(e.unit)}` : ''}`), md(`${shortTime(e.effective)} (${formatAge(e.ageMinutes)} ago)`), md(e.ref)]),
      );
      const seen = new Set<string>();
      const unique = rows.filter((r) => (seen.has(r.join('|')) ? false : (seen.add(r.join('|')), true)));
      if (unique.length) parts.push(`**${title}**\n\n${table(['Marker', 'Value', 'Time (age)', 'Source'], unique)}`);
    }
    if (section === 'gaps' && model.gaps.length) parts.push(`**${title}**\n\n${model.gaps.map((g) => `- ${md(g.what)}${g.why ? `: ${md(g.why)}` : ''}`).join('\n')}`);
    if (section === 'order' && model.order.length) parts.push(`**${title}**\n\n${model.order.map((c) => `- ${md(c)}`).join('\n')}`);
    if (section === 'cautions') parts.push(`**${title}**\n\n${cat.cautions.map((c) => `- ${md(c)}`).join('\n')}`);
  }

  const rule = kind.indicatorRules.find((r) => Object.entries(r.if).every(([k, v]) => model.vars[k] === v));
  const indicator = rule?.then ?? kind.defaultIndicator;
  const reasons = (kind.overrideReasons ?? [])
    .map((code) => cat.overrideReasons.find((r) => r.code === code))
    .filter((r): r is NonNullable<typeof r> => !!r)
    .map((r) => ({ code: r.code, system: cat.overrideReasonSystem, display: r.display }));
  const base = ctx.publicUrl.replace(/\/$/, '');
  const docsUrl = `${base}/docs/${kind.docsPage.replace(/\.md$/, '')}`; // the page as HTML (GET /docs/{page})
  const card: Card = {
    uuid: randomUUID(),
    summary,
    detail: parts.join('\n\n'),
    indicator,
    source: { label: cat.source.label, url: docsUrl, ...(cat.source.topic ? { topic: cat.source.topic } : {}) },
    links: [...(ctx.adviceLink ? [{ ...ctx.adviceLink, type: 'absolute' as const }] : []), { label: `How Tidemark reasons: ${kind.title}`, url: docsUrl, type: 'absolute' }],
  };
  if (model.suggestions.length) {
    card.suggestions = model.suggestions;
    card.selectionBehavior = model.selectionBehavior ?? 'at-most-one';
  }
  if (reasons.length && model.suggestions.length) card.overrideReasons = reasons;
  return card;
}
