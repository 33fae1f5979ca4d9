/**
 * The thread runners a driver (the CLI's async pipeline) hands its heavy work
 * to: k-means runs and the analyze+vectorize step, each on several threads for
 * large inputs and on the calling thread for small ones (the result is the
 * same either way, bit for bit). Their request and runner types live in
 * `src/runners.ts`, beside the single-thread versions.
 *
 * @module
 */
import type { KMeansRunner, VectorizeRunner } from '../runners.js';
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
