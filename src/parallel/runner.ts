/**
 * The k-means runner the CLI hands to `groupDocumentsAsync`: large inputs on
 * several threads, small ones on the calling thread (the result is the same).
 *
 * @module
 */
import type { KMeansRunner } from '../pipeline.js';
import { sphericalKMeans } from '../cluster/kmeans.js';
import { sphericalKMeansParallel } from './kmeans-parallel.js';

/** Rows from which k-means is worth the threads' start-up (below it one thread is as fast). */
export const PARALLEL_MIN_ROWS = 20_000;

/** Runs k-means on `threads` threads for inputs of {@link PARALLEL_MIN_ROWS} rows or more, on this thread otherwise. */
export function kmeansRunner(threads: number): KMeansRunner {
  return async (req) =>
    threads > 1 && req.matrix.rows >= PARALLEL_MIN_ROWS
      ? sphericalKMeansParallel(req.matrix, { ...req.options, threads })
      : sphericalKMeans(req.matrix, req.options);
}
