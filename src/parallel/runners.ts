/**
 * The thread runners a driver (the CLI's async pipeline) hands its heavy work
 * to: k-means runs, the analyze+vectorize step and the reduction (truncated
 * SVD), each on several threads for
 * large inputs and on the calling thread for small ones (the result is the
 * same either way, bit for bit). Their request and runner types live in
 * `src/runners.ts`, beside the single-thread versions.
 *
 * @module
 */
import type { KMeansRunner, ReduceRunner, VectorizeRunner } from '../runners.js';
import { reduceForGrouping, reducedSpaceOf, reductionRng } from '../reduce/space.js';
import { truncatedSvdParallel } from './svd-parallel.js';
import { sphericalKMeans } from '../cluster/kmeans.js';
import { sphericalKMeansParallel } from './kmeans-parallel.js';
import { fitTfidfParallel } from './analyze-parallel.js';

/** Rows from which k-means is worth the threads' start-up (below it one thread is as fast). */
export const PARALLEL_MIN_ROWS = 20_000;

/** Runs k-means on `threads` threads for inputs of {@link PARALLEL_MIN_ROWS} rows or more, on this thread otherwise. */
export function kmeansRunner(threads: number): KMeansRunner {
  return async (req) =>
    threads > 1 && req.matrix.rows >= PARALLEL_MIN_ROWS
      ? sphericalKMeansParallel(req.matrix, { ...req.options, threads }, req.onProgress)
      : sphericalKMeans(req.matrix, req.options, req.onProgress);
}

/**
 * Characters of text from which analysis is worth the workers' start-up
 * (each loads the analyzer's word lists and stemmers, a few hundred
 * milliseconds of CPU); below it one thread is as fast.
 */
export const PARALLEL_ANALYZE_MIN_CHARS = 4_000_000;

/** Settings of {@link vectorizeRunner} beyond the thread count. */
export interface VectorizeRunnerOptions {
  /** Characters from which the threads are used; default {@link PARALLEL_ANALYZE_MIN_CHARS}. */
  minChars?: number | undefined;
  /** Where the built worker script is (see `fitTfidfParallel`); by default found beside the module. */
  workerUrl?: URL | string | undefined;
  /** Characters per chunk (see `fitTfidfParallel`); its default when not given. */
  chunkChars?: number | undefined;
}

/**
 * Runs the step on `threads` threads when the texts hold `minChars`
 * ({@link PARALLEL_ANALYZE_MIN_CHARS}) characters or more, on this thread
 * otherwise.
 *
 * ```ts
 * const fit = await vectorizeRunner(2)({ texts, analyzer: settings, vectorize: { minDf: 2 } });
 * ```
 */
export function vectorizeRunner(threads: number, options: VectorizeRunnerOptions = {}): VectorizeRunner {
  const minChars = options.minChars ?? PARALLEL_ANALYZE_MIN_CHARS;
  const { workerUrl, chunkChars } = options;
  return async ({ texts, analyzer, vectorize, onProgress }) => {
    let chars = 0;
    for (let i = 0; i < texts.length && chars < minChars; i++) chars += texts[i]!.length;
    const use = chars >= minChars ? threads : 1;
    return fitTfidfParallel(texts, analyzer, vectorize, { threads: use, workerUrl, chunkChars, onProgress });
  };
}

/**
 * Rows from which the reduction (truncated SVD) is worth the worker's
 * start-up; below it the decomposition runs on the calling thread (the demo's
 * few hundred documents always do).
 */
export const PARALLEL_REDUCE_MIN_ROWS = 20_000;

/** Settings of {@link reduceRunner} beyond the thread count. */
export interface ReduceRunnerOptions {
  /** Rows from which the threads are used; default {@link PARALLEL_REDUCE_MIN_ROWS}. */
  minRows?: number | undefined;
  /** Where the built worker script is (see `truncatedSvdParallel`); by default found beside the module. */
  workerUrl?: URL | string | undefined;
}

/**
 * Runs the reduction on `threads` threads for matrices of `minRows`
 * ({@link PARALLEL_REDUCE_MIN_ROWS}) rows or more, on this thread otherwise;
 * the reduced space is the same, bit for bit.
 *
 * ```ts
 * const space = await reduceRunner(2)({ matrix, options: { dims: 50 }, seed: 1, nonEmptyRows: matrix.rows });
 * ```
 */
export function reduceRunner(threads: number, options: ReduceRunnerOptions = {}): ReduceRunner {
  const minRows = options.minRows ?? PARALLEL_REDUCE_MIN_ROWS;
  const { workerUrl } = options;
  return async ({ matrix, options: reduce, seed, nonEmptyRows }) => {
    if (threads < 2 || matrix.rows < minRows) return reduceForGrouping(matrix, reduce, seed, nonEmptyRows);
    const rng = reductionRng(matrix, reduce, seed, nonEmptyRows);
    return reducedSpaceOf(await truncatedSvdParallel(matrix, reduce, rng, { threads, workerUrl }), matrix.rows);
  };
}
