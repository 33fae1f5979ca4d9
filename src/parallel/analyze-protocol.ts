/**
 * Messages between the parallel analyzer (`analyze-parallel.ts`) and its
 * workers (`analyze-worker.ts`), and the one loop both sides run over a
 * chunk of documents.
 *
 * The runner posts a chunk of texts (cloned once, by the message); the
 * worker analyzes them into its own {@link TermCollector} and replies with
 * the terms it had not reported before (in first-seen order, so the reply's
 * ids `0 .. ` continue its earlier replies) and the chunk's documents as a
 * {@link TermSegment} whose two buffers are transferred, not copied. One
 * message each way per chunk, none per document.
 *
 * @module
 */

import type { Analyzer, AnalyzerSettings } from '../analyze/index.js';
import type { TermCollector, TermSegment } from '../vectorize/collect.js';

/** What a worker receives at start. */
export interface AnalyzeWorkerInit {
  /** Resolved analyzer settings; the worker builds its analyzer from them. */
  readonly settings: AnalyzerSettings;
}

/** A chunk of consecutive documents to analyze. */
export interface ChunkRequest {
  /** Chunk number (its position in document order). */
  readonly chunk: number;
  /** The chunk's texts, in document order. */
  readonly texts: readonly string[];
}

/** A worker's answer for one chunk; ids are the worker's own provisional ids. */
export interface ChunkReply {
  /** Chunk number of the request. */
  readonly chunk: number;
  /** Terms new to this worker since its previous reply, in first-seen order (the next ids). */
  readonly terms: readonly string[];
  /** Documents in the chunk. */
  readonly rows: number;
  /** `rows + 1` offsets into `entries`. */
  readonly offsets: Int32Array;
  /** The worker's term ids with counts, packed as a `TermSegment`'s entries. */
  readonly entries: Int32Array;
}

/** Analyzes `texts[from .. to)` into `collector`, one document each (the loop of runner and workers alike). */
export function analyzeInto(analyzer: Analyzer, collector: TermCollector, texts: readonly string[], from: number, to: number): void {
  for (let i = from; i < to; i++) collector.add(analyzer.analyze(texts[i]!));
}
