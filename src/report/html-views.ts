/**
 * Views of the report added for reading the grouping: how groups relate (a
 * similarity matrix in the tree's leaf order and a similarity graph at a
 * threshold the reader moves), a group's terms explained, counts over time,
 * and scores against known labels. Server-rendered markup; every data string
 * goes through {@link escapeHtml}; numbers through the formatters.
 *
 * @module
 */
import type { ReportData } from './report-data.js';
import { escapeHtml as e, formatCount, formatFixed, formatShare, truncate } from './html-escape.js';
import { groupHref, treeLayout } from './html-charts.js';

type Group = ReportData['groups'][number];

/** A group's number as a badge, apart from its name. */
export function groupNumber(id: number): string {
  return `<span class="gno" aria-label="group ${e(id)}">${e(id)}</span>`;
}

/** A link to a group: its number badge and its name. */
export function groupLink(g: Pick<Group, 'id' | 'label'>, max = 1000): string {
  return `<a class="glink" href="${groupHref(g.id)}">${groupNumber(g.id)}<span class="gname">${e(truncate(g.label, max))}</span></a>`;
}

function c2(v: number): string {
  return formatFixed(v, 2);
}

/** Leaf order of the tree, or the groups' own order without a usable tree. */
export function leafOrder(data: ReportData): number[] {
  const k = data.groups.length;
  if (data.tree && data.tree.merges.length > 0) {
    const layout = treeLayout(k, data.tree.merges);
    if (!layout.problem && layout.leafOrder.length === k) return [...layout.leafOrder];
  }
  return Array.from({ length: k }, (_, i) => i);
}

/** The group × group similarity matrix as an SVG grid, rows and columns in the tree's leaf order. */
export function similarityMatrix(data: ReportData): string {
  const k = data.groups.length;
  const sim = data.similarity!;
  const order = leafOrder(data);
  const cell = Math.max(12, Math.min(40, Math.floor(520 / Math.max(1, k))));
  const labelW = 230;
  const top = 34;
  const width = labelW + cell * k + 8;
  const height = top + cell * k + 8;
  let lo = Infinity;
  let hi = -Infinity;
  for (let a = 0; a < k; a++)
    for (let b = 0; b < k; b++)
      if (a !== b && Number.isFinite(sim[a * k + b])) {
        lo = Math.min(lo, sim[a * k + b]);
        hi = Math.max(hi, sim[a * k + b]);
      }
  if (!(hi > lo)) {
    lo = 0;
    hi = 1;
  }
  const out = [
    `<svg class="chart sim-matrix" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="group" aria-labelledby="simm-title simm-desc">`,
    `<title id="simm-title">Similarity of the group centres</title><desc id="simm-desc">${e(
      `A ${k} by ${k} grid: the cell of two groups is darker the more alike their centres are (cosine ${formatFixed(lo, 2)} palest to ${formatFixed(hi, 2)} darkest among different groups). Rows and columns follow the leaf order of the tree, so related groups sit next to each other.`,
    )}</desc>`,
  ];
  order.forEach((g, pos) => {
    const grp = data.groups[g];
    const y = top + pos * cell;
    out.push(
      `<a href="${groupHref(grp.id)}" class="chart-link"><text class="bar-label" x="${labelW - 6}" y="${c2(y + cell / 2 + 4)}" text-anchor="end">` +
        `<tspan class="gno-svg">${e(grp.id)}</tspan> ${e(truncate(grp.label, 26))}<title>${e(`Group ${grp.id}: ${grp.label}`)}</title></text></a>`,
      `<text class="tick" x="${c2(labelW + pos * cell + cell / 2)}" y="${top - 8}" text-anchor="middle">${e(grp.id)}</text>`,
    );
  });
  order.forEach((a, row) => {
    order.forEach((b, col) => {
      const v = sim[a * k + b];
      const x = labelW + col * cell;
      const y = top + row * cell;
      const strength = a === b ? 1 : Number.isFinite(v) ? Math.max(0.04, (v - lo) / (hi - lo)) : 0;
      const title = a === b ? `Group ${data.groups[a].id}` : `Groups ${data.groups[a].id} and ${data.groups[b].id}: similarity ${formatFixed(v, 3)}`;
      out.push(
        `<rect class="${a === b ? 'sim-self' : 'sim-cell'}" x="${x}" y="${y}" width="${cell - 1}" height="${cell - 1}" fill-opacity="${formatFixed(strength, 3)}"><title>${e(title)}</title></rect>`,
      );
      if (cell >= 34 && a !== b) {
        out.push(`<text class="sim-value${strength > 0.55 ? ' on-dark' : ''}" x="${c2(x + cell / 2)}" y="${c2(y + cell / 2 + 4)}" text-anchor="middle">${e(formatFixed(v, 2).replace(/^0/, ''))}</text>`);
      }
    });
  });
  out.push('</svg>');
  return out.join('');
}

/**
 * The similarity graph: groups on a ring in the tree's leaf order (area by
 * size), a line between two groups whose centres are at least as alike as
 * the threshold the reader picks (the page's script hides the others).
 */
export function similarityGraph(data: ReportData): { svg: string; start: number } {
  const k = data.groups.length;
  const sim = data.similarity!;
  const order = leafOrder(data);
  const size = 520;
  const c = size / 2;
  const ring = size / 2 - 90;
  const pos = new Map<number, [number, number]>();
  order.forEach((g, i) => {
    const angle = -Math.PI / 2 + (2 * Math.PI * i) / Math.max(1, k);
    pos.set(g, [c + ring * Math.cos(angle), c + ring * Math.sin(angle)]);
  });
  const pairs: [number, number, number][] = [];
  for (let a = 0; a < k; a++) for (let b = a + 1; b < k; b++) if (Number.isFinite(sim[a * k + b])) pairs.push([a, b, sim[a * k + b]]);
  pairs.sort((x, y) => y[2] - x[2]);
  // Start with about as many lines as groups.
  const start = pairs.length ? Math.floor(100 * pairs[Math.min(pairs.length - 1, Math.max(0, k - 1))][2]) / 100 : 0;
  const maxSize = Math.max(1, ...data.groups.map((g) => g.size));
  const out = [
    `<svg class="chart sim-graph" viewBox="0 0 ${size} ${size}" width="${size}" height="${size}" role="group" aria-labelledby="simg-title simg-desc">`,
    `<title id="simg-title">Groups joined by similarity</title><desc id="simg-desc">${e(
      `${k} groups on a ring in the tree's leaf order, circle area by number of documents; a line joins two groups whose centres have at least the chosen similarity, thicker when more alike.`,
    )}</desc>`,
  ];
  for (const [a, b, v] of pairs) {
    const [x1, y1] = pos.get(a)!;
    const [x2, y2] = pos.get(b)!;
    out.push(
      `<line class="sim-edge" data-s="${formatFixed(v, 3)}" x1="${c2(x1)}" y1="${c2(y1)}" x2="${c2(x2)}" y2="${c2(y2)}" stroke-width="${c2(1 + 5 * Math.max(0, v))}"${v < start ? ' visibility="hidden"' : ''}><title>${e(
        `Groups ${data.groups[a].id} and ${data.groups[b].id}: ${formatFixed(v, 3)}`,
      )}</title></line>`,
    );
  }
  order.forEach((g) => {
    const grp = data.groups[g];
    const [x, y] = pos.get(g)!;
    const r = 6 + 16 * Math.sqrt(Math.max(0, grp.size) / maxSize);
    const outward = x >= c ? 'start' : 'end';
    const lx = x + (x >= c ? r + 4 : -r - 4);
    out.push(
      `<a href="${groupHref(grp.id)}" class="chart-link" aria-label="${e(`Group ${grp.id}: ${grp.label}, ${formatCount(grp.size)} documents`)}">`,
      `<circle class="sim-node" cx="${c2(x)}" cy="${c2(y)}" r="${c2(r)}"></circle>`,
      `<text class="sim-node-no" x="${c2(x)}" y="${c2(y + 4)}" text-anchor="middle">${e(grp.id)}</text>`,
      `<text class="map-label" x="${c2(lx)}" y="${c2(y + 4)}" text-anchor="${outward}">${e(truncate(grp.label, 18))}</text></a>`,
    );
  });
  out.push('</svg>');
  return { svg: out.join(''), start };
}

/** The table explaining a group's name: each term, its weight, and the share of the group's documents vs the others' that contain it. */
export function termTable(g: Group): string {
  const rows = g.terms.map((t) => {
    const inside = t.inGroup;
    const outside = t.outside;
    const bar = (v: number | undefined, cls: string) =>
      v === undefined || !Number.isFinite(v)
        ? ''
        : `<svg class="share" viewBox="0 0 60 8" width="60" height="8" aria-hidden="true"><rect class="share-track" width="60" height="8"></rect><rect class="${cls}" width="${c2(60 * Math.min(1, Math.max(0, v)))}" height="8"></rect></svg>`;
    return (
      `<tr><td class="text" data-label="Term"><strong>${e(t.term)}</strong></td><td class="num" data-label="Weight">${e(formatFixed(t.weight, 4))}</td>` +
      `<td class="num" data-label="In this group">${inside === undefined ? '–' : e(formatShare(inside, 1))} ${bar(inside, 'share-in')}</td>` +
      `<td class="num" data-label="Elsewhere">${outside === undefined ? '–' : e(formatShare(outside, 1))} ${bar(outside, 'share-out')}</td></tr>`
    );
  });
  return (
    '<table class="terms rows-stack"><caption class="visually-hidden">Terms that name the group</caption><thead><tr>' +
    '<th scope="col">Term</th><th scope="col" class="num">Weight</th><th scope="col" class="num">Documents of this group with it</th><th scope="col" class="num">Other documents with it</th>' +
    `</tr></thead><tbody>${rows.join('')}</tbody></table>`
  );
}

/** A small line of counts over the periods (the trend of one group). */
export function sparkline(counts: readonly number[], label: string): string {
  const w = 120;
  const h = 24;
  const max = Math.max(1, ...counts);
  const n = counts.length;
  const pts = counts.map((v, i) => `${c2(n === 1 ? w / 2 : (w - 4) * (i / (n - 1)) + 2)},${c2(h - 2 - ((h - 4) * v) / max)}`);
  return (
    `<svg class="spark" viewBox="0 0 ${w} ${h}" width="${w}" height="${h}" role="img" aria-label="${e(label)}">` +
    `<polyline class="spark-line" points="${pts.join(' ')}"></polyline>` +
    (n > 0 ? `<circle class="spark-end" cx="${pts[n - 1].split(',')[0]}" cy="${pts[n - 1].split(',')[1]}" r="2.5"></circle>` : '') +
    '</svg>'
  );
}

const GRAIN: Readonly<Record<string, string>> = { day: 'day', week: 'ISO week', month: 'month' };

/** The "Over time" view's body: what was counted, the chart of the largest groups, and a table with a trend line per group. */
export function trendsBody(data: ReportData): string[] {
  const t = data.trends!;
  const k = data.groups.length;
  const p = t.periods.length;
  const body: string[] = [
    `<p>Documents per group per <strong>${e(GRAIN[t.granularity] ?? t.granularity)}</strong> by the column <code>${e(t.column)}</code>` +
      ` (${e(formatCount(p))} periods${p ? `, ${e(t.periods[0])} to ${e(t.periods[p - 1])}` : ''}). Time zone: ${e(t.zone)}. ` +
      'The last period may be incomplete.</p>',
  ];
  if (t.unparsed > 0) {
    body.push(
      `<p class="notice">${e(formatCount(t.unparsed))} document(s) had no date that could be read (counted nowhere here), for example: ` +
        t.unparsedIds.map((id) => `<code>${e(id)}</code>`).join(', ') +
        '.</p>',
    );
  }
  if (p === 0) return body;
  const rising = new Set(t.rising);
  if (t.rising.length) {
    body.push(
      `<p>Grew most in the last period (${e(t.periods[p - 1])} against ${e(t.periods[p - 2] ?? '–')}): ` +
        t.rising.map((g) => groupLink(data.groups[g], 40)).join(', ') +
        '.</p>',
    );
  }
  // Chart: the six largest groups' counts as lines.
  const top = data.groups
    .map((g, i) => i)
    .sort((a, b) => data.groups[b].size - data.groups[a].size || a - b)
    .slice(0, 6);
  const w = Math.max(640, Math.min(1000, 60 + p * 22));
  const h = 240;
  const left = 44;
  const bottom = 40;
  const max = Math.max(1, ...top.flatMap((g) => t.counts[g] ?? []));
  const x = (i: number) => left + (p === 1 ? (w - left - 10) / 2 : ((w - left - 10) * i) / (p - 1));
  const y = (v: number) => h - bottom - ((h - bottom - 12) * v) / max;
  const svg = [
    `<svg class="chart trend-chart" viewBox="0 0 ${w} ${h}" width="${w}" height="${h}" role="group" aria-labelledby="trend-title trend-desc">`,
    `<title id="trend-title">Documents per period, largest groups</title><desc id="trend-desc">${e(
      `One line per group for the ${top.length} largest groups, documents per ${GRAIN[t.granularity] ?? t.granularity} from ${t.periods[0]} to ${t.periods[p - 1]}; the table below gives every count.`,
    )}</desc>`,
    `<line class="axis" x1="${left}" y1="${h - bottom}" x2="${w - 6}" y2="${h - bottom}"></line>`,
    `<text class="tick" x="${left - 6}" y="${c2(y(max) + 4)}" text-anchor="end">${e(formatCount(max))}</text>`,
    `<text class="tick" x="${left - 6}" y="${c2(y(0) + 4)}" text-anchor="end">0</text>`,
    `<text class="tick" x="${left}" y="${h - bottom + 16}">${e(t.periods[0])}</text>`,
    `<text class="tick" x="${w - 6}" y="${h - bottom + 16}" text-anchor="end">${e(t.periods[p - 1])}</text>`,
  ];
  top.forEach((g, j) => {
    const pts = (t.counts[g] ?? []).map((v, i) => `${c2(x(i))},${c2(y(v))}`).join(' ');
    svg.push(`<polyline class="trend-line trend-${j}" points="${pts}"><title>${e(`Group ${data.groups[g].id}: ${data.groups[g].label}`)}</title></polyline>`);
  });
  svg.push('</svg>');
  const legend = top.map((g, j) => `<li><span class="swatch trend-${j}" aria-hidden="true"></span>${groupLink(data.groups[g], 40)}</li>`).join('');
  body.push(`<div class="chart-wrap">${svg.join('')}</div><ul class="trend-legend">${legend}</ul>`);
  const rows = Array.from({ length: k }, (_, g) => {
    const c = t.counts[g] ?? [];
    const total = c.reduce((a, b) => a + b, 0);
    const last = c[p - 1] ?? 0;
    const before = p >= 2 ? c[p - 2] ?? 0 : 0;
    const change = p >= 2 ? last - before : 0;
    return (
      `<tr data-group="${e(data.groups[g].id)}"><td class="text" data-label="Group">${groupLink(data.groups[g], 48)}${rising.has(g) ? ' <span class="flag">grew most</span>' : ''}</td>` +
      `<td class="num" data-label="Dated">${e(formatCount(total))}</td>` +
      `<td data-label="Trend">${sparkline(c, `Group ${data.groups[g].id} per period: ${c.join(', ')}`)}</td>` +
      `<td class="num" data-label="Last period" data-count="${e(last)}">${e(formatCount(last))}</td>` +
      `<td class="num" data-label="Change">${p >= 2 ? e((change > 0 ? '+' : '') + formatCount(change)) : '–'}</td></tr>`
    );
  });
  body.push(
    '<table class="trends rows-stack"><caption class="visually-hidden">Documents per group over time</caption><thead><tr>' +
      '<th scope="col">Group</th><th scope="col" class="num">Dated documents</th><th scope="col">Trend</th>' +
      `<th scope="col" class="num">Last period (${e(t.periods[p - 1])})</th><th scope="col" class="num">Change</th></tr></thead><tbody>` +
      rows.join('') +
      '</tbody></table>',
  );
  const head = t.periods.map((q) => `<th scope="col" class="num">${e(q)}</th>`).join('');
  const full = Array.from(
    { length: k },
    (_, g) => `<tr><th scope="row">${groupNumber(data.groups[g].id)}</th>${(t.counts[g] ?? []).map((v) => `<td class="num">${e(formatCount(v))}</td>`).join('')}</tr>`,
  );
  body.push(
    `<details class="fallback"><summary>Table: every count</summary><div class="scroll"><table class="counts-grid"><caption class="visually-hidden">Documents per group and period</caption><thead><tr><th scope="col">Group</th>${head}</tr></thead><tbody>${full.join('')}</tbody></table></div></details>`,
  );
  return body;
}

/** The "Scores" view's body: the scores against known labels and where each label went (label × group). */
export function evaluationBody(data: ReportData): string[] {
  const ev = data.evaluation!;
  const groupIds = data.groups.map((g) => String(g.id));
  const extra = [...new Set(ev.contingency.flatMap((r) => r.groups.map((x) => x.group)).filter((x) => !groupIds.includes(x)))];
  const cols = [...groupIds, ...extra];
  const body = [
    `<p>The groups compared with the known labels in <code>${e(ev.field)}</code>: ${e(formatCount(ev.scored))} documents scored, ${e(
      formatCount(ev.leftOut),
    )} left out (no group or no label). 1 is a perfect match for every score.</p>`,
    `<dl class="counts">${ev.scores.map((s) => `<div><dt>${e(s.name)}</dt><dd>${e(formatFixed(s.value, 3))}</dd></div>`).join('')}</dl>`,
    '<h3>Where each label went</h3>',
    '<p>One row per known label, one column per group; the largest count of each row is marked.</p>',
  ];
  const head = cols.map((c) => {
    const g = data.groups.find((x) => String(x.id) === c);
    return `<th scope="col" class="num">${g ? `<a href="${groupHref(g.id)}" title="${e(g.label)}">${groupNumber(g.id)}</a>` : e(c)}</th>`;
  });
  const rows = ev.contingency.map((r) => {
    const counts = new Map(r.groups.map((x) => [x.group, x.count]));
    const best = Math.max(0, ...r.groups.map((x) => x.count));
    return (
      `<tr><th scope="row" class="text">${e(r.label)}</th><td class="num">${e(formatCount(r.size))}</td>` +
      cols.map((c) => {
        const v = counts.get(c) ?? 0;
        return `<td class="num${v === best && v > 0 ? ' top' : v === 0 ? ' zero' : ''}">${v ? e(formatCount(v)) : '·'}</td>`;
      }).join('') +
      '</tr>'
    );
  });
  body.push(
    `<div class="scroll"><table class="label-grid"><caption class="visually-hidden">Known labels by group</caption><thead><tr><th scope="col">Label</th><th scope="col" class="num">Documents</th>${head.join(
      '',
    )}</tr></thead><tbody>${rows.join('')}</tbody></table></div>`,
  );
  return body;
}
