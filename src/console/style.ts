/**
 * The console's stylesheet (GET /console/style.css): the reasoning page's plain style (src/pages/style.ts) plus the
 * console's bar, filter forms and tables. Our own design: dark text on white, one dark rule under the bar, no motion.
 */
import { PAGE_CSS } from '../pages/style.js';

export const CONSOLE_CSS = `${PAGE_CSS}
body.console { max-width: 72rem; }
.console-bar { display: flex; flex-wrap: wrap; align-items: center; gap: 0.25rem 1.1rem; border-bottom: 3px solid var(--ink); padding: 0.4rem 0 0.5rem; margin-bottom: 0.75rem; }
.console-bar .brand { font-weight: 700; margin-right: 0.75rem; }
.console-bar a { text-decoration: none; padding: 0.15rem 0.1rem; }
.console-bar a[aria-current="page"] { color: var(--ink); font-weight: 700; border-bottom: 3px solid var(--info); }
.console-bar .sign-out, .console-bar .via { margin-left: auto; }
.console-bar .via { color: var(--muted); font-size: 0.85rem; }
button { font: inherit; padding: 0.2rem 0.8rem; border: 1px solid var(--ink); background: var(--soft); color: var(--ink); cursor: pointer; }
button:focus-visible, a:focus-visible, input:focus-visible, select:focus-visible, textarea:focus-visible { outline: 3px solid var(--info); outline-offset: 1px; }
input, select, textarea { font: inherit; padding: 0.15rem 0.3rem; border: 1px solid var(--muted); background: #fff; }
textarea { width: 100%; font-family: ui-monospace, "Cascadia Mono", "DejaVu Sans Mono", monospace; font-size: 0.85rem; }
.filters { display: flex; flex-wrap: wrap; gap: 0.4rem 0.9rem; align-items: end; background: var(--soft); border: 1px solid var(--line); padding: 0.5rem 0.65rem; margin: 0.5rem 0 0.75rem; font-size: 0.9rem; }
.filters label { display: flex; flex-direction: column; gap: 0.1rem; color: var(--muted); }
.sign-in { max-width: 32rem; margin: 4rem auto; border: 2px solid var(--ink); padding: 1rem 1.25rem; }
.sign-in form { display: flex; flex-direction: column; gap: 0.4rem; margin-top: 0.75rem; }
.alert { border-left: 0.4rem solid var(--critical); padding: 0.3rem 0.6rem; background: #fbf1f0; }
.chain { border: 1px solid var(--line); padding: 0.2rem 0.75rem 0.5rem; margin: 0.75rem 0; border-left: 0.45rem solid var(--info); }
.chain.bad { border-left-color: var(--critical); background: #fbf1f0; }
.chain h2 { border: 0; margin: 0.3rem 0 0.2rem; font-size: 1rem; }
figure.chart { border-top: 1px solid var(--line); padding-top: 0.5rem; }
.summary { font-size: 0.92rem; }
.pager a { margin-right: 1rem; }
.back { margin: 0 0 0.5rem; }
footer { margin-top: 2.5rem; border-top: 1px solid var(--line); padding-top: 0.5rem; }
#advice-list td { white-space: nowrap; }
@media print { .console-bar, .filters, .sign-out, form { display: none; } }
`;
