/**
 * The two closest groups of every document: the best and the second-best
 * group centre by cosine, in the space the grouping used (reduced rows and
 * reduced centres, or TF-IDF rows and term centres), and from them the
 * runner-up of each document's own group with the margin between the two.
 *
 * A small margin says a document sits between two groups; the report shows
 * it beside the fit and `documents.csv` carries it as `next_group` and
 * `next_margin` (see README). Pure; typed arrays out.
 *
 * @module
 */
import type { Csr } from '../types.js';
import { rowIsNonEmpty } from '../util/csr.js';
import { scoreAll } from './kmeans-kernel.js';

/** Per row, the best and second-best group by cosine to the centres (-1 and NaN when a row has no non-zero entry or fewer groups exist). */
export interface ClosestTwo {
  readonly best: Int32Array;
  readonly bestCosine: Float32Array;
  readonly second: Int32Array;
  readonly secondCosine: Float32Array;
}

/**
 * Scores every row against every centre (`centroids[term * groups + g]`,
 * unit vectors, so the dot product is the cosine) and keeps the two highest.
 * Ties go to the lower group number. Rows without entries (or with only
 * stored zeros) get -1 / NaN.
 * O(nnz · groups) time, O(groups) scratch allocated once.
 */
export function closestTwo(matrix: Csr, centroids: Float32Array, groups: number): ClosestTwo {
  const { rows, indptr, indices, values } = matrix;
  if (centroids.length !== matrix.cols * groups) {
    throw new RangeError(`centroids hold ${centroids.length} values; ${matrix.cols} columns × ${groups} groups need ${matrix.cols * groups}`);
  }
  const best = new Int32Array(rows).fill(-1);
  const second = new Int32Array(rows).fill(-1);
  const bestCosine = new Float32Array(rows).fill(Number.NaN);
  const secondCosine = new Float32Array(rows).fill(Number.NaN);
  const score = new Float64Array(groups);
  for (let r = 0; r < rows; r++) {
    const start = indptr[r]!;
    const end = indptr[r + 1]!;
    // No entry, or only stored zeros (a projected row with no known term): no group.
    if (groups === 0 || !rowIsNonEmpty(matrix, r)) continue;
    scoreAll(indices, values, centroids, groups, start, end, score); // k-means' own scoring kernel
    let b = 0;
    let s = -1;
    for (let g = 1; g < groups; g++) {
      if (score[g]! > score[b]!) {
        s = b;
        b = g;
      } else if (s < 0 || score[g]! > score[s]!) s = g;
    }
    best[r] = b;
    bestCosine[r] = score[b]!;
    if (s >= 0) {
      second[r] = s;
      secondCosine[r] = score[s]!;
    }
  }
  return { best, bestCosine, second, secondCosine };
}

/** Per row: the closest group other than its own, and own cosine − that group's cosine. */
export interface NextGroups {
  /** The closest group other than the row's own; -1 for rows in no group or with a single group. */
  readonly group: Int32Array;
  /** Cosine to its own centre minus cosine to `group`'s (≥ 0 when the row sits with its closest centre); NaN where `group` is -1. */
  readonly margin: Float32Array;
}

/**
 * The runner-up of each row's own group (`assignments[r]`, -1 for none):
 * the best group when the row is not in it (a refined or split grouping can
 * leave a row outside its closest centre, giving a negative margin), the
 * second-best otherwise.
 */
export function nextGroups(two: ClosestTwo, assignments: Int32Array): NextGroups {
  const n = assignments.length;
  const group = new Int32Array(n).fill(-1);
  const margin = new Float32Array(n).fill(Number.NaN);
  for (let r = 0; r < n; r++) {
    const own = assignments[r]!;
    if (own < 0 || two.best[r]! < 0) continue;
    if (two.best[r] === own) {
      if (two.second[r]! < 0) continue;
      group[r] = two.second[r]!;
      margin[r] = two.bestCosine[r]! - two.secondCosine[r]!;
    } else {
      group[r] = two.best[r]!;
      // Own cosine is not kept; it is below best and at most second (own ≠ best).
      margin[r] = Number.NaN;
    }
  }
  return { group, margin };
}

/**
 * {@link closestTwo} then {@link nextGroups}, with the exact own-group cosine
 * for rows that do not sit with their closest centre.
 */
export function nextGroupsOf(matrix: Csr, centroids: Float32Array, groups: number, assignments: Int32Array): NextGroups {
  const two = closestTwo(matrix, centroids, groups);
  const next = nextGroups(two, assignments);
  const { indptr, indices, values } = matrix;
  for (let r = 0; r < assignments.length; r++) {
    const own = assignments[r]!;
    if (own < 0 || next.group[r]! < 0 || two.best[r] === own) continue;
    let s = 0;
    for (let p = indptr[r]!; p < indptr[r + 1]!; p++) s += values[p]! * centroids[indices[p]! * groups + own]!;
    next.margin[r] = Math.fround(s) - two.bestCosine[r]!;
  }
  return next;
}
