/** The reasoning page from a stored advice record: adapter (view.ts) → trends (trends.ts) → plots (plots.ts) → HTML (page.ts). */
import { reasoningPage, type RenderedPlot } from './page.js';
import { plotSvg } from './plots.js';
import { trendsOf } from './trends.js';
import { toPageView, type ViewInput } from './view.js';

export { noticePage, STYLESHEET_PATH } from './page.js';
export { PAGE_CSS } from './style.js';
export { docsPage } from './docs.js';

export async function renderAdvicePage(input: ViewInput & { zone: string }): Promise<string> {
  const view = toPageView(input);
  const trends = view.snapshot ? trendsOf(view.snapshot, view.adviceAt) : undefined;
  const plots: RenderedPlot[] = [];
  for (const plot of trends?.plots ?? []) {
    if (!plot.rows.length) {
      plots.push({ plot });
      continue;
    }
    try {
      plots.push({ plot, svg: await plotSvg(plot, trends!, input.zone) });
    } catch {
      // A plot vega cannot draw leaves its summary and table: the page itself is still given.
      plots.push({ plot, failed: true });
    }
  }
  return reasoningPage(view, input.zone, trends, plots);
}
