/**
 * Grouping in the reduced space: the reduced rows handed to the grouping
 * engines, and the way back to term space for naming.
 *
 * The reduced rows are dense (d numbers a row). They are wrapped as a CSR
 * matrix whose rows are full (indices 0..d−1), so spherical k-means (with its
 * bounds, restarts, mini-batch and thread runner), the average-link trees and
 * the silhouette run on them unchanged: one code path, bit-identical threads.
 * The price is one Int32 index per value (4·n·d bytes, 20 MB at 100k rows and
 * d = 50) and an indirect load per multiply-add; a row of d = 50 values costs
 * about what a TF-IDF row of 50 terms costs. Rows that project to zero (a
 * document without terms) are stored with no entries, so they stay out of
 * every group as in term space.
 *
 * Groups are named from TF-IDF terms: after grouping, each group's unit
 * centroid is recomputed in term space from its members' TF-IDF rows
 * ({@link termSpacePartition}); the fits stay those of the reduced space (the
 * ones a saved model reproduces when filing documents).
 *
 * @module
 */
import type { Csr } from '../types.js';
import type { Partition } from '../cluster/partition.js';
import { partitionFromAssignments } from '../cluster/partition.js';
import { createRng, deriveSeed, type Rng } from '../util/random.js';
import { truncatedSvd, type TruncatedSvd } from './svd.js';
import { resolveReduceOptions, type ReduceOptions } from './options.js';

/** Stream index of the reduction's generator under the run's seed (k-means restarts use 0, 1, 2, …). */
export const REDUCE_SEED_STREAM = 0x4c5341;

/** The reduced space of a run: the decomposition and the rows as the grouping engines read them. */
export interface ReducedSpace {
  readonly svd: TruncatedSvd;
  /** The reduced rows (n × d) as a CSR matrix with full rows; zero rows hold no entries. */
  readonly matrix: Csr;
}

/** A run's reduced space after grouping: the decomposition, the reduced rows, and the groups' unit centres there. */
export interface ReducedGrouping extends ReducedSpace {
  /** Unit centres in the reduced space, dimension-major: `centroids[dim * groups + g]` (as k-means' term-major centroids). */
  readonly centroids: Float32Array;
}

/**
 * Wraps dense row-major rows (n × d) as a CSR matrix with full rows, sharing
 * `rows` as its values. Rows that are all zero get no entries.
 */
export function denseRowsAsCsr(rows: Float32Array, n: number, d: number): Csr {
  if (rows.length !== n * d) throw new RangeError(`rows hold ${rows.length} values; ${n} × ${d} needs ${n * d}`);
  const indptr = new Int32Array(n + 1);
  let zeroRows = 0;
  for (let i = 0; i < n; i++) {
    let any = false;
    for (let j = 0; j < d && !any; j++) any = rows[i * d + j] !== 0;
    if (!any) zeroRows++;
    indptr[i + 1] = indptr[i]! + (any ? d : 0);
  }
  const nnz = indptr[n]!;
  const indices = new Int32Array(nnz);
  for (let p = 0; p < nnz; p++) indices[p] = p % d;
  // Without zero rows the dense array is the value array itself; else the full rows are packed.
  let values: Float32Array;
  if (zeroRows === 0) values = rows;
  else {
    values = new Float32Array(nnz);
    for (let i = 0; i < n; i++) if (indptr[i + 1]! > indptr[i]!) values.set(rows.subarray(i * d, i * d + d), indptr[i]!);
  }
  return { rows: n, cols: d, indptr, indices, values };
}

/**
 * Reduces the TF-IDF rows for grouping: truncated SVD with a generator
 * derived from `seed` ({@link REDUCE_SEED_STREAM}), rows re-normalised.
 * `nonEmptyRows` bounds `dims` together with the terms.
 */
export function reduceForGrouping(matrix: Csr, options: Partial<ReduceOptions>, seed: number, nonEmptyRows: number): ReducedSpace {
  const rng = reductionRng(matrix, options, seed, nonEmptyRows);
  return reducedSpaceOf(truncatedSvd(matrix, options, rng), matrix.rows);
}

/**
 * Checks a run's reduction options against the pile (`dims` bounded by
 * `nonEmptyRows` and the terms; throws {@link UsageError} naming the option)
 * and returns the decomposition's generator, derived from `seed`
 * ({@link REDUCE_SEED_STREAM}): what {@link reduceForGrouping} does before
 * the decomposition, for drivers that run it elsewhere (on threads).
 */
export function reductionRng(matrix: Csr, options: Partial<ReduceOptions>, seed: number, nonEmptyRows: number): Rng {
  resolveReduceOptions(options, Math.min(nonEmptyRows, matrix.cols));
  return createRng(deriveSeed(seed, REDUCE_SEED_STREAM));
}

/** The reduced space of a finished decomposition of `rows` rows: its rows wrapped as full CSR rows. */
export function reducedSpaceOf(svd: TruncatedSvd, rows: number): ReducedSpace {
  return { svd, matrix: denseRowsAsCsr(svd.rows, rows, svd.dims) };
}

/**
 * The partition in term space for naming, the tree and the saved model's
 * term centroids: unit centroids from the members' TF-IDF rows, while the
 * assignments, fits and objective stay the reduced space's.
 */
export function termSpacePartition(tfidf: Csr, reduced: Partition): Partition {
  const terms = partitionFromAssignments(tfidf, reduced.assignments, reduced.groups);
  return { groups: reduced.groups, assignments: reduced.assignments, centroids: terms.centroids, fit: reduced.fit, objective: reduced.objective };
}
