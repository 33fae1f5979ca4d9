import { rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr } from '../src/types.js';
import { createRng } from '../src/util/random.js';
import { UsageError } from '../src/util/errors.js';
import { buildForWorkers } from './helpers/build-workers.js';
import { demoDocs } from './helpers/demo.js';
import { truncatedSvd, type TruncatedSvd } from '../src/reduce/svd.js';
import { reduceForGrouping } from '../src/reduce/space.js';
import { balancedRanges, chooseSvdWorkerUrl, truncatedSvdParallel } from '../src/parallel/svd-parallel.js';
import { PARALLEL_REDUCE_MIN_ROWS, reduceRunner } from '../src/parallel/runners.js';
import { fitHere } from '../src/runners.js';
import { groupDocuments, groupDocumentsAsync } from '../src/pipeline.js';

// The worker must be built JavaScript (vitest runs this suite from the
// TypeScript source): beforeAll compiles the parallel module and its worker
// into a temporary folder laid out like dist/ (as test/kmeans-parallel.test.ts).
let outDir = '';
let workerUrl: URL;
let built: { truncatedSvdParallel: typeof truncatedSvdParallel };

beforeAll(async () => {
  outDir = buildForWorkers('sheaf-svd-worker-', ['src/parallel/svd-parallel.ts', 'src/parallel/svd-worker.ts']);
  workerUrl = pathToFileURL(join(outDir, 'dist/parallel/svd-worker.js'));
  built = (await import(pathToFileURL(join(outDir, 'dist/parallel/svd-parallel.js')).href)) as typeof built;
}, 120_000);

afterAll(() => {
  if (outDir) rmSync(outDir, { recursive: true, force: true });
});

function bytesOf(a: ArrayBufferView): Buffer {
  return Buffer.from(a.buffer, a.byteOffset, a.byteLength);
}

/** Every output array agrees bit for bit, and the parallel one is on ordinary memory. */
function expectIdentical(one: TruncatedSvd, many: TruncatedSvd): void {
  expect(many.dims).toBe(one.dims);
  expect(many.terms).toBe(one.terms);
  expect(many.options).toEqual(one.options);
  expect(bytesOf(many.components).equals(bytesOf(one.components))).toBe(true);
  expect(bytesOf(many.singularValues).equals(bytesOf(one.singularValues))).toBe(true);
  expect(bytesOf(many.rows).equals(bytesOf(one.rows))).toBe(true);
  expect(many.rows.buffer instanceof SharedArrayBuffer).toBe(false);
}

/** Random sparse matrix: `rows` × `cols`, about `fill` of the entries stored, some rows empty; `distinct` > 0 repeats that many rows (rank deficiency). */
function randomCsr(seed: number, rows: number, cols: number, fill: number, distinct: number): Csr {
  const rng = createRng(seed);
  const indptr = new Int32Array(rows + 1);
  const idx: number[] = [];
  const val: number[] = [];
  const patterns: { t: number[]; v: number[] }[] = [];
  for (let r = 0; r < rows; r++) {
    let row: { t: number[]; v: number[] };
    if (distinct > 0 && patterns.length >= distinct) row = patterns[rng.int(distinct)]!;
    else {
      row = { t: [], v: [] };
      if (rng.next() > 0.05) for (let c = 0; c < cols; c++) if (rng.next() < fill) row.t.push(c), row.v.push(0.05 + rng.next());
      patterns.push(row);
    }
    idx.push(...row.t);
    val.push(...row.v);
    indptr[r + 1] = idx.length;
  }
  return { rows, cols, indptr, indices: Int32Array.from(idx), values: Float32Array.from(val) };
}

describe('truncatedSvdParallel gives the single-thread decomposition, bit for bit', () => {
  it('on random matrices (taller and wider than long, rank-deficient ones through the Gram–Schmidt fallback), 2 or 3 threads', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.record({
          seed: fc.integer({ min: 1, max: 1e6 }),
          rows: fc.integer({ min: 3, max: 90 }),
          cols: fc.integer({ min: 3, max: 90 }),
          fill: fc.double({ min: 0.02, max: 0.5, noNaN: true }),
          distinct: fc.oneof(fc.constant(0), fc.integer({ min: 1, max: 4 })),
          dims: fc.integer({ min: 1, max: 12 }),
          oversampling: fc.integer({ min: 0, max: 6 }),
          powerIterations: fc.integer({ min: 0, max: 3 }),
          threads: fc.integer({ min: 2, max: 3 }),
        }),
        async ({ seed, rows, cols, fill, distinct, dims, oversampling, powerIterations, threads }) => {
          const a = randomCsr(seed, rows, cols, fill, distinct);
          const options = { dims: Math.min(dims, rows, cols), oversampling, powerIterations };
          const one = truncatedSvd(a, options, createRng(seed));
          const many = await truncatedSvdParallel(a, options, createRng(seed), { threads, workerUrl });
          expectIdentical(one, many);
        },
      ),
      { numRuns: 25 },
    );
  }, 120_000);

  it('on the demo tickets’ TF-IDF rows (457 × terms) at the defaults, from the built module (worker found beside it)', async () => {
    const { matrix } = fitHere({ texts: demoDocs().map((d) => d.text), analyzer: {}, vectorize: {} });
    const one = truncatedSvd(matrix, {}, createRng(7));
    const many = await built.truncatedSvdParallel(matrix, {}, createRng(7), { threads: 2 });
    expectIdentical(one, many);
    expect(one.dims).toBe(50);
    expect(one.singularValues[0]!).toBeGreaterThan(one.singularValues[49]!);
  }, 60_000);

  it('on a larger sparse matrix (4000 × 1500, the products split by stored values)', async () => {
    const a = randomCsr(11, 4000, 1500, 0.01, 0);
    expectIdentical(truncatedSvd(a, { dims: 20 }, createRng(3)), await truncatedSvdParallel(a, { dims: 20 }, createRng(3), { threads: 2, workerUrl }));
  }, 60_000);

  it('leaves the input matrix as it was', async () => {
    const a = randomCsr(5, 60, 40, 0.2, 0);
    const copy = { indptr: a.indptr.slice(), indices: a.indices.slice(), values: a.values.slice() };
    await truncatedSvdParallel(a, { dims: 5 }, createRng(1), { threads: 2, workerUrl });
    expect(bytesOf(a.indptr).equals(bytesOf(copy.indptr))).toBe(true);
    expect(bytesOf(a.indices).equals(bytesOf(copy.indices))).toBe(true);
    expect(bytesOf(a.values).equals(bytesOf(copy.values))).toBe(true);
  });
});

describe('truncatedSvdParallel settings and failures', () => {
  const a = randomCsr(2, 30, 20, 0.3, 0);

  it('threads: 1 runs on the calling thread (no worker script needed)', async () => {
    expectIdentical(truncatedSvd(a, { dims: 4 }, createRng(1)), await truncatedSvdParallel(a, { dims: 4 }, createRng(1), { threads: 1, workerUrl: '/nonexistent/worker.js' }));
  });

  it('rejects a bad thread count with the message of the k-means runner', async () => {
    const call = truncatedSvdParallel(a, { dims: 4 }, createRng(1), { threads: 0 });
    await expect(call).rejects.toThrow(UsageError);
    await expect(truncatedSvdParallel(a, { dims: 4 }, createRng(1), { threads: 0 })).rejects.toThrow('threads must be a whole number from 1 to 64; got 0');
  });

  it('rejects bad reduction options before starting any worker', async () => {
    await expect(truncatedSvdParallel(a, { dims: 21 }, createRng(1), { threads: 2, workerUrl: '/nonexistent/worker.js' })).rejects.toThrow(
      'dims must be a whole number from 1 to 20 (the smaller of the non-empty documents and the terms); got 21',
    );
  });

  it('a worker that fails rejects the call with the worker named', async () => {
    const bad = join(outDir, 'failing-svd-worker.mjs');
    writeFileSync(bad, "throw new Error('broken on purpose');\n");
    await expect(truncatedSvdParallel(a, { dims: 4 }, createRng(1), { threads: 2, workerUrl: bad })).rejects.toThrow('SVD worker 1 failed: broken on purpose');
  });

  it('finds the worker beside the module, else in dist/, else says to build', () => {
    const here = 'file:///pkg/src/parallel/svd-parallel.ts';
    const has = (...urls: string[]) => (u: URL) => urls.includes(u.href);
    expect(chooseSvdWorkerUrl('file:///pkg/dist/parallel/svd-parallel.js', has('file:///pkg/dist/parallel/svd-worker.js')).href).toBe('file:///pkg/dist/parallel/svd-worker.js');
    expect(chooseSvdWorkerUrl(here, has('file:///pkg/dist/parallel/svd-worker.js')).href).toBe('file:///pkg/dist/parallel/svd-worker.js');
    expect(() => chooseSvdWorkerUrl(here, has())).toThrow(
      'SVD worker script not found at /pkg/src/parallel/svd-worker.js or /pkg/dist/parallel/svd-worker.js; run `npm run build` first',
    );
  });

  it('balances ranges by cost: every row in exactly one range, in order', () => {
    expect(Array.from(balancedRanges(10, 2, () => 1))).toEqual([0, 5, 10]);
    // Gram rows of an l = 6 block cost 6, 5, 4, 3, 2, 1 entries: 21 in all, the first range takes 6 + 5 = 11.
    expect(Array.from(balancedRanges(6, 2, (i) => 6 - i))).toEqual([0, 2, 6]);
    expect(Array.from(balancedRanges(1, 3, () => 1))).toEqual([0, 1, 1, 1]);
    expect(Array.from(balancedRanges(0, 2, () => 1))).toEqual([0, 0, 0]);
  });
});

describe('reduceRunner in the async pipeline', () => {
  it('uses the threads from minRows on (a broken worker shows it) and the calling thread below', async () => {
    const a = randomCsr(4, 50, 30, 0.3, 0);
    const req = { matrix: a, options: { dims: 5 }, seed: 9, nonEmptyRows: a.rows };
    const here = reduceForGrouping(a, { dims: 5 }, 9, a.rows);
    const below = await reduceRunner(2, { minRows: 51, workerUrl: '/nonexistent/worker.js' })(req);
    expectIdentical(here.svd, below.svd);
    await expect(reduceRunner(2, { minRows: 50, workerUrl: '/nonexistent/worker.js' })(req)).rejects.toThrow('SVD worker 1 failed');
    const threaded = await reduceRunner(2, { minRows: 50, workerUrl })(req);
    expectIdentical(here.svd, threaded.svd);
    expect(Array.from(threaded.matrix.indptr)).toEqual(Array.from(here.matrix.indptr));
    expect(PARALLEL_REDUCE_MIN_ROWS).toBeGreaterThan(457); // the demo stays on one thread
  }, 60_000);

  it('groupDocumentsAsync with the threaded reduction gives groupDocuments’ groups and reduced rows on the demo', async () => {
    const docs = demoDocs();
    const sync = groupDocuments(docs, { groups: 8, seed: 3 });
    const threaded = await groupDocumentsAsync(docs, { groups: 8, seed: 3 }, { reduce: reduceRunner(2, { minRows: 0, workerUrl }) });
    expect(sync.reduced).not.toBeNull();
    expectIdentical(sync.reduced!.svd, threaded.reduced!.svd);
    expect(Array.from(threaded.partition.assignments)).toEqual(Array.from(sync.partition.assignments));
    expect(threaded.timings.map((t) => t.stage)).toEqual(sync.timings.map((t) => t.stage));
    expect(threaded.timings.map((t) => t.stage)).toContain('reduce');
  }, 60_000);
});
