import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr } from '../src/types.js';
import { createRng } from '../src/util/random.js';
import { contingency, nmi } from '../src/evaluate/index.js';
import {
  DEFAULT_KMEANS_OPTIONS,
  SCREEN_AUTO_ROWS,
  countNonEmptyRows,
  resolveKMeansOptions,
  screenSampleSize,
  sphericalKMeans,
} from '../src/cluster/kmeans.js';

/** Sparse unit rows around planted topics, with each row's topic (−1 for the ~3% empty rows). */
function planted(seed: number, n: number, d: number, topics: number, focus: number): { matrix: Csr; truth: Int32Array } {
  const rng = createRng(seed);
  const cores: number[][] = [];
  for (let z = 0; z < topics; z++) cores.push(Array.from({ length: 3 + rng.int(5) }, () => rng.int(d)));
  const indptr = new Int32Array(n + 1);
  const truth = new Int32Array(n).fill(-1);
  const indices: number[] = [];
  const values: number[] = [];
  for (let r = 0; r < n; r++) {
    if (rng.next() >= 0.03) {
      const z = rng.int(topics);
      truth[r] = z;
      const core = cores[z]!;
      const row = new Map<number, number>();
      const len = 2 + rng.int(10);
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
  return { matrix: { rows: n, cols: d, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) }, truth };
}

function nmiOf(truth: Int32Array, assignments: Int32Array): number {
  const t: number[] = [];
  const p: number[] = [];
  for (let r = 0; r < truth.length; r++) {
    if (assignments[r]! < 0) continue;
    t.push(truth[r]!);
    p.push(assignments[r]!);
  }
  return nmi(contingency(Int32Array.from(t), Int32Array.from(p)));
}

describe('screenSampleSize: when restarts are screened', () => {
  const at = (partial: Parameters<typeof resolveKMeansOptions>[0], rows: number) => screenSampleSize(resolveKMeansOptions(partial, rows), rows);
  it('auto: from SCREEN_AUTO_ROWS rows, far above the labelled corpora (<= 3,000 documents) and the demo', () => {
    expect(SCREEN_AUTO_ROWS).toBe(20_000);
    expect(DEFAULT_KMEANS_OPTIONS.screen).toBe('auto');
    expect(at({ groups: 100 }, 19_999)).toBe(0);
    expect(at({ groups: 100 }, 20_000)).toBe(10_000);
    expect(at({ groups: 100 }, 1_000_000)).toBe(10_000);
  });
  it('never with one restart, a starting partition, screen: false, or a sample as large as the pile', () => {
    expect(at({ groups: 100, restarts: 1 }, 60_000)).toBe(0);
    expect(at({ groups: 100, screen: false }, 60_000)).toBe(0);
    expect(at({ groups: 2, initialAssignments: [0, 1] }, 60_000)).toBe(0);
    expect(at({ groups: 10, screen: true, screenSize: 500 }, 500)).toBe(0);
    expect(at({ groups: 10, screen: true, screenSize: 500 }, 501)).toBe(500);
  });
  it('at least one row per group in the sample', () => {
    expect(at({ groups: 300, screen: true, screenSize: 100 }, 5_000)).toBe(300);
  });
});

describe('sphericalKMeans with screened restarts', () => {
  const { matrix, truth } = planted(21, 3000, 400, 12, 0.7);

  it('continues only the screenKeep best restarts on the sample, and keeps the best of them on all rows', () => {
    for (const keep of [1, 2, 3]) {
      const res = sphericalKMeans(matrix, { groups: 12, restarts: 5, seed: 4, screen: true, screenSize: 500, screenKeep: keep });
      const screened = [...res.screenObjectives];
      expect(screened.length).toBe(5);
      for (const v of screened) expect(v).toBeGreaterThan(0);
      // The continued restarts are the `keep` best on the sample (ties to the earlier restart).
      const ranked = screened.map((v, r) => [v, r] as const).sort((a, b) => b[0] - a[0] || a[1] - b[1]);
      const continued = new Set(ranked.slice(0, keep).map(([, r]) => r));
      const full = [...res.restartObjectives];
      for (let r = 0; r < 5; r++) expect(Number.isNaN(full[r]!)).toBe(!continued.has(r));
      // A sample of 500 of ~2,900 rows: its objective is a fraction of the whole pile's.
      for (const r of continued) expect(full[r]!).toBeGreaterThan(screened[r]! * 3);
      expect(res.objective).toBe(Math.max(...full.filter((v) => !Number.isNaN(v))));
    }
  });

  it('reaches the objective and the planted topics of unscreened restarts (within 1%, NMI within 0.02)', () => {
    const base = { groups: 12, restarts: 6 } as const;
    for (const seed of [1, 2, 3]) {
      const off = sphericalKMeans(matrix, { ...base, seed, screen: false });
      const on = sphericalKMeans(matrix, { ...base, seed, screen: true, screenSize: 600 });
      expect(off.screenObjectives.length).toBe(0);
      expect(on.objective).toBeGreaterThan(off.objective * 0.99);
      expect(nmiOf(truth, on.assignments)).toBeGreaterThan(nmiOf(truth, off.assignments) - 0.02);
      // Cheaper: fewer row–centroid dot products in all.
      expect(on.dotProducts).toBeLessThan(off.dotProducts);
    }
  });

  it('screenPasses bounds the screening passes of mini-batch runs only', () => {
    const base = { groups: 12, restarts: 4, seed: 2, screen: true, screenSize: 600, batchSize: 200, batchIterations: 10 } as const;
    const brief = sphericalKMeans(matrix, { ...base, miniBatch: true, screenPasses: 1 });
    const long = sphericalKMeans(matrix, { ...base, miniBatch: true, screenPasses: 50 });
    // One pass on 600 rows per restart against up to 50: fewer dot products, other sample objectives.
    expect(brief.dotProducts).toBeLessThan(long.dotProducts);
    expect([...brief.screenObjectives]).not.toEqual([...long.screenObjectives]);
    // Full-pass runs screen with maxIterations and stableShare: screenPasses changes nothing.
    const a = sphericalKMeans(matrix, { ...base, miniBatch: false, screenPasses: 1 });
    const b = sphericalKMeans(matrix, { ...base, miniBatch: false, screenPasses: 50 });
    expect([...a.assignments]).toEqual([...b.assignments]);
    expect([...a.screenObjectives]).toEqual([...b.screenObjectives]);
  });

  it('same seed and input, same result; the sample depends on the seed', () => {
    const opts = { groups: 12, restarts: 3, seed: 8, screen: true, screenSize: 400 } as const;
    const a = sphericalKMeans(matrix, opts);
    const b = sphericalKMeans(matrix, opts);
    expect([...b.assignments]).toEqual([...a.assignments]);
    expect(Buffer.from(b.centroids.buffer).equals(Buffer.from(a.centroids.buffer))).toBe(true);
    expect([...b.screenObjectives]).toEqual([...a.screenObjectives]);
    const c = sphericalKMeans(matrix, { ...opts, seed: 9 });
    expect([...c.screenObjectives]).not.toEqual([...a.screenObjectives]);
  });

  it('valid partitions on random inputs: every non-empty row in a group, every group used, fit its centroid score', () => {
    fc.assert(
      fc.property(
        fc.record({
          seed: fc.integer({ min: 0, max: 0xffffffff }),
          n: fc.integer({ min: 20, max: 400 }),
          k: fc.integer({ min: 2, max: 8 }),
          restarts: fc.integer({ min: 2, max: 4 }),
          screenSize: fc.integer({ min: 2, max: 100 }),
          screenKeep: fc.integer({ min: 1, max: 4 }),
          miniBatch: fc.boolean(),
        }),
        ({ seed, n, k, restarts, screenSize, screenKeep, miniBatch }) => {
          const { matrix: m } = planted(seed, n, 40, 5, 0.6);
          const rows = countNonEmptyRows(m);
          fc.pre(rows > k);
          const res = sphericalKMeans(m, { groups: k, restarts, seed, screen: true, screenSize, screenKeep, miniBatch, batchSize: 16, batchIterations: 5 });
          const used = new Set<number>();
          for (let r = 0; r < n; r++) {
            const empty = m.indptr[r + 1] === m.indptr[r];
            expect(res.assignments[r]! === -1).toBe(empty);
            if (empty) continue;
            used.add(res.assignments[r]!);
            let s = 0;
            for (let j = m.indptr[r]!; j < m.indptr[r + 1]!; j++) s += m.values[j]! * res.centroids[m.indices[j]! * k + res.assignments[r]!]!;
            expect(res.fit[r]!).toBeCloseTo(s, 5);
          }
          expect(used.size).toBe(k);
          expect(res.screenObjectives.length).toBe(Math.max(screenSize, k) < rows ? restarts : 0);
        },
      ),
      { seed: 11, numRuns: 60 },
    );
  });

  it('auto at SCREEN_AUTO_ROWS rows screens the default 10 restarts; one row fewer runs them in full', () => {
    const big = planted(5, 20_620, 60, 4, 0.8).matrix;
    const rows = countNonEmptyRows(big);
    expect(rows).toBeGreaterThanOrEqual(SCREEN_AUTO_ROWS);
    const opts = { groups: 4, maxIterations: 5 } as const;
    expect(sphericalKMeans(big, opts).screenObjectives.length).toBe(10);
    // Drop non-empty rows down to 19,999: the default run is the unscreened one, bit for bit.
    const keepRows = SCREEN_AUTO_ROWS - 1;
    let seen = 0;
    let cut = 0;
    while (seen < keepRows) if (big.indptr[++cut]! > big.indptr[cut - 1]!) seen++;
    const small: Csr = { rows: cut, cols: big.cols, indptr: big.indptr.slice(0, cut + 1), indices: big.indices, values: big.values };
    expect(countNonEmptyRows(small)).toBe(keepRows);
    const auto = sphericalKMeans(small, opts);
    const off = sphericalKMeans(small, { ...opts, screen: false });
    expect(auto.screenObjectives.length).toBe(0);
    expect([...auto.assignments]).toEqual([...off.assignments]);
    expect([...auto.restartObjectives]).toEqual([...off.restartObjectives]);
  });
});
