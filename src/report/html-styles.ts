/**
 * The report's one inline style sheet. Constant text (no data), so its CSP
 * hash is stable. System fonts only; light and dark schemes follow
 * `prefers-color-scheme`.
 *
 * @module
 */

/** CSS of the report page. */
export const REPORT_CSS = `
:root {
  color-scheme: light dark;
  --bg: #ffffff; --fg: #1b1e23; --muted: #59606b; --line: #d5d9df; --panel: #f4f6f8;
  --link: #0b57b0; --focus: #c2185b; --bar: #4a6fa5; --bar2: #6d8f3c; --track: #e3e7ec;
  --ins-bg: #dff3e2; --ins-fg: #0d4a1c; --del-bg: #fbe2e2; --del-fg: #7a1010; --hit: rgba(11, 87, 176, 0.08);
}
@media (prefers-color-scheme: dark) {
  :root {
    --bg: #15181c; --fg: #e6e8eb; --muted: #a4abb5; --line: #3a4049; --panel: #1e2227;
    --link: #8ab8ff; --focus: #ff7eb3; --bar: #7fa3d8; --bar2: #a3c46e; --track: #2c3138;
    --ins-bg: #16391f; --ins-fg: #b8f0c4; --del-bg: #431b1b; --del-fg: #ffc4c4; --hit: rgba(138, 184, 255, 0.12);
  }
}
* { box-sizing: border-box; }
[hidden] { display: none !important; }
html { font-size: 100%; }
body {
  margin: 0; background: var(--bg); color: var(--fg);
  font: 1rem/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", "Liberation Sans", sans-serif;
}
a { color: var(--link); }
a:focus-visible, button:focus-visible, input:focus-visible, summary:focus-visible, [tabindex]:focus-visible {
  outline: 3px solid var(--focus); outline-offset: 2px;
}
h2[tabindex="-1"]:focus, main:focus { outline: none; }
.skip { position: absolute; left: -999px; top: 0; background: var(--bg); padding: .5rem 1rem; z-index: 2; }
.skip:focus { left: .5rem; }
.visually-hidden {
  position: absolute !important; width: 1px; height: 1px; overflow: hidden; clip: rect(0 0 0 0);
  white-space: nowrap; border: 0; padding: 0; margin: -1px;
}
header.top { border-bottom: 1px solid var(--line); background: var(--panel); }
header.top .inner, main { max-width: 76rem; margin: 0 auto; padding: 0 1rem; }
header.top h1 { font-size: 1.25rem; margin: 0; padding: .75rem 0 .25rem; overflow-wrap: anywhere; }
header.top .meta { margin: 0 0 .5rem; color: var(--muted); font-size: .875rem; }
nav.views ul { list-style: none; display: flex; flex-wrap: wrap; gap: .25rem 1rem; margin: 0; padding: 0 0 .5rem; }
nav.views a { display: inline-block; padding: .25rem .125rem; }
nav.views a[aria-current="page"] { font-weight: 700; text-decoration-thickness: 3px; }
main { padding-bottom: 3rem; }
section.view > h2 { margin-top: 1.25rem; overflow-wrap: anywhere; }
h3 { margin-top: 1.75rem; }
.js section.view[hidden] { display: none; }
.notice { border-left: 4px solid var(--focus); padding: .5rem .75rem; background: var(--panel); }
table.choice tr.chosen td { font-weight: 700; }
.muted { color: var(--muted); }
dl.counts { display: grid; grid-template-columns: repeat(auto-fill, minmax(11rem, 1fr)); gap: .5rem 1rem; margin: 0; }
dl.counts div { background: var(--panel); border: 1px solid var(--line); border-radius: 6px; padding: .5rem .75rem; }
dl.counts dt { color: var(--muted); font-size: .875rem; }
dl.counts dd { margin: 0; font-size: 1.375rem; font-variant-numeric: tabular-nums; }
table { border-collapse: collapse; width: 100%; margin: .5rem 0; font-variant-numeric: tabular-nums; }
th, td { text-align: left; padding: .3rem .5rem; border-bottom: 1px solid var(--line); vertical-align: top; }
td.num, th.num { text-align: right; }
td.text { overflow-wrap: anywhere; }
td code, li code { overflow-wrap: anywhere; }
th button { font: inherit; font-weight: 700; background: none; border: 0; padding: 0; color: var(--link); cursor: pointer; text-decoration: underline; }
th[aria-sort] button::after { content: ""; }
th[aria-sort="ascending"] button::after { content: " \\25B2"; }
th[aria-sort="descending"] button::after { content: " \\25BC"; }
details.fallback { margin: .5rem 0 1rem; }
details.fallback summary { cursor: pointer; color: var(--link); }
.chart-wrap { width: fit-content; max-width: 100%; overflow-x: auto; border: 1px solid var(--line); border-radius: 6px; background: var(--bg); }
svg.chart { display: block; max-width: 100%; height: auto; font-size: 13px; fill: var(--fg); }
svg.map-chart, svg.tree-chart { max-width: none; }
svg.map-chart { max-width: 100%; }
svg .row-hit { fill: transparent; }
svg a.chart-link:hover .row-hit, svg a.chart-link:focus .row-hit { fill: var(--hit); }
svg a.chart-link:focus { outline: 3px solid var(--focus); }
svg a.chart-link:focus .map-dot { stroke: var(--focus); stroke-width: 4; }
svg a.chart-link text { fill: var(--link); text-decoration: underline; }
svg .bar { fill: var(--bar); }
svg .sizes-chart .bar, svg.sizes-chart rect.bar { stroke: var(--fg); stroke-width: .5; }
svg .bar-cohesion { fill: var(--bar2); }
svg .bar-term { fill: var(--bar); }
svg .bar-track { fill: var(--track); }
svg .bar-value, svg .tick { fill: var(--fg); font-variant-numeric: tabular-nums; }
svg .axis-label { fill: var(--muted); font-size: 12px; }
svg .axis, svg .branch { stroke: var(--fg); fill: none; stroke-width: 1.5; }
svg .grid { stroke: var(--line); stroke-width: 1; stroke-dasharray: 2 3; }
svg .join { fill: var(--fg); }
svg .plot-frame { fill: none; stroke: var(--line); }
svg .map-dot { fill-opacity: .7; stroke: var(--fg); stroke-width: 1; }
svg .map-label { font-size: 12px; paint-order: stroke; stroke: var(--bg); stroke-width: 3px; stroke-linejoin: round; }
.tools { display: flex; flex-wrap: wrap; gap: .5rem 1rem; align-items: center; margin: .75rem 0 .25rem; }
.tools input[type="search"] { font: inherit; padding: .3rem .5rem; min-width: 16rem; border: 1px solid var(--muted); border-radius: 4px; background: var(--bg); color: var(--fg); }
.pager { display: flex; gap: .75rem; align-items: center; margin: .5rem 0; }
button { font: inherit; }
.pager button, button.toggle {
  padding: .25rem .75rem; border: 1px solid var(--muted); border-radius: 4px; background: var(--panel); color: var(--fg); cursor: pointer;
}
.pager button[disabled] { opacity: .5; cursor: default; }
ol.exemplars li { margin: .25rem 0; overflow-wrap: anywhere; }
.stats { display: flex; flex-wrap: wrap; gap: .25rem 1.5rem; padding: 0; list-style: none; }
.step-nav { display: flex; flex-wrap: wrap; gap: .5rem 1.5rem; margin: 1rem 0; }
.legend { background: var(--panel); padding: .5rem .75rem; border-radius: 6px; }
article.member { border-top: 1px solid var(--line); padding: .5rem 0 1rem; }
article.member h3 { margin: .5rem 0 .25rem; font-size: 1.05rem; overflow-wrap: anywhere; }
.diff { white-space: pre-wrap; overflow-wrap: anywhere; background: var(--panel); padding: .5rem .75rem; border-radius: 6px; line-height: 1.7; }
ins { background: var(--ins-bg); color: var(--ins-fg); text-decoration: underline; }
del { background: var(--del-bg); color: var(--del-fg); text-decoration: line-through; }
.mark { font-weight: 700; text-decoration: none; display: inline; }
.elided { color: var(--muted); font-style: italic; }
@media print {
  .js section.view[hidden] { display: block; }
  nav.views, .pager, .tools, .skip { display: none; }
}
`;
