/**
 * Rendering: a CardModel (what to say, built from Advice) + the catalogue (how to say it) → a CDS Hooks
 * card. No clinical logic here; wording lives in cards/catalogue.json.
 */
import { randomUUID } from 'node:crypto';
import type { Card, Suggestion } from '../hooks/schemas.js';
import { findKind, type Catalogue } from './catalogue.js';
import { fill, inline, md } from './markdown.js';

/** One line of the pop-up's detail: plain text (escaped here), an optional bold label, a bullet. */
export interface DetailLine {
  label?: string;
  text: string;
  bullet?: boolean;
  /** Never dropped to fit the limits (the questions, the gap that would change the advice). */
  keep?: boolean;
  /** Lines are dropped from the highest priority number down when the detail would pass its limits. */
  priority?: number;
}

export interface CardModel {
  kind: string;
  /** Template variables of the summary (plain text; escaped here). */
  vars: Record<string, string>;
  /** The detail's lines, in order (the caution line with the links is added here). */
  lines: DetailLine[];
  suggestions: Suggestion[];
  selectionBehavior?: 'at-most-one' | 'any';
}

/** The pop-up's limits (issue 16): a detail a prescriber reads in seconds. */
export const DETAIL_MAX_CHARS = 900;
export const DETAIL_MAX_LINES = 12;
/** Longest line of the detail (our own bound). */
const LINE_MAX = 200;

const UNIT_DISPLAY: Record<string, string> = {
  'mm[Hg]': 'mmHg',
  'cm[H2O]': 'cmH2O',
  '{grade}': '',
  '{regions}': 'regions',
  'L/min/m2': 'L/min/m²',
  'mL/m2': 'mL/m²',
};
export const unitDisplay = (u: string | undefined): string => (u === undefined ? '' : (UNIT_DISPLAY[u] ?? u));

const KIND_LABEL: Record<string, string> = {
  heartRate: 'Heart rate',
  systolicBp: 'Systolic BP',
  diastolicBp: 'Diastolic BP',
  meanBp: 'Mean arterial pressure',
  respiratoryRate: 'Respiratory rate',
  spo2: 'SpO2',
  fio2: 'FiO2',
  bodyWeight: 'Weight',
  bodyHeight: 'Height',
  cvp: 'CVP',
  rightAtrialPressure: 'Right atrial pressure',
  lactate: 'Lactate',
  albumin: 'Albumin',
  creatinine: 'Creatinine',
  urineOutput: 'Urine output',
  fluidIntake: 'Fluid intake',
  fluidOutput: 'Fluid output',
  fluidBalance: 'Fluid balance',
  cardiacOutput: 'Cardiac output',
  cardiacIndex: 'Cardiac index',
  strokeVolume: 'Stroke volume',
  strokeVolumeIndex: 'Stroke volume index',
  ppv: 'PPV',
  svv: 'SVV',
  ivcDiameterMax: 'IVC diameter (max)',
  ivcDiameterMin: 'IVC diameter (min)',
  capillaryRefill: 'Capillary refill time',
  tidalVolume: 'Tidal volume',
  peep: 'PEEP',
  intraAbdominalPressure: 'Intra-abdominal pressure',
  evlwi: 'EVLWI',
  portalPulsatility: 'Portal pulsatility fraction',
  edemaGrade: 'Oedema grade',
  bLineRegions: 'Lung ultrasound B-pattern',
  bLineRegionsLeft: 'Lung ultrasound B-pattern (left)',
  bLineRegionsRight: 'Lung ultrasound B-pattern (right)',
  ventilationMode: 'Ventilation',
  heartRhythm: 'Rhythm',
  hepaticVeinPattern: 'Hepatic vein Doppler',
  renalVeinPattern: 'Intrarenal venous Doppler',
  lvFunction: 'LV function (echo)',
  chestStatus: 'Chest',
  plr: 'Passive leg raise',
  miniFluidChallenge: 'Mini fluid challenge',
  endExpiratoryOcclusion: 'End-expiratory occlusion',
  tidalVolumeChallenge: 'Tidal volume challenge',
};
const MEASURED_LABEL: Record<string, string> = {
  pulsePressure: 'pulse pressure',
  vti: 'VTI',
  cardiacOutput: 'cardiac output',
  cardiacIndex: 'cardiac index',
  strokeVolume: 'stroke volume',
  ppv: 'PPV',
  svv: 'SVV',
};
/** "heartRate" → "Heart rate"; "plr:cardiacOutput" (a dynamic test and what it measured) → "Passive leg raise (cardiac output)". */
export function kindLabel(k: string): string {
  const [test, measured] = k.split(':');
  if (measured && test)
    return `${KIND_LABEL[test] ?? test} (${MEASURED_LABEL[measured] ?? KIND_LABEL[measured]?.toLowerCase() ?? measured})`;
  return KIND_LABEL[k] ?? k;
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

/** A URL of ours inside a Markdown link destination: nothing in it may close the link. */
function linkUrl(url: string): string {
  return encodeURI(decodeURI(url)).replace(/[()<>[\]]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
}

/** Markdown of one line: every text escaped (md), our own structure (bullet, bold label) added around it. */
function lineMarkdown(l: DetailLine): string {
  const body = `${l.label ? `**${md(l.label)}:** ` : ''}${md(l.text, LINE_MAX)}`;
  // Two markers, so the questions and the findings stay two lists (CommonMark 0.31 §5.3: a new bullet character starts a new list).
  if (l.label) return `- ${body}`;
  return l.bullet ? `* ${body}` : body;
}

/** Groups lines into Markdown blocks: consecutive list lines form one list; other lines stand as paragraphs. */
function detailMarkdown(lines: DetailLine[], caution: string): string {
  const blocks: string[][] = [];
  let prevList: 'label' | 'bullet' | undefined;
  for (const l of lines) {
    let kind: 'label' | 'bullet' | undefined = l.bullet ? 'bullet' : undefined;
    if (l.label) kind = 'label';
    if (kind && kind === prevList) blocks[blocks.length - 1]?.push(lineMarkdown(l));
    else blocks.push([lineMarkdown(l)]);
    prevList = kind;
  }
  blocks.push([caution]);
  return blocks.map((b) => b.join('\n')).join('\n\n');
}

const nonEmptyLines = (s: string) => s.split('\n').filter((l) => l.trim()).length;

/** The detail within the pop-up's limits: lines dropped by priority (highest number first, the last of a kind first) until it fits. */
function fitted(lines: DetailLine[], caution: string): string {
  let kept = [...lines];
  let text = detailMarkdown(kept, caution);
  while ((text.length > DETAIL_MAX_CHARS || nonEmptyLines(text) > DETAIL_MAX_LINES) && kept.some((l) => !l.keep)) {
    const worst = Math.max(...kept.filter((l) => !l.keep).map((l) => l.priority ?? 0));
    const at =
      kept
        .map((l, i) => ({ l, i }))
        .filter(({ l }) => !l.keep && (l.priority ?? 0) === worst)
        .pop()?.i ?? -1;
    kept = kept.filter((_l, i) => i !== at);
    text = detailMarkdown(kept, caution);
  }
  return text.length > DETAIL_MAX_CHARS ? `${cutEscaped(text, DETAIL_MAX_CHARS - 1)}…` : text;
}

export function renderCard(model: CardModel, cat: Catalogue, ctx: RenderContext): Card {
  const kind = findKind(cat, model.kind);
  // Variables can carry client text (the reason of an assessment-gap card quotes what a prefetch OperationOutcome
  // said): escaped in the summary as values are in the detail. Tidemark's own phrases hold nothing to escape.
  const summaryVars = Object.fromEntries(Object.entries(model.vars).map(([k, v]) => [k, inline(v)]));
  let summary = fill(kind.summary, summaryVars).replace(/\s+/g, ' ').trim();
  if (summary.length >= 140) summary = fill(kind.shortSummary, summaryVars).replace(/\s+/g, ' ').trim();
  if (summary.length >= 140) summary = `${cutEscaped(summary, 136)}…`;

  const rule = kind.indicatorRules.find((r) => Object.entries(r.if).every(([k, v]) => model.vars[k] === v));
  const indicator = rule?.then ?? kind.defaultIndicator;
  const reasons = (kind.overrideReasons ?? [])
    .map((code) => cat.overrideReasons.find((r) => r.code === code))
    .filter((r): r is NonNullable<typeof r> => !!r)
    .map((r) => ({ code: r.code, system: cat.overrideReasonSystem, display: r.display }));
  const base = ctx.publicUrl.replace(/\/$/, '');
  const docsUrl = `${base}/docs/${kind.docsPage.replace(/\.md$/, '')}`; // the page as HTML (GET /docs/{page})
  const P = cat.popup;
  const link = ctx.adviceLink ? `[${md(P.reasoningLink)}](${linkUrl(ctx.adviceLink.url)})` : `[${md(P.docsLink)}](${linkUrl(docsUrl)})`;
  const caution = `*${md(P.caution)}* ${link}`;
  const card: Card = {
    uuid: randomUUID(),
    summary,
    detail: fitted(model.lines, caution),
    indicator,
    source: { label: cat.source.label, url: docsUrl, ...(cat.source.topic ? { topic: cat.source.topic } : {}) },
    links: [
      ...(ctx.adviceLink ? [{ ...ctx.adviceLink, type: 'absolute' as const }] : []),
      { label: `How Tidemark reasons: ${kind.title}`, url: docsUrl, type: 'absolute' },
    ],
  };
  if (model.suggestions.length) {
    card.suggestions = model.suggestions;
    card.selectionBehavior = model.selectionBehavior ?? 'at-most-one';
  }
  if (reasons.length && model.suggestions.length) card.overrideReasons = reasons;
  return card;
}
