/**
 * Truncated SVD on several threads: the same decomposition and the same
 * result as {@link truncatedSvd}, bit for bit, with the work on the big
 * blocks — the products A·X and Aᵀ·Y, the Gram matrices and row solves of
 * the orthonormalisations, V = Q̂W and the projection of the rows — split
 * over `threads` threads by output rows.
 *
 * How it runs (as the k-means runner, `kmeans-parallel.ts`):
 * - A, its transpose and every block the kernels touch live in
 *   SharedArrayBuffers, allocated once per call.
 * - `threads − 1` workers start once per call; the calling thread is thread
 *   0 and works on the first range itself. Per step the runner writes the
 *   work and the ranges into a shared control block and wakes the workers
 *   with `Atomics.notify`; they report with `Atomics.add`, which the runner
 *   awaits with `Atomics.waitAsync`.
 * - Each output row (of the product, of the Gram matrix, of the solved
 *   block) is computed by the same kernel call sequence whichever thread
 *   holds it (`src/reduce/svd-kernels.ts`), so the split never changes a
 *   value. Ranges are balanced by stored values for the products and the
 *   projection, by entries for the Gram rows, evenly otherwise.
 * - Everything else (the Gaussian draw, Cholesky and its fallback, the small
 *   SVD, the sign fix) runs on the calling thread in the fixed order of
 *   {@link svdSteps}, the generator both paths drive.
 *
 * The worker script must be built JavaScript: `svd-worker.js` beside this
 * module (`dist/parallel/` in a build) or, when this module runs from
 * TypeScript source, `dist/parallel/svd-worker.js` of this package (run
 * `npm run build` first); the `workerUrl` option points elsewhere.
 *
 * @module
 */

import { existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { Csr } from '../types.js';
import type { Rng } from '../util/random.js';
import { resolveReduceOptions, type ReduceOptions } from '../reduce/options.js';
import {
  createOrthWorkspace,
  createSvdArrays,
  finishSvd,
  svdBlockWidth,
  svdSteps,
  transposeCsr,
  truncatedSvd,
  type SvdAllocator,
  type TruncatedSvd,
} from '../reduce/svd.js';
import {
  runSvdBlock,
  svdWorkRows,
  SVD_WORK_A,
  SVD_WORK_AT,
  SVD_WORK_GRAM_OMEGA,
  SVD_WORK_GRAM_Y,
  SVD_WORK_PROJECT,
  type SvdArrays,
} from '../reduce/svd-kernels.js';
import { resolveParallelOptions, type ParallelOptions } from './kmeans-parallel.js';
import {
  SVD_CTRL_BLOCKS,
  SVD_CTRL_DONE,
  SVD_CTRL_EPOCH,
  SVD_CTRL_READY,
  SVD_CTRL_WORK,
  SVD_WORK_EXIT,
  svdControlLength,
  type SvdWorkerInit,
} from './svd-protocol.js';

/**
 * Picks the worker script: `svd-worker.js` beside `moduleUrl` if it exists,
 * else the package's `dist/parallel/svd-worker.js` seen from a module in
 * `src/parallel/`. Throws an Error naming both places when neither exists.
 */
export function chooseSvdWorkerUrl(moduleUrl: string | URL, exists: (url: URL) => boolean): URL {
  const beside = new URL('./svd-worker.js', moduleUrl);
  if (exists(beside)) return beside;
  const built = new URL('../../dist/parallel/svd-worker.js', moduleUrl);
  if (exists(built)) return built;
  throw new Error(`SVD worker script not found at ${fileURLToPath(beside)} or ${fileURLToPath(built)}; run \`npm run build\` first`);
}

function workerScript(given: URL | string | undefined): URL {
  if (given instanceof URL) return given;
  if (typeof given === 'string') return /^file:/i.test(given) ? new URL(given) : pathToFileURL(given);
  return chooseSvdWorkerUrl(import.meta.url, (url) => existsSync(url));
}

/** `Atomics.waitAsync` (Node 16+; typed here because the project's `lib` is ES2023, which lacks it). */
type WaitAsync = (
  array: Int32Array,
  index: number,
  value: number,
) => { async: false; value: 'not-equal' | 'timed-out' } | { async: true; value: Promise<'ok' | 'timed-out'> };
const waitAsync: WaitAsync = (Atomics as unknown as { waitAsync: WaitAsync }).waitAsync;

const SHARED: SvdAllocator = Object.freeze({
  float64: (length: number) => new Float64Array(new SharedArrayBuffer(length * 8)),
  float32: (length: number) => new Float32Array(new SharedArrayBuffer(length * 4)),
});

/** A copy of the matrix with its arrays on shared memory. */
function shareCsr(a: Csr): Csr {
  const indptr = new Int32Array(new SharedArrayBuffer(a.indptr.length * 4));
  indptr.set(a.indptr);
  const indices = new Int32Array(new SharedArrayBuffer(a.indices.length * 4));
  indices.set(a.indices);
  const values = SHARED.float32(a.values.length);
  values.set(a.values);
  return { rows: a.rows, cols: a.cols, indptr, indices, values };
}

/**
 * Range bounds over `count` output rows for `threads` threads, balanced by
 * `cost(i)` (`bounds[t] .. bounds[t + 1]` is thread t's range).
 */
export function balancedRanges(count: number, threads: number, cost: (i: number) => number): Int32Array {
  let total = 0;
  for (let i = 0; i < count; i++) total += cost(i);
  const bounds = new Int32Array(threads + 1);
  let acc = 0;
  let t = 1;
  for (let i = 0; i < count && t < threads; i++) {
    acc += cost(i);
    while (t < threads && acc >= (total * t) / threads) bounds[t++] = i + 1;
  }
  while (t < threads) bounds[t++] = count;
  bounds[threads] = count;
  return bounds;
}

/** The ranges of every row work of a decomposition, computed once per call. */
function rangesFor(s: SvdArrays, threads: number): Map<number, Int32Array> {
  const byStored = (a: Csr) => (i: number) => a.indptr[i + 1]! - a.indptr[i]! + 1;
  const aRanges = balancedRanges(s.a.rows, threads, byStored(s.a));
  const gram = balancedRanges(s.l, threads, (i) => s.l - i);
  const ranges = new Map<number, Int32Array>([
    [SVD_WORK_A, aRanges],
    [SVD_WORK_AT, balancedRanges(s.at.rows, threads, byStored(s.at))],
    [SVD_WORK_GRAM_Y, gram],
    [SVD_WORK_GRAM_OMEGA, gram],
    [SVD_WORK_PROJECT, aRanges],
  ]);
  return ranges;
}

/** The running workers of one call and the shared control block. */
class SvdCrew {
  private readonly workers: Worker[] = [];
  private failure: Error | null = null;
  private closing = false;
  readonly control: Int32Array;
  private readonly acc: Float64Array;

  constructor(
    private readonly s: SvdArrays,
    private readonly threads: number,
    script: URL,
  ) {
    this.control = new Int32Array(new SharedArrayBuffer(svdControlLength(threads) * 4));
    this.acc = new Float64Array(s.d);
    const arrays: SvdWorkerInit['arrays'] = {
      aIndptr: s.a.indptr,
      aIndices: s.a.indices,
      aValues: s.a.values,
      tIndptr: s.at.indptr,
      tIndices: s.at.indices,
      tValues: s.at.values,
      omega: s.omega,
      y: s.y,
      g: s.g,
      rt: s.rt,
      wd: s.wd,
      compT: s.compT,
      byTerm: s.byTerm,
      rows: s.rows,
    };
    for (const [name, a] of Object.entries(arrays)) {
      if (!((a as ArrayBufferView).buffer instanceof SharedArrayBuffer)) throw new Error(`internal: ${name} is not on shared memory`);
    }
    for (let thread = 1; thread < threads; thread++) {
      const init: SvdWorkerInit = { thread, control: this.control, n: s.a.rows, m: s.a.cols, l: s.l, d: s.d, arrays };
      const worker = new Worker(script, { workerData: init });
      worker.on('error', (e: Error) => this.fail(new Error(`SVD worker ${thread} failed: ${e.message}`)));
      worker.on('exit', (code) => {
        if (code !== 0 && !this.closing) this.fail(new Error(`SVD worker ${thread} stopped with exit code ${code}`));
      });
      this.workers.push(worker);
    }
  }

  private fail(e: Error): void {
    if (this.failure === null) this.failure = e;
    Atomics.notify(this.control, SVD_CTRL_DONE);
    Atomics.notify(this.control, SVD_CTRL_READY);
  }

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
    return this.waitFor(SVD_CTRL_READY, this.threads - 1);
  }

  /** Runs row work `work` over all its output rows: range `bounds[t]..bounds[t + 1]` on thread t. */
  async run(work: number, bounds: Int32Array): Promise<void> {
    const { control, threads, s } = this;
    for (let t = 0; t < threads; t++) {
      control[SVD_CTRL_BLOCKS + 2 * t] = bounds[t]!;
      control[SVD_CTRL_BLOCKS + 2 * t + 1] = bounds[t + 1]!;
    }
    control[SVD_CTRL_WORK] = work;
    Atomics.store(control, SVD_CTRL_DONE, 0);
    Atomics.add(control, SVD_CTRL_EPOCH, 1);
    Atomics.notify(control, SVD_CTRL_EPOCH);
    runSvdBlock(s, work, bounds[0]!, bounds[1]!, this.acc);
    await this.waitFor(SVD_CTRL_DONE, threads - 1);
  }

  /** Tells the workers to return, then stops them. */
  async close(): Promise<void> {
    const { control } = this;
    this.closing = true;
    control[SVD_CTRL_WORK] = SVD_WORK_EXIT;
    Atomics.add(control, SVD_CTRL_EPOCH, 1);
    Atomics.notify(control, SVD_CTRL_EPOCH);
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}

/**
 * {@link truncatedSvd} on `threads` threads (default 2): same options, same
 * validation, the same {@link TruncatedSvd} bit for bit (components,
 * singular values, rows; the returned arrays are ordinary, not shared).
 * Resolves once the workers have stopped; a bad option rejects with
 * `UsageError`. `threads: 1` runs on the calling thread without workers.
 *
 * ```ts
 * const svd = await truncatedSvdParallel(matrix, { dims: 50 }, createRng(1), { threads: 2 });
 * ```
 */
export async function truncatedSvdParallel(
  matrix: Csr,
  options: Partial<ReduceOptions>,
  rng: Rng,
  parallel: Partial<ParallelOptions> = {},
): Promise<TruncatedSvd> {
  const { threads, workerUrl } = resolveParallelOptions(parallel);
  const o = resolveReduceOptions(options, Math.min(matrix.rows, matrix.cols));
  if (threads === 1) return truncatedSvd(matrix, options, rng);
  const script = workerScript(workerUrl);
  const l = svdBlockWidth(o, matrix.rows, matrix.cols);
  const ws = createOrthWorkspace(l, SHARED);
  const s = createSvdArrays(shareCsr(matrix), shareCsr(transposeCsr(matrix)), l, o.dims, ws, SHARED);
  const ranges = rangesFor(s, threads);
  const even = new Map<number, Int32Array>();
  const boundsOf = (work: number): Int32Array => {
    const known = ranges.get(work) ?? even.get(work);
    if (known) return known;
    const count = svdWorkRows(s, work);
    const made = balancedRanges(count, threads, () => 1);
    even.set(work, made);
    return made;
  };
  const crew = new SvdCrew(s, threads, script);
  try {
    await crew.ready();
    const steps = svdSteps(s, ws, o, rng);
    for (;;) {
      const step = steps.next();
      if (step.done) return finishSvd(o, s, step.value, true);
      await crew.run(step.value, boundsOf(step.value));
    }
  } finally {
    await crew.close();
  }
}
