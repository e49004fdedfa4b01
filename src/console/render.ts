/**
 * The console's pages as HTML: sign-in, overview, advice list, impact, and the frame put around a record's
 * reasoning page. Pure: data in, a string out (the plots are rendered to SVG by charts.ts, no I/O). Every value goes
 * through the escaping `html` template of the reasoning page (src/pages/escape.ts); only our own markup and vega's
 * SVG are inserted raw. No script: filters are a GET form, paging is links, the POSTs are plain forms carrying
 * the session's CSRF token.
 */
import type { AdviceSummary, FeedbackRow, OverviewAggregates, TopIndicator } from '../audit/types.js';
import type { ImpactReport } from '../audit/impact.js';
import { html, raw, type Raw } from '../pages/escape.js';
import { chartSvg, cycleColours, describeDatum, FEEDBACK_COLOURS, INDICATOR_COLOURS, type ChartDatum, type ChartInput } from './charts.js';
import type { DayRange } from './range.js';

export const CONSOLE_STYLESHEET_PATH = '/console/style.css';

export type ConsoleTab = 'overview' | 'advice' | 'impact';

/** What every signed-in page needs: the CSRF token for the sign-out form, and whether sign-out applies (a session, not a proxy). */
export interface Chrome {
  csrf: string;
  session: boolean;
}

function doc(title: string, body: Raw): string {
  return `<!doctype html>\n${html`<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><meta name="robots" content="noindex"><title>${title} · Tidemark audit console</title><link rel="stylesheet" href="${CONSOLE_STYLESHEET_PATH}"></head><body class="console">${body}</body></html>`.html}\n`;
}

/** The bar at the top of each signed-in page: the tabs and sign-out (plain links and one form). */
/** The list's indicator cell: the answer's card indicators, or why it has none. */
function indicatorsCell(i: { outcome: string; indicators: string[] }): string {
  if (i.outcome !== 'answered') return 'refused (missing data)';
  return i.indicators.length ? i.indicators.join(', ') : 'none';
}

/** "1 answer", "17 answers". */
function count(n: number, noun: string): string {
  return `${n} ${noun}${n === 1 ? '' : 's'}`;
}

export function consoleBar(active: ConsoleTab | undefined, chrome: Chrome): Raw {
  const tab = (t: ConsoleTab, href: string, label: string) =>
    html`<a href="${href}"${t === active ? raw(' aria-current="page"') : ''}>${label}</a>`;
  return html`<nav class="console-bar" aria-label="Console"><span class="brand">Tidemark · audit console</span>${tab('overview', '/console', 'Overview')}${tab('advice', '/console/advice', 'Advice list')}${tab('impact', '/console/impact', 'Impact of a rule change')}${
    chrome.session
      ? html`<form method="post" action="/console/sign-out" class="sign-out"><input type="hidden" name="csrf" value="${chrome.csrf}"><button type="submit">Sign out</button></form>`
      : html`<span class="via">signed in through the single-sign-on proxy</span>`
  }</nav>`;
}

function page(title: string, active: ConsoleTab | undefined, chrome: Chrome, body: Raw): string {
  return doc(
    title,
    html`${consoleBar(active, chrome)}<main>${body}</main><footer class="meta">Tidemark gives advisory information only. This console reads the audit trail; it changes nothing in it.</footer>`,
  );
}

// ------------------------------------------------------------------ sign-in

export function signInPage(o: { csrf: string; message?: string; available: boolean }): string {
  return doc(
    'Sign in',
    html`<main class="sign-in"><h1>Audit console: sign in</h1>
<p>Present the audit credential (the audit API's bearer token) once; you then get a session of limited length in this browser.</p>
${o.message ? html`<p class="alert" role="alert" id="sign-in-message">${o.message}</p>` : ''}
${
  o.available
    ? html`<form method="post" action="/console/sign-in"><input type="hidden" name="csrf" value="${o.csrf}"><label for="credential">Audit credential</label><input id="credential" name="credential" type="password" autocomplete="off" required maxlength="4096"><button type="submit">Sign in</button></form>`
    : html`<p>Sign-in with the audit credential is not set up on this service (no audit token is configured). Reach the console through the site's single-sign-on proxy instead.</p>`
}
</main>`,
  );
}

/** A plain page for a refusal or a mistake (status set by the caller). */
export function consoleNotice(title: string, text: string, chrome?: Chrome): string {
  const body = html`<h1>${title}</h1><p class="alert" role="alert">${text}</p>`;
  return chrome
    ? page(title, undefined, chrome, body)
    : doc(title, html`<main class="sign-in">${body}<p><a href="/console/sign-in">Sign in</a></p></main>`);
}

// ------------------------------------------------------------------ overview

interface Figure {
  id: string;
  title: string;
  chart: ChartInput;
  note?: string;
  table: Raw;
  summary: string;
}

const sum = (xs: number[]) => xs.reduce((a, b) => a + b, 0);
const pct = (n: number, d: number) => (d ? `${Math.round((n / d) * 100)} %` : '–');
const INDICATOR_ORDER: TopIndicator[] = ['critical', 'warning', 'info', 'none'];

function rangeForm(action: string, range: DayRange, extra: Raw = raw('')): Raw {
  return html`<form method="get" action="${action}" class="filters" aria-label="Date range"><label>From <input type="date" name="from" value="${range.from}"></label><label>To <input type="date" name="to" value="${range.to}"></label>${extra}<button type="submit">Show</button></form>`;
}

function figures(o: OverviewAggregates, range: DayRange): Figure[] {
  const out: Figure[] = [];
  // Answers per day, one plot per service, stacked by the answer's most urgent indicator.
  const services = [...new Set(o.answersByDay.map((r) => r.service))];
  for (const service of services) {
    const rows = o.answersByDay.filter((r) => r.service === service);
    const data: ChartDatum[] = rows.map((r) => ({ x: r.day, series: r.indicator, value: r.answers }));
    const present = INDICATOR_ORDER.filter((i) => rows.some((r) => r.indicator === i));
    out.push({
      id: `answers-${service}`,
      title: `Answers per day: ${service}`,
      chart: {
        kind: 'stacked',
        data,
        xDomain: range.days,
        series: present.map((name) => ({ name, colour: INDICATOR_COLOURS[name]! })),
        xTitle: 'Day (UTC)',
        yTitle: 'Answers',
      },
      summary: `${count(sum(rows.map((r) => r.answers)), 'answer')} from ${service} in ${count(range.days.length, 'day')}: ${present.map((i) => `${i} ${sum(rows.filter((r) => r.indicator === i).map((r) => r.answers))}`).join(', ')} (most urgent card of each answer).`,
      table: html`<table class="chart-data"><thead><tr><th>Day</th><th>Most urgent card</th><th class="num">Answers</th></tr></thead><tbody>${rows.map((r) => html`<tr data-x="${r.day}" data-series="${r.indicator}" data-value="${r.answers}"><td>${r.day}</td><td>${r.indicator}</td><td class="num">${r.answers}</td></tr>`)}</tbody></table>`,
    });
  }
  // Feedback shares, one plot per card kind.
  const kinds = [...new Set(o.feedbackByWeek.map((r) => r.cardKind))];
  for (const kind of kinds) {
    const rows = o.feedbackByWeek.filter((r) => r.cardKind === kind);
    const data: ChartDatum[] = rows
      .flatMap((r) => [
        { x: r.week, series: 'accepted', value: r.accepted },
        { x: r.week, series: 'overridden', value: r.overridden },
        { x: r.week, series: 'no feedback', value: r.noFeedback },
      ])
      .filter((d) => d.value > 0);
    const cards = sum(rows.map((r) => r.cards));
    const acc = sum(rows.map((r) => r.accepted));
    const ovr = sum(rows.map((r) => r.overridden));
    out.push({
      id: `feedback-${kind}`,
      title: `Feedback on “${kind}” cards, share per week`,
      chart: {
        kind: 'share',
        data,
        xDomain: range.weeks,
        series: Object.entries(FEEDBACK_COLOURS).map(([name, colour]) => ({ name, colour })),
        xTitle: 'Week (Monday, UTC)',
        yTitle: 'Share of cards',
        height: 120,
      },
      summary: `${cards} “${kind}” cards: accepted ${acc} (${pct(acc, cards)}), overridden ${ovr} (${pct(ovr, cards)}), no feedback ${cards - acc - ovr} (${pct(cards - acc - ovr, cards)}).`,
      note: 'A card both accepted and overridden counts as overridden.',
      table: html`<table class="chart-data"><thead><tr><th>Week of</th><th class="num">Cards</th><th class="num">Accepted</th><th class="num">Overridden</th><th class="num">No feedback</th></tr></thead><tbody>${rows.map((r) => html`<tr data-x="${r.week}" data-cards="${r.cards}"><td>${r.week}</td><td class="num">${r.cards}</td><td class="num">${r.accepted} (${pct(r.accepted, r.cards)})</td><td class="num">${r.overridden} (${pct(r.overridden, r.cards)})</td><td class="num">${r.noFeedback} (${pct(r.noFeedback, r.cards)})</td></tr>`)}</tbody></table>`,
    });
  }
  // Override reasons per week.
  const reasons = [...new Set(o.overrideReasonsByWeek.map((r) => r.reasonCode))];
  const display = new Map(o.overrideReasonsByWeek.map((r) => [r.reasonCode, r.reasonDisplay]));
  const reasonName = (code: string) => (display.get(code) ? `${display.get(code)} (${code})` : code);
  out.push({
    id: 'override-reasons',
    title: 'Override reasons per week',
    chart: {
      kind: 'stacked',
      data: o.overrideReasonsByWeek.map((r) => ({ x: r.week, series: reasonName(r.reasonCode), value: r.cards })),
      xDomain: range.weeks,
      series: cycleColours(reasons.map(reasonName)),
      xTitle: 'Week (Monday, UTC)',
      yTitle: 'Overridden cards',
    },
    summary: reasons.length
      ? `${sum(o.overrideReasonsByWeek.map((r) => r.cards))} overridden cards: ${reasons.map((c) => `${reasonName(c)} ${sum(o.overrideReasonsByWeek.filter((r) => r.reasonCode === c).map((r) => r.cards))}`).join(', ')}.`
      : 'No card was overridden in this range.',
    table: html`<table class="chart-data"><thead><tr><th>Week of</th><th>Reason</th><th class="num">Cards</th></tr></thead><tbody>${o.overrideReasonsByWeek.map((r) => html`<tr data-x="${r.week}" data-series="${r.reasonCode}" data-value="${r.cards}"><td>${r.week}</td><td>${reasonName(r.reasonCode)}</td><td class="num">${r.cards}</td></tr>`)}</tbody></table>`,
  });
  // Verdict mix per week.
  const mixName = (r: { responsiveness: string; tolerance: string }) => `${r.responsiveness} × ${r.tolerance}`;
  const mixes = [...new Set(o.verdictsByWeek.map(mixName))].sort();
  out.push({
    id: 'verdicts',
    title: 'Verdict mix per week (responsiveness × tolerance)',
    chart: {
      kind: 'stacked',
      data: o.verdictsByWeek.map((r) => ({ x: r.week, series: mixName(r), value: r.answers })),
      xDomain: range.weeks,
      series: cycleColours(mixes),
      xTitle: 'Week (Monday, UTC)',
      yTitle: 'Answers',
      height: 180,
    },
    summary: mixes.length
      ? `${mixes.map((m) => `${m}: ${sum(o.verdictsByWeek.filter((r) => mixName(r) === m).map((r) => r.answers))}`).join('; ')}.`
      : 'No answers in this range.',
    note: '“none”: the answer has no such verdict (an answer refused for missing data).',
    table: html`<table class="chart-data"><thead><tr><th>Week of</th><th>Responsiveness</th><th>Tolerance</th><th class="num">Answers</th></tr></thead><tbody>${o.verdictsByWeek.map((r) => html`<tr data-x="${r.week}" data-series="${mixName(r)}" data-value="${r.answers}"><td>${r.week}</td><td>${r.responsiveness}</td><td>${r.tolerance}</td><td class="num">${r.answers}</td></tr>`)}</tbody></table>`,
  });
  // Latency.
  out.push({
    id: 'latency',
    title: 'Answer time per day, p50 and p99',
    chart: {
      kind: 'lines',
      data: o.latencyByDay.flatMap((r) => [
        { x: r.day, series: 'p50', value: r.p50Ms },
        { x: r.day, series: 'p99', value: r.p99Ms },
      ]),
      xDomain: range.days,
      series: [
        { name: 'p50', colour: '#1d4f91' },
        { name: 'p99', colour: '#a8201a' },
      ],
      xTitle: 'Day (UTC)',
      yTitle: 'Milliseconds',
    },
    summary: o.latencyByDay.length
      ? `Over ${o.latencyByDay.length} days with answers, the daily p50 ranged ${Math.min(...o.latencyByDay.map((r) => r.p50Ms))}–${Math.max(...o.latencyByDay.map((r) => r.p50Ms))} ms and the daily p99 ${Math.min(...o.latencyByDay.map((r) => r.p99Ms))}–${Math.max(...o.latencyByDay.map((r) => r.p99Ms))} ms.`
      : 'No answers in this range.',
    note: 'Total time of each answer as recorded, nearest-rank percentiles of the day.',
    table: html`<table class="chart-data"><thead><tr><th>Day</th><th class="num">Answers</th><th class="num">p50 (ms)</th><th class="num">p99 (ms)</th></tr></thead><tbody>${o.latencyByDay.map((r) => html`<tr data-x="${r.day}" data-answers="${r.answers}"><td>${r.day}</td><td class="num">${r.answers}</td><td class="num">${r.p50Ms}</td><td class="num">${r.p99Ms}</td></tr>`)}</tbody></table>`,
  });
  return out;
}

async function figureHtml(f: Figure): Promise<Raw> {
  let svg: string | undefined;
  if (f.chart.data.length) {
    try {
      svg = await chartSvg(f.chart);
    } catch {
      svg = undefined; // the table below still carries the numbers
    }
  }
  const failed = f.chart.data.length ? html`<p class="empty">This plot could not be drawn; its numbers are in the table.</p>` : '';
  return html`<figure id="${f.id}" class="chart"><figcaption id="${f.id}-title">${f.title}</figcaption>${
    svg ? html`<div role="img" aria-labelledby="${f.id}-title ${f.id}-summary" class="plot">${raw(svg)}</div>` : failed
  }<p id="${f.id}-summary" class="summary">${f.summary}</p>${f.note ? html`<p class="meta">${f.note}</p>` : ''}<details><summary>Numbers of this plot as a table</summary>${f.table}</details></figure>`;
}

export async function overviewPage(o: {
  chrome: Chrome;
  range: DayRange;
  aggregates: OverviewAggregates;
  chain: { ok: boolean; checked: number; firstBadSeq?: number };
  service?: string;
}): Promise<string> {
  const total = sum(o.aggregates.answersByDay.map((r) => r.answers));
  const figs = figures(o.aggregates, o.range);
  const rendered: Raw[] = [];
  for (const f of figs) rendered.push(await figureHtml(f));
  const serviceSelect = serviceInput(o.service);
  const body = html`<h1>Overview</h1>
${rangeForm('/console', o.range, serviceSelect)}
<section id="chain" aria-labelledby="chain-h" class="${o.chain.ok ? 'chain ok' : 'chain bad'}"><h2 id="chain-h">Audit chain</h2><p id="chain-status">${
    o.chain.ok
      ? `Intact: ${o.chain.checked === 1 ? 'the one record' : `all ${o.chain.checked} records`} checked, each hash covers the one before it.`
      : `Broken at record seq ${o.chain.firstBadSeq ?? '?'} (after ${o.chain.checked} records checked): a record was changed or removed. See docs/audit.md, "Verifying the trail".`
  }</p><p class="meta">The whole trail is checked, whatever the date range.</p></section>
<p class="meta" id="range-total">${count(total, 'answer')} from ${o.range.from} to ${o.range.to} (UTC days)${o.service ? ` for ${o.service}` : ''}.</p>
<section aria-label="Plots">${rendered}</section>`;
  return page('Overview', 'overview', o.chrome, body);
}

// ------------------------------------------------------------------ advice list

export interface ListFilters {
  from: string;
  to: string;
  service?: string;
  patient?: string;
  indicator?: string;
  responsiveness?: string;
  tolerance?: string;
  feedback?: string;
}

const RESPONSIVENESS = ['likely', 'unlikely', 'indeterminate', 'none'];
const TOLERANCE = ['adequate', 'limited', 'poor', 'not-known', 'none'];
const FEEDBACK = ['accepted', 'overridden', 'none'];

/** The service filter: a CDS service id, free text (the store is not scanned for the ids in use). */
function serviceInput(value: string | undefined): Raw {
  return html`<label>Service <input type="text" name="service" value="${value ?? ''}" maxlength="64" size="16" placeholder="all" pattern="[A-Za-z0-9._\-]{1,64}"></label>`;
}

function select(name: string, label: string, options: string[], value: string | undefined): Raw {
  return html`<label>${label} <select name="${name}"><option value="">any</option>${options.map((o) => html`<option value="${o}"${o === value ? raw(' selected') : ''}>${o}</option>`)}</select></label>`;
}

export function listPage(o: {
  chrome: Chrome;
  filters: ListFilters;
  items: AdviceSummary[];
  nextHref?: string;
  firstHref?: string;
  zoneNote: string;
}): string {
  const f = o.filters;
  const body = html`<h1>Advice list</h1>
<form method="get" action="/console/advice" class="filters" aria-label="Filters">
<label>From <input type="date" name="from" value="${f.from}"></label><label>To <input type="date" name="to" value="${f.to}"></label>
${serviceInput(f.service)}
<label>Patient <input type="text" name="patient" value="${f.patient ?? ''}" maxlength="64" size="14" pattern="[A-Za-z0-9.\\-]{1,64}"></label>
${select('indicator', 'Most urgent card', ['critical', 'warning', 'info', 'none'], f.indicator)}
${select('responsiveness', 'Responsiveness', RESPONSIVENESS, f.responsiveness)}
${select('tolerance', 'Tolerance', TOLERANCE, f.tolerance)}
${select('feedback', 'Feedback', FEEDBACK, f.feedback)}
<button type="submit">Filter</button></form>
<p class="meta">Latest stored first (the trail's order). ${o.zoneNote} Feedback counts cards: accepted / overridden.</p>
${
  o.items.length
    ? html`<table id="advice-list"><thead><tr><th>Recorded</th><th>Service</th><th>Patient</th><th>Card indicators</th><th>Responsiveness</th><th>Tolerance</th><th class="num">Feedback</th><th class="num">ms</th><th></th></tr></thead><tbody>${o.items.map((i) => html`<tr data-id="${i.id}"><td>${i.recordedAt.replace('T', ' ').slice(0, 19)}</td><td>${i.service}</td><td class="ref">${i.patientId ?? '–'}</td><td>${indicatorsCell(i)}</td><td>${i.responsiveness ?? '–'}</td><td>${i.tolerance ?? '–'}</td><td class="num">${i.feedback.accepted} / ${i.feedback.overridden}</td><td class="num">${i.latencyMs}</td><td><a href="/console/advice/${encodeURIComponent(i.id)}">Open</a></td></tr>`)}</tbody></table>`
    : html`<p class="empty" id="advice-list-empty">No advice matches these filters.</p>`
}
<p class="pager">${o.firstHref ? html`<a href="${o.firstHref}">Newest</a> ` : ''}${o.nextHref ? html`<a href="${o.nextHref}" id="next-page">Older</a>` : ''}</p>`;
  return page('Advice list', 'advice', o.chrome, body);
}

// ------------------------------------------------------------------ one record

/** The reasoning page of a record (src/pages), with the console bar above it and the record's feedback below it. */
export function recordPage(reasoning: string, feedback: FeedbackRow[], cardKinds: Record<string, string>, chrome: Chrome): string {
  const section = html`<section id="feedback" aria-labelledby="feedback-h"><h2 id="feedback-h">Feedback on these cards</h2>${
    feedback.length
      ? html`<table><thead><tr><th>Card kind</th><th>Outcome</th><th>Reason</th><th>Comment</th><th>Suggestions accepted</th><th>When (UTC)</th></tr></thead><tbody>${feedback.map((f) => html`<tr data-outcome="${f.outcome}"><td>${cardKinds[f.cardUuid] ?? '?'}</td><td>${f.outcome}</td><td>${f.overrideReason ? `${f.overrideReason.display ?? ''}${f.overrideReason.code ? ` (${f.overrideReason.code})` : ''}` : ''}</td><td>${f.userComment ?? ''}</td><td>${f.acceptedSuggestions.join(', ')}</td><td>${f.outcomeTimestamp}</td></tr>`)}</tbody></table>`
      : html`<p class="empty">No feedback was received for the cards of this advice.</p>`
  }</section>`;
  const bar = html`<link rel="stylesheet" href="${CONSOLE_STYLESHEET_PATH}">${consoleBar('advice', chrome)}<p class="back"><a href="/console/advice">← Back to the advice list</a></p>`;
  // The reasoning page is ours (src/pages/page.ts): one <body> and one closing </main>.
  const withBar = reasoning.replace('<body>', `<body class="console-record">${bar.html}`);
  const at = withBar.lastIndexOf('</main>');
  return at === -1 ? withBar.replace('</body>', `${section.html}</body>`) : `${withBar.slice(0, at)}${section.html}${withBar.slice(at)}`;
}

// ------------------------------------------------------------------ impact

export interface ImpactForm {
  thresholds: string;
  service?: string;
  from?: string;
  to?: string;
}

const DIMENSION_LABEL: Record<string, string> = {
  responsiveness: 'Responsiveness verdict',
  confidence: 'Responsiveness confidence',
  tolerance: 'Tolerance verdict',
  action: 'Advised action',
  'next-test': 'Next test',
  'headline-key': 'Headline',
  card: 'Card shown',
  indicator: 'Card indicator',
  headline: 'Card summary',
  suggestions: 'Suggestions',
};

function impactReportHtml(r: ImpactReport, form: ImpactForm, chrome: Chrome, maxPage: number): Raw {
  const ex = (ids: string[]) =>
    ids.map((id, i) => html`${i ? ', ' : ''}<a href="/console/advice/${encodeURIComponent(id)}" class="ref">${id.slice(0, 8)}</a>`);
  return html`<section id="report" aria-labelledby="report-h"><h2 id="report-h">Report</h2>
<p id="report-totals">${r.replayed} of ${r.read} records re-run under the candidate (rules version <code>${r.candidateRulesVersion}</code>): <strong>${r.changed.any} changed</strong>, ${r.unchanged} unchanged${r.notReplayable ? `, ${r.notReplayable} without a snapshot` : ''}${r.failed ? `, ${r.failed} failed to re-run` : ''}. Nothing was written to the trail.</p>
<table id="changed-counts"><thead><tr><th>Records in which … changed</th><th class="num">Records</th></tr></thead><tbody>${(
    [
      ['responsiveness', 'the responsiveness verdict'],
      ['confidence', 'its confidence'],
      ['tolerance', 'the tolerance verdict'],
      ['action', 'the advised action'],
      ['nextTest', 'the next test'],
      ['indicator', 'a card indicator'],
      ['headline', 'a headline or card summary'],
      ['suggestions', 'the suggestions'],
      ['cards', 'which cards are shown'],
    ] as const
  ).map(([k, label]) => html`<tr data-count="${k}"><td>${label}</td><td class="num">${r.changed[k]}</td></tr>`)}</tbody></table>
<h3>By card kind</h3>${
    r.byCardKind.length
      ? html`<table id="by-kind"><thead><tr><th>Card kind</th><th class="num">Records</th><th class="num">Indicator</th><th class="num">Summary</th><th class="num">Suggestions</th><th class="num">Shown / not shown</th></tr></thead><tbody>${r.byCardKind.map((k) => html`<tr data-kind="${k.cardKind}"><td>${k.cardKind}</td><td class="num">${k.records}</td><td class="num">${k.indicator}</td><td class="num">${k.headline}</td><td class="num">${k.suggestions}</td><td class="num">${k.shownOrAbsent}</td></tr>`)}</tbody></table>`
      : html`<p class="empty">No cards in these records.</p>`
  }
<h3>By change</h3>${
    r.changes.length
      ? html`<table id="changes"><thead><tr><th>What</th><th>Card kind</th><th>From</th><th>To</th><th class="num">Records</th><th>Examples</th></tr></thead><tbody>${r.changes.map((c) => html`<tr data-dimension="${c.dimension}" data-from="${c.from}" data-to="${c.to}" data-count="${c.count}"><td>${DIMENSION_LABEL[c.dimension] ?? c.dimension}</td><td>${c.cardKind || '–'}</td><td>${c.from}</td><td>${c.to}</td><td class="num">${c.count}</td><td>${ex(c.examples)}</td></tr>`)}</tbody></table>`
      : html`<p class="empty" id="no-changes">The candidate changes nothing in these records.</p>`
  }
${r.failedExamples.length ? html`<p>Records that failed to re-run: ${ex(r.failedExamples)}</p>` : ''}
${
  r.more && r.lastSeq !== undefined
    ? html`<form method="post" action="/console/impact" class="next"><p>At most ${maxPage} records are re-run per request; more remain.</p><input type="hidden" name="csrf" value="${chrome.csrf}"><input type="hidden" name="thresholds" value="${form.thresholds}"><input type="hidden" name="service" value="${form.service ?? ''}"><input type="hidden" name="from" value="${form.from ?? ''}"><input type="hidden" name="to" value="${form.to ?? ''}"><input type="hidden" name="after" value="${r.lastSeq}"><button type="submit" id="impact-next">Next ${maxPage} records</button></form>`
    : ''
}
</section>`;
}

export function impactPage(o: { chrome: Chrome; form: ImpactForm; maxPage: number; report?: ImpactReport; error?: string }): string {
  const f = o.form;
  const body = html`<h1>Impact of a rule change</h1>
<p>Paste candidate thresholds (the shape of the configuration file's <code>thresholds</code>, e.g. <code>{"responsiveness": {"ppvThresholdPercent": 15}}</code>). Every answered record in the range is re-run under them and compared with what was answered; nothing is written to the trail. At most ${o.maxPage} records per run, oldest first; the report offers the next ones.</p>
<form method="post" action="/console/impact" class="impact" aria-label="Candidate">
<input type="hidden" name="csrf" value="${o.chrome.csrf}">
<label for="thresholds">Candidate thresholds (JSON)</label><textarea id="thresholds" name="thresholds" rows="8" cols="70" required spellcheck="false">${f.thresholds}</textarea>
<div class="filters"><label>From <input type="date" name="from" value="${f.from ?? ''}"></label><label>To <input type="date" name="to" value="${f.to ?? ''}"></label>${serviceInput(f.service)}<button type="submit" id="impact-run">Run</button></div>
</form>
${o.error ? html`<p class="alert" role="alert" id="impact-error">${o.error}</p>` : ''}
${o.report ? impactReportHtml(o.report, f, o.chrome, o.maxPage) : ''}`;
  return page('Impact', 'impact', o.chrome, body);
}

export { describeDatum };
