import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { createHash } from 'node:crypto';
import { DomUtils, parseDocument } from 'htmlparser2';
import type { Document, Element } from 'domhandler';
import { renderReport, REPORT_DATA_ELEMENT_ID, REPORT_TEXT_ELEMENT_PREFIX } from '../src/report/html.js';
import { escapeHtml, formatCount, formatFixed, jsonForScript, truncate } from '../src/report/html-escape.js';
import { COLUMN_VALUE_CHARS, reportPayload, TEXT_CHUNK, type ReportPayload } from '../src/report/html-payload.js';
import { REPORT_SCRIPT } from '../src/report/html-client.js';
import { similarityAxis, treeLayout } from '../src/report/html-charts.js';
import type { ReportData } from '../src/report/report-data.js';
import { HOSTILE, tinyReport } from './helpers/browser.js';

// htmlparser2 is an independent HTML tokenizer: it ends <script>/<style> raw text at `</script`/`</style`
// the way browsers do (WHATWG HTML §13.2.5.4 script data state), so what it sees is what a browser would split.
function parse(html: string): Document {
  return parseDocument(html, { decodeEntities: true });
}
function all(doc: Document): Element[] {
  return DomUtils.findAll(() => true, doc.children);
}
function byId(doc: Document, id: string): Element {
  const found = DomUtils.findOne((el) => el.attribs.id === id, doc.children);
  if (!found) throw new Error(`no element #${id}`);
  return found;
}
/** The raw characters of the JSON data block as they appear in the markup. */
function rawDataBlock(html: string): string {
  const open = `<script type="application/json" id="${REPORT_DATA_ELEMENT_ID}">`;
  const start = html.indexOf(open);
  expect(start).toBeGreaterThan(0);
  const end = html.indexOf('</script>', start + open.length);
  return html.slice(start + open.length, end);
}
function scripts(doc: Document): Element[] {
  return DomUtils.findAll((el) => el.name === 'script', doc.children);
}
function cspOf(doc: Document): string {
  const meta = DomUtils.findOne((el) => el.name === 'meta' && el.attribs['http-equiv'] === 'Content-Security-Policy', doc.children);
  expect(meta).not.toBeNull();
  return meta!.attribs.content;
}
function sha256(text: string): string {
  return createHash('sha256').update(Buffer.from(text, 'utf8')).digest('base64');
}
const URL_ATTRIBUTES = ['src', 'srcset', 'action', 'formaction', 'poster', 'data', 'xlink:href', 'background', 'ping', 'manifest', 'cite'];
const ALLOWED_TAGS = new Set([
  'html', 'head', 'meta', 'title', 'style', 'body', 'a', 'header', 'div', 'h1', 'h2', 'h3', 'p', 'nav', 'ul', 'ol', 'li',
  'main', 'section', 'dl', 'dt', 'dd', 'strong', 'code', 'table', 'caption', 'thead', 'tbody', 'tr', 'th', 'td',
  'details', 'summary', 'svg', 'desc', 'text', 'rect', 'circle', 'path', 'line', 'script', 'span', 'tspan', 'polyline',
  'label', 'input', 'output',
]);

/** Checks that hold for every report: structure, safety, self-containment. */
function checkSafe(html: string, data: ReportData): Document {
  const doc = parse(html);
  // Exactly one executable script, whose text is the constant client script, and the data block.
  // Exactly one executable script (the last), the data block first, then the text blocks (JSON, never run).
  const s = scripts(doc);
  const chunks = data.documents.some((d) => d.text !== undefined) ? Math.ceil(data.documents.length / TEXT_CHUNK) : 0;
  expect(s).toHaveLength(2 + chunks);
  expect(s[0].attribs).toEqual({ type: 'application/json', id: REPORT_DATA_ELEMENT_ID });
  for (let c = 0; c < chunks; c++) {
    expect(s[1 + c].attribs).toEqual({ type: 'application/json', id: `${REPORT_TEXT_ELEMENT_PREFIX}${c}` });
    const block = JSON.parse(DomUtils.textContent(s[1 + c])) as { original: string[] };
    expect(block.original).toEqual(data.documents.slice(c * TEXT_CHUNK, (c + 1) * TEXT_CHUNK).map((d) => d.text ?? ''));
  }
  expect(s[s.length - 1].attribs).toEqual({});
  expect(DomUtils.textContent(s[s.length - 1])).toBe(REPORT_SCRIPT);
  // The data block seen by the parser is the whole raw block: nothing in the data ended it early.
  const raw = rawDataBlock(html);
  expect(DomUtils.textContent(s[0])).toBe(raw);
  expect(raw).not.toMatch(/[<>\u2028\u2029]/);
  const parsed = JSON.parse(raw) as ReportPayload;
  expect(parsed).toEqual(reportPayload(data));
  expect(parsed.documents.title).toEqual(data.documents.map((d) => d.title));
  expect(parsed.documents.id).toEqual(data.documents.map((d) => d.id));
  expect(parsed.groups.label).toEqual(data.groups.map((g) => g.label));
  for (const el of all(doc)) {
    expect(ALLOWED_TAGS.has(el.name), `unexpected <${el.name}>`).toBe(true);
    for (const name of Object.keys(el.attribs)) {
      expect(name.startsWith('on'), `handler attribute ${name} on <${el.name}>`).toBe(false);
      expect(URL_ATTRIBUTES.includes(name), `${name} on <${el.name}>`).toBe(false);
    }
    if ('href' in el.attribs) expect(el.attribs.href.startsWith('#'), el.attribs.href).toBe(true);
    if ('style' in el.attribs) throw new Error(`style attribute on <${el.name}>`);
  }
  return doc;
}

describe('renderReport: self-contained page', () => {
  const data = tinyReport();
  const html = renderReport(data);
  const doc = parse(html);

  it('passes the safety checks (one script, allow-listed markup, links only to #…, data block round-trips)', () => {
    checkSafe(html, data);
  });

  it('references nothing outside the page', () => {
    expect(html).not.toMatch(/https?:\/\//i);
    expect(html).not.toMatch(/url\(|@import/i);
    const hrefs = DomUtils.findAll((el) => 'href' in el.attribs, doc.children).map((el) => el.attribs.href);
    expect(hrefs.length).toBeGreaterThan(10);
    for (const h of hrefs) expect(h).toMatch(/^#[a-z]+(-\d+)?$/);
    expect(html.startsWith('<!DOCTYPE html>\n<html lang="en"')).toBe(true);
  });

  it('has a CSP allowing only its own inline script and style, by SHA-256 of their exact text', () => {
    const csp = cspOf(doc);
    const style = DomUtils.findOne((el) => el.name === 'style', doc.children)!;
    const script = scripts(doc).at(-1)!;
    expect(csp).toBe(
      `default-src 'none'; script-src 'sha256-${sha256(DomUtils.textContent(script))}'; ` +
        `style-src 'sha256-${sha256(DomUtils.textContent(style))}'; base-uri 'none'; form-action 'none'`,
    );
    expect(csp).not.toMatch(/unsafe/);
    // The policy comes before the style and the scripts.
    expect(html.indexOf('Content-Security-Policy')).toBeLessThan(html.indexOf('<style>'));
  });

  it('the client script builds pages from text only', () => {
    for (const banned of ['innerHTML', 'outerHTML', 'insertAdjacentHTML', 'document.write', 'eval(', 'new Function', 'javascript:', 'setAttribute(\'on', 'srcdoc']) {
      expect(REPORT_SCRIPT.includes(banned), banned).toBe(false);
    }
    expect(REPORT_SCRIPT).toContain('JSON.parse(doc.getElementById(\'sheaf-data\').textContent)');
  });

  it('has every view, one page per group, and navigation by hash', () => {
    const views = DomUtils.findAll((el) => el.name === 'section', doc.children).map((el) => el.attribs.id);
    expect(views).toEqual(['overview', 'relations', 'tree', 'documents', 'ungrouped', 'group-0', 'group-1', 'group-2', 'duplicates', 'duplicate-set', 'document']);
    const nav = DomUtils.findAll((el) => el.name === 'a', [byId(doc, 'main').parent!.children.find((c) => (c as Element).name === 'header') as Element]);
    expect(nav.map((a) => a.attribs.href)).toEqual(['#overview', '#relations', '#tree', '#documents', '#ungrouped', '#duplicates']);
    for (const id of views) {
      const h2 = DomUtils.findOne((el) => el.name === 'h2', [byId(doc, id)])!;
      expect(h2.attribs.tabindex).toBe('-1');
    }
  });

  it('overview: counts, groups by size with bar lengths proportional to size, and a table of the same', () => {
    const overview = byId(doc, 'overview');
    const dds = DomUtils.findAll((el) => el.name === 'dd', [overview]).map((el) => DomUtils.textContent(el));
    expect(dds).toEqual(['12', '3', '11', '1', '0', '30', '2']);
    const chart = DomUtils.findOne((el) => el.name === 'svg', [overview])!;
    const links = DomUtils.findAll((el) => el.name === 'a', [chart]);
    // Largest first: groups 0 and 2 have 4 documents, group 1 has 3.
    expect(links.map((a) => a.attribs.href)).toEqual(['#group-0', '#group-2', '#group-1']);
    expect(links[2].attribs['aria-label']).toBe(
      `Group 1: refund / invoice, 3 documents, cohesion ${formatFixed(data.groups[1].cohesion, 3)}`,
    );
    const sizeBars = DomUtils.findAll((el) => el.name === 'rect' && el.attribs.class === 'bar', [chart]).map((r) => Number(r.attribs.width));
    expect(sizeBars[0]).toBeCloseTo(240, 2);
    expect(sizeBars[2] / sizeBars[0]).toBeCloseTo(3 / 4, 3);
    const cohesionBars = DomUtils.findAll((el) => el.name === 'rect' && el.attribs.class === 'bar bar-cohesion', [chart]);
    expect(Number(cohesionBars[2].attribs.width)).toBeCloseTo(90 * data.groups[1].cohesion, 1);
    // SVG has title and desc, referenced by aria-labelledby.
    const [t, d] = chart.attribs['aria-labelledby'].split(' ');
    expect(DomUtils.textContent(byId(doc, t))).toBe('Documents per group and cohesion');
    expect(DomUtils.textContent(byId(doc, d))).toMatch(/^Horizontal bars, one row per group \(3\)/);
    const rows = DomUtils.findAll((el) => el.name === 'tr', [DomUtils.findOne((el) => el.name === 'details', [overview])!]);
    expect(rows.slice(1).map((r) => DomUtils.findAll((c) => c.name === 'td', [r]).map((c) => DomUtils.textContent(c)))).toEqual([
      ['0password / reset', '4', '36.4%', formatFixed(data.groups[0].cohesion, 3), formatFixed(data.groups[0].separation, 3)],
      ['2parcel / courier', '4', '36.4%', formatFixed(data.groups[2].cohesion, 3), formatFixed(data.groups[2].separation, 3)],
      ['1refund / invoice', '3', '27.3%', formatFixed(data.groups[1].cohesion, 3), formatFixed(data.groups[1].separation, 3)],
    ]);
  });

  it('relations: a k × k grid of centre similarities in the tree\'s leaf order, and a line per pair of groups on the ring', () => {
    const rel = byId(doc, 'relations');
    const k = data.groups.length;
    const order = treeLayout(k, data.tree!.merges).leafOrder;
    const cells = DomUtils.findAll((el) => el.name === 'rect' && /^sim-/.test(el.attribs.class ?? ''), [rel]);
    expect(cells).toHaveLength(k * k);
    // Row r, column c holds the similarity of groups order[r] and order[c] (title text), the diagonal apart.
    cells.forEach((cell, at) => {
      const a = order[Math.floor(at / k)];
      const b = order[at % k];
      const title = DomUtils.textContent(cell);
      if (a === b) expect(cell.attribs.class).toBe('sim-self');
      else expect(title).toBe(`Groups ${a} and ${b}: ${formatFixed(data.similarity![a * k + b], 3).replace(/^/, 'similarity ')}`);
    });
    // Darker (more opaque) for more alike pairs.
    const off = cells.filter((c) => c.attribs.class === 'sim-cell').map((c, i) => [Number(c.attribs['fill-opacity']), i] as const);
    const sims = cells.map((_, at) => data.similarity![order[Math.floor(at / k)] * k + order[at % k]]).filter((_, at) => Math.floor(at / k) !== at % k);
    const byOpacity = off.slice().sort((x, y) => x[0] - y[0]).map((x) => sims[x[1]]);
    expect(byOpacity).toEqual(sims.slice().sort((x, y) => x - y));
    const edges = DomUtils.findAll((el) => el.name === 'line' && el.attribs.class === 'sim-edge', [rel]);
    expect(edges).toHaveLength((k * (k - 1)) / 2);
    expect(edges.map((e) => Number(e.attribs['data-s']))).toEqual(
      [data.similarity![1], data.similarity![2], data.similarity![5]].map((v) => Number(v.toFixed(3))).sort((x, y) => y - x),
    );
  });

  it('tree: one branch per merge, join heights linear in similarity on the axis, leaves on the bottom edge, leaves linked', () => {
    const tree = byId(doc, 'tree');
    const merges = data.tree!.merges;
    const branches = DomUtils.findAll((el) => el.name === 'path' && el.attribs.class === 'branch', [tree]);
    expect(branches).toHaveLength(merges.length);
    const ticks = DomUtils.findAll((el) => el.name === 'text' && el.attribs.class === 'tick', [tree]).map((t) => ({
      value: Number(DomUtils.textContent(t)),
      y: Number(t.attribs.y) - 4,
    }));
    const axis = similarityAxis(merges.map((m) => m.similarity));
    expect(ticks[0].value).toBeCloseTo(axis.low, 9);
    expect(ticks[ticks.length - 1].value).toBeCloseTo(axis.high, 9);
    const yAt = (sim: number) =>
      ticks[0].y + ((sim - ticks[0].value) * (ticks[ticks.length - 1].y - ticks[0].y)) / (ticks[ticks.length - 1].value - ticks[0].value);
    const joins = DomUtils.findAll((el) => el.name === 'circle', [tree]).map((c) => Number(c.attribs.cy));
    merges.forEach((m, i) => expect(joins[i]).toBeCloseTo(yAt(m.similarity), 1));
    // Higher similarity is drawn lower; the leaves start on the bottom edge (the axis maximum).
    expect(ticks[ticks.length - 1].y).toBeGreaterThan(ticks[0].y);
    const leafY = Number(/^M[\d.]+ ([\d.]+)/.exec(branches[0].attribs.d)![1]);
    expect(leafY).toBeCloseTo(ticks[ticks.length - 1].y, 1);
    const leafLinks = DomUtils.findAll((el) => el.name === 'a', [DomUtils.findOne((el) => el.name === 'svg', [tree])!]);
    expect(leafLinks.map((a) => a.attribs.href).sort()).toEqual(['#group-0', '#group-1', '#group-2']);
    const rows = DomUtils.findAll((el) => el.name === 'tr', [DomUtils.findOne((el) => el.name === 'tbody', [tree])!]);
    expect(rows).toHaveLength(2);
    expect(DomUtils.textContent(rows[1])).toContain('merge 1 (2 groups)');
  });

  it('similarityAxis: steps of 1, 2 or 5 × 10^n from a tick below the lowest join to half a step or more above the highest', () => {
    const close = (got: { low: number; high: number; tick: number }, want: [number, number, number]) => {
      expect(got.low).toBeCloseTo(want[0], 12);
      expect(got.high).toBeCloseTo(want[1], 12);
      expect(got.tick).toBe(want[2]);
    };
    close(similarityAxis([0.031, 0.098]), [0.02, 0.12, 0.02]); // span 0.067: 0.02 steps; 0.098 + 0.01 -> 0.12
    close(similarityAxis([0.031, 0.09]), [0.03, 0.1, 0.01]); // span 0.059 <= 6 steps of 0.01; 0.09 + 0.005 -> 0.10
    close(similarityAxis([0.2, 0.9]), [0.2, 1, 0.2]); // capped at 1
    close(similarityAxis([0.5]), [0.5, 0.501, 0.001]); // one join: minimum span 0.005 -> steps of 0.001
    close(similarityAxis([0, 0.0123]), [0, 0.015, 0.005]);
  });

  it('group page: stats, term bars with weights, exemplars with titles, a mount for the document list', () => {
    const g = data.groups[0];
    const page = byId(doc, 'group-0');
    const h2 = DomUtils.findOne((el) => el.name === 'h2', [page])!;
    // The number stands apart from the name.
    expect(DomUtils.textContent(DomUtils.findOne((el) => el.attribs.class === 'gno', [h2])!)).toBe('0');
    expect(DomUtils.textContent(h2)).toBe('0 password / reset');
    expect(DomUtils.textContent(DomUtils.findOne((el) => el.name === 'ul', [page])!)).toBe(
      `4 documents (36.4% of those grouped)cohesion ${formatFixed(g.cohesion, 3)}separation ${formatFixed(g.separation, 3)}`,
    );
    // The term table: term, weight, share of the group's documents with it, share of the others.
    const table = DomUtils.findOne((el) => el.name === 'table' && (el.attribs.class ?? '').startsWith('terms'), [page])!;
    const rows = DomUtils.findAll((el) => el.name === 'tr', [table]).slice(1);
    expect(rows.map((r) => DomUtils.findAll((c) => c.name === 'td', [r]).map((c) => DomUtils.textContent(c).trim()))).toEqual(
      g.terms.map((t) => [t.term, formatFixed(t.weight, 4), formatFixed(100 * t.inGroup!, 1) + '%', formatFixed(100 * t.outside!, 1) + '%']),
    );
    // 'password' is in all 4 documents of group 0 and in none of the 7 others (tinyCorpus).
    const pw = g.terms.find((t) => t.term === 'password')!;
    expect([pw.inGroup, pw.outside]).toEqual([1, 0]);
    const ex = DomUtils.findAll((el) => el.name === 'li', [DomUtils.findOne((el) => el.name === 'ol', [page])!]).map((li) => DomUtils.textContent(li));
    expect(ex).toEqual(g.exemplars.map((id) => `${data.documents.find((d) => d.id === id)!.title} ${id}`));
    // Each exemplar links to the document reader at its position in input order.
    const hrefs = DomUtils.findAll((el) => el.name === 'a', [DomUtils.findOne((el) => el.name === 'ol', [page])!]).map((a) => a.attribs.href);
    expect(hrefs).toEqual(g.exemplars.map((id) => `#doc-${data.documents.findIndex((d) => d.id === id)}`));
    const mount = DomUtils.findOne((el) => 'data-table' in el.attribs, [page])!;
    expect(mount.attribs).toMatchObject({ 'data-table': 'group', 'data-group': '0' });
  });

  it('embedded numbers are rounded to 3 decimals (what the page shows), non-finite fits become null', () => {
    const p = JSON.parse(rawDataBlock(html)) as ReportPayload;
    data.documents.forEach((d, i) => {
      if (Number.isFinite(d.fit)) expect(p.documents.fit[i]).toBe(Number(d.fit.toFixed(3)));
      else expect(p.documents.fit[i]).toBeNull();
    });
    expect(p.duplicates!.sets[0].members[1].diff).toEqual(
      data.duplicates!.sets[0].members[1].diff!.map((x) => [{ same: 0, added: 1, removed: 2 }[x.kind], x.text]),
    );
  });
});

describe('renderReport: hostile input', () => {
  const data = tinyReport({ hostile: true });
  const html = renderReport(data);
  const doc = parse(html);

  it('passes the safety checks (one script, allow-listed markup, links only to #…, data block round-trips)', () => {
    checkSafe(html, data);
  });

  it('writes hostile titles, labels, ids, terms and settings as text', () => {
    expect(DomUtils.textContent(DomUtils.findOne((el) => el.name === 'title', doc.children)!)).toBe(data.title);
    expect(DomUtils.textContent(DomUtils.findOne((el) => el.name === 'h1', doc.children)!)).toBe(data.title);
    const settings = DomUtils.findAll((el) => el.name === 'td', [DomUtils.findOne((el) => el.name === 'table' && el.attribs.class === 'settings', doc.children)!]);
    expect(settings.map((td) => DomUtils.textContent(td))).toContain(HOSTILE.attr);
    expect(settings.map((td) => DomUtils.textContent(td))).toContain(HOSTILE.script);
    expect(DomUtils.textContent(DomUtils.findOne((el) => el.name === 'h2', [byId(doc, 'group-0')])!)).toBe(`0 ${HOSTILE.close}`);
    const exemplars = DomUtils.textContent(DomUtils.findOne((el) => el.name === 'ol', [byId(doc, 'group-0')])!);
    expect(exemplars).toContain(HOSTILE.close);
    // The hostile term shows in the fallback table cell exactly.
    const cells = DomUtils.findAll((el) => el.name === 'td', [byId(doc, 'group-0')]).map((td) => DomUtils.textContent(td));
    expect(cells).toContain(HOSTILE.svg);
    // No hostile string survived as markup: the only elements are the allow-listed ones (checked above), and
    // the raw markup holds the escaped forms.
    expect(html).toContain('&lt;/script&gt;&lt;script&gt;window.__pwned = &quot;close&quot;&lt;/script&gt;');
    expect(html).toContain('&quot; autofocus onfocus=&quot;window.__pwned = &#39;attr&#39;&quot; x=&quot;');
    expect(html.match(/<script/g)).toHaveLength(3);
    // Hostile column names and values, texts, merged names: only in JSON blocks, escaped.
    expect(html).not.toContain(HOSTILE.img);
    expect(html).not.toContain(HOSTILE.comment);
  });

  it('the data block escapes <, >, &, U+2028 and U+2029 as \\u escapes', () => {
    const raw = rawDataBlock(html);
    expect(raw).toContain('\\u003c/script\\u003e\\u003cscript\\u003ewindow.__pwned = \\"close\\"\\u003c/script\\u003e');
    expect(raw).toContain('line\\u2028separator\\u2029end');
    expect(raw).toContain('\\u003c!-- ');
  });

  it('escapeHtml and jsonForScript: exact outputs', () => {
    expect(escapeHtml(`<a href="x" title='y'>&amp;</a>`)).toBe('&lt;a href=&quot;x&quot; title=&#39;y&#39;&gt;&amp;amp;&lt;/a&gt;');
    expect(escapeHtml(12)).toBe('12');
    expect(jsonForScript({ t: '</script><!--&\u2028\u2029' })).toBe('{"t":"\\u003c/script\\u003e\\u003c!--\\u0026\\u2028\\u2029"}');
    expect(JSON.parse(jsonForScript({ t: '</script><!--&\u2028\u2029' }))).toEqual({ t: '</script><!--&\u2028\u2029' });
  });
});

describe('renderReport: views degrade when parts are missing', () => {
  it('without a tree and without a near-duplicate search', () => {
    const data = tinyReport({ tree: false, duplicates: false });
    const html = renderReport(data);
    const doc = checkSafe(html, data);
    expect(DomUtils.textContent(byId(doc, 'tree'))).toContain('No tree was built for this run.');
    expect(DomUtils.textContent(byId(doc, 'duplicates'))).toContain('Near-duplicates were not searched for in this run.');
    expect(JSON.parse(rawDataBlock(html)).duplicates).toBeNull();
    expect(DomUtils.textContent(byId(doc, 'overview'))).not.toContain('Near-duplicate sets');
  });

  it('with no groups, no documents and no settings', () => {
    const data: ReportData = {
      ...tinyReport({ tree: false, duplicates: false }),
      groups: [],
      documents: [],
      settings: [],
    };
    const html = renderReport(data);
    const doc = checkSafe(html, data);
    expect(DomUtils.textContent(byId(doc, 'overview'))).toContain('This run made no groups.');
    expect(DomUtils.textContent(byId(doc, 'relations'))).toContain('Relations need at least two groups.');
    expect(DomUtils.findAll((el) => el.name === 'section', doc.children).map((s) => s.attribs.id)).toEqual([
      'overview', 'relations', 'tree', 'documents', 'duplicates', 'duplicate-set', 'document',
    ]);
  });

  it('an inconsistent tree is reported, not drawn', () => {
    const data: ReportData = { ...tinyReport(), tree: { merges: [{ left: 0, right: 7, similarity: 0.5, size: 2 }] } };
    const doc = checkSafe(renderReport(data), data);
    expect(DomUtils.textContent(byId(doc, 'tree'))).toContain('The tree cannot be drawn: merge 0 refers to node 7, which does not exist yet.');
    expect(DomUtils.findAll((el) => el.name === 'svg', [byId(doc, 'tree')])).toHaveLength(0);
  });

  it('treeLayout orders leaves from the root, left child first, and catches reused nodes', () => {
    // ((0,2),(1,3)) : merge 0 = (0,2) -> node 4; merge 1 = (1,3) -> node 5; merge 2 = (4,5).
    const merges = [
      { left: 0, right: 2, similarity: 0.9, size: 2 },
      { left: 1, right: 3, similarity: 0.8, size: 2 },
      { left: 4, right: 5, similarity: 0.1, size: 4 },
    ];
    expect(treeLayout(4, merges).leafOrder).toEqual([0, 2, 1, 3]);
    expect(treeLayout(4, merges.slice(0, 2)).leafOrder).toEqual([1, 3, 0, 2]);
    expect(treeLayout(4, [merges[0], { left: 0, right: 1, similarity: 0.5, size: 2 }]).problem).toBe('merge 1 reuses node 0');
  });
});

describe('formatting helpers', () => {
  it('counts, fixed decimals, truncation by code point', () => {
    expect(formatCount(1234567)).toBe('1,234,567');
    expect(formatCount(-1000)).toBe('-1,000');
    expect(formatFixed(-0.0001, 3)).toBe('0.000');
    expect(formatFixed(Number.NaN, 3)).toBe('–');
    expect(truncate('a  b\n c', 10)).toBe('a b c');
    expect(truncate('😀😀😀😀', 3)).toBe('😀😀…');
  });
});

describe('renderReport property: arbitrary strings never escape their place', () => {
  const nasty = fc.constantFrom('<', '>', '&', '"', "'", '</script', '</SCRIPT ', '<!--', '-->', '\u2028', '\u2029', 'javascript:', '&amp;', '`', '${x}', '\\', '\u0000');
  const char16 = fc.integer({ min: 0, max: 0xffff }).map((c) => String.fromCharCode(c));
  const text = fc.string({ unit: fc.oneof(nasty, char16, fc.string({ unit: 'binary', maxLength: 1 })), maxLength: 24 });

  it('JSON round-trips, the data block holds no "<", and the markup stays the same shape', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(text, text), { minLength: 3, maxLength: 3 }), text, text, (titles, label, setting) => {
        const base = tinyReport();
        const data: ReportData = {
          ...base,
          title: label,
          settings: [{ name: setting, value: label }],
          groups: base.groups.map((g, i) => ({ ...g, label: i === 1 ? label : g.label, terms: [{ term: setting, weight: 0.5 }] })),
          documents: base.documents.map((d, i) => (i < 3 ? { ...d, id: titles[i][0], title: titles[i][1] } : d)),
        };
        const html = renderReport(data);
        const doc = checkSafe(html, data);
        const raw = rawDataBlock(html);
        expect(raw.toLowerCase()).not.toContain('</script');
        // Text put into markup decodes back exactly (the settings table writes values verbatim).
        const cells = DomUtils.findAll((el) => el.name === 'td', [DomUtils.findOne((el) => el.name === 'table' && el.attribs.class === 'settings', doc.children)!]);
        expect(DomUtils.textContent(cells[0])).toBe(setting);
        expect(DomUtils.textContent(cells[1])).toBe(label);
        expect(DomUtils.textContent(DomUtils.findOne((el) => el.name === 'title', doc.children)!)).toBe(label);
      }),
      { numRuns: 150, seed: 7 },
    );
  });
});

describe('column values in the data block', () => {
  it('are cut at COLUMN_VALUE_CHARS characters with an ellipsis (the whole text stays in the text blocks)', () => {
    const base = tinyReport();
    const long = 'x'.repeat(COLUMN_VALUE_CHARS + 5);
    const data: ReportData = { ...base, documents: base.documents.map((d, i) => (i === 0 ? { ...d, fields: [long, 'y'], text: long } : d)) };
    const p = reportPayload(data);
    expect(p.columns.values[0][0]).toBe('x'.repeat(COLUMN_VALUE_CHARS - 1) + '…');
    expect(p.columns.values[1][0]).toBe('y');
    expect(p.columns.values[0][1]).toBe(base.documents[1].fields![0]);
  });
});
