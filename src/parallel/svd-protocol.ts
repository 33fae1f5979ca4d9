/**
 * The shared control block between the decomposition's thread runner
 * (`svd-parallel.ts`) and its workers (`svd-worker.ts`): an Int32Array on a
 * SharedArrayBuffer. The runner writes the row work (`SVD_WORK_*` of
 * `src/reduce/svd-kernels.ts`) and one range of output rows per thread, bumps
 * `EPOCH` and notifies; each worker runs its range and adds 1 to `DONE`. A
 * worker adds 1 to `READY` once it has built its views, before it first waits.
 *
 * @module
 */

/** Request counter; a worker waits for it to move past the last one it served. */
export const SVD_CTRL_EPOCH = 0;
/** Row work (`SVD_WORK_*`), or {@link SVD_WORK_EXIT}. */
export const SVD_CTRL_WORK = 1;
/** Workers finished with the current request. */
export const SVD_CTRL_DONE = 2;
/** Workers started. */
export const SVD_CTRL_READY = 3;
/** First range bound: thread t works on output rows `[ctrl[SVD_CTRL_BLOCKS + 2t], ctrl[SVD_CTRL_BLOCKS + 2t + 1])`. */
export const SVD_CTRL_BLOCKS = 8;
/** Work code that tells workers to return. */
export const SVD_WORK_EXIT = -1;

/** Length of the control block for `threads` threads (the caller's thread is thread 0). */
export function svdControlLength(threads: number): number {
  return SVD_CTRL_BLOCKS + 2 * threads;
}

/** What a worker receives at start (the typed arrays share memory with the runner's). */
export interface SvdWorkerInit {
  /** This worker's thread number, 1 .. threads − 1. */
  readonly thread: number;
  /** The control block. */
  readonly control: Int32Array;
  /** Rows n, terms m, block width l, dimensions d. */
  readonly n: number;
  readonly m: number;
  readonly l: number;
  readonly d: number;
  /** Every shared array of `SvdArrays`, by name (A and Aᵀ as their three CSR arrays). */
  readonly arrays: {
    readonly aIndptr: Int32Array;
    readonly aIndices: Int32Array;
    readonly aValues: Float32Array;
    readonly tIndptr: Int32Array;
    readonly tIndices: Int32Array;
    readonly tValues: Float32Array;
    readonly omega: Float64Array;
    readonly y: Float64Array;
    readonly g: Float64Array;
    readonly rt: Float64Array;
    readonly wd: Float64Array;
    readonly compT: Float64Array;
    readonly byTerm: Float32Array;
    readonly rows: Float32Array;
  };
}
