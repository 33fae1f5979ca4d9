/**
 * Spherical k-means on several threads: the same algorithm and the same
 * result as {@link sphericalKMeans}, bit for bit, with the row passes
 * (assignment, seeding updates, fit refresh, mini-batch assignment) split
 * over `threads` threads in contiguous blocks of rows.
 *
 * How it runs:
 * - The matrix and every array the passes touch live in SharedArrayBuffers:
 *   copied in once per call (the matrix only if it is not shared already),
 *   never per pass.
 * - `threads − 1` workers start once per call; the calling thread is thread
 *   0 and works on the first block itself. Per pass the runner writes the
 *   request into a shared control block and wakes the workers with
 *   `Atomics.notify`; they report with `Atomics.add` on a counter, which the
 *   runner awaits with `Atomics.waitAsync` (the event loop stays free while
 *   it waits). No messages per pass.
 * - Blocks of the active rows are balanced by stored non-zeros (the work of
 *   a pass is about proportional to them); other row lists split evenly.
 *   Each block writes only its own rows, so the split never changes a value.
 * - Everything else (seeding draws, centroid sums, restarts, numbering) runs
 *   on the calling thread in the fixed order of the single-thread path; the
 *   pass kernel is the one function both paths call (`runBlock` in
 *   `src/cluster/kmeans-kernel.ts`).
 *
 * The worker script must be built JavaScript: by default
 * `kmeans-worker.js` beside this module (so `dist/parallel/` in a build).
 * When this module itself runs from TypeScript source (a test runner, a TS
 * loader), nothing is beside it, and it falls back to
 * `dist/parallel/kmeans-worker.js` of this package, which `npm run build`
 * makes; the `workerUrl` option points elsewhere. Keep that build in step
 * with the source, or the workers run older code.
 *
 * @module
 */

import { existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { planKMeans, sphericalKMeans, type KMeansOptions, type KMeansResult } from '../cluster/kmeans.js';
import {
  createWorkspace,
  finishResult,
  kmeansSteps,
  type Allocator,
  type Workspace,
  type KMeansProgress,
} from '../cluster/kmeans-engine.js';
import { LIST_ACTIVE, STAT_LENGTH, runBlock } from '../cluster/kmeans-kernel.js';
import type { Csr } from '../types.js';
import { UsageError, show } from '../util/errors.js';
import {
  CTRL_BLOCKS,
  CTRL_DONE,
  CTRL_EPOCH,
  CTRL_LIST,
  CTRL_READY,
  CTRL_WORK,
  WORK_EXIT,
  controlLength,
  type WorkerInit,
} from './kmeans-protocol.js';

/** Threading settings of {@link sphericalKMeansParallel}. */
export interface ParallelOptions {
  /** Threads in all, the calling one included; 1 runs {@link sphericalKMeans} on the calling thread. Whole number 1 .. 64. */
  threads: number;
  /** Where the built worker script is; by default found as described in the module notes. */
  workerUrl?: URL | string | undefined;
}

/** Two threads: the target of this runner (two cores). */
export const DEFAULT_PARALLEL_OPTIONS: Readonly<Pick<ParallelOptions, 'threads'>> = Object.freeze({ threads: 2 });

const MAX_THREADS = 64;

/**
 * Merges `partial` over {@link DEFAULT_PARALLEL_OPTIONS} and validates it;
 * throws {@link UsageError} naming the option.
 */
export function resolveParallelOptions(partial: Partial<ParallelOptions>): ParallelOptions {
  const threads = partial.threads ?? DEFAULT_PARALLEL_OPTIONS.threads;
  if (typeof threads !== 'number' || !Number.isInteger(threads) || threads < 1 || threads > MAX_THREADS) {
    throw new UsageError(`threads must be a whole number from 1 to ${MAX_THREADS}; got ${show(threads)}`, 'threads');
  }
  const { workerUrl } = partial;
  if (workerUrl !== undefined && typeof workerUrl !== 'string' && !(workerUrl instanceof URL)) {
    throw new UsageError(`workerUrl must be a URL or a file path; got ${show(workerUrl)}`, 'workerUrl');
  }
  return workerUrl === undefined ? { threads } : { threads, workerUrl };
}

/**
 * Picks the worker script: `kmeans-worker.js` beside `moduleUrl` if it
 * exists, else the package's `dist/parallel/kmeans-worker.js` seen from a
 * module in `src/parallel/`. `exists` tells whether a file URL names a file.
 * Throws an Error naming both places when neither exists.
 */
export function chooseWorkerUrl(moduleUrl: string | URL, exists: (url: URL) => boolean): URL {
  const beside = new URL('./kmeans-worker.js', moduleUrl);
  if (exists(beside)) return beside;
  const built = new URL('../../dist/parallel/kmeans-worker.js', moduleUrl);
  if (exists(built)) return built;
  throw new Error(
    `k-means worker script not found at ${fileURLToPath(beside)} or ${fileURLToPath(built)}; run \`npm run build\` first`,
  );
}

function workerScript(given: URL | string | undefined): URL {
  if (given instanceof URL) return given;
  if (typeof given === 'string') return /^file:/i.test(given) ? new URL(given) : pathToFileURL(given);
  return chooseWorkerUrl(import.meta.url, (url) => existsSync(url));
}

/** `Atomics.waitAsync` (Node 16+; typed here because the project's `lib` is ES2023, which lacks it). */
type WaitAsync = (
  array: Int32Array,
  index: number,
  value: number,
) => { async: false; value: 'not-equal' | 'timed-out' } | { async: true; value: Promise<'ok' | 'timed-out'> };
const waitAsync: WaitAsync = (Atomics as unknown as { waitAsync: WaitAsync }).waitAsync;

/** Typed arrays on SharedArrayBuffers. */
const SHARED_ALLOCATOR: Allocator = Object.freeze({
  int32: (length: number) => new Int32Array(new SharedArrayBuffer(length * 4)),
  float32: (length: number) => new Float32Array(new SharedArrayBuffer(length * 4)),
  float64: (length: number) => new Float64Array(new SharedArrayBuffer(length * 8)),
});

function isShared(a: ArrayBufferView): boolean {
  return a.buffer instanceof SharedArrayBuffer;
}

/** The matrix with its arrays on shared memory (the same arrays when they already are). */
function shareCsr(matrix: Csr): Csr {
  const share = <T extends Int32Array | Float32Array>(a: T, make: (n: number) => T): T => {
    if (isShared(a)) return a;
    const out = make(a.length);
    out.set(a);
    return out;
  };
  return {
    rows: matrix.rows,
    cols: matrix.cols,
    indptr: share(matrix.indptr, SHARED_ALLOCATOR.int32),
    indices: share(matrix.indices, SHARED_ALLOCATOR.int32),
    values: share(matrix.values, SHARED_ALLOCATOR.float32),
  };
}

/**
 * Block bounds over the active rows, balanced by stored non-zeros plus one
 * per row: `bounds[t] .. bounds[t + 1]` is thread t's block.
 */
function balancedBounds(ws: Workspace, threads: number): Int32Array {
  const { active, indptr } = ws;
  const m = active.length;
  let total = 0;
  for (let a = 0; a < m; a++) total += indptr[active[a]! + 1]! - indptr[active[a]!]! + 1;
  const bounds = new Int32Array(threads + 1);
  let acc = 0;
  let t = 1;
  for (let a = 0; a < m && t < threads; a++) {
    acc += indptr[active[a]! + 1]! - indptr[active[a]!]! + 1;
    while (t < threads && acc >= (total * t) / threads) bounds[t++] = a + 1;
  }
  while (t < threads) bounds[t++] = m;
  bounds[threads] = m;
  return bounds;
}

/** The running workers of one call and the shared control block. */
class Crew {
  private readonly workers: Worker[] = [];
  private failure: Error | null = null;
  private closing = false;
  readonly control: Int32Array;
  readonly stats: Float64Array;

  constructor(
    private readonly ws: Workspace,
    private readonly threads: number,
    script: URL,
  ) {
    this.control = new Int32Array(new SharedArrayBuffer(controlLength(threads) * 4));
    this.stats = new Float64Array(new SharedArrayBuffer(threads * STAT_LENGTH * 8));
    const arrays: WorkerInit['arrays'] = {
      indptr: ws.indptr,
      indices: ws.indices,
      values: ws.values,
      rowNorm: ws.rowNorm,
      centroids: ws.centroids,
      assign: ws.assign,
      fit: ws.fit,
      upper: ws.upper,
      lower: ws.lower,
      move: ws.move,
      order: ws.order,
      moved: ws.moved,
      closest: ws.closest,
      dense: ws.dense,
      trials: ws.trials,
      active: ws.active,
      batch: ws.batch,
      sample: ws.sample,
      screen: ws.screen,
      wide: ws.wide,
      scale: ws.scale,
    };
    for (const [name, a] of Object.entries(arrays)) {
      if (!isShared(a as ArrayBufferView)) throw new Error(`internal: ${name} is not on shared memory`);
    }
    for (let thread = 1; thread < threads; thread++) {
      const init: WorkerInit = { thread, k: ws.k, control: this.control, stats: this.stats, arrays };
      const worker = new Worker(script, { workerData: init });
      worker.on('error', (e: Error) => this.fail(new Error(`k-means worker ${thread} failed: ${e.message}`)));
      worker.on('exit', (code) => {
        if (code !== 0 && !this.closing) this.fail(new Error(`k-means worker ${thread} stopped with exit code ${code}`));
      });
      this.workers.push(worker);
    }
  }

  /** Records the first failure and wakes the runner if it is waiting. */
  private fail(e: Error): void {
    if (this.failure === null) this.failure = e;
    Atomics.notify(this.control, CTRL_DONE);
    Atomics.notify(this.control, CTRL_READY);
  }

  /** Resolves when counter `slot` of the control block reaches `target`; rejects once a worker has failed. */
  private async waitFor(slot: number, target: number): Promise<void> {
    const { control } = this;
    for (;;) {
      if (this.failure) throw this.failure;
      const seen = Atomics.load(control, slot);
      if (seen >= target) return;
      const w = waitAsync(control, slot, seen);
      if (w.async) await w.value;
    }
  }

  /** Waits until every worker has started. */
  ready(): Promise<void> {
    return this.waitFor(CTRL_READY, this.threads - 1);
  }

  /** Runs the pass described in `ws.request` on all threads and sums the statistics into `ws.passStats`. */
  async pass(activeBounds: Int32Array): Promise<void> {
    const { ws, threads, control, stats } = this;
    const { work, list, count } = ws.request;
    for (let t = 0; t < threads; t++) {
      const from = list === LIST_ACTIVE ? activeBounds[t]! : Math.floor((count * t) / threads);
      const to = list === LIST_ACTIVE ? activeBounds[t + 1]! : Math.floor((count * (t + 1)) / threads);
      control[CTRL_BLOCKS + 2 * t] = from;
      control[CTRL_BLOCKS + 2 * t + 1] = to;
    }
    control[CTRL_WORK] = work;
    control[CTRL_LIST] = list;
    stats.fill(0);
    Atomics.store(control, CTRL_DONE, 0);
    Atomics.add(control, CTRL_EPOCH, 1);
    Atomics.notify(control, CTRL_EPOCH);
    runBlock(ws, work, list, control[CTRL_BLOCKS]!, control[CTRL_BLOCKS + 1]!, stats, 0);
    await this.waitFor(CTRL_DONE, threads - 1);
    const out = ws.passStats;
    for (let t = 0; t < threads; t++) {
      for (let s = 0; s < STAT_LENGTH; s++) out[s]! += stats[t * STAT_LENGTH + s]!;
    }
  }

  /** Tells the workers to return, then stops them (a worker stuck in a block is stopped too). */
  async close(): Promise<void> {
    const { control } = this;
    this.closing = true;
    control[CTRL_WORK] = WORK_EXIT;
    Atomics.add(control, CTRL_EPOCH, 1);
    Atomics.notify(control, CTRL_EPOCH);
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}

/**
 * {@link sphericalKMeans} on `threads` threads (default 2): same options,
 * same validation, the same {@link KMeansResult} bit for bit (assignments,
 * centroids, fits, objective, iteration and skip counts). Resolves once
 * the workers have stopped; a bad option rejects with {@link UsageError}.
 * `threads: 1` runs on the calling thread without workers.
 *
 * ```ts
 * const result = await sphericalKMeansParallel(matrix, { groups: 100, threads: 2 });
 * ```
 */
export async function sphericalKMeansParallel(
  matrix: Csr,
  options: Partial<KMeansOptions> & { groups: number } & Partial<ParallelOptions>,
  onProgress?: KMeansProgress,
): Promise<KMeansResult> {
  const { threads: threadsGiven, workerUrl, ...kmeans } = options;
  const parallel = resolveParallelOptions({ threads: threadsGiven, workerUrl });
  if (parallel.threads === 1) return sphericalKMeans(matrix, kmeans, onProgress);
  const plan = planKMeans(shareCsr(matrix), kmeans);
  const script = workerScript(parallel.workerUrl);
  const ws = createWorkspace(plan, SHARED_ALLOCATOR);
  const bounds = balancedBounds(ws, parallel.threads);
  const crew = new Crew(ws, parallel.threads, script);
  try {
    await crew.ready();
    const steps = kmeansSteps(ws, plan, onProgress);
    for (;;) {
      const step = steps.next();
      if (step.done) return finishResult(ws, step.value);
      await crew.pass(bounds);
    }
  } finally {
    await crew.close();
  }
}
