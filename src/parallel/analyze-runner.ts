/**
 * The analysis runner a driver (the CLI's async pipeline) can hand its
 * analyze+vectorize step to: large inputs on several threads, small ones on
 * the calling thread (the result is the same either way, bit for bit).
 *
 * @module
 */

import type { AnalyzerOptions, AnalyzerSettings } from '../analyze/index.js';
import type { TfidfFit, VectorizeOptions } from '../vectorize/index.js';
import { fitTfidfParallel } from './analyze-parallel.js';

/**
 * Characters of text from which analysis is worth the workers' start-up
 * (each loads the analyzer's word lists and stemmers, a few hundred
 * milliseconds of CPU); below it one thread is as fast.
 */
export const PARALLEL_ANALYZE_MIN_CHARS = 4_000_000;

/** One analyze+vectorize step: the texts, in document order, and the settings of both stages. */
export interface VectorizeRequest {
  /** One text per document. */
  readonly texts: readonly string[];
  /** Analyzer options or resolved settings. */
  readonly analyzer: Partial<AnalyzerOptions> | AnalyzerSettings;
  /** Vocabulary pruning options. */
  readonly vectorize: Partial<VectorizeOptions>;
  /** Called as documents are analyzed: done so far, and in all. */
  readonly onProgress?: ((done: number, total: number) => void) | undefined;
}

/** Runs an analyze+vectorize step, on the calling thread or on several (same result either way). */
export type VectorizeRunner = (request: VectorizeRequest) => Promise<TfidfFit>;

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
