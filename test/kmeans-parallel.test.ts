import { rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr } from '../src/types.js';
import { UsageError } from '../src/util/errors.js';
import { createRng } from '../src/util/random.js';
import { buildForWorkers } from './helpers/build-workers.js';
import { countNonEmptyRows, sphericalKMeans, type KMeansResult } from '../src/cluster/kmeans.js';
import {
  DEFAULT_PARALLEL_OPTIONS,
  chooseWorkerUrl,
  resolveParallelOptions,
  sphericalKMeansParallel,
} from '../src/parallel/kmeans-parallel.js';

// The worker must be built JavaScript (vitest runs this suite from the
// TypeScript source, and a worker thread cannot load .ts). beforeAll compiles
// the parallel modules and what they import, with the project's own build
// settings, into a temporary folder laid out like dist/. The source runner is
// pointed at that worker with `workerUrl`; the built runner is also imported
// from there, to check the default lookup (worker beside the module).
let outDir = '';
let workerUrl: URL;
let built: { sphericalKMeansParallel: typeof sphericalKMeansParallel };

beforeAll(() => {
  outDir = buildForWorkers('sheaf-kmeans-worker-', ['src/parallel/kmeans-parallel.ts', 'src/parallel/kmeans-worker.ts']);
  workerUrl = pathToFileURL(join(outDir, 'dist/parallel/kmeans-worker.js'));
}, 120_000);

beforeAll(async () => {
  built = (await import(pathToFileURL(join(outDir, 'dist/parallel/kmeans-parallel.js')).href)) as typeof built;
});

afterAll(() => {
  if (outDir) rmSync(outDir, { recursive: true, force: true });
});

/** Sparse unit rows around planted topics (as in kmeans-prune.test.ts). */
function planted(seed: number, n: number, d: number, topics: number, focus: number): Csr {
  const rng = createRng(seed);
  const cores: number[][] = [];
  for (let z = 0; z < topics; z++) cores.push(Array.from({ length: 2 + rng.int(4) }, () => rng.int(d)));
  const indptr = new Int32Array(n + 1);
  const indices: number[] = [];
  const values: number[] = [];
  for (let r = 0; r < n; r++) {
    if (rng.next() >= 0.03) {
      const core = cores[rng.int(topics)]!;
      const row = new Map<number, number>();
      const len = 1 + rng.int(9);
      for (let w = 0; w < len; w++) {
        const t = rng.next() < focus ? core[rng.int(core.length)]! : rng.int(d);
        row.set(t, (row.get(t) ?? 0) + 0.1 + rng.next());
      }
      const terms = [...row.keys()].sort((a, b) => a - b);
      let norm = 0;
      for (const t of terms) norm += row.get(t)! ** 2;
      norm = Math.sqrt(norm);
      for (const t of terms) {
        indices.push(t);
        values.push(row.get(t)! / norm);
      }
    }
    indptr[r + 1] = indices.length;
  }
  return { rows: n, cols: d, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) };
}

function bytesOf(a: ArrayBufferView): Buffer {
  return Buffer.from(a.buffer, a.byteOffset, a.byteLength);
}

/** The two results agree on every field, bit for bit. */
function expectIdentical(a: KMeansResult, b: KMeansResult): void {
  expect([...b.assignments]).toEqual([...a.assignments]);
  expect(bytesOf(b.centroids).equals(bytesOf(a.centroids))).toBe(true);
  expect(bytesOf(b.fit).equals(bytesOf(a.fit))).toBe(true);
  expect(b.objective).toBe(a.objective);
  expect(b.iterations).toBe(a.iterations);
  expect(b.converged).toBe(a.converged);
  expect(b.reseeded).toBe(a.reseeded);
  expect(b.batches).toBe(a.batches);
  expect([...b.restartObjectives]).toEqual([...a.restartObjectives]);
  expect([...b.screenObjectives]).toEqual([...a.screenObjectives]);
  expect(b.scored).toBe(a.scored);
  expect(b.skipped).toBe(a.skipped);
  expect(b.dotProducts).toBe(a.dotProducts);
  expect([...b.skippedByPass]).toEqual([...a.skippedByPass]);
  expect([...b.dotsByPass]).toEqual([...a.dotsByPass]);
}

describe('sphericalKMeansParallel gives the single-thread result', () => {
  it('bit for bit on random planted-topic data, 2 or 3 threads, pruned or plain', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.record({
          seed: fc.integer({ min: 0, max: 0xffffffff }),
          n: fc.integer({ min: 2, max: 600 }),
          d: fc.integer({ min: 3, max: 60 }),
          topics: fc.integer({ min: 1, max: 8 }),
          focus: fc.double({ min: 0, max: 1, noNaN: true }),
          k: fc.integer({ min: 2, max: 10 }),
          restarts: fc.integer({ min: 1, max: 3 }),
          maxIterations: fc.integer({ min: 1, max: 30 }),
          threads: fc.integer({ min: 2, max: 3 }),
          prune: fc.boolean(),
          runSeed: fc.integer({ min: 0, max: 0xffffffff }),
          screen: fc.boolean(),
          screenSize: fc.integer({ min: 2, max: 300 }),
          screenKeep: fc.integer({ min: 1, max: 3 }),
        }),
        async ({ seed, n, d, topics, focus, k, restarts, maxIterations, threads, prune, runSeed, screen, screenSize, screenKeep }) => {
          const matrix = planted(seed, n, d, topics, focus);
          const m = countNonEmptyRows(matrix);
          fc.pre(m >= 2);
          const opts = { groups: Math.min(k, m), restarts, maxIterations, seed: runSeed, prune, miniBatch: false, screen, screenSize, screenKeep };
          const one = sphericalKMeans(matrix, opts);
          const many = await sphericalKMeansParallel(matrix, { ...opts, threads, workerUrl });
          expectIdentical(one, many);
        },
      ),
      { seed: 7, numRuns: 40 },
    );
  });

  it('on a larger input (6000 rows), with blocks split by non-zeros', async () => {
    const matrix = planted(3, 6000, 400, 15, 0.7);
    const opts = { groups: 15, restarts: 2, seed: 9, miniBatch: false } as const;
    const one = sphericalKMeans(matrix, opts);
    const two = await sphericalKMeansParallel(matrix, { ...opts, threads: 2, workerUrl });
    expectIdentical(one, two);
    expect(two.skipped).toBeGreaterThan(0);
  });

  it('with mini-batch steps and with a starting partition', async () => {
    const matrix = planted(4, 3000, 200, 10, 0.8);
    const mb = { groups: 10, restarts: 2, seed: 5, miniBatch: true, batchSize: 300, batchIterations: 30 } as const;
    expectIdentical(sphericalKMeans(matrix, mb), await sphericalKMeansParallel(matrix, { ...mb, threads: 2, workerUrl }));
    const start = Int32Array.from({ length: matrix.rows }, (_, r) => (matrix.indptr[r + 1]! > matrix.indptr[r]! ? r % 10 : -1));
    const from = { groups: 10, initialAssignments: start } as const;
    expectIdentical(sphericalKMeans(matrix, from), await sphericalKMeansParallel(matrix, { ...from, threads: 2, workerUrl }));
  });

  it('with restarts screened on a sample, full passes and mini-batch steps', async () => {
    const matrix = planted(6, 4000, 300, 12, 0.75);
    const lloyd = { groups: 12, restarts: 4, seed: 3, miniBatch: false, screen: true, screenSize: 700, screenKeep: 2 } as const;
    const a = sphericalKMeans(matrix, lloyd);
    expect(a.screenObjectives.length).toBe(4);
    expectIdentical(a, await sphericalKMeansParallel(matrix, { ...lloyd, threads: 2, workerUrl }));
    const mb = { ...lloyd, miniBatch: true, batchSize: 300, batchIterations: 20, screenKeep: 1 } as const;
    const b = sphericalKMeans(matrix, mb);
    expect(b.batches).toBeGreaterThan(0);
    expectIdentical(b, await sphericalKMeansParallel(matrix, { ...mb, threads: 2, workerUrl }));
  });

  it('from the built module, finding the worker beside it (the dist/ layout)', async () => {
    const matrix = planted(8, 1500, 120, 6, 0.8);
    const opts = { groups: 6, seed: 2, miniBatch: false } as const;
    const res = await built.sphericalKMeansParallel(matrix, { ...opts, threads: 2 });
    expectIdentical(sphericalKMeans(matrix, opts), res);
  });

  it('leaves the input matrix as it was and returns ordinary (not shared) arrays', async () => {
    const matrix = planted(10, 500, 50, 4, 0.8);
    const copy = { indptr: matrix.indptr.slice(), indices: matrix.indices.slice(), values: matrix.values.slice() };
    const res = await sphericalKMeansParallel(matrix, { groups: 4, threads: 2, workerUrl });
    expect(bytesOf(matrix.indptr).equals(bytesOf(copy.indptr))).toBe(true);
    expect(bytesOf(matrix.indices).equals(bytesOf(copy.indices))).toBe(true);
    expect(bytesOf(matrix.values).equals(bytesOf(copy.values))).toBe(true);
    for (const a of [res.assignments, res.centroids, res.fit]) expect(a.buffer).toBeInstanceOf(ArrayBuffer);
  });

  it('threads: 1 runs on the calling thread (no worker script needed)', async () => {
    const matrix = planted(11, 300, 40, 3, 0.8);
    const res = await sphericalKMeansParallel(matrix, { groups: 3, threads: 1, workerUrl: '/nonexistent/worker.js' });
    expectIdentical(sphericalKMeans(matrix, { groups: 3 }), res);
  });
});

describe('options and failures', () => {
  it('defaults to two threads', () => {
    expect(DEFAULT_PARALLEL_OPTIONS).toEqual({ threads: 2 });
    expect(resolveParallelOptions({})).toEqual({ threads: 2 });
    expect(resolveParallelOptions({ threads: 3, workerUrl: 'x.js' })).toEqual({ threads: 3, workerUrl: 'x.js' });
  });

  const cases: [string, Record<string, unknown>, string, string][] = [
    ['zero threads', { threads: 0 }, 'threads must be a whole number from 1 to 64; got 0', 'threads'],
    ['fractional threads', { threads: 1.5 }, 'threads must be a whole number from 1 to 64; got 1.5', 'threads'],
    ['too many threads', { threads: 65 }, 'threads must be a whole number from 1 to 64; got 65', 'threads'],
    ['string threads', { threads: '2' }, 'threads must be a whole number from 1 to 64; got "2"', 'threads'],
    ['a numeric workerUrl', { workerUrl: 5 }, 'workerUrl must be a URL or a file path; got 5', 'workerUrl'],
  ];
  for (const [name, partial, message, option] of cases) {
    it(`rejects ${name}`, async () => {
      const matrix = planted(1, 20, 5, 2, 0.9);
      let caught: unknown;
      try {
        await sphericalKMeansParallel(matrix, { groups: 2, ...(partial as object) });
      } catch (e) {
        caught = e;
      }
      expect(caught).toBeInstanceOf(UsageError);
      expect((caught as UsageError).message).toBe(message);
      expect((caught as UsageError).option).toBe(option);
    });
  }

  it('rejects bad k-means options before starting any worker', async () => {
    const matrix = planted(1, 20, 5, 2, 0.9);
    await expect(
      sphericalKMeansParallel(matrix, { groups: 2, restarts: 0, threads: 2, workerUrl: '/nonexistent/worker.js' }),
    ).rejects.toThrow('restarts must be a whole number >= 1; got 0');
  });

  it('a worker that fails rejects the call with the worker named', async () => {
    const bad = join(outDir, 'failing-worker.mjs');
    writeFileSync(bad, "throw new Error('broken on purpose');\n");
    const matrix = planted(2, 200, 20, 3, 0.8);
    await expect(sphericalKMeansParallel(matrix, { groups: 3, threads: 2, workerUrl: bad })).rejects.toThrow(
      'k-means worker 1 failed: broken on purpose',
    );
  });

  it('finds the worker beside the module, else in dist/, else says to build', () => {
    const here = 'file:///pkg/src/parallel/kmeans-parallel.ts';
    const besideDist = 'file:///pkg/dist/parallel/kmeans-parallel.js';
    const has = (...urls: string[]) => (u: URL) => urls.includes(u.href);
    expect(chooseWorkerUrl(besideDist, has('file:///pkg/dist/parallel/kmeans-worker.js')).href).toBe(
      'file:///pkg/dist/parallel/kmeans-worker.js',
    );
    expect(chooseWorkerUrl(here, has('file:///pkg/dist/parallel/kmeans-worker.js')).href).toBe(
      'file:///pkg/dist/parallel/kmeans-worker.js',
    );
    expect(chooseWorkerUrl(here, has('file:///pkg/src/parallel/kmeans-worker.js')).href).toBe(
      'file:///pkg/src/parallel/kmeans-worker.js',
    );
    expect(() => chooseWorkerUrl(here, has())).toThrow(
      'k-means worker script not found at /pkg/src/parallel/kmeans-worker.js or /pkg/dist/parallel/kmeans-worker.js; run `npm run build` first',
    );
  });
});
