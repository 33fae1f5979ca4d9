/**
 * Inline SVG charts of the HTML report, drawn at render time from the report
 * data: group sizes and cohesion, the map of groups, the dendrogram, a group's
 * terms. Every chart carries `<title>`/`<desc>`, its marks carry numbers as text
 * (colour is never the only carrier), and a table of the same data is drawn
 * beside it by the page. All data strings go through {@link escapeHtml}.
 *
 * @module
 */
import type { ReportData } from './report-data.js';
import { escapeHtml as e, formatCount, formatFixed, truncate } from './html-escape.js';

type Group = ReportData['groups'][number];
type Merge = NonNullable<ReportData['tree']>['merges'][number];

/**
 * The qualitative palette of Okabe & Ito (2008), "Color Universal Design",
 * chosen to stay distinguishable with common colour-vision deficiencies (hex
 * values from memory; black left out so marks show on dark backgrounds).
 * Colour only repeats what the labels say.
 */
export const PALETTE: readonly string[] = ['#E69F00', '#56B4E9', '#009E73', '#F0E442', '#0072B2', '#D55E00', '#CC79A7', '#999999'];

/** Palette colour of the group at position `index` in the report's group list. */
export function groupColour(index: number): string {
  return PALETTE[((index % PALETTE.length) + PALETTE.length) % PALETTE.length];
}

/** `#group-N` link target for a group id. */
export function groupHref(id: number): string {
  return `#group-${e(id)}`;
}

/** Short visible name of a group (its label; the number is shown apart, see {@link groupNumberSvg}). */
export function groupName(g: Pick<Group, 'id' | 'label'>, max = 1000): string {
  return truncate(g.label, max);
}

/** A group's number inside an SVG text, set apart from the name by its own style. */
function groupNumberSvg(id: number): string {
  return `<tspan class="gno-svg">${e(id)}</tspan> `;
}

/** Limits a number to [lo, hi]; `lo` for non-finite input. */
function clamp(v: number, lo: number, hi: number): number {
  return Number.isFinite(v) ? Math.min(hi, Math.max(lo, v)) : lo;
}

/** Two decimals, enough for SVG coordinates. */
function c2(v: number): string {
  return formatFixed(v, 2);
}

/** SVG opening with title and description referenced for assistive technology. */
function svgOpen(id: string, width: number, height: number, title: string, desc: string, cls: string): string {
  return (
    `<svg class="chart ${e(cls)}" viewBox="0 0 ${c2(width)} ${c2(height)}" width="${c2(width)}" height="${c2(height)}" ` +
    `role="group" aria-labelledby="${e(id)}-title ${e(id)}-desc">` +
    `<title id="${e(id)}-title">${e(title)}</title><desc id="${e(id)}-desc">${e(desc)}</desc>`
  );
}

/**
 * Horizontal bars: documents per group, and cohesion (mean cosine of members to
 * their centroid, 0–1) beside it. Each row is a link to the group's page.
 * `groups` are drawn in the order given.
 */
export function sizesChart(groups: readonly Group[], colourIndex: ReadonlyMap<number, number>): string {
  const rowH = 26;
  const top = 30;
  const width = 780;
  const labelRight = 300;
  const barX = 310;
  const barMax = 240;
  const cohX = 640;
  const cohMax = 90;
  const height = top + rowH * Math.max(1, groups.length) + 8;
  const maxSize = Math.max(1, ...groups.map((g) => (Number.isFinite(g.size) ? g.size : 0)));
  const out: string[] = [
    svgOpen(
      'sizes',
      width,
      height,
      'Documents per group and cohesion',
      `Horizontal bars, one row per group (${groups.length}). Left bars: number of documents, longest = ${formatCount(maxSize)}. ` +
        'Right bars: cohesion, the mean cosine similarity of members to the group centre, on a scale from 0 to 1. ' +
        'Each row links to the group page.',
      'sizes-chart',
    ),
    `<text class="axis-label" x="${barX}" y="18">Documents</text>`,
    `<text class="axis-label" x="${cohX}" y="18">Cohesion (0–1)</text>`,
  ];
  groups.forEach((g, row) => {
    const y = top + row * rowH;
    const w = (barMax * clamp(g.size, 0, maxSize)) / maxSize;
    const cw = cohMax * clamp(g.cohesion, 0, 1);
    const colour = groupColour(colourIndex.get(g.id) ?? row);
    out.push(
      `<a href="${groupHref(g.id)}" class="chart-link" aria-label="${e(
        `Group ${g.id}: ${g.label}, ${formatCount(g.size)} documents, cohesion ${formatFixed(g.cohesion, 3)}`,
      )}">`,
      `<rect class="row-hit" x="0" y="${y}" width="${width}" height="${rowH}"></rect>`,
      `<text class="bar-label" x="${labelRight}" y="${y + 17}" text-anchor="end">${groupNumberSvg(g.id)}${e(groupName(g, 36))}<title>${e(`Group ${g.id}: ${g.label}`)}</title></text>`,
      `<rect class="bar" x="${barX}" y="${y + 5}" width="${c2(Math.max(w, 1))}" height="${rowH - 10}" fill="${colour}"></rect>`,
      `<text class="bar-value" x="${c2(barX + Math.max(w, 1) + 6)}" y="${y + 17}">${e(formatCount(g.size))}</text>`,
      `<rect class="bar-track" x="${cohX}" y="${y + 8}" width="${cohMax}" height="${rowH - 16}"></rect>`,
      `<rect class="bar bar-cohesion" x="${cohX}" y="${y + 8}" width="${c2(cw)}" height="${rowH - 16}"></rect>`,
      `<text class="bar-value" x="${cohX + cohMax + 6}" y="${y + 17}">${e(formatFixed(g.cohesion, 2))}</text>`,
      `</a>`,
    );
  });
  out.push('</svg>');
  return out.join('');
}

/** Validated tree layout: leaf order and per-node positions, or a reason it cannot be drawn. */
export interface TreeLayout {
  /** Leaf (group position) order from left to right. */
  readonly leafOrder: readonly number[];
  /** Problem found in the merges, if any (then nothing else is meaningful). */
  readonly problem?: string;
}

/**
 * Checks merges (node `k + i` made by merge `i`, children already existing and
 * each used once) and orders the leaves by walking from the roots, left child first.
 */
export function treeLayout(k: number, merges: readonly Merge[]): TreeLayout {
  const used = new Uint8Array(k + merges.length);
  for (let i = 0; i < merges.length; i++) {
    const { left, right } = merges[i];
    for (const child of [left, right]) {
      if (!Number.isSafeInteger(child) || child < 0 || child >= k + i) {
        return { leafOrder: [], problem: `merge ${i} refers to node ${String(child)}, which does not exist yet` };
      }
      if (used[child]) return { leafOrder: [], problem: `merge ${i} reuses node ${child}` };
      used[child] = 1;
    }
    if (left === right) return { leafOrder: [], problem: `merge ${i} joins node ${left} with itself` };
  }
  const leafOrder: number[] = [];
  const stack: number[] = [];
  // Roots: the newest nodes first, so a complete tree starts at its top.
  for (let node = k + merges.length - 1; node >= 0; node--) {
    if (used[node]) continue;
    stack.push(node);
    while (stack.length > 0) {
      const v = stack.pop()!;
      if (v < k) leafOrder.push(v);
      else {
        const m = merges[v - k];
        stack.push(m.right, m.left);
      }
    }
  }
  return { leafOrder };
}

/**
 * Range and tick step of the dendrogram's similarity axis: from a tick at or
 * below the lowest join to the first tick at least half a step above the
 * highest (at most 1), so the highest join stands clear of the leaves; about
 * 3 to 7 steps of 1, 2 or 5 × 10^n. Text TF-IDF groups often join at similarities
 * near 0, so the axis covers the joins rather than all of [0, 1].
 */
export function similarityAxis(similarities: readonly number[]): { low: number; high: number; tick: number } {
  const finite = similarities.filter((v) => Number.isFinite(v)).map((v) => clamp(v, -1, 1));
  const lo = finite.length > 0 ? Math.min(...finite) : 0;
  const hi = finite.length > 0 ? Math.max(...finite) : 1;
  const span = Math.max(hi - lo, 0.005);
  const steps = [0.001, 0.002, 0.005, 0.01, 0.02, 0.05, 0.1, 0.2, 0.5];
  const tick = steps.find((s) => span / s <= 6) ?? 0.5;
  const low = Math.max(-1, Math.floor(lo / tick + 1e-9) * tick);
  const high = Math.min(1, Math.ceil((hi + tick / 2) / tick - 1e-9) * tick);
  return { low, high, tick };
}

/**
 * The dendrogram over the groups: leaves on the bottom edge, each merge drawn
 * at the height of its average-link similarity on the axis of
 * {@link similarityAxis}, lower similarity higher up. Leaf labels are links to
 * the group pages.
 */
export function treeChart(groups: readonly Group[], merges: readonly Merge[]): string {
  const k = groups.length;
  const layout = treeLayout(k, merges);
  if (layout.problem) return '';
  const step = clamp(760 / Math.max(1, k), 20, 44);
  const left = 64;
  const top = 24;
  const plotH = 300;
  const labelH = 190;
  const width = left + step * k + 24;
  const height = top + plotH + labelH;
  const sims = merges.map((m) => (Number.isFinite(m.similarity) ? m.similarity : 0));
  const { low, high, tick } = similarityAxis(sims);
  const digits = tick < 0.01 ? 3 : tick < 0.1 ? 2 : 1;
  // Lower similarity higher up; the leaves sit on the bottom edge (the highest value of the axis).
  const yOf = (sim: number) => top + (plotH * (clamp(sim, low, high) - low)) / (high - low || 1);
  const nx = new Float64Array(k + merges.length);
  const ny = new Float64Array(k + merges.length);
  layout.leafOrder.forEach((leaf, pos) => {
    nx[leaf] = left + step * (pos + 0.5);
    ny[leaf] = yOf(high);
  });
  const out: string[] = [
    svgOpen(
      'tree',
      width,
      height,
      'Tree of the groups',
      `Dendrogram of ${k} groups built by average-link agglomeration on cosine similarity. ` +
        'Leaves on the bottom edge are the groups; two branches join at the height of the mean similarity between their documents, ' +
        `read on the left axis, which runs from ${formatFixed(high, digits)} at the bottom to ${formatFixed(low, digits)} at the top ` +
        '(the range of the joins; lower similarity higher up). Leaf labels link to the group pages.',
      'tree-chart',
    ),
  ];
  // Axis with ticks; a break mark at the bottom when the axis does not reach 1.
  out.push(`<line class="axis" x1="${left - 8}" y1="${c2(yOf(high))}" x2="${left - 8}" y2="${c2(yOf(low))}"></line>`);
  if (high < 1) {
    const yb = yOf(high) - 16;
    out.push(`<path class="axis" d="M${left - 13} ${c2(yb + 3)}l10 -5M${left - 13} ${c2(yb + 8)}l10 -5"></path>`);
  }
  const ticks = Math.round((high - low) / tick);
  for (let t = 0; t <= ticks; t++) {
    const v = low + t * tick;
    const y = yOf(v);
    out.push(
      `<line class="grid" x1="${left - 12}" y1="${c2(y)}" x2="${c2(width - 16)}" y2="${c2(y)}"></line>`,
      `<text class="tick" x="${left - 14}" y="${c2(y + 4)}" text-anchor="end">${formatFixed(v, digits)}</text>`,
    );
  }
  out.push(
    `<text class="axis-label" x="14" y="${c2(top + plotH / 2)}" transform="rotate(-90 14 ${c2(top + plotH / 2)})" text-anchor="middle">similarity</text>`,
  );
  merges.forEach((m, i) => {
    const node = k + i;
    nx[node] = (nx[m.left] + nx[m.right]) / 2;
    ny[node] = yOf(sims[i]);
    out.push(
      `<path class="branch" d="M${c2(nx[m.left])} ${c2(ny[m.left])}V${c2(ny[node])}H${c2(nx[m.right])}V${c2(ny[m.right])}"></path>`,
      `<circle class="join" cx="${c2(nx[node])}" cy="${c2(ny[node])}" r="3"><title>${e(
        `Merge ${i + 1}: similarity ${formatFixed(m.similarity, 3)}, ${formatCount(m.size)} groups below`,
      )}</title></circle>`,
    );
  });
  for (const leaf of layout.leafOrder) {
    const g = groups[leaf];
    const x = nx[leaf];
    const y = ny[leaf] + 8;
    out.push(
      `<a href="${groupHref(g.id)}" class="chart-link" aria-label="${e(`Group ${g.id}: ${g.label}`)}">`,
      `<text class="leaf-label" x="${c2(x + 4)}" y="${c2(y)}" transform="rotate(90 ${c2(x + 4)} ${c2(y)})">${groupNumberSvg(g.id)}${e(
        groupName(g, 24),
      )}<title>${e(`Group ${g.id}: ${g.label}`)}</title></text>`,
      `</a>`,
    );
  }
  out.push('</svg>');
  return out.join('');
}
