/**
 * The reasoning page's stylesheet, served from the same origin (GET /pages/style.css) so the CSP can stay
 * `default-src 'self'` with no inline style. A plain clinical page of our own: system fonts, dark text on white,
 * verdicts first, nothing that moves; a print stylesheet that drops the chrome and keeps plots whole.
 */
export const PAGE_CSS = `
:root { --ink: #111; --muted: #444; --line: #bbb; --soft: #f3f3f0; --info: #1d4f91; --warning: #7a4b00; --critical: #b3261e; }
* { box-sizing: border-box; }
html { font-family: system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", sans-serif; font-size: 16px; color: var(--ink); background: #fff; }
body { margin: 0 auto; max-width: 60rem; padding: 1rem 1.25rem 3rem; line-height: 1.45; }
h1 { font-size: 1.35rem; margin: 0.25rem 0 0.5rem; }
h2 { font-size: 1.1rem; margin: 2rem 0 0.5rem; padding-bottom: 0.2rem; border-bottom: 2px solid var(--ink); }
h3 { font-size: 1rem; margin: 1.25rem 0 0.35rem; }
p, ul { margin: 0.35rem 0; }
a { color: var(--info); }
.meta { color: var(--muted); font-size: 0.9rem; }
.advisory { border: 2px solid var(--ink); padding: 0.5rem 0.75rem; margin: 0.75rem 0; font-weight: 600; }
.headline { font-size: 1.15rem; font-weight: 700; margin: 0.5rem 0; padding-left: 0.6rem; border-left: 0.45rem solid var(--info); }
.headline.warning { border-left-color: var(--warning); }
.headline.critical { border-left-color: var(--critical); }
.verdicts { display: grid; grid-template-columns: repeat(auto-fit, minmax(17rem, 1fr)); gap: 0.75rem; margin: 0.75rem 0; }
.verdict { border: 1px solid var(--line); padding: 0.6rem 0.75rem; background: var(--soft); }
.verdict .q { font-size: 0.85rem; color: var(--muted); margin: 0; }
.verdict .v { font-size: 1.2rem; font-weight: 700; margin: 0.15rem 0 0.3rem; }
.verdict dl { display: grid; grid-template-columns: minmax(5.5rem, max-content) 1fr; gap: 0.1rem 0.6rem; margin: 0.3rem 0 0; font-size: 0.9rem; }
.verdict dt { color: var(--muted); }
.verdict dd { margin: 0; }
table { border-collapse: collapse; width: 100%; margin: 0.4rem 0 0.8rem; font-size: 0.9rem; }
th, td { text-align: left; vertical-align: top; padding: 0.25rem 0.45rem; border-bottom: 1px solid var(--line); }
th { background: var(--soft); font-weight: 600; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
code, .ref { font-family: ui-monospace, "Cascadia Mono", "DejaVu Sans Mono", monospace; font-size: 0.82rem; overflow-wrap: anywhere; }
.finding { margin: 0.6rem 0 0.9rem; }
.finding > p.text { font-weight: 600; }
.tag { display: inline-block; font-size: 0.78rem; border: 1px solid var(--muted); padding: 0 0.35rem; margin-right: 0.3rem; }
figure { margin: 0.75rem 0 1.25rem; break-inside: avoid; page-break-inside: avoid; }
figcaption { font-weight: 600; margin-bottom: 0.25rem; }
figure svg { max-width: 100%; height: auto; display: block; }
details { margin: 0.3rem 0; }
summary { cursor: pointer; color: var(--info); }
.empty { color: var(--muted); font-style: italic; }
.notice { max-width: 36rem; margin: 4rem auto; border: 2px solid var(--ink); padding: 1rem 1.25rem; }
@page { margin: 14mm 12mm; }
@media print {
  html { font-size: 11pt; }
  body { max-width: none; padding: 0; }
  a { color: var(--ink); text-decoration: none; }
  details::details-content { content-visibility: visible; display: block; }
  summary { color: var(--ink); }
  .verdict { background: none; }
  h2 { break-after: avoid; page-break-after: avoid; }
  tr, .finding, .verdict { break-inside: avoid; page-break-inside: avoid; }
}
`;
