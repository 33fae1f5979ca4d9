/**
 * Worker entry of the decomposition's thread runner (see `svd-parallel.ts`).
 * Builds the kernels' views over the shared arrays once, then serves requests
 * until told to exit: wait for the epoch to move, run this thread's range
 * with the same {@link runSvdBlock} the single-thread path uses, report done.
 * Runs as built JavaScript (`dist/parallel/svd-worker.js`).
 *
 * @module
 */

import { parentPort, workerData } from 'node:worker_threads';
import { runSvdBlock, type SvdArrays } from '../reduce/svd-kernels.js';
import { SVD_CTRL_BLOCKS, SVD_CTRL_DONE, SVD_CTRL_EPOCH, SVD_CTRL_READY, SVD_CTRL_WORK, SVD_WORK_EXIT, type SvdWorkerInit } from './svd-protocol.js';

function serve(init: SvdWorkerInit): void {
  const { control, thread, n, m, l, d, arrays: x } = init;
  const s: SvdArrays = {
    a: { rows: n, cols: m, indptr: x.aIndptr, indices: x.aIndices, values: x.aValues },
    at: { rows: m, cols: n, indptr: x.tIndptr, indices: x.tIndices, values: x.tValues },
    l,
    d,
    omega: x.omega,
    y: x.y,
    g: x.g,
    rt: x.rt,
    wd: x.wd,
    compT: x.compT,
    byTerm: x.byTerm,
    rows: x.rows,
  };
  const acc = new Float64Array(d);
  let seen = Atomics.load(control, SVD_CTRL_EPOCH);
  Atomics.add(control, SVD_CTRL_READY, 1);
  Atomics.notify(control, SVD_CTRL_READY);
  for (;;) {
    Atomics.wait(control, SVD_CTRL_EPOCH, seen);
    seen = Atomics.load(control, SVD_CTRL_EPOCH);
    const work = control[SVD_CTRL_WORK]!;
    if (work === SVD_WORK_EXIT) return;
    runSvdBlock(s, work, control[SVD_CTRL_BLOCKS + 2 * thread]!, control[SVD_CTRL_BLOCKS + 2 * thread + 1]!, acc);
    Atomics.add(control, SVD_CTRL_DONE, 1);
    Atomics.notify(control, SVD_CTRL_DONE);
  }
}

if (parentPort) serve(workerData as SvdWorkerInit);
