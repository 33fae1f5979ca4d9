/**
 * `report.html`: one self-contained HTML5 page drawn from {@link ReportData}.
 *
 * - No network: no external scripts, styles, fonts or images; one inline
 *   `<style>`, one inline `<script>`, both allowed by a Content-Security-Policy
 *   (`default-src 'none'`) through their SHA-256 hashes.
 * - Untrusted text (document titles and ids, labels, terms, settings) is
 *   escaped wherever it is written into markup; the client-side data is a JSON
 *   block in which `<`, `>`, `&`, U+2028 and U+2029 are `\u` escapes, read with
 *   `JSON.parse` and put on the page with `textContent` only.
 * - Views, routed by the URL hash so back/forward work: `#overview`, `#map`,
 *   `#tree`, `#documents`, `#ungrouped`, `#duplicates`, `#group-N`, `#set-N`.
 *   Charts are inline SVG with `<title>`/`<desc>` and a table of the same data.
 *
 * Pure: a function of its input (the CSP hashes are computed with
 * `node:crypto`, which does no I/O).
 *
 * @module
 */
import { createHash } from 'node:crypto';
import type { ReportData } from './report-data.js';
import { escapeHtml as e, formatCount, formatFixed, formatShare, jsonForScript } from './html-escape.js';
import { groupHref, groupName, sizesChart, treeChart, treeLayout } from './html-charts.js';
import { COLUMN_VALUE_CHARS, reportPayload, textChunks } from './html-payload.js';
import { continuityHtml } from './continuity.js';
import { evaluationBody, groupLink, groupNumber, similarityGraph, similarityMatrix, sparkline, termTable, trendsBody } from './html-views.js';
import { REPORT_CSS } from './html-styles.js';
import { REPORT_SCRIPT } from './html-client.js';
import { choiceSection, mixedStat, unsortedCounts } from './html-quality.js';

type Group = ReportData['groups'][number];

/** Id of the `<script type="application/json">` element that holds the page's data. */
export const REPORT_DATA_ELEMENT_ID = 'sheaf-data';

/** Id prefix of the `<script type="application/json">` blocks holding the documents' texts (`sheaf-text-0`, …). */
export const REPORT_TEXT_ELEMENT_PREFIX = 'sheaf-text-';

/** `'sha256-…'` CSP source for an inline script or style element's exact text. */
export function cspHash(text: string): string {
  return `'sha256-${createHash('sha256').update(text, 'utf8').digest('base64')}'`;
}

/** The Content-Security-Policy of the report: nothing but its own inline script and style. */
export function reportCsp(): string {
  return [
    "default-src 'none'",
    `script-src ${cspHash(REPORT_SCRIPT)}`,
    `style-src ${cspHash(REPORT_CSS)}`,
    "base-uri 'none'",
    "form-action 'none'",
  ].join('; ');
}

/**
 * Renders the report as one self-contained HTML document (a string; writing it
 * is the caller's job). Views without data (no tree, no near-duplicate search,
 * no ungrouped documents) say so instead of failing.
 */
export function renderReport(data: ReportData): string {
  const groups = data.groups;
  const colourIndex = new Map<number, number>();
  groups.forEach((g, i) => colourIndex.set(g.id, i));
  const titleById = new Map<string, string>();
  const indexById = new Map<string, number>();
  let ungrouped = 0;
  data.documents.forEach((d, i) => {
    if (!titleById.has(d.id)) (titleById.set(d.id, d.title), indexById.set(d.id, i));
    if (d.group < 0) ungrouped++;
  });
  const bySize = groups.slice().sort((a, b) => b.size - a.size || a.id - b.id);
  const grouped = groups.reduce((s, g) => s + (Number.isFinite(g.size) ? g.size : 0), 0);

  if (data.kind === 'duplicates') return renderDuplicatesReport(data);
  const nav: [string, string][] = [
    ['overview', 'Overview'],
    ['relations', 'Relations'],
    ['tree', 'Tree'],
    ['documents', 'All documents'],
  ];
  if (ungrouped > 0) nav.push(['ungrouped', 'Not grouped']);
  if (data.trends) nav.push(['trends', 'Over time']);
  if (data.evaluation) nav.push(['scores', 'Scores']);
  if (data.continuity) nav.push(['since', 'Since last run']);
  nav.push(['duplicates', 'Near-duplicates']);

  const parts: string[] = [];
  parts.push(
    ...pageHead(
      data,
      nav,
      `sheaf ${e(data.version)} · ${e(data.createdAt)} · ${e(formatCount(data.counts.documents))} documents in ${e(formatCount(groups.length))} groups`,
    ),
  );
  parts.push(overviewView(data, bySize, grouped, colourIndex));
  parts.push(relationsView(data));
  parts.push(treeView(data));
  parts.push(
    view('documents', 'All documents', [
      `<p>${e(formatCount(data.documents.length))} documents in input order. Search by id, title or text; filter by group, fit, near-copies or a column of the export (values longer than ${COLUMN_VALUE_CHARS} characters are cut here; the reader shows the whole text); sort by a column heading; open a document by its id.</p>`,
      mountPoint('all', ''),
    ]),
  );
  if (ungrouped > 0) {
    parts.push(
      view('ungrouped', 'Not grouped', [
        `<p>${e(formatCount(ungrouped))} documents belong to no group: ${e(formatCount(data.counts.withoutTerms))} had no usable terms after analysis` +
          (data.counts.unsorted ? `, ${e(formatCount(data.counts.unsorted))} fit no group well (unsorted; their fit is kept)` : '') +
          '.</p>',
        mountPoint('ungrouped', ''),
      ]),
    );
  }
  if (data.trends) parts.push(view('trends', 'Over time', trendsBody(data)));
  if (data.evaluation) parts.push(view('scores', 'Scores against known labels', evaluationBody(data)));
  if (data.continuity) {
    const labels = new Map(groups.map((g) => [g.id, g.label]));
    parts.push(view('since', 'Since the previous run', [continuityHtml(data.continuity, (id) => labels.get(id) ?? '')]));
  }
  groups.forEach((g, i) => parts.push(groupView(g, i, groups, grouped, titleById, indexById)));
  parts.push(duplicatesView(data));
  parts.push(...pageTail(data));
  return parts.join('');
}

/** A view section with its focusable heading. */
function view(id: string, heading: string, body: string[], extra = '', badge = ''): string {
  return (
    `<section class="view" id="${e(id)}" aria-labelledby="${e(id)}-h"${extra}>\n` +
    `<h2 id="${e(id)}-h" tabindex="-1">${badge}${badge ? ' ' : ''}${e(heading)}</h2>\n${body.join('\n')}\n</section>\n`
  );
}

/** Where the page's script builds a list; says what is missing when scripts are off. */
function mountPoint(kind: string, attrs: string): string {
  return `<div class="list" data-table="${e(kind)}"${attrs}><p class="muted">This list is built by the page's script, which is not running.</p></div>`;
}

/** A `<details>` with a table of the same data as a chart. */
function fallbackTable(summary: string, caption: string, head: string[], rows: string[][], numeric: ReadonlySet<number>): string {
  const th = head.map((h, i) => `<th scope="col"${numeric.has(i) ? ' class="num"' : ''}>${e(h)}</th>`).join('');
  const body = rows
    .map((r) => `<tr>${r.map((cell, i) => `<td${numeric.has(i) ? ' class="num"' : ' class="text"'}>${cell}</td>`).join('')}</tr>`)
    .join('\n');
  return (
    `<details class="fallback"><summary>${e(summary)}</summary>` +
    `<table><caption class="visually-hidden">${e(caption)}</caption><thead><tr>${th}</tr></thead><tbody>\n${body}\n</tbody></table></details>`
  );
}

function groupLinkHtml(g: Pick<Group, 'id' | 'label'>): string {
  return groupLink(g);
}

function overviewView(
  data: ReportData,
  bySize: readonly Group[],
  grouped: number,
  colourIndex: ReadonlyMap<number, number>,
): string {
  const c = data.counts;
  const counts: [string, string][] = [
    ['Documents', formatCount(c.documents)],
    ['Groups', formatCount(data.groups.length)],
    ['In a group', formatCount(c.grouped)],
    ['Without usable terms', formatCount(c.withoutTerms)],
    ...unsortedCounts(data),
    ['Inputs skipped', formatCount(c.skipped)],
    ['Terms in the vocabulary', formatCount(c.terms)],
  ];
  if (data.duplicates) counts.push(['Near-duplicate sets', formatCount(data.duplicates.sets.length)]);
  const body: string[] = [
    `<dl class="counts">${counts.map(([k, v]) => `<div><dt>${e(k)}</dt><dd>${e(v)}</dd></div>`).join('')}</dl>`,
    '<h3>Groups by size</h3>',
  ];
  if (bySize.length === 0) {
    body.push('<p>This run made no groups.</p>');
  } else {
    const hasSeparation = bySize.some((g) => g.separation !== undefined);
    body.push(
      '<p>Each row links to the group’s page. <strong>Cohesion</strong> is the mean cosine similarity of the group’s documents to its centre (1 would mean all point the same way). ' +
        (hasSeparation
          ? '<strong>Separation</strong> is the highest cosine between this group’s centre and another’s (lower means more distinct).'
          : '') +
        '</p>',
      `<div class="chart-wrap">${sizesChart(bySize, colourIndex)}</div>`,
      fallbackTable(
        'Table: documents and cohesion per group' + (data.trends ? ', with their trend' : ''),
        'Documents, share and cohesion per group, largest first',
        ['Group', 'Documents', 'Share', 'Cohesion', ...(hasSeparation ? ['Separation'] : []), ...(data.trends ? ['Over time'] : [])],
        bySize.map((g) => [
          groupLinkHtml(g) + (g.mixed ? ' (mixed)' : ''),
          e(formatCount(g.size)),
          e(formatShare(g.size, grouped)),
          e(formatFixed(g.cohesion, 3)),
          ...(hasSeparation ? [e(formatFixed(g.separation, 3))] : []),
          ...(data.trends ? [sparkline(data.trends.counts[data.groups.indexOf(g)] ?? [], `Group ${g.id} per period`)] : []),
        ]),
        new Set(hasSeparation ? [1, 2, 3, 4] : [1, 2, 3]),
      ),
    );
  }
  body.push(...choiceSection(data));
  body.push('<h3>Settings</h3>');
  if (data.settings.length === 0) body.push('<p>No settings were recorded.</p>');
  else {
    body.push(
      '<table class="settings"><caption class="visually-hidden">Settings of this run</caption><thead><tr><th scope="col">Setting</th><th scope="col">Value</th></tr></thead><tbody>',
      ...data.settings.map((s) => `<tr><td><code>${e(s.name)}</code></td><td class="text">${e(s.value)}</td></tr>`),
      '</tbody></table>',
    );
  }
  body.push(`<p class="muted">Made by sheaf ${e(data.version)} at ${e(data.createdAt)}.</p>`);
  return view('overview', 'Overview', body);
}

function relationsView(data: ReportData): string {
  const body: string[] = [];
  if (data.groups.length < 2 || !data.similarity) {
    body.push('<p>Relations need at least two groups.</p>');
  } else {
    const graph = similarityGraph(data);
    body.push(
      '<p>How alike the groups are: the cosine similarity of their centres. The grid puts the groups in the order of the tree’s leaves, so a dark block along the diagonal is a family of related groups.</p>',
      `<div class="chart-wrap">${similarityMatrix(data)}</div>`,
      '<h3>Groups joined above a similarity</h3>',
      `<div class="tools"><label for="sim-threshold">Join groups at similarity ≥ <output id="sim-value" for="sim-threshold">${e(formatFixed(graph.start, 2))}</output></label>` +
        `<input type="range" id="sim-threshold" min="0" max="1" step="0.01" value="${e(formatFixed(graph.start, 2))}"><span id="sim-count" class="status" role="status"></span></div>`,
      `<div class="chart-wrap">${graph.svg}</div>`,
    );
  }
  return view('relations', 'How the groups relate', body);
}

function treeView(data: ReportData): string {
  const groups = data.groups;
  const body: string[] = [];
  if (!data.tree) {
    body.push('<p>No tree was built for this run.</p>');
    return view('tree', 'Tree of the groups', body);
  }
  const merges = data.tree.merges;
  const k = groups.length;
  const layout = treeLayout(k, merges);
  const nodeName = (v: number): string =>
    v < k ? groupLinkHtml(groups[v]) : e(`merge ${v - k + 1} (${formatCount(merges[v - k].size)} groups)`);
  if (merges.length === 0) {
    body.push('<p>The tree has no merges.</p>');
    return view('tree', 'Tree of the groups', body);
  }
  if (layout.problem) {
    body.push(`<p class="notice">The tree cannot be drawn: ${e(layout.problem)}.</p>`);
    return view('tree', 'Tree of the groups', body);
  }
  body.push(
    '<p>Groups are joined step by step, the most alike first (average-link on cosine similarity). ' +
      'The height of a join is the mean similarity between the documents on its two sides: the lower it is drawn, the more alike.</p>',
    `<div class="chart-wrap">${treeChart(groups, merges)}</div>`,
    '<h3>Coarser or finer</h3>',
    '<p>Cut the tree at any level: fewer groups merge the most alike first. Merged groups are named from the summed term weights of the groups they hold.</p>',
    `<div class="cut" data-cut=""><p class="muted">This control is built by the page's script, which is not running.</p></div>`,
    fallbackTable(
      'Table: the joins, most alike first',
      'Joins of the tree in order',
      ['Step', 'Joins', 'With', 'Similarity', 'Groups below'],
      merges.map((m, i) => [
        e(formatCount(i + 1)),
        nodeName(m.left),
        nodeName(m.right),
        e(formatFixed(m.similarity, 3)),
        e(formatCount(m.size)),
      ]),
      new Set([0, 3, 4]),
    ),
  );
  return view('tree', 'Tree of the groups', body);
}

function groupView(
  g: Group,
  position: number,
  groups: readonly Group[],
  grouped: number,
  titleById: ReadonlyMap<string, string>,
  indexById: ReadonlyMap<string, number>,
): string {
  const id = `group-${g.id}`;
  const heading = g.label;
  const stats = [
    `<li><strong>${e(formatCount(g.size))}</strong> documents (${e(formatShare(g.size, grouped))} of those grouped)</li>`,
    `<li>cohesion <strong>${e(formatFixed(g.cohesion, 3))}</strong></li>`,
    ...mixedStat(g),
  ];
  if (g.separation !== undefined) stats.push(`<li>separation <strong>${e(formatFixed(g.separation, 3))}</strong></li>`);
  const body: string[] = [`<ul class="stats">${stats.join('')}</ul>`, '<h3>Terms that name it</h3>'];
  if (g.terms.length === 0) body.push('<p>No terms.</p>');
  else {
    body.push(
      '<p>Each term’s weight combines how central it is to the group and how much it sets the group apart; the shares say how many of the group’s documents contain it against the other documents.</p>',
      termTable(g),
    );
  }
  body.push('<h3>Exemplars</h3>');
  if (g.exemplars.length === 0) body.push('<p>No exemplars.</p>');
  else {
    body.push(
      '<p>Documents close to the group’s centre and unlike each other (maximal marginal relevance), the closest first; never two near-copies.</p><ol class="exemplars">',
      ...g.exemplars.map((x) => {
        const title = titleById.get(x);
        const at = indexById.get(x);
        const text = `${title !== undefined && title !== '' ? `${e(title)} ` : ''}<code>${e(x)}</code>`;
        // Each exemplar opens in the document reader (#doc-N, N its position in input order).
        return `<li>${at === undefined ? text : `<a href="#doc-${at}">${text}</a>`}</li>`;
      }),
      '</ol>',
    );
  }
  body.push(
    '<h3>Documents</h3>',
    '<p>Fit is the cosine similarity of a document to the group’s centre.</p>',
    mountPoint('group', ` data-group="${e(g.id)}"`),
  );
  const links: string[] = [];
  if (position > 0) links.push(`<a href="${groupHref(groups[position - 1].id)}">← ${groupNumber(groups[position - 1].id)} ${e(groupName(groups[position - 1], 40))}</a>`);
  links.push('<a href="#overview">All groups</a>');
  if (position < groups.length - 1) links.push(`<a href="${groupHref(groups[position + 1].id)}">${groupNumber(groups[position + 1].id)} ${e(groupName(groups[position + 1], 40))} →</a>`);
  body.push(`<nav class="step-nav" aria-label="Other groups">${links.join('')}</nav>`);
  return view(id, heading, body, ' data-nav="overview"', groupNumber(g.id));
}

function duplicatesView(data: ReportData): string {
  const dup = data.duplicates;
  const body: string[] = [];
  if (!dup) {
    body.push('<p>Near-duplicates were not searched for in this run.</p>');
  } else {
    const docs = dup.sets.reduce((s, set) => s + set.members.length, 0);
    body.push(
      `<p>${e(formatCount(dup.sets.length))} sets holding ${e(formatCount(docs))} documents, found by ${e(dup.by)} at similarity ${e(
        formatFixed(dup.threshold, 2),
      )} or more. Strongest sets first; open a set to see what differs.</p>`,
    );
    if (dup.sets.length === 0) body.push('<p>No documents were that alike.</p>');
    else body.push(mountPoint('sets', ''));
  }
  return view('duplicates', 'Near-duplicates', body);
}

/** The page's head, top bar and navigation (shared by both kinds of report). */
function pageHead(data: ReportData, nav: readonly [string, string][], meta: string): string[] {
  return [
    '<!DOCTYPE html>\n<html lang="en" class="no-js">\n<head>\n<meta charset="utf-8">\n',
    `<meta http-equiv="Content-Security-Policy" content="${e(reportCsp())}">\n`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">\n',
    '<meta name="referrer" content="no-referrer">\n',
    '<meta name="color-scheme" content="light dark">\n',
    `<meta name="generator" content="${e(`sheaf ${data.version}`)}">\n`,
    `<title>${e(data.title)}</title>\n`,
    `<style>${REPORT_CSS}</style>\n</head>\n<body>\n`,
    '<a class="skip" href="#main">Skip to the content</a>\n',
    '<header class="top"><div class="inner">',
    `<h1>${e(data.title)}</h1>`,
    `<p class="meta">${meta}</p>`,
    '<nav class="views" aria-label="Views"><ul>',
    ...nav.map(([id, text]) => `<li><a href="#${id}">${e(text)}</a></li>`),
    '</ul></nav></div></header>\n<main id="main" tabindex="-1">\n',
    '<p id="route-notice" class="notice" role="status" hidden></p>\n',
  ];
}

/** The sections every report ends with: a near-duplicate set's page, the document reader, the data blocks and the script. */
function pageTail(data: ReportData): string[] {
  return [
    `<section class="view" id="duplicate-set" data-nav="duplicates" aria-labelledby="duplicate-set-h">` +
      `<h2 id="duplicate-set-h" tabindex="-1">Near-duplicate set</h2><div id="duplicate-set-body">` +
      `<p class="muted">Choose a set in the <a href="#duplicates">list of near-duplicate sets</a>.</p></div></section>\n`,
    `<section class="view" id="document" data-nav="documents" aria-labelledby="document-h">` +
      `<h2 id="document-h" tabindex="-1">Document</h2><div id="document-body">` +
      `<p class="muted">Open a document from <a href="#documents">the list of documents</a>.</p></div></section>\n`,
    '</main>\n',
    `<script type="application/json" id="${REPORT_DATA_ELEMENT_ID}">${jsonForScript(reportPayload(data))}</script>\n`,
    ...textChunks(data).map((c, i) => `<script type="application/json" id="${REPORT_TEXT_ELEMENT_PREFIX}${i}">${jsonForScript(c)}</script>\n`),
    `<script>${REPORT_SCRIPT}</script>\n</body>\n</html>\n`,
  ];
}

/** The report of `sheaf duplicates`: the sets, each set's page, and the documents in sets. */
function renderDuplicatesReport(data: ReportData): string {
  const parts = pageHead(
    data,
    [
      ['duplicates', 'Near-duplicate sets'],
      ['documents', 'Documents in sets'],
    ],
    `sheaf ${e(data.version)} · ${e(data.createdAt)} · ${e(formatCount(data.counts.documents))} documents compared`,
  );
  parts.push(duplicatesView(data));
  parts.push(
    view('documents', 'Documents in sets', [
      `<p>${e(formatCount(data.documents.length))} documents belong to a near-duplicate set. Search by id, title or text; open a document by its id.</p>`,
      mountPoint('all', ''),
    ]),
  );
  parts.push(...pageTail(data));
  return parts.join('');
}
