/**
 * The console's plots: one Vega-Lite spec per plot, compiled by vega-lite and rendered to SVG by vega's headless
 * View on the server (as the reasoning page's plots, src/pages/plots.ts); no chart drawing of our own, no script in
 * the browser. Days and weeks are categories (YYYY-MM-DD text, UTC days, weeks by their Monday), so no time zone
 * enters the drawing. Every bar and point carries an aria-label "{series} {value} at {x}" (the `description`
 * channel), which the browser test reads back; each plot also has a table with the same numbers (render.ts).
 */
import * as vega from 'vega';
import { compile, type TopLevelSpec } from 'vega-lite';

export const CHART_WIDTH = 620;

/** One bar segment or point: x category, series (colour), value. */
export interface ChartDatum {
  x: string;
  series: string;
  value: number;
}

export interface ChartInput {
  kind: 'stacked' | 'share' | 'lines';
  data: ChartDatum[];
  /** Every x category in order (days or weeks of the range), so empty ones keep their place. */
  xDomain: string[];
  /** Series in legend order, with their colours. */
  series: Array<{ name: string; colour: string }>;
  xTitle: string;
  yTitle: string;
  height?: number;
}

/** Our own palettes: dark, distinct hues that hold up in greyscale print; grey for "none". */
export const INDICATOR_COLOURS: Record<string, string> = { critical: '#a8201a', warning: '#b86e00', info: '#1d4f91', none: '#9b9b9b' };
export const FEEDBACK_COLOURS: Record<string, string> = { accepted: '#2f6f4e', overridden: '#a8201a', 'no feedback': '#c9c9c4' };
const CYCLE = ['#1d4f91', '#b86e00', '#2f6f4e', '#5b3a8c', '#a8201a', '#0f6e73', '#7a4b00', '#444444', '#8c3a6b', '#4d6b1f'];
/** A colour per name from a fixed cycle (the order of first appearance). */
export const cycleColours = (names: string[]): Array<{ name: string; colour: string }> =>
  names.map((name, i) => ({ name, colour: CYCLE[i % CYCLE.length]! }));

export const describeDatum = (d: ChartDatum, share?: number): string =>
  `${d.series} ${d.value}${share === undefined ? '' : ` (${Math.round(share * 100)} %)`} at ${d.x}`;

export function chartSpec(c: ChartInput): TopLevelSpec {
  const totals = new Map<string, number>();
  for (const d of c.data) totals.set(d.x, (totals.get(d.x) ?? 0) + d.value);
  const values = c.data.map((d) => ({ ...d, desc: describeDatum(d, c.kind === 'share' ? d.value / (totals.get(d.x) || 1) : undefined) }));
  const x = {
    field: 'x',
    type: 'ordinal',
    title: c.xTitle,
    scale: { domain: c.xDomain },
    axis: { labelAngle: c.xDomain.length > 8 ? -50 : 0, labelFontSize: 10, titleFontSize: 12, labelOverlap: 'greedy' },
  };
  const colour = {
    field: 'series',
    type: 'nominal',
    title: null,
    scale: { domain: c.series.map((s) => s.name), range: c.series.map((s) => s.colour) },
    legend: { orient: 'top', direction: 'horizontal', labelFontSize: 12, labelLimit: 420, symbolType: 'square', columns: 3 },
  };
  const y = {
    field: 'value',
    type: 'quantitative',
    title: c.yTitle,
    axis: { format: c.kind === 'share' ? '.0%' : '~s', labelFontSize: 11, titleFontSize: 12 },
  };
  const encoding =
    c.kind === 'lines'
      ? { x, y, color: colour, description: { field: 'desc' } }
      : {
          x,
          y: { ...y, stack: c.kind === 'share' ? 'normalize' : 'zero' },
          color: colour,
          order: { field: 'rank' },
          description: { field: 'desc' },
        };
  const rank = new Map(c.series.map((s, i) => [s.name, i]));
  const ranked = values.map((v) => ({ ...v, rank: rank.get(v.series) ?? 99 }));
  const layers =
    c.kind === 'lines'
      ? [
          { mark: { type: 'line', strokeWidth: 2, aria: false }, encoding: { x, y, color: colour, detail: { field: 'series' } } },
          { mark: { type: 'point', filled: true, size: 45, opacity: 1 }, encoding },
        ]
      : [{ mark: { type: 'bar', stroke: '#ffffff', strokeWidth: 0.5 }, encoding }];
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    width: CHART_WIDTH,
    height: c.height ?? 160,
    background: '#ffffff',
    padding: { left: 8, right: 8, top: 6, bottom: 6 },
    config: { font: 'system-ui, -apple-system, "Segoe UI", Roboto, sans-serif', view: { stroke: '#999' }, axis: { gridColor: '#e4e4e4' } },
    data: { values: ranked },
    layer: layers,
  };
  return spec as unknown as TopLevelSpec;
}

/** The plot as SVG text. Vega's and vega-lite's console loggers are silenced (nothing but the service's logger writes). */
export async function chartSvg(c: ChartInput): Promise<string> {
  const quiet = vega.logger(vega.None);
  const view = new vega.View(vega.parse(compile(chartSpec(c), { logger: quiet }).spec), { renderer: 'none', logger: quiet });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}
