/**
 * The kinds of heavy work the pipeline hands to its driver, and how each
 * runs on the calling thread: k-means runs, the analyze+vectorize step and
 * the reduction (truncated SVD).
 * The thread runners of `src/parallel` implement the same types and return
 * the very same results, so the output never depends on which ran.
 *
 * @module
 */
import type { Csr } from './types.js';
import { createAnalyzer, type AnalyzerOptions, type AnalyzerSettings } from './analyze/index.js';
import { fitTfidf, type TfidfFit, type VectorizeOptions } from './vectorize/index.js';
import { sphericalKMeans, type KMeansProgress } from './cluster/kmeans.js';
import type { KMeansOptions, KMeansResult } from './cluster/kmeans-types.js';
import { reduceForGrouping, type ReducedSpace, type ReduceOptions } from './reduce/index.js';

/** A k-means run the pipeline needs; the driver decides on how many threads it runs. */
export interface KMeansRequest {
  readonly matrix: Csr;
  readonly options: Partial<KMeansOptions> & { readonly groups: number };
  /** Called after every pass of the run (see `KMeansProgress`); data for the driver to show. */
  readonly onProgress?: KMeansProgress | undefined;
}

/** Runs a k-means request, on the calling thread or on several (same result either way). */
export type KMeansRunner = (request: KMeansRequest) => Promise<KMeansResult>;

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

/** The reduction of a run: the TF-IDF rows, the decomposition's options, the run's seed. */
export interface ReduceRequest {
  readonly matrix: Csr;
  readonly options: Partial<ReduceOptions>;
  /** The run's seed (the decomposition draws from its own stream of it). */
  readonly seed: number;
  /** Documents with terms (bounds `dims` together with the terms). */
  readonly nonEmptyRows: number;
}

/** Runs a reduction, on the calling thread or on several (same result either way, bit for bit). */
export type ReduceRunner = (request: ReduceRequest) => Promise<ReducedSpace>;

/** The runners of `groupDocumentsAsync`; a missing one runs on the calling thread. */
export interface PipelineRunners {
  readonly kmeans?: KMeansRunner;
  readonly vectorize?: VectorizeRunner;
  readonly reduce?: ReduceRunner;
}

/** A reduction run on the calling thread. */
export function reduceHere(req: ReduceRequest): ReducedSpace {
  return reduceForGrouping(req.matrix, req.options, req.seed, req.nonEmptyRows);
}

/** A k-means request run on the calling thread. */
export function kmeansHere(req: KMeansRequest): KMeansResult {
  return sphericalKMeans(req.matrix, req.options, req.onProgress);
}

/** Analysis streamed into the TF-IDF fit on the calling thread (no list of term lists is ever held). */
export function fitHere(req: VectorizeRequest): TfidfFit {
  const analyzer = createAnalyzer(req.analyzer);
  const n = req.texts.length;
  const step = Math.max(1, Math.floor(n / 100));
  function* termLists(): Generator<string[]> {
    for (let i = 0; i < n; i++) {
      if (req.onProgress && i % step === 0) req.onProgress(i, n);
      yield analyzer.analyze(req.texts[i]!);
    }
    req.onProgress?.(n, n);
  }
  return fitTfidf(termLists(), req.vectorize);
}

/** The work the pipeline hands to its driver: k-means runs, the analyze+vectorize step and the reduction. */
export type PipelineStep =
  | ({ readonly kind: 'kmeans' } & KMeansRequest)
  | ({ readonly kind: 'vectorize' } & VectorizeRequest & { readonly analyzer: AnalyzerSettings })
  | ({ readonly kind: 'reduce' } & ReduceRequest);

/** What the driver sends back for a {@link PipelineStep}. */
export type StepReply = KMeansResult | TfidfFit | ReducedSpace;
