/**
 * The reasoning page of one piece of advice, as HTML: verdicts first, then what would change the advice (the what-if
 * table), the trend plots, the findings with their provenance, what was missing, stale or set aside, the ordered
 * bolus, thresholds and rules version, the cautions.
 * Pure: a PageView (view.ts) and the rendered plots in, a string out. Every value goes through the escaping `html`
 * template (escape.ts); only our own markup and vega's SVG are inserted raw.
 */
import { html, raw, type Raw } from './escape.js';
import { describeRow } from './plots.js';
import { clock, clockWithAge, fullClock } from './time.js';
import type { Trends, TrendPlot } from './trends.js';
import type { PageFinding, PageView, PageWhatIf, PageWhatIfOutcome } from './view.js';

export const STYLESHEET_PATH = '/pages/style.css';

export interface RenderedPlot {
  plot: TrendPlot;
  svg?: string;
  failed?: boolean;
}

function doc(title: string, body: Raw): string {
  return `<!doctype html>\n${html`<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><meta name="robots" content="noindex"><title>${title}</title><link rel="stylesheet" href="${STYLESHEET_PATH}"></head><body>${body}</body></html>`.html}\n`;
}

/** A plain page for a refused or unknown link: a title and one paragraph. */
export function noticePage(title: string, text: string): string {
  return doc(
    title,
    html`<main class="notice"><h1>${title}</h1><p>${text}</p><p class="meta">Tidemark gives advisory information only; the order itself is not affected.</p></main>`,
  );
}

const TOPIC_TITLE: Record<string, string> = {
  responsiveness: 'Responsiveness',
  tolerance: 'Tolerance',
  perfusion: 'Perfusion and need',
  phase: 'Phase of care',
  data: 'Data',
};

function evidenceTable(f: PageFinding, zone: string, at: string): Raw {
  if (!f.evidence.length) return raw('');
  return html`<table><thead><tr><th>Marker</th><th>Value</th><th>Time (age)</th><th>FHIR reference</th></tr></thead><tbody>${f.evidence.map(
    (e) =>
      html`<tr><td>${e.label}</td><td class="num">${e.value}${e.unit ? ` ${e.unit}` : ''}</td><td>${clockWithAge(e.effective, zone, at)}</td><td class="ref">${e.ref}</td></tr>`,
  )}</tbody></table>`;
}

function valuesList(f: PageFinding): Raw {
  if (!f.figures.length) return raw('');
  return html`<details><summary>Derived values</summary><table><tbody>${f.figures.map(([k, v]) => html`<tr><td class="ref">${k}</td><td class="num">${v}</td></tr>`)}</tbody></table></details>`;
}

const DIRECTION_WORDS: Record<string, string> = { for: 'for volume', against: 'against volume' };

function finding(f: PageFinding, zone: string, at: string): Raw {
  return html`<div class="finding"><p class="text">${f.direction ? html`<span class="tag">${DIRECTION_WORDS[f.direction] ?? 'neutral'}</span>` : ''}${f.tier ? html`<span class="tag">${f.tier}</span>` : ''}${f.assessed ? '' : html`<span class="tag">not assessed</span>`}${f.text}</p>${
    f.reason ? html`<p>Why: ${f.reason}</p>` : ''
  }${evidenceTable(f, zone, at)}${valuesList(f)}<p class="meta">Rule <code>${f.ruleId}</code>${f.source ? html` · Source: ${f.source}` : ''}</p></div>`;
}

function whatIfOutcome(o: PageWhatIfOutcome | undefined, result: 'positive' | 'negative'): Raw {
  if (!o) return html`<td class="empty">—</td>`;
  return html`<td data-result="${result}" data-changes="${o.changes ? 'yes' : 'no'}"><p class="meta">${o.assumed}</p><p><strong>${o.verdict}</strong></p>${
    o.action ? html`<p>${o.action}</p>` : ''
  }<p>${o.changes ? html`<span class="tag">changes the advice</span>` : html`<span class="meta">no change</span>`}</p></td>`;
}

function whatIfSection(w: PageWhatIf | undefined): Raw {
  const head = html`<h2 id="what-if-h">What would change the advice</h2>`;
  if (!w)
    return html`<section id="what-if" aria-labelledby="what-if-h">${head}<p class="empty">Not worked out for this advice (no responsiveness verdict, or made by an earlier rules version).</p></section>`;
  let lead = html`<p id="what-if-decisive">No feasible test would change the verdict or the advice now.</p>`;
  if (w.settled)
    lead = html`<p id="what-if-decisive">The responsiveness verdict already rests on a test with a flow measurement, so no further test is named as deciding; the table still shows what each result would do.</p>`;
  if (w.decisive)
    lead = html`<p id="what-if-decisive">The test that would settle it: <strong>${w.decisive}</strong> (the first feasible test, in the order the advice prefers for this patient, whose result would change the verdict or the advice).</p>`;
  return html`<section id="what-if" aria-labelledby="what-if-h">${head}${lead}<p class="meta">For each test the advice can offer: whether it can be done for this patient now, and if so what a result just past its published threshold (positive) or clearly below it (negative) would do, worked out by re-running the same rules with that one result added. These results are hypothetical; nothing in this table was measured.</p>
<table class="what-if"><thead><tr><th>Test</th><th>Feasible now</th><th>If positive</th><th>If negative</th></tr></thead><tbody>${w.rows.map(
    (r) =>
      html`<tr data-test="${r.code}" data-feasible="${r.feasible ? 'yes' : 'no'}"${r.decisive ? raw(' data-decisive="yes"') : ''}><td><strong>${r.test}</strong>${r.decisive ? html` <span class="tag">decisive</span>` : ''}${
        r.source ? html`<p class="meta">Threshold: ${r.source}</p>` : ''
      }</td>${
        r.feasible
          ? html`<td>Yes${r.readOn ? html`, read on ${r.readOn}` : ''}</td>${whatIfOutcome(
              r.outcomes.find((o) => o.result === 'positive'),
              'positive',
            )}${whatIfOutcome(
              r.outcomes.find((o) => o.result === 'negative'),
              'negative',
            )}`
          : html`<td colspan="3">No: ${r.why.join('; ')}.</td>`
      }</tr>`,
  )}</tbody></table></section>`;
}

function plotFigure(p: RenderedPlot, zone: string, trends: Trends, n: number): Raw {
  const rows = p.plot.rows;
  const id = `plot-${p.plot.id}`;
  const counts = p.plot.axes
    .flatMap((a) => a.series)
    .map((s) => [s, rows.filter((r) => r.series === s)] as const)
    .filter(([, r]) => r.length);
  const summary = counts.length
    ? counts
        .map(([s, r]) => {
          const last = r[r.length - 1]!;
          return `${s}: ${r.length} value${r.length === 1 ? '' : 's'}, latest ${last.value} ${last.unit} at ${clock(last.t, zone, trends.now)}`;
        })
        .join('; ')
    : `Nothing charted in the last ${trends.hours} h.`;
  return html`<figure id="${id}" data-plot="${p.plot.id}"><figcaption id="${id}-title">${n}. ${p.plot.title}</figcaption>${
    p.svg ? html`<div role="img" aria-labelledby="${id}-title ${id}-summary" class="plot">${raw(p.svg)}</div>` : ''
  }${p.failed ? html`<p class="empty">This plot could not be drawn; its values are in the table below.</p>` : ''}<p id="${id}-summary" class="${counts.length ? 'meta' : 'empty'}">${summary}</p>${
    rows.length
      ? html`<details><summary>Values of this plot as a table</summary><table class="plot-data"><thead><tr><th>Time (site)</th><th>Series</th><th>Value</th><th>Unit</th><th>Note</th><th>FHIR reference</th></tr></thead><tbody>${rows.map(
          (r) =>
            html`<tr data-series="${r.series}" data-time="${r.t}" data-value="${r.value}" aria-label="${describeRow(r)}"><td>${r.t0 ? `${clock(r.t0, zone, trends.now)}–` : ''}${clock(r.t, zone, trends.now)}</td><td>${r.series}</td><td class="num">${r.value}</td><td>${r.unit}</td><td>${r.note ?? ''}</td><td class="ref">${r.ref}</td></tr>`,
        )}</tbody></table></details>`
      : ''
  }</figure>`;
}

export function reasoningPage(v: PageView, zone: string, trends: Trends | undefined, plots: RenderedPlot[]): string {
  const at = v.adviceAt;
  // Findings that could not be assessed are listed once, under "Missing, stale or set aside".
  const byTopic = ['responsiveness', 'tolerance', 'perfusion', 'phase', 'data']
    .map((t) => [t, v.findings.filter((f) => f.topic === t && f.assessed)] as const)
    .filter(([, f]) => f.length);
  const unassessed = v.findings.filter((f) => !f.assessed).length;
  const body = html`<header><p class="meta">Tidemark · reasoning behind one piece of fluid advice</p>
<h1>Fluid bolus advice, ${fullClock(at, zone)}</h1>
<p class="advisory">Advisory only. It does not order, stop or block anything; local protocol and the treating clinician's judgement prevail.</p>
<p class="meta">Patient <span class="ref">${v.patientRef ?? 'not given'}</span>${v.encounterRef ? html` · Encounter <span class="ref">${v.encounterRef}</span>` : ''} · Service <code>${v.service}</code> (${v.hook}) · Advice <span class="ref">${v.adviceId}</span> · Ages are counted back from the moment of the advice.</p></header>
<main>
<section id="verdicts" aria-labelledby="verdicts-h"><h2 id="verdicts-h">Verdicts</h2>
${v.headline ? html`<p class="headline ${v.indicator ?? 'info'}" id="headline">${v.headline}</p>` : ''}
${v.action ? html`<p><strong>Advice:</strong> ${v.action}.${v.phase ? html` <span class="meta">(${v.phase})</span>` : ''}</p>` : ''}
${v.answered ? '' : html`<p>The advice could not be given: required data could not be obtained (see below).</p>`}
<div class="verdicts">${v.verdicts.map(
    (
      d,
    ) => html`<div class="verdict" data-verdict="${d.key}"><p class="q">${d.question}</p><p class="v">${d.value}</p><p>${d.rationale}</p><dl>
${d.confidence ? html`<dt>Confidence</dt><dd>${d.confidence}</dd>` : ''}${d.coverage ? html`<dt>Coverage</dt><dd>${d.coverage}</dd>` : ''}${d.nextTest ? html`<dt>Next test</dt><dd>${d.nextTest}</dd>` : ''}${d.assumptions.length ? html`<dt>Assumed</dt><dd>${d.assumptions.join('; ')}</dd>` : ''}${
      d.decidingRules.length
        ? html`<dt>Decided by</dt><dd>${d.decidingRules.map((r, j) => html`${j ? ', ' : ''}<code>${r}</code>`)}</dd>`
        : ''
    }</dl></div>`,
  )}</div>
${v.reasons.length ? html`<h3>Why</h3><ul>${v.reasons.map((r) => html`<li>${r}</li>`)}</ul>` : ''}
${v.alternatives.length ? html`<h3>Options to consider instead of, or before, the bolus</h3><ul>${v.alternatives.map((r) => html`<li>${r}</li>`)}</ul>` : ''}
</section>
${whatIfSection(v.whatIf)}
${trends ? html`<section id="trends" aria-labelledby="trends-h"><h2 id="trends-h">Trends, last ${trends.hours} h</h2><p class="meta">All plots share one time axis, ${clock(trends.from, zone, trends.now)} to ${clock(trends.to, zone, trends.from)} site time (${zone}); the dashed line is the moment of the advice. Values as Tidemark read them from the data the call brought.</p>${plots.map((p, i) => plotFigure(p, zone, trends, i + 1))}</section>` : ''}
<section id="findings" aria-labelledby="findings-h"><h2 id="findings-h">Findings</h2>${byTopic.map(([t, fs]) => html`<h3>${TOPIC_TITLE[t] ?? t}</h3>${fs.map((f) => finding(f, zone, at))}`)}${byTopic.length ? '' : html`<p class="empty">No marker could be assessed.</p>`}${unassessed ? html`<p class="meta">${unassessed} more could not be assessed: see <a href="#gaps">Missing, stale or set aside</a>.</p>` : ''}</section>
<section id="gaps" aria-labelledby="gaps-h"><h2 id="gaps-h">Missing, stale or set aside</h2>${
    v.gaps.length
      ? html`<table><thead><tr><th>What</th><th>State</th><th>Why</th><th>Values seen, FHIR reference</th></tr></thead><tbody>${v.gaps.map(
          (g) =>
            html`<tr><td>${g.what}</td><td>${g.kind}</td><td>${g.why}</td><td>${g.ref ? html`<span class="ref">${g.ref}</span>` : ''}${g.evidence.map(
              (e) =>
                html`<div>${e.label} ${e.value}${e.unit ? ` ${e.unit}` : ''}, ${clockWithAge(e.effective, zone, at)} <span class="ref">${e.ref}</span></div>`,
            )}</td></tr>`,
        )}</tbody></table>`
      : html`<p class="empty">Nothing was missing, stale or set aside.</p>`
  }</section>
<section id="order" aria-labelledby="order-h"><h2 id="order-h">The ordered bolus</h2>${v.order.length ? v.order.map((f) => finding(f, zone, at)) : html`<p class="empty">No fluid bolus was selected in this order.</p>`}</section>
<section id="rules" aria-labelledby="rules-h"><h2 id="rules-h">Rules and thresholds</h2><p>Rules version <code>${v.rulesVersion}</code> (package version, card catalogue and active thresholds). Recorded ${fullClock(v.recordedAt, zone)}.</p>${
    v.thresholds
      ? html`<details><summary>The ${v.thresholds.length} thresholds of this rules version</summary><table><tbody>${v.thresholds.map(([k, x]) => html`<tr><td class="ref">${k}</td><td>${x}</td></tr>`)}</tbody></table></details>`
      : html`<p>This advice was made under another rules version than the one now running, so its thresholds are not shown here; the audit API's replay re-runs it under today's rules.</p>`
  }<p class="meta">Each finding above names its published source, or says common practice.</p></section>
<section id="cautions" aria-labelledby="cautions-h"><h2 id="cautions-h">Cautions</h2><ul>${v.cautions.map((c) => html`<li>${c}</li>`)}</ul><p><strong>Local protocol and the licensed clinician's judgement prevail over this advice.</strong></p></section>
</main>`;
  return doc(`Fluid advice, ${clock(at, zone)}`, body);
}
