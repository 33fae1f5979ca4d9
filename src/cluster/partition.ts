/**
 * A partition of the rows into groups, whatever made it (k-means, a cut of a
 * tree): assignments, unit centroids, fits. Helpers to derive centroids from
 * assignments and to number groups canonically.
 *
 * @module
 */
import type { Csr } from '../types.js';

/** Rows split into groups, with each group's unit mean direction. */
export interface Partition {
  readonly groups: number;
  /** Group per row, -1 for rows in no group (all-zero rows). */
  readonly assignments: Int32Array;
  /** Unit mean directions, term-major: `centroids[term * groups + g]`. */
  readonly centroids: Float32Array;
  /** Cosine of each row to its own centroid (0 for rows in no group). */
  readonly fit: Float32Array;
  /** Sum of the fits. */
  readonly objective: number;
}

/**
 * Renumbers groups canonically (size descending, then smallest member row),
 * the same convention k-means uses, so outputs read the same whatever made the
 * partition. Returns new assignments; `-1` stays `-1`.
 */
export function canonicalGroups(assignments: Int32Array, groups: number): Int32Array {
  const size = new Int32Array(groups);
  const first = new Int32Array(groups).fill(0x7fffffff);
  for (let r = 0; r < assignments.length; r++) {
    const g = assignments[r];
    if (g < 0) continue;
    size[g]++;
    if (r < first[g]) first[g] = r;
  }
  const order = Array.from({ length: groups }, (_, g) => g).sort((a, b) => size[b] - size[a] || first[a] - first[b]);
  const rename = new Int32Array(groups);
  order.forEach((g, i) => {
    rename[g] = i;
  });
  return assignments.map((g) => (g < 0 ? -1 : rename[g]));
}

/** Per group, the sum of its member rows, term-major (`[term * groups + g]`); rows assigned -1 are left out. O(nnz + cols·groups). */
export function groupSums(matrix: Csr, assignments: Int32Array, groups: number): Float64Array {
  const { rows, cols, indptr, indices, values } = matrix;
  const sums = new Float64Array(cols * groups);
  for (let r = 0; r < rows; r++) {
    const g = assignments[r];
    if (g < 0) continue;
    for (let p = indptr[r]; p < indptr[r + 1]; p++) sums[indices[p] * groups + g] += values[p];
  }
  return sums;
}

/**
 * Unit centroids and fits for a given assignment (sums of member rows,
 * normalised; an all-zero sum stays zero). O(nnz + cols·groups).
 */
export function partitionFromAssignments(matrix: Csr, assignments: Int32Array, groups: number): Partition {
  const { rows, cols, indptr, indices, values } = matrix;
  const sums = groupSums(matrix, assignments, groups);
  const norm = new Float64Array(groups);
  for (let t = 0; t < cols; t++) for (let g = 0; g < groups; g++) norm[g] += sums[t * groups + g] ** 2;
  for (let g = 0; g < groups; g++) norm[g] = Math.sqrt(norm[g]);
  const centroids = new Float32Array(cols * groups);
  for (let t = 0; t < cols; t++) {
    for (let g = 0; g < groups; g++) if (norm[g] > 0) centroids[t * groups + g] = sums[t * groups + g] / norm[g];
  }
  const fit = new Float32Array(rows);
  let objective = 0;
  for (let r = 0; r < rows; r++) {
    const g = assignments[r];
    if (g < 0) continue;
    let s = 0;
    for (let p = indptr[r]; p < indptr[r + 1]; p++) s += values[p] * centroids[indices[p] * groups + g];
    fit[r] = s;
    objective += s;
  }
  return { groups, assignments, centroids, fit, objective };
}
