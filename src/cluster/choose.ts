/**
 * Choosing the number of groups from the cuts of a tree: the knee of the
 * k-means objective curve.
 *
 * The knee is found with Kneedle (Satopaa, Albrecht, Irwin & Raghavan 2011,
 * "Finding a 'Kneedle' in a Haystack: Detecting Knee Points in System
 * Behavior", ICDCS Workshops, §III): normalise the curve to the unit square,
 * take the difference curve (for a concave increasing curve `y_n − x_n`), and
 * declare a local maximum of it a knee once the difference curve falls below
 * the threshold `T = y_d(max) − S · mean(Δx_n)` before the next local maximum.
 * We do not smooth the curve (the paper smooths noisy data with a spline; the
 * objective of nested cuts is already monotone). When no local maximum passes
 * the threshold test, we take the highest point of the difference curve and say
 * so. The objective of a cut is Σ over its groups of Σ_i cos(x_i, unit centre),
 * which for unit rows equals Σ_g ‖Σ_{i∈g} x_i‖ (the spherical k-means objective,
 * Dhillon & Modha 2001); it never falls as a nested cut gets finer.
 *
 * Our own rules (not from the paper): the edge warning (a knee at the first or
 * last point Kneedle can return, or a curve without a knee, is reported as data
 * with a suggested wider range) and the fallback for ranges of fewer than three
 * cuts (the best silhouette).
 *
 * @module
 */
import type { Csr } from '../types.js';
import { cutToGroups, type Dendrogram } from './tree.js';
import { silhouetteForCuts, termMajorGram } from './quality.js';
import { groupSums } from './partition.js';

/** What {@link kneedle} found. */
export interface KneeResult {
  /** Index of the knee in the input, or -1 when the curve has fewer than three points or is flat. */
  readonly index: number;
  /** True when a local maximum passed the paper's threshold test; false when the highest difference was taken instead. */
  readonly detected: boolean;
  /** The difference curve `y_n − x_n` (0 at both ends), one value per point. */
  readonly difference: Float64Array;
}

/**
 * Kneedle (Satopaa et al. 2011, §III) on a concave increasing curve, offline:
 * returns the first knee detected with sensitivity `s` (the paper's S; 1 by
 * default). `x` must be strictly increasing. Pure; O(n).
 *
 * @throws Error when `x` and `y` differ in length or `x` is not strictly increasing.
 */
export function kneedle(x: ArrayLike<number>, y: ArrayLike<number>, s = 1): KneeResult {
  const n = x.length;
  if (y.length !== n) throw new Error(`kneedle: x has ${n} values, y has ${y.length}`);
  for (let i = 1; i < n; i++) if (!(x[i] > x[i - 1])) throw new Error('kneedle: x must be strictly increasing');
  const difference = new Float64Array(n);
  if (n < 3) return { index: -1, detected: false, difference };
  let yMin = Infinity;
  let yMax = -Infinity;
  for (let i = 0; i < n; i++) {
    if (y[i] < yMin) yMin = y[i];
    if (y[i] > yMax) yMax = y[i];
  }
  const xSpan = x[n - 1] - x[0];
  const ySpan = yMax - yMin;
  if (!(ySpan > 0)) return { index: -1, detected: false, difference };
  for (let i = 0; i < n; i++) difference[i] = (y[i] - yMin) / ySpan - (x[i] - x[0]) / xSpan;
  // Mean step of the normalised x: (x_n[n-1] − x_n[0]) / (n − 1) = 1 / (n − 1).
  const meanStep = 1 / (n - 1);
  let best = -1;
  for (let i = 1; i < n - 1; i++) {
    if (best < 0 || difference[i] > difference[best]) best = i;
    const isMax = difference[i] > difference[i - 1] && difference[i] >= difference[i + 1];
    if (!isMax) continue;
    const threshold = difference[i] - s * meanStep;
    for (let j = i + 1; j < n; j++) {
      // Stop at the next local maximum: this one was not a knee.
      if (j < n - 1 && difference[j] > difference[j - 1] && difference[j] >= difference[j + 1]) break;
      if (difference[j] < threshold) return { index: i, detected: true, difference };
    }
  }
  return { index: best > 0 && difference[best] > 0 ? best : -1, detected: false, difference };
}

/** Most values (doubles) in the dense leaf sums of the Gram path: 2^24, 128 MiB. */
export const GRAM_SUMS_LIMIT = 1 << 24;

/**
 * The spherical k-means objective Σ_g ‖Σ_{i∈g} x_i‖ of each cut of a tree
 * over leaf groups. `leafOf[r]` is the leaf of row r (-1: in no group); `cuts`
 * are numbers of groups. Uses the Gram matrix of the leaf sums, O(Σ_t z_t² +
 * cuts · leaves²) for z_t leaves using term t, when there are at most
 * `gramLimit` leaves and the dense leaf sums (cols × leaves doubles) stay
 * within {@link GRAM_SUMS_LIMIT}; otherwise sums the rows of each cut
 * directly, O(cuts · (nnz + cols · k)). `leafClusters[c]`, when given, is
 * the cut `cuts[c]` already made ({@link cutToGroups}), so a caller that has
 * the cuts does not make them again.
 */
export function objectiveForCuts(
  matrix: Csr,
  leafOf: Int32Array,
  tree: Dendrogram,
  cuts: readonly number[],
  gramLimit = 2048,
  leafClusters?: readonly Int32Array[],
): Float64Array {
  const leaves = tree.leaves;
  const out = new Float64Array(cuts.length);
  const cutAt = (c: number): Int32Array => leafClusters?.[c] ?? cutToGroups(tree, cuts[c]);
  if (leaves <= gramLimit && matrix.cols * leaves <= GRAM_SUMS_LIMIT) {
    const gram = leafGram(matrix, leafOf, leaves);
    const norm2 = new Float64Array(leaves);
    for (let c = 0; c < cuts.length; c++) {
      const cluster = cutAt(c);
      norm2.fill(0);
      for (let a = 0; a < leaves; a++) {
        const ga = cluster[a];
        for (let b = 0; b < leaves; b++) if (cluster[b] === ga) norm2[ga] += gram[a * leaves + b];
      }
      let total = 0;
      for (let g = 0; g < leaves; g++) total += Math.sqrt(Math.max(0, norm2[g]));
      out[c] = total;
    }
    return out;
  }
  for (let c = 0; c < cuts.length; c++) {
    const cluster = cutAt(c);
    const assign = new Int32Array(leafOf.length);
    for (let r = 0; r < leafOf.length; r++) assign[r] = leafOf[r] < 0 ? -1 : cluster[leafOf[r]];
    out[c] = sphericalObjective(matrix, assign, cuts[c]);
  }
  return out;
}

/** Σ_g ‖Σ_{i∈g} x_i‖ for a given assignment (-1 rows left out): the naive reference. */
export function sphericalObjective(matrix: Csr, assignments: Int32Array, groups: number): number {
  const sums = groupSums(matrix, assignments, groups);
  const norm2 = new Float64Array(groups);
  for (let i = 0; i < sums.length; i++) norm2[i % groups] += sums[i] * sums[i];
  let total = 0;
  for (let g = 0; g < groups; g++) total += Math.sqrt(norm2[g]);
  return total;
}

/** Gram matrix (leaves × leaves, row-major) of the leaf sum vectors. */
function leafGram(matrix: Csr, leafOf: Int32Array, leaves: number): Float64Array {
  return termMajorGram(groupSums(matrix, leafOf, leaves), matrix.cols, leaves);
}

/** One number of groups tried, with its scores. */
export interface CutScore {
  readonly groups: number;
  /** Spherical k-means objective of the cut (Σ cosine of members to their unit centre). */
  readonly objective: number;
  /** Kneedle's difference curve at this cut (0 at the ends of the range). */
  readonly knee: number;
  /** Mean silhouette (cosine) on the sample; NaN when not computed. */
  readonly silhouette: number;
}

/** The choice among cuts, with the warnings that go with it. */
export interface CutChoice {
  readonly chosen: number;
  /** `knee` (Kneedle detected it), `knee-fallback` (highest difference, no knee passed the test), `silhouette` (fewer than three cuts). */
  readonly rule: 'knee' | 'knee-fallback' | 'silhouette';
  /** Sentences for the person, as data; empty when the choice is clear of the range's edges. */
  readonly warnings: readonly string[];
}

/**
 * Picks the number of groups from scored cuts `lo..top` (consecutive; `top` may
 * be below the range end `hi` when there are fewer leaves): the Kneedle knee of
 * the objective; with fewer than three cuts, the best silhouette (ties: fewer
 * groups). Warns, as data, when the choice sits on an edge of the range: at the
 * first or last point, or the first or last point Kneedle can return (its
 * difference curve is 0 at both ends), or when no knee was detected.
 */
export function chooseCut(scores: readonly CutScore[], range: readonly [number, number]): CutChoice {
  const [lo, hi] = range;
  const n = scores.length;
  const top = scores[n - 1].groups;
  const wider = `${lo}..${Math.max(hi * 2, hi + 2)}`;
  if (n < 3) {
    let chosen = scores[0].groups;
    let best = -Infinity;
    for (const c of scores) if (Number.isFinite(c.silhouette) && c.silhouette > best) [best, chosen] = [c.silhouette, c.groups];
    return {
      chosen,
      rule: 'silhouette',
      warnings: [
        top < hi
          ? `only ${lo}..${top} groups can be tried (the tree has only ${top} leaves), too few for a knee; chose by silhouette`
          : `the range ${lo}..${hi} holds fewer than three numbers of groups, too few for a knee; chose by silhouette; try --range ${wider}`,
      ],
    };
  }
  const k = kneedle(
    scores.map((c) => c.groups),
    scores.map((c) => c.objective),
  );
  const index = k.index < 0 ? Math.floor((n - 1) / 2) : k.index;
  const chosen = scores[index].groups;
  const warnings: string[] = [];
  if (k.index < 0) warnings.push(`the objective curve over ${lo}..${top} has no knee; took the middle of the range; try another --range`);
  else if (!k.detected) warnings.push(`no clear knee in the objective curve over ${lo}..${top}; took the point farthest above the straight line`);
  if (index >= n - 2) {
    warnings.push(
      top < hi
        ? `the choice sits at the top of the cuts available (${lo}..${top}: the tree has only ${top} leaves)`
        : `the choice sits at the top of the range ${lo}..${hi}; try --range ${wider}`,
    );
  } else if (index <= 1 && lo > 2) {
    warnings.push(`the choice sits at the bottom of the range ${lo}..${hi}; try --range 2..${hi}`);
  }
  return { chosen, rule: k.index >= 0 && k.detected ? 'knee' : 'knee-fallback', warnings };
}

/** What {@link chooseFromTree} decided, with the table behind it. */
export interface TreeChoice extends CutChoice {
  /** Leaf → group of the chosen cut. */
  readonly leafClusters: Int32Array;
  /** Every cut tried, in order of the number of groups. */
  readonly tried: readonly CutScore[];
  /** Rows in the silhouette sample. */
  readonly sampled: number;
}

/**
 * Scores the cuts `lo..min(hi, leaves)` of a tree over leaf groups by the
 * spherical k-means objective and the sampled silhouette, and picks one with
 * {@link chooseCut}. `leafOf[r]` is the leaf of row r (-1: none).
 */
export function chooseFromTree(
  matrix: Csr,
  leafOf: Int32Array,
  tree: Dendrogram,
  cuts: readonly number[],
  range: readonly [number, number],
  sample: { readonly sampleSize: number; readonly seed: number },
): TreeChoice {
  const sil = silhouetteForCuts(matrix, leafOf, tree, cuts, sample);
  // The cuts the silhouette made, scored again for the objective (each cut made once).
  const objective = objectiveForCuts(matrix, leafOf, tree, cuts, undefined, sil.cuts.map((c) => c.leafClusters));
  const curve = kneedle(cuts, objective);
  const tried: CutScore[] = cuts.map((g, i) => ({ groups: g, objective: objective[i], knee: curve.difference[i], silhouette: sil.cuts[i].mean }));
  const choice = chooseCut(tried, range);
  const at = cuts.indexOf(choice.chosen);
  return { ...choice, leafClusters: sil.cuts[at].leafClusters, tried, sampled: sil.sampled };
}
