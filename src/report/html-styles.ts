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
/* Word changes: words only in this copy sit on a tinted band with a filled corner mark; words only in the representative are struck through with a hollow one. */
ins { background: var(--ins-bg); color: var(--ins-fg); text-decoration: none; border-bottom: 2px solid currentColor; padding: 0 .15em; border-radius: 3px 3px 0 0; }
ins::before { content: "\\25B8"; font-size: .7em; vertical-align: super; margin-right: .1em; }
del { background: var(--del-bg); color: var(--del-fg); text-decoration: line-through; text-decoration-thickness: 2px; padding: 0 .15em; border-radius: 3px; }
del::before { content: "\\25B9"; font-size: .7em; vertical-align: super; margin-right: .1em; text-decoration: none; display: inline-block; }
.elided { color: var(--muted); font-style: italic; }
/* Group numbers stand apart from names. */
.gno { display: inline-block; min-width: 1.7em; padding: 0 .35em; margin-right: .45em; border-radius: 999px; background: var(--track);
  color: var(--fg); font-size: .8em; font-weight: 700; text-align: center; font-variant-numeric: tabular-nums; line-height: 1.6; vertical-align: .08em; text-decoration: none; }
a.glink { text-decoration: none; }
a.glink .gname { text-decoration: underline; }
h2 .gno { font-size: .6em; vertical-align: .3em; }
svg .gno-svg { font-weight: 700; fill: var(--muted); }
td.col { white-space: nowrap; }
.table-wrap, .scroll { overflow-x: auto; max-width: 100%; }
fieldset.filters { display: flex; flex-wrap: wrap; gap: .5rem 1rem; align-items: end; border: 1px solid var(--line); border-radius: 6px; padding: .5rem .75rem .75rem; margin: .5rem 0; }
fieldset.filters legend { color: var(--muted); font-size: .875rem; padding: 0 .25rem; }
.filter { display: flex; flex-direction: column; gap: .15rem; font-size: .875rem; }
.filter select, .filter input { font: inherit; padding: .25rem .4rem; border: 1px solid var(--muted); border-radius: 4px; background: var(--bg); color: var(--fg); max-width: 16rem; }
.filter input.short { width: 5.5rem; }
button.toggle[aria-pressed="true"] { background: var(--fg); color: var(--bg); }
.cut .tools input[type="range"] { width: min(22rem, 60vw); }
.cut output { font-weight: 700; }
.cut-table button.toggle { white-space: nowrap; }
.holds { display: flex; flex-wrap: wrap; gap: .25rem .75rem; }
dl.doc-facts, dl.doc-columns { display: grid; grid-template-columns: max-content 1fr; gap: .25rem 1rem; margin: .5rem 0; }
dl.doc-facts div, dl.doc-columns div { display: contents; }
dl.doc-facts dt, dl.doc-columns dt { color: var(--muted); }
dl.doc-facts dd, dl.doc-columns dd { margin: 0; overflow-wrap: anywhere; }
.doc-text { white-space: pre-wrap; overflow-wrap: anywhere; background: var(--panel); border-left: 4px solid var(--bar); padding: .75rem 1rem; border-radius: 0 6px 6px 0; line-height: 1.6; }
mark { background: #f3d9a4; color: #2b1d00; border-radius: 2px; padding: 0 .1em; }
ul.near li { margin: .2rem 0; overflow-wrap: anywhere; }
svg .sim-cell { fill: var(--bar); }
svg .sim-self { fill: var(--muted); }
svg .sim-value { font-size: 11px; fill: var(--fg); }
svg .sim-value.on-dark { fill: #ffffff; }
svg .sim-edge { stroke: var(--bar); stroke-opacity: .55; stroke-linecap: round; }
svg .sim-node { fill: var(--panel); stroke: var(--fg); stroke-width: 1.5; }
svg .sim-node-no { font-size: 11px; font-weight: 700; }
svg .share-track { fill: var(--track); }
svg .share-in { fill: var(--bar); }
svg .share-out { fill: var(--muted); }
svg.share { vertical-align: middle; margin-left: .3rem; }
svg.spark { vertical-align: middle; }
svg .spark-line { fill: none; stroke: var(--bar); stroke-width: 1.5; }
svg .spark-end { fill: var(--bar); }
svg .trend-line { fill: none; stroke-width: 2; }
.trend-0 { stroke: #b5651d; background: #b5651d; } .trend-1 { stroke: #2f6f9f; background: #2f6f9f; } .trend-2 { stroke: #3d8b37; background: #3d8b37; }
.trend-3 { stroke: #8e44ad; background: #8e44ad; } .trend-4 { stroke: #c0392b; background: #c0392b; } .trend-5 { stroke: #7f8c8d; background: #7f8c8d; }
ul.trend-legend { list-style: none; padding: 0; display: flex; flex-wrap: wrap; gap: .25rem 1.25rem; }
.swatch { display: inline-block; width: 1.2rem; height: .3rem; vertical-align: middle; margin-right: .4rem; border-radius: 2px; }
.flag { display: inline-block; font-size: .75rem; font-weight: 700; padding: 0 .4rem; border-radius: 999px; border: 1px solid var(--focus); color: var(--focus); }
table.label-grid td.top { font-weight: 700; background: var(--hit); }
table.label-grid td.zero { color: var(--muted); }
table.counts-grid th, table.counts-grid td { padding: .2rem .4rem; }
/* Narrow screens: each row of a list becomes a card, each cell a labelled line. */
@media (max-width: 560px) {
  main, header.top .inner { padding: 0 .6rem; }
  table.rows thead, table.rows-stack thead { position: absolute; width: 1px; height: 1px; overflow: hidden; clip: rect(0 0 0 0); }
  table.rows, table.rows tbody, table.rows tr, table.rows td, table.rows-stack, table.rows-stack tbody, table.rows-stack tr, table.rows-stack td { display: block; width: 100%; }
  table.rows tr, table.rows-stack tr { border: 1px solid var(--line); border-radius: 6px; margin: 0 0 .6rem; padding: .3rem .5rem; }
  table.rows td, table.rows-stack td { border: 0; padding: .15rem 0; display: grid; grid-template-columns: 6.5rem minmax(0, 1fr); gap: .5rem; text-align: left; }
  table.rows td::before, table.rows-stack td::before { content: attr(data-label); color: var(--muted); font-size: .85rem; overflow-wrap: anywhere; }
  table.rows td[colspan] { display: block; }
  table.rows td.col { white-space: normal; overflow-wrap: anywhere; }
  table.rows td[colspan]::before { content: none; }
  .tools input[type="search"] { min-width: 0; width: 100%; }
  .filter select, .filter input { max-width: 100%; }
  dl.doc-facts, dl.doc-columns { grid-template-columns: 1fr; gap: 0; }
  dl.doc-facts dd, dl.doc-columns dd { margin-bottom: .4rem; }
}
@media print {
  .js section.view[hidden] { display: block; }
  nav.views, .pager, .tools, .skip { display: none; }
}
`;
