/**
 * Trend plots as SVG, rendered on the server: a Vega-Lite spec per plot, compiled by vega-lite and rendered by
 * vega's headless View (renderer 'none', toSVG); no chart drawing of our own. Every plot has the same time axis
 * (the window of trends.ts, same width), shown in the site's time zone: vega formats time in the process's zone
 * or in UTC only, so each instant is shifted by its zone offset and drawn on a UTC scale (wall-clock time).
 * Each point, bar and line vertex carries an aria-label "{series} {value} {unit} at {ISO instant}" (the
 * Vega-Lite `description` channel), which the browser test reads back.
 */
import * as vega from 'vega';
import { compile, type TopLevelSpec } from 'vega-lite';
import { zoneOffsetMs } from './time.js';
import type { TrendPlot, TrendRow, Trends } from './trends.js';

export const PLOT_WIDTH = 640;
export const PLOT_HEIGHT = 120;
/** Our own palette: dark, distinct hues that hold up in greyscale print. */
const COLOURS: Record<string, string> = {
  MAP: '#b3261e',
  'Heart rate': '#1d4f91',
  CVP: '#5b3a8c',
  Lactate: '#7a4b00',
  'Urine output': '#2f6f4e',
  'Cumulative balance': '#1d4f91',
  'Fluid given': '#2f6f4e',
  'Draft bolus (now)': '#b3261e',
  'Dynamic test': '#1d4f91',
  PPV: '#7a4b00',
  SVV: '#5b3a8c',
};
const SHAPES: Record<string, string> = { 'Dynamic test': 'diamond', PPV: 'circle', SVV: 'square', 'Draft bolus (now)': 'triangle-down' };

const PAD_LEFT = 76;
const PAD_RIGHT = 76;

/** The value axis: the data's range, widened about its middle to at least `minSpan`; from 0 for bars. */
function yDomain(rows: TrendRow[], minSpan: number): [number, number] {
  const v = rows.map((r) => r.value);
  let lo = Math.min(...v);
  let hi = Math.max(...v);
  if (rows.some((r) => r.mark === 'bar' || r.mark === 'draft')) lo = Math.min(0, lo);
  if (hi - lo < minSpan) {
    const mid = (hi + lo) / 2;
    const zeroBased = lo === 0 && rows.some((r) => r.mark === 'bar' || r.mark === 'draft');
    [lo, hi] = zeroBased ? [0, minSpan] : [mid - minSpan / 2, mid + minSpan / 2];
    if (lo < 0 && Math.min(...v) >= 0) [lo, hi] = [0, minSpan];
  }
  return [lo, hi];
}

export const describeRow = (r: TrendRow): string => `${r.series} ${r.value} ${r.unit} at ${r.t}`;

interface Datum {
  x: number;
  x0?: number;
  v: number;
  series: string;
  desc: string;
}

function layerFor(
  rows: TrendRow[],
  mark: TrendRow['mark'],
  y: object,
  colour: object,
  x: object,
  shift: (iso: string) => number,
): object[] {
  const values: Datum[] = rows
    .filter((r) => r.mark === mark)
    .map((r) => ({
      x: shift(r.t),
      ...(r.t0 ? { x0: shift(r.t0) } : {}),
      v: r.value,
      series: r.series,
      desc: describeRow(r),
    }));
  if (!values.length) return [];
  const enc = { x, y: { field: 'v', type: 'quantitative', ...y }, color: colour, description: { field: 'desc' } };
  switch (mark) {
    case 'line':
      return [
        {
          data: { values },
          mark: { type: 'line', strokeWidth: 2, interpolate: 'linear', aria: false },
          encoding: { ...enc, detail: { field: 'series' } },
        },
        { data: { values }, mark: { type: 'point', filled: true, size: 36, opacity: 1 }, encoding: enc },
      ];
    case 'bar':
      return [
        {
          data: { values },
          mark: { type: 'bar', opacity: 0.75, minBandSize: 3 },
          encoding: { ...enc, x: { ...x, field: 'x0' }, x2: { field: 'x' }, y2: { datum: 0 } },
        },
      ];
    case 'point':
    case 'draft':
      return [
        {
          data: { values },
          mark: {
            type: 'point',
            filled: true,
            size: mark === 'draft' ? 140 : 70,
            opacity: 1,
            shape: SHAPES[values[0]!.series] ?? 'circle',
          },
          encoding: enc,
        },
      ];
  }
}

export function plotSpec(plot: TrendPlot, trends: Trends, zone: string): TopLevelSpec {
  const shift = (iso: string) => {
    const t = Date.parse(iso);
    return t + zoneOffsetMs(t, zone);
  };
  const x = {
    field: 'x',
    type: 'temporal',
    title: `Site time (${zone}); dashed line: the advice`,
    scale: { type: 'utc', domain: [shift(trends.from), shift(trends.to)] },
    axis: { format: '%H:%M', labelFontSize: 11, titleFontSize: 12, tickCount: 12 },
  };
  const names = plot.axes.flatMap((a) => a.series);
  const colour = {
    field: 'series',
    type: 'nominal',
    title: null,
    scale: { domain: names, range: names.map((n) => COLOURS[n] ?? '#222') },
    legend: { orient: 'top', direction: 'horizontal', labelFontSize: 12, labelLimit: 260, symbolSize: 80, symbolType: 'circle', offset: 6 },
  };
  const groups = plot.axes
    .map((a, i) => {
      const rows = plot.rows.filter((r) => a.series.includes(r.series));
      const y = {
        title: a.title,
        scale: { domain: yDomain(rows, a.minSpan), nice: true },
        axis: { orient: i === 0 ? 'left' : 'right', titleFontSize: 12, labelFontSize: 11, format: '~r', minExtent: 44, maxExtent: 44 },
      };
      return { layer: (['bar', 'line', 'point', 'draft'] as const).flatMap((m) => layerFor(rows, m, y, colour, x, shift)) };
    })
    .filter((g) => g.layer.length);
  const nowRule = {
    data: { values: [{ x: shift(trends.now) }] },
    mark: { type: 'rule', strokeDash: [5, 4], color: '#222', aria: false },
    encoding: { x },
  };
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    // Fixed padding, no auto-size: every plot's frame starts and ends at the same x, so the time axes line up.
    width: PLOT_WIDTH,
    height: PLOT_HEIGHT,
    background: '#ffffff',
    autosize: { type: 'none', contains: 'content' },
    padding: { left: PAD_LEFT, right: PAD_RIGHT, top: 34, bottom: 44 },
    config: {
      font: 'system-ui, -apple-system, "Segoe UI", Roboto, sans-serif',
      view: { stroke: '#999' },
      axis: { labelFontSize: 11, titleFontSize: 12, gridColor: '#e4e4e4' },
      legend: { labelFontSize: 12 },
    },
    layer: [...groups, nowRule],
    resolve: { scale: { y: groups.length > 1 ? 'independent' : 'shared' } },
  };
  return spec as unknown as TopLevelSpec;
}

/** The plot as an SVG string (role img, labelled by the plot's title element). */
export async function plotSvg(plot: TrendPlot, trends: Trends, zone: string): Promise<string> {
  // Nothing may write to stdout/stderr but the service's logger: vega's and vega-lite's console loggers are silenced
  // (level None); a spec they cannot compile or render still throws.
  const quiet = vega.logger(vega.None);
  const view = new vega.View(vega.parse(compile(plotSpec(plot, trends, zone), { logger: quiet }).spec), {
    renderer: 'none',
    logger: quiet,
  });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}
