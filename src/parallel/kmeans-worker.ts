/**
 * Worker entry of the parallel k-means runner (see `kmeans-parallel.ts`).
 * Builds the kernel's views over the shared arrays once, then serves
 * requests until told to exit: wait for the epoch to move, run this thread's
 * block with the same {@link runBlock} the single-thread path uses, report
 * done. Runs as built JavaScript (`dist/parallel/kmeans-worker.js`).
 *
 * @module
 */

import { parentPort, workerData } from 'node:worker_threads';
import { STAT_LENGTH, runBlock, type KernelArrays } from '../cluster/kmeans-kernel.js';
import {
  CTRL_BLOCKS,
  CTRL_DONE,
  CTRL_EPOCH,
  CTRL_LIST,
  CTRL_READY,
  CTRL_WORK,
  WORK_EXIT,
  type WorkerInit,
} from './kmeans-protocol.js';

function serve(init: WorkerInit): void {
  const { control, stats, thread, k } = init;
  const arrays: KernelArrays = { ...init.arrays, k, scores: new Float64Array(k) };
  let seen = Atomics.load(control, CTRL_EPOCH);
  Atomics.add(control, CTRL_READY, 1);
  Atomics.notify(control, CTRL_READY);
  for (;;) {
    Atomics.wait(control, CTRL_EPOCH, seen);
    seen = Atomics.load(control, CTRL_EPOCH);
    const work = control[CTRL_WORK]!;
    if (work === WORK_EXIT) return;
    const from = control[CTRL_BLOCKS + 2 * thread]!;
    const to = control[CTRL_BLOCKS + 2 * thread + 1]!;
    runBlock(arrays, work, control[CTRL_LIST]!, from, to, stats, thread * STAT_LENGTH);
    Atomics.add(control, CTRL_DONE, 1);
    Atomics.notify(control, CTRL_DONE);
  }
}

if (parentPort) serve(workerData as WorkerInit);
