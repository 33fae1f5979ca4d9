/**
 * The shared control block between the k-means runner and its workers: an
 * Int32Array on a SharedArrayBuffer. The runner writes a request (work kind,
 * row list, one block per thread), bumps `EPOCH` and notifies; each worker
 * runs its block and adds 1 to `DONE`. A worker adds 1 to `READY` once it has
 * built its views, before it first waits.
 *
 * @module
 */

/** Request counter; a worker waits for it to move past the last one it served. */
export const CTRL_EPOCH = 0;
/** Work kind (`WORK_*` of the kernel, or {@link WORK_EXIT}). */
export const CTRL_WORK = 1;
/** Row list (`LIST_*` of the kernel). */
export const CTRL_LIST = 2;
/** Workers finished with the current request. */
export const CTRL_DONE = 3;
/** Workers started. */
export const CTRL_READY = 4;
/** First block bound: thread t works on rows `[ctrl[CTRL_BLOCKS + 2t], ctrl[CTRL_BLOCKS + 2t + 1])` of the list. */
export const CTRL_BLOCKS = 8;
/** Work kind that tells workers to return. */
export const WORK_EXIT = -1;

/** Length of the control block for `threads` threads (the caller's thread is thread 0). */
export function controlLength(threads: number): number {
  return CTRL_BLOCKS + 2 * threads;
}

/** What a worker receives at start (the typed arrays share memory with the runner's). */
export interface WorkerInit {
  /** This worker's thread number, 1 .. threads − 1. */
  readonly thread: number;
  /** Number of groups. */
  readonly k: number;
  /** The control block. */
  readonly control: Int32Array;
  /** Per-thread statistics, `STAT_LENGTH` entries per thread. */
  readonly stats: Float64Array;
  /** Every shared array of the kernel's `KernelArrays`, by name. */
  readonly arrays: {
    readonly indptr: Int32Array;
    readonly indices: Int32Array;
    readonly values: Float32Array;
    readonly rowNorm: Float64Array;
    readonly centroids: Float32Array;
    readonly assign: Int32Array;
    readonly fit: Float64Array;
    readonly upper: Float64Array;
    readonly lower: Float64Array;
    readonly move: Float64Array;
    readonly order: Int32Array;
    readonly moved: Float64Array;
    readonly closest: Float64Array;
    readonly dense: Float64Array;
    readonly trials: Float64Array;
    readonly active: Int32Array;
    readonly batch: Int32Array;
    readonly sample: Int32Array;
    readonly screen: Int32Array;
    readonly wide: Float32Array;
    readonly scale: Float64Array;
  };
}
