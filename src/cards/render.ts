/**
 * Rendering: a CardModel (what to say, built from Advice) + the catalogue (how to say it) → a CDS Hooks
 * card. No clinical logic here; wording lives in cards/catalogue.json.
 */
import { randomUUID } from 'node:crypto';
import type { Card, Suggestion } from '../hooks/schemas.js';
import { formatAge } from './format.js';
import type { Evidence } from '../assess/types.js';
import { findKind, type Catalogue } from './catalogue.js';
import { fill, md, table } from './markdown.js';

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

export interface RenderContext {
  hook: string;
  publicUrl: string;
}

export function renderCard(model: CardModel, cat: Catalogue, ctx: RenderContext): Card {
  const kind = findKind(cat, model.kind);
  let summary = fill(kind.summary, model.vars).replace(/\s+/g, ' ').trim();
  if (summary.length >= 140) summary = fill(kind.shortSummary, model.vars).replace(/\s+/g, ' ').trim();
  if (summary.length >= 140) summary = `${summary.slice(0, 136)}…`;

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
  const card: Card = {
    uuid: randomUUID(),
    summary,
    detail: parts.join('\n\n'),
    indicator,
    source: { label: cat.source.label, url: `${base}/docs/${kind.docsPage}`, ...(cat.source.topic ? { topic: cat.source.topic } : {}) },
    links: [{ label: `How Tidemark reasons: ${kind.title}`, url: `${base}/docs/${kind.docsPage}`, type: 'absolute' }],
  };
  if (model.suggestions.length) {
    card.suggestions = model.suggestions;
    card.selectionBehavior = model.selectionBehavior ?? 'at-most-one';
  }
  if (reasons.length && model.suggestions.length) card.overrideReasons = reasons;
  return card;
}
