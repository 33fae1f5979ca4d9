/**
 * Analysis and TF-IDF fitting on several threads: the same result as
 * `fitTfidf(texts.map((t) => createAnalyzer(settings).analyze(t)), options)`
 * (same vocabulary, df, idf, and bit-identical CSR arrays), with the
 * analysis, the costly part, spread over `threads` threads.
 *
 * How it runs:
 * - The documents are cut into chunks of consecutive texts (about
 *   `chunkChars` characters each). `threads − 1` workers start once per
 *   call; the calling thread is thread 0 and analyzes chunks itself. Chunks
 *   are handed out in order to whoever is free (each worker holds up to two,
 *   so it never waits for the calling thread), which balances the load
 *   whatever the text lengths.
 * - A worker receives a chunk's texts in one message (the strings are cloned
 *   once) and answers in one message: the terms it had not reported before
 *   and the chunk's documents as distinct term ids with counts (packed as
 *   `TermSegment` in `src/vectorize/collect.ts` describes), in buffers that
 *   are transferred, not copied (`analyze-protocol.ts`).
 * - The calling thread maps each worker's ids onto its own interned terms
 *   and keeps every chunk as such a segment. Beyond the input texts, what is
 *   held is O(non-zeros of the matrix) plus the vocabulary, not O(raw text):
 *   a worker holds one or two chunks of text at a time.
 * - Once all chunks are in, the segments go, in document order, through the
 *   same back half as {@link fitTfidf} (`fitCollected`: df, pruning, sorted
 *   vocabulary, tf-idf rows). That back half does not depend on the order in
 *   which terms were first interned, so which thread analyzed which chunk
 *   never changes a value.
 *
 * The worker script must be built JavaScript, found as the k-means runner
 * finds its own: `analyze-worker.js` beside this module (`dist/parallel/` in
 * a build), else `dist/parallel/analyze-worker.js` of this package when this
 * module runs from TypeScript source; `workerUrl` points elsewhere.
 *
 * @module
 */

import { existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { createAnalyzer, resolveAnalyzerOptions, type AnalyzerOptions, type AnalyzerSettings } from '../analyze/index.js';
import { IntBuffer } from '../vectorize/buffers.js';
import { TermCollector, type TermSegment } from '../vectorize/collect.js';
import { resolveVectorizeOptions, type VectorizeOptions } from '../vectorize/options.js';
import { fitCollected, fitTfidf, type TfidfFit } from '../vectorize/tfidf.js';
import { UsageError, show } from '../util/errors.js';
import { resolveParallelOptions } from './kmeans-parallel.js';
import { analyzeInto, type AnalyzeWorkerInit, type ChunkReply, type ChunkRequest } from './analyze-protocol.js';

/** Threading settings of {@link fitTfidfParallel}. */
export interface AnalyzeParallelOptions {
  /** Threads in all, the calling one included; 1 runs {@link fitTfidf} on the calling thread. Whole number 1 .. 64. */
  threads: number;
  /** Where the built worker script is; by default found as described in the module notes. */
  workerUrl?: URL | string | undefined;
  /** Characters of text per chunk handed to a thread (a chunk ends at the document that reaches it). Whole number >= 1. */
  chunkChars: number;
  /** Called on the calling thread as chunks finish: documents analyzed so far, and in all. */
  onProgress?: ((done: number, total: number) => void) | undefined;
}

/** Two threads; chunks of 256 Ki characters (a few thousand ticket-sized documents). */
export const DEFAULT_ANALYZE_PARALLEL_OPTIONS: Readonly<Pick<AnalyzeParallelOptions, 'threads' | 'chunkChars'>> = Object.freeze({
  threads: 2,
  chunkChars: 1 << 18,
});

/** Most documents in one chunk, however short they are. */
const MAX_CHUNK_DOCS = 8192;

/** Chunks a worker holds at once: one it works on and one waiting, so it never waits for the calling thread. */
const IN_FLIGHT = 2;

/**
 * Merges `partial` over {@link DEFAULT_ANALYZE_PARALLEL_OPTIONS} and
 * validates it; throws {@link UsageError} naming the option.
 */
export function resolveAnalyzeParallelOptions(partial: Partial<AnalyzeParallelOptions> = {}): AnalyzeParallelOptions {
  const base = resolveParallelOptions({ threads: partial.threads, workerUrl: partial.workerUrl });
  const chunkChars: unknown = partial.chunkChars ?? DEFAULT_ANALYZE_PARALLEL_OPTIONS.chunkChars;
  if (typeof chunkChars !== 'number' || !Number.isInteger(chunkChars) || chunkChars < 1) {
    throw new UsageError(`chunkChars must be a whole number >= 1; got ${show(chunkChars)}`, 'chunkChars');
  }
  const { onProgress } = partial;
  if (onProgress !== undefined && typeof onProgress !== 'function') {
    throw new UsageError(`onProgress must be a function; got ${show(onProgress)}`, 'onProgress');
  }
  return { ...base, chunkChars, ...(onProgress === undefined ? {} : { onProgress }) };
}

/**
 * Picks the worker script: `analyze-worker.js` beside `moduleUrl` if it
 * exists, else the package's `dist/parallel/analyze-worker.js` seen from a
 * module in `src/parallel/`. `exists` tells whether a file URL names a file.
 * Throws an Error naming both places when neither exists.
 */
export function chooseAnalyzeWorkerUrl(moduleUrl: string | URL, exists: (url: URL) => boolean): URL {
  const beside = new URL('./analyze-worker.js', moduleUrl);
  if (exists(beside)) return beside;
  const built = new URL('../../dist/parallel/analyze-worker.js', moduleUrl);
  if (exists(built)) return built;
  throw new Error(
    `analyzer worker script not found at ${fileURLToPath(beside)} or ${fileURLToPath(built)}; run \`npm run build\` first`,
  );
}

function workerScript(given: URL | string | undefined): URL {
  if (given instanceof URL) return given;
  if (typeof given === 'string') return /^file:/i.test(given) ? new URL(given) : pathToFileURL(given);
  return chooseAnalyzeWorkerUrl(import.meta.url, (url) => existsSync(url));
}

/**
 * Chunk starts: chunk `c` is `texts[bounds[c] .. bounds[c + 1])`. A chunk
 * closes at the document that brings it to `chunkChars` characters, or at
 * {@link MAX_CHUNK_DOCS} documents.
 */
export function chunkBounds(texts: readonly string[], chunkChars: number): Int32Array {
  const n = texts.length;
  const starts = new IntBuffer(64);
  starts.push(0);
  let chars = 0;
  let docs = 0;
  for (let i = 0; i < n; i++) {
    const t = texts[i];
    chars += typeof t === 'string' ? t.length : 0;
    docs++;
    if ((chars >= chunkChars || docs >= MAX_CHUNK_DOCS) && i + 1 < n) {
      starts.push(i + 1);
      chars = 0;
      docs = 0;
    }
  }
  if (n > 0) starts.push(n);
  return starts.toArray();
}

/** One worker of a call: its thread, the chunks it holds, and its ids mapped to the calling thread's. */
interface Hand {
  readonly worker: Worker;
  inFlight: number;
  /** Worker id -> id in the calling thread's collector. */
  readonly ids: IntBuffer;
}

/** Lets the event loop run (worker replies are handled there) before the calling thread's next chunk. */
function turn(): Promise<void> {
  return new Promise((resolve) => setImmediate(resolve));
}

/**
 * Analyzes `texts` with the analyzer of `analyzer` (options or saved
 * settings) and fits TF-IDF with `options` on `threads` threads: the same
 * {@link TfidfFit} as
 * `fitTfidf(texts.map((t) => createAnalyzer(analyzer).analyze(t)), options)`,
 * bit for bit, whatever the thread count and chunk size. Bad options reject
 * with {@link UsageError} before any worker starts; so do the fit's own
 * errors (no documents, no terms). Resolves once the workers have stopped.
 *
 * ```ts
 * const { vocabulary, matrix } = await fitTfidfParallel(texts, settings, { minDf: 2 }, { threads: 2 });
 * ```
 */
export async function fitTfidfParallel(
  texts: readonly string[],
  analyzer: Partial<AnalyzerOptions> | AnalyzerSettings | undefined,
  options: Partial<VectorizeOptions> | undefined,
  parallel: Partial<AnalyzeParallelOptions> = {},
): Promise<TfidfFit> {
  const settings = resolveAnalyzerOptions(analyzer);
  const opts = resolveVectorizeOptions(options);
  const par = resolveAnalyzeParallelOptions(parallel);
  const n = texts.length;
  const bounds = chunkBounds(texts, par.chunkChars);
  const chunks = Math.max(0, bounds.length - 1);
  const workers = Math.min(par.threads - 1, chunks - 1);
  if (workers < 1) return fitOnThisThread(texts, settings, opts, par.onProgress);

  const script = workerScript(par.workerUrl);
  const collector = new TermCollector();
  const segments: (TermSegment | undefined)[] = new Array<TermSegment | undefined>(chunks);
  const own = createAnalyzer(settings);
  let next = 0;
  let finished = 0;
  let docsDone = 0;
  let closing = false;
  let failure: Error | null = null;
  let settle!: { resolve: () => void; reject: (e: Error) => void };
  const allIn = new Promise<void>((resolve, reject) => (settle = { resolve, reject }));
  allIn.catch(() => undefined);

  const fail = (e: Error): void => {
    if (failure !== null) return;
    failure = e;
    settle.reject(e);
  };
  const chunkDone = (c: number, seg: TermSegment): void => {
    segments[c] = seg;
    finished++;
    docsDone += seg.rows;
    par.onProgress?.(docsDone, n);
    if (finished === chunks) settle.resolve();
  };
  const feed = (hand: Hand): void => {
    while (hand.inFlight < IN_FLIGHT && next < chunks && failure === null) {
      const c = next++;
      const req: ChunkRequest = { chunk: c, texts: texts.slice(bounds[c]!, bounds[c + 1]!) };
      hand.worker.postMessage(req);
      hand.inFlight++;
    }
  };
  const receive = (hand: Hand, reply: ChunkReply): void => {
    const map = hand.ids;
    for (const t of reply.terms) map.push(collector.intern(t));
    const entries = reply.entries;
    const to = map.data;
    for (let p = 0; p < entries.length; p++) {
      const e = entries[p]!;
      if (e >= 0) entries[p] = to[e]!;
      else {
        entries[p] = ~to[~e]!;
        p++; // the count
      }
    }
    hand.inFlight--;
    chunkDone(reply.chunk, { rows: reply.rows, offsets: reply.offsets, entries });
    feed(hand);
  };

  const init: AnalyzeWorkerInit = { settings };
  const hands: Hand[] = [];
  for (let w = 1; w <= workers; w++) {
    const hand: Hand = { worker: new Worker(script, { workerData: init }), inFlight: 0, ids: new IntBuffer(1 << 12) };
    hand.worker.on('message', (reply: ChunkReply) => {
      try {
        receive(hand, reply);
      } catch (e) {
        fail(e instanceof Error ? e : new Error(String(e)));
      }
    });
    hand.worker.on('error', (e: Error) => fail(new Error(`analyzer worker ${w} failed: ${e.message}`)));
    hand.worker.on('messageerror', (e: Error) => fail(new Error(`analyzer worker ${w} sent an unreadable message: ${e.message}`)));
    hand.worker.on('exit', (code) => {
      if (!closing) fail(new Error(`analyzer worker ${w} stopped with exit code ${code} before the analysis was done`));
    });
    hands.push(hand);
  }
  try {
    for (const hand of hands) feed(hand);
    while (next < chunks) {
      if (failure !== null) throw failure;
      const c = next++;
      analyzeInto(own, collector, texts, bounds[c]!, bounds[c + 1]!);
      chunkDone(c, collector.take(true));
      await turn();
    }
    await allIn;
  } finally {
    closing = true;
    await Promise.all(hands.map((h) => h.worker.terminate()));
  }
  return fitCollected(collector.names, segments as TermSegment[], opts);
}

/** The one-thread path: {@link fitTfidf} over the analyzer's term lists, reporting progress about every 1%. */
function fitOnThisThread(
  texts: readonly string[],
  settings: AnalyzerSettings,
  opts: VectorizeOptions,
  onProgress: ((done: number, total: number) => void) | undefined,
): TfidfFit {
  const analyzer = createAnalyzer(settings);
  const n = texts.length;
  const step = Math.max(1, Math.floor(n / 100));
  function* termLists(): Generator<string[]> {
    for (let i = 0; i < n; i++) {
      if (onProgress && i > 0 && i % step === 0) onProgress(i, n);
      yield analyzer.analyze(texts[i]!);
    }
    onProgress?.(n, n);
  }
  return fitTfidf(termLists(), opts);
}
