/**
 * k-means on reduced rows wrapped as full CSR rows: the thread runner gives
 * the single-thread result bit for bit, and the result is a fixed point of a
 * naive dense assignment (each row at its most similar centre, computed on the
 * dense rows directly).
 */
import { rmSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildForWorkers } from './helpers/build-workers.js';
import { sphericalKMeans } from '../src/cluster/kmeans.js';
import { sphericalKMeansParallel } from '../src/parallel/kmeans-parallel.js';
import { denseRowsAsCsr, truncatedSvd } from '../src/reduce/index.js';
import { createRng } from '../src/util/random.js';
import type { Csr } from '../src/types.js';

let outDir = '';
let workerUrl: URL;
beforeAll(() => {
  outDir = buildForWorkers('sheaf-reduce-worker-', ['src/parallel/kmeans-parallel.ts', 'src/parallel/kmeans-worker.ts']);
  workerUrl = pathToFileURL(join(outDir, 'dist/parallel/kmeans-worker.js'));
}, 120_000);
afterAll(() => {
  if (outDir) rmSync(outDir, { recursive: true, force: true });
});

/** Sparse unit rows around planted topics; every 40th row empty. */
function planted(seed: number, n: number, terms: number, topics: number): Csr {
  const rng = createRng(seed);
  const indptr = new Int32Array(n + 1);
  const indices: number[] = [];
  const values: number[] = [];
  for (let r = 0; r < n; r++) {
    if (r % 40 !== 39) {
      const z = rng.int(topics);
      const row = new Map<number, number>();
      for (let w = 0; w < 8; w++) {
        const t = rng.next() < 0.7 ? (z * 7 + rng.int(7)) % terms : rng.int(terms);
        row.set(t, (row.get(t) ?? 0) + 0.2 + rng.next());
      }
      const keys = [...row.keys()].sort((a, b) => a - b);
      const norm = Math.sqrt(keys.reduce((a, t) => a + row.get(t)! ** 2, 0));
      for (const t of keys) {
        indices.push(t);
        values.push(row.get(t)! / norm);
      }
    }
    indptr[r + 1] = indices.length;
  }
  return { rows: n, cols: terms, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) };
}

describe('k-means on reduced rows', () => {
  const tfidf = planted(5, 1200, 300, 9);
  const svd = truncatedSvd(tfidf, { dims: 16 }, createRng(11));
  const wrapped = denseRowsAsCsr(svd.rows, tfidf.rows, 16);

  it('empty TF-IDF rows stay out of every group', () => {
    const km = sphericalKMeans(wrapped, { groups: 9, seed: 3 });
    for (let r = 39; r < tfidf.rows; r += 40) expect(km.assignments[r]).toBe(-1);
  });

  it('threads give the single-thread result bit for bit', async () => {
    const one = sphericalKMeans(wrapped, { groups: 9, seed: 3 });
    const two = await sphericalKMeansParallel(wrapped, { groups: 9, seed: 3, threads: 2, workerUrl });
    expect(two.assignments).toEqual(one.assignments);
    expect(two.centroids).toEqual(one.centroids);
    expect(two.fit).toEqual(one.fit);
    expect(two.objective).toBe(one.objective);
  });

  it('a converged run is a fixed point of the naive dense assignment', () => {
    const km = sphericalKMeans(wrapped, { groups: 9, seed: 4 });
    expect(km.converged).toBe(true);
    const d = 16;
    const k = 9;
    for (let r = 0; r < tfidf.rows; r++) {
      if (km.assignments[r]! < 0) continue;
      let best = -1;
      let bestS = -Infinity;
      for (let g = 0; g < k; g++) {
        let s = 0;
        for (let j = 0; j < d; j++) s += svd.rows[r * d + j]! * km.centroids[j * k + g]!;
        if (s > bestS + 1e-6) {
          bestS = s;
          best = g;
        }
      }
      expect(km.assignments[r]).toBe(best);
      expect(Math.abs(km.fit[r]! - bestS)).toBeLessThan(1e-5);
    }
  });
});
