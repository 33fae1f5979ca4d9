/**
 * Group names and exemplars.
 *
 * A group is named by terms that are both central to it (high weight in its
 * centroid: cluster-internal labelling) and distinctive for it (much more
 * common inside the group than outside: differential labelling). Both ideas
 * and the mutual-information score used for the second are the ones surveyed
 * in Manning, Raghavan & Schütze, *Introduction to Information Retrieval*
 * (2008), §17.7 and §13.5.1. Combining them as a product is our choice.
 *
 * @module
 */
import type { Csr } from '../types.js';
import { UsageError, show } from '../util/errors.js';
import { stripUndefined } from '../util/options.js';
import { diverseExemplars } from './exemplars.js';

/** Options for {@link labelGroups}. */
export interface LabelOptions {
  /** Terms listed with weights per group. */
  terms: number;
  /** Terms joined into the group's name. */
  nameTerms: number;
  /** Exemplar documents per group: central and unlike each other (maximal marginal relevance, see exemplars.ts). */
  exemplars: number;
  /** λ of maximal marginal relevance for exemplars, 0 to 1: 1 takes the closest to the centre only. */
  exemplarRelevance: number;
  /** Cosine at or above which two documents are near-copies: never both exemplars of a group (0 to 1). */
  nearCopy: number;
  /** Centroid terms considered as candidates before scoring distinctiveness. */
  candidates: number;
}

/** Defaults for {@link LabelOptions}. */
export const DEFAULT_LABEL_OPTIONS: Readonly<LabelOptions> = Object.freeze({
  terms: 10,
  nameTerms: 3,
  exemplars: 3,
  candidates: 60,
  exemplarRelevance: 0.7,
  nearCopy: 0.9,
});

/** Merges defaults once and validates every value; throws {@link UsageError}. */
export function resolveLabelOptions(partial: Partial<LabelOptions> = {}): LabelOptions {
  const o: LabelOptions = { ...DEFAULT_LABEL_OPTIONS, ...stripUndefined(partial) };
  for (const key of ['terms', 'nameTerms', 'exemplars', 'candidates'] as const) {
    const v = o[key];
    if (!Number.isInteger(v) || v < 1 || v > 1000) {
      throw new UsageError(`${key} must be a whole number from 1 to 1000; got ${show(v)}`, key);
    }
  }
  for (const key of ['exemplarRelevance', 'nearCopy'] as const) {
    const v = o[key];
    if (typeof v !== 'number' || !(v >= 0 && v <= 1)) throw new UsageError(`${key} must be a number from 0 to 1; got ${show(v)}`, key);
  }
  if (o.nameTerms > o.terms) {
    throw new UsageError(`nameTerms must not exceed terms (${o.terms}); got ${o.nameTerms}`, 'nameTerms');
  }
  return o;
}

/** One term of a group's description. */
export interface LabelTerm {
  readonly term: string;
  /** Combined score: centroid weight times mutual information with the group. */
  readonly weight: number;
  /** The term's weight in the group's unit centroid. */
  readonly centroidWeight: number;
  /** Share of the group's documents that contain the term. */
  readonly inGroup: number;
  /** Share of the other documents that contain the term. */
  readonly outside: number;
}

/** A group's name, terms, size, cohesion and exemplars. */
export interface GroupLabel {
  readonly id: number;
  readonly label: string;
  readonly terms: readonly LabelTerm[];
  readonly size: number;
  /** Mean cosine of members to the centroid. */
  readonly cohesion: number;
  /** Row indices of exemplar members, in the order maximal marginal relevance chose them (the closest to the centroid first). */
  readonly exemplars: readonly number[];
}

/** What {@link labelGroups} needs to know about the fitted grouping. */
export interface LabelInput {
  readonly matrix: Csr;
  /** Group per row, -1 for rows in no group. */
  readonly assignments: Int32Array;
  /** Cosine of each row to its own centroid. */
  readonly fit: Float32Array;
  readonly groups: number;
  /** Unit centroids, term-major: `centroids[term * groups + g]`. */
  readonly centroids: Float32Array;
  /** Column index to term. */
  readonly terms: readonly string[];
  /** Optional display form for a term (for example the most common surface word behind a stem). */
  readonly display?: (term: string) => string;
}

/**
 * Names every group and picks its exemplars. Deterministic: ties are broken
 * by term index and row index.
 */
export function labelGroups(input: LabelInput, options: Partial<LabelOptions> = {}): GroupLabel[] {
  const o = resolveLabelOptions(options);
  const { matrix, assignments, fit, groups: k, centroids } = input;
  const cols = matrix.cols;
  const display = input.display ?? ((t: string) => t);

  // Group sizes, cohesion, total non-empty rows.
  const size = new Int32Array(k);
  const fitSum = new Float64Array(k);
  let n = 0;
  for (let r = 0; r < matrix.rows; r++) {
    const g = assignments[r];
    if (g < 0) continue;
    size[g]++;
    fitSum[g] += fit[r];
    n++;
  }

  // Candidate terms per group: the top centroid weights.
  const m = Math.min(o.candidates, cols);
  const candidates = new Int32Array(k * m).fill(-1);
  const heapW = new Float64Array(m);
  for (let g = 0; g < k; g++) {
    topColumns(centroids, cols, k, g, m, candidates.subarray(g * m, g * m + m), heapW);
  }

  // Document frequency of each candidate inside its group, and overall among grouped rows.
  // slot[t] lists which (group, candidate) pairs mention term t.
  const slotStart = new Int32Array(cols + 1);
  for (let i = 0; i < candidates.length; i++) if (candidates[i] >= 0) slotStart[candidates[i] + 1]++;
  for (let t = 0; t < cols; t++) slotStart[t + 1] += slotStart[t];
  const slotGroup = new Int32Array(slotStart[cols]);
  const slotPos = new Int32Array(slotStart[cols]);
  const fillAt = slotStart.slice(0, cols);
  for (let i = 0; i < candidates.length; i++) {
    const t = candidates[i];
    if (t < 0) continue;
    const at = fillAt[t]++;
    slotGroup[at] = Math.floor(i / m);
    slotPos[at] = i;
  }
  const inGroupDf = new Int32Array(k * m);
  const totalDf = new Int32Array(cols);
  for (let r = 0; r < matrix.rows; r++) {
    const g = assignments[r];
    if (g < 0) continue;
    for (let p = matrix.indptr[r]; p < matrix.indptr[r + 1]; p++) {
      if (matrix.values[p] === 0) continue;
      const t = matrix.indices[p];
      totalDf[t]++;
      for (let s = slotStart[t]; s < slotStart[t + 1]; s++) {
        if (slotGroup[s] === g) inGroupDf[slotPos[s]]++;
      }
    }
  }

  const out: GroupLabel[] = [];
  const score = new Float64Array(m);
  for (let g = 0; g < k; g++) {
    const ng = size[g];
    const scored: LabelTerm[] = [];
    for (let j = 0; j < m; j++) {
      const t = candidates[g * m + j];
      if (t < 0) continue;
      const n11 = inGroupDf[g * m + j];
      const n10 = totalDf[t] - n11;
      const inShare = ng > 0 ? n11 / ng : 0;
      const outShare = n - ng > 0 ? n10 / (n - ng) : 0;
      const w = centroids[t * k + g];
      // Only terms more common inside than outside describe the group.
      const mi = inShare > outShare ? mutualInformation(n11, n10, ng - n11, n - ng - n10) : 0;
      score[j] = w * mi;
      scored.push({ term: display(input.terms[t]), weight: w * mi, centroidWeight: w, inGroup: inShare, outside: outShare });
    }
    // Fall back to centroid weight when no term is distinctive (for example one group holds everything).
    const anyDistinctive = scored.some((s) => s.weight > 0);
    const ranked = scored
      .map((s, i) => ({ s, i }))
      .sort((x, y) => {
        const a = anyDistinctive ? y.s.weight - x.s.weight : y.s.centroidWeight - x.s.centroidWeight;
        return a !== 0 ? a : x.i - y.i;
      })
      .filter((x) => x.s.centroidWeight > 0)
      .map((x) => x.s);
    const terms = dedupeDisplay(ranked).slice(0, o.terms);
    out.push({
      id: g,
      label: terms.slice(0, o.nameTerms).map((t) => t.term).join(' · ') || '(no terms)',
      terms,
      size: ng,
      cohesion: ng > 0 ? fitSum[g] / ng : 0,
      exemplars: [],
    });
  }

  // Exemplars: central and unlike each other (maximal marginal relevance), never two near-copies.
  const best = diverseExemplars(matrix, assignments, fit, k, { count: o.exemplars, relevance: o.exemplarRelevance, nearCopy: o.nearCopy });
  return out.map((g) => ({ ...g, exemplars: best[g.id] }));
}

/** Two stems can share a display form ("charge", "charging" → "charge"); keep the first. */
function dedupeDisplay(terms: LabelTerm[]): LabelTerm[] {
  const seen = new Set<string>();
  const out: LabelTerm[] = [];
  for (const t of terms) {
    if (seen.has(t.term)) continue;
    seen.add(t.term);
    out.push(t);
  }
  return out;
}

/**
 * Mutual information (in bits) between "document contains the term" and
 * "document is in the group", from the four cell counts, as in IIR §13.5.1
 * (eq. 13.17). Empty cells contribute nothing.
 */
export function mutualInformation(n11: number, n10: number, n01: number, n00: number): number {
  const n = n11 + n10 + n01 + n00;
  if (n === 0) return 0;
  const n1x = n11 + n10;
  const n0x = n01 + n00;
  const nx1 = n11 + n01;
  const nx0 = n10 + n00;
  const cell = (nij: number, ni: number, nj: number): number =>
    nij === 0 ? 0 : (nij / n) * Math.log2((n * nij) / (ni * nj));
  return cell(n11, n1x, nx1) + cell(n01, n0x, nx1) + cell(n10, n1x, nx0) + cell(n00, n0x, nx0);
}

/** Writes into `out` the `m` columns with the largest weight for group g (ties: lower column), descending. */
function topColumns(
  centroids: Float32Array,
  cols: number,
  k: number,
  g: number,
  m: number,
  out: Int32Array,
  w: Float64Array,
): void {
  let filled = 0;
  for (let t = 0; t < cols; t++) {
    const v = centroids[t * k + g];
    if (v <= 0) continue;
    if (filled < m) {
      let i = filled++;
      while (i > 0 && w[i - 1] < v) {
        w[i] = w[i - 1];
        out[i] = out[i - 1];
        i--;
      }
      w[i] = v;
      out[i] = t;
    } else if (v > w[m - 1]) {
      let i = m - 1;
      while (i > 0 && w[i - 1] < v) {
        w[i] = w[i - 1];
        out[i] = out[i - 1];
        i--;
      }
      w[i] = v;
      out[i] = t;
    }
  }
  for (let i = filled; i < m; i++) out[i] = -1;
}

/** The `count` rows with the highest fit in each group, ties by row index. */
export function exemplarRows(assignments: Int32Array, fit: Float32Array, groups: number, count: number): number[][] {
  const best: number[][] = Array.from({ length: groups }, () => []);
  for (let r = 0; r < assignments.length; r++) {
    const g = assignments[r];
    if (g < 0) continue;
    const list = best[g];
    if (list.length === count && fit[list[count - 1]] >= fit[r]) continue;
    let i = list.length < count ? list.length : count - 1;
    if (list.length < count) list.push(r);
    while (i > 0 && fit[list[i - 1]] < fit[r]) {
      list[i] = list[i - 1];
      i--;
    }
    list[i] = r;
  }
  return best;
}

/**
 * The most common surface word behind each wanted term (ties: the shorter,
 * then the alphabetically first), read from the given texts, so a stem such
 * as "batteri" is shown as "battery". Terms never seen keep their own form.
 */
export function surfaceForms(
  texts: Iterable<string>,
  analyze: (text: string) => { terms: string[]; surfaces: string[] },
  wanted: ReadonlySet<string>,
): Map<string, string> {
  const counts = new Map<string, Map<string, number>>();
  for (const text of texts) {
    const { terms, surfaces } = analyze(text);
    for (let i = 0; i < terms.length; i++) {
      const t = terms[i];
      if (!wanted.has(t)) continue;
      let c = counts.get(t);
      if (c === undefined) counts.set(t, (c = new Map()));
      c.set(surfaces[i], (c.get(surfaces[i]) ?? 0) + 1);
    }
  }
  const out = new Map<string, string>();
  for (const [term, c] of counts) {
    let best = '';
    let bestN = -1;
    for (const [s, n] of c) {
      if (n > bestN || (n === bestN && (s.length < best.length || (s.length === best.length && s < best)))) {
        best = s;
        bestN = n;
      }
    }
    out.set(term, best);
  }
  return out;
}

/** Rewrites labels with display forms of their terms (merging terms that show alike) and rebuilds each name. */
export function withDisplayForms(
  labels: readonly GroupLabel[],
  display: ReadonlyMap<string, string>,
  options: Partial<LabelOptions> = {},
): GroupLabel[] {
  const o = resolveLabelOptions(options);
  return labels.map((g) => {
    const terms = dedupeDisplay(g.terms.map((t) => ({ ...t, term: display.get(t.term) ?? t.term })));
    return { ...g, terms, label: terms.slice(0, o.nameTerms).map((t) => t.term).join(' · ') || '(no terms)' };
  });
}
