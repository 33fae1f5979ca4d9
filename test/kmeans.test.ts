import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr } from '../src/types.js';
import { UsageError } from '../src/util/errors.js';
import { createRng, deriveSeed, type Rng } from '../src/util/random.js';
import { naiveGreedySeeds } from './helpers/greedy-seeds.js';
import {
  DEFAULT_KMEANS_OPTIONS,
  assignToCentroids,
  countNonEmptyRows,
  resolveKMeansOptions,
  sphericalKMeans,
  type KMeansResult,
} from '../src/cluster/kmeans.js';

/** Builds an L2-normalised CSR matrix from dense rows (all-zero rows stay empty). */
function csrFromDense(rows: readonly (readonly number[])[], cols: number): Csr {
  const indptr = new Int32Array(rows.length + 1);
  const indices: number[] = [];
  const values: number[] = [];
  rows.forEach((row, r) => {
    let norm = 0;
    for (const v of row) norm += v * v;
    norm = Math.sqrt(norm);
    row.forEach((v, c) => {
      if (v !== 0) {
        indices.push(c);
        values.push(v / norm);
      }
    });
    indptr[r + 1] = indices.length;
  });
  return { rows: rows.length, cols, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) };
}

/** Dense Float32 copy of a CSR matrix, one Float32Array per row. */
function toDense(m: Csr): Float32Array[] {
  const out: Float32Array[] = [];
  for (let r = 0; r < m.rows; r++) {
    const row = new Float32Array(m.cols);
    for (let j = m.indptr[r]!; j < m.indptr[r + 1]!; j++) row[m.indices[j]!] = m.values[j]!;
    out.push(row);
  }
  return out;
}

function dot(a: Float32Array, b: Float32Array): number {
  let s = 0;
  for (let t = 0; t < a.length; t++) s += a[t]! * b[t]!;
  return s;
}

/**
 * Naive reference: dense rows and centroids, obvious loops, the same rules
 * (greedy k-means++ with weights 1 − cos, batch passes, a stop once at most
 * `stableShare` of the rows move (the means of that assignment kept), farthest-row re-seeding,
 * best restart, canonical numbering) and the same random draws.
 */
function naiveKMeans(
  m: Csr,
  k: number,
  restarts: number,
  maxIterations: number,
  seed: number,
  stableShare = 0.001,
): { assignments: number[]; objective: number; iterations: number; converged: boolean } {
  const X = toDense(m);
  const n = m.rows;
  const d = m.cols;
  const active: number[] = [];
  for (let i = 0; i < n; i++) if (X[i]!.some((v) => v !== 0)) active.push(i);
  let best: { assign: number[]; objective: number; iterations: number; converged: boolean } | undefined;
  for (let r = 0; r < restarts; r++) {
    const rng: Rng = createRng(deriveSeed(seed, r));
    // seeding: greedy k-means++ (test/helpers/greedy-seeds.ts)
    const C: Float32Array[] = naiveGreedySeeds(active, k, rng, (i, j) => dot(X[i]!, Float32Array.from(X[j]!))).map((i) => Float32Array.from(X[i]!));
    // iterations
    const assign = new Array<number>(n).fill(-1);
    const fit = new Array<number>(n).fill(0);
    let iterations = 0;
    let converged = false;
    while (iterations < maxIterations) {
      iterations++;
      let changed = 0;
      for (const i of active) {
        let bg = 0;
        let bs = dot(X[i]!, C[0]!);
        for (let g = 1; g < k; g++) {
          const s = dot(X[i]!, C[g]!);
          if (s > bs) {
            bs = s;
            bg = g;
          }
        }
        if (assign[i] !== bg) changed++;
        assign[i] = bg;
        fit[i] = bs;
      }
      if (changed === 0) {
        converged = true;
        break;
      }
      const sums: Float64Array[] = Array.from({ length: k }, () => new Float64Array(d));
      const counts = new Array<number>(k).fill(0);
      for (const i of active) {
        counts[assign[i]!]++;
        for (let t = 0; t < d; t++) if (X[i]![t] !== 0) sums[assign[i]!]![t] += X[i]![t]!;
      }
      for (let g = 0; g < k; g++) {
        if (counts[g] !== 0) continue;
        let far = -1;
        for (const i of active) if (counts[assign[i]!]! > 1 && (far < 0 || fit[i]! < fit[far]!)) far = i;
        const from = assign[far]!;
        for (let t = 0; t < d; t++) if (X[far]![t] !== 0) sums[from]![t] += -1 * X[far]![t]!;
        counts[from]--;
        for (let t = 0; t < d; t++) if (X[far]![t] !== 0) sums[g]![t] += X[far]![t]!;
        counts[g] = 1;
        assign[far] = g;
      }
      for (let g = 0; g < k; g++) {
        let norm2 = 0;
        for (let t = 0; t < d; t++) norm2 += sums[g]![t]! * sums[g]![t]!;
        const inv = 1 / Math.sqrt(norm2);
        for (let t = 0; t < d; t++) C[g]![t] = sums[g]![t]! * inv;
      }
      if (changed <= stableShare * active.length) {
        converged = true;
        break;
      }
    }
    for (const i of active) fit[i] = dot(X[i]!, C[assign[i]!]!);
    let objective = 0;
    for (const i of active) objective += fit[i]!;
    if (best === undefined || objective > best.objective) best = { assign, objective, iterations, converged };
  }
  // canonical numbering: size descending, then smallest member row
  const b = best!;
  const groups = Array.from({ length: k }, (_, g) => ({
    g,
    size: b.assign.filter((a) => a === g).length,
    first: b.assign.indexOf(g),
  }));
  groups.sort((x, y) => y.size - x.size || x.first - y.first);
  const newOf = new Map(groups.map((x, idx) => [x.g, idx]));
  return {
    assignments: b.assign.map((a) => (a < 0 ? -1 : newOf.get(a)!)),
    objective: b.objective,
    iterations: b.iterations,
    converged: b.converged,
  };
}

/** Random sparse rows, some all-zero; values drawn from a small set so duplicates and ties happen. */
const smallValues = fc.constantFrom(0, 0, 0, 0, 1, 2, 3);
const realValues = fc.oneof(fc.constant(0), fc.constant(0), fc.double({ min: 0.01, max: 1, noNaN: true }));
function sparseInput(values: fc.Arbitrary<number>) {
  return fc
    .record({ n: fc.integer({ min: 2, max: 40 }), d: fc.integer({ min: 1, max: 12 }) })
    .chain(({ n, d }) =>
      fc.record({
        rows: fc.array(fc.array(values, { minLength: d, maxLength: d }), { minLength: n, maxLength: n }),
        d: fc.constant(d),
        k: fc.integer({ min: 2, max: 6 }),
        seed: fc.integer({ min: 0, max: 0xffffffff }),
        restarts: fc.integer({ min: 1, max: 3 }),
      }),
    )
    .map((x) => {
      const matrix = csrFromDense(x.rows, x.d);
      return { ...x, matrix, m: countNonEmptyRows(matrix) };
    })
    .filter((x) => x.m >= 2)
    .map((x) => ({ ...x, k: Math.min(x.k, x.m) }));
}

function centroidScores(m: Csr, r: number, res: KMeansResult): number[] {
  const k = res.groups;
  const s = new Array<number>(k).fill(0);
  for (let j = m.indptr[r]!; j < m.indptr[r + 1]!; j++) {
    for (let g = 0; g < k; g++) s[g] += m.values[j]! * res.centroids[m.indices[j]! * k + g]!;
  }
  return s;
}

function checkInvariants(matrix: Csr, res: KMeansResult, k: number): void {
  const n = matrix.rows;
  expect(res.groups).toBe(k);
  expect(res.assignments.length).toBe(n);
  expect(res.centroids.length).toBe(matrix.cols * k);
  let recomputed = 0;
  const size = new Array<number>(k).fill(0);
  const first = new Array<number>(k).fill(-1);
  for (let r = 0; r < n; r++) {
    const empty = matrix.indptr[r + 1] === matrix.indptr[r];
    const a = res.assignments[r]!;
    if (empty) {
      expect(a).toBe(-1);
      expect(res.fit[r]).toBe(0);
      continue;
    }
    expect(a).toBeGreaterThanOrEqual(0);
    expect(a).toBeLessThan(k);
    size[a]++;
    if (first[a] === -1) first[a] = r;
    const scores = centroidScores(matrix, r, res);
    recomputed += scores[a]!;
    expect(res.fit[r]).toBeCloseTo(scores[a]!, 6);
    if (res.converged) expect(scores[a]!).toBeGreaterThanOrEqual(Math.max(...scores) - 1e-12);
  }
  expect(Math.abs(res.objective - recomputed)).toBeLessThanOrEqual(1e-9 * Math.max(1, n));
  // unit centroids, no empty group, canonical numbering
  for (let g = 0; g < k; g++) {
    let norm2 = 0;
    for (let t = 0; t < matrix.cols; t++) norm2 += res.centroids[t * k + g]! ** 2;
    expect(Math.sqrt(norm2)).toBeCloseTo(1, 5);
    expect(size[g]).toBeGreaterThan(0);
    if (g > 0) {
      expect(size[g - 1]! > size[g]! || (size[g - 1] === size[g] && first[g - 1]! < first[g]!)).toBe(true);
    }
  }
  expect(res.restartObjectives.length).toBeGreaterThan(0);
  expect(res.objective).toBe(Math.max(...res.restartObjectives));
}

describe('resolveKMeansOptions', () => {
  it('merges the documented defaults', () => {
    const speed = { prune: true, miniBatch: 'auto', batchSize: 4096, batchIterations: 200, batchTolerance: 0.001, screen: 'auto', screenSize: 10_000, screenKeep: 1, screenPasses: 10 };
    expect(DEFAULT_KMEANS_OPTIONS).toEqual({ restarts: 10, maxIterations: 100, stableShare: 0.001, seed: 1, ...speed });
    expect(resolveKMeansOptions({ groups: 3 }, 10)).toEqual({ groups: 3, restarts: 10, maxIterations: 100, stableShare: 0.001, seed: 1, ...speed });
    expect(
      resolveKMeansOptions(
        { groups: 10, restarts: 1, maxIterations: 5, stableShare: 0.5, seed: 4294967295, prune: false, miniBatch: true, batchSize: 1, batchIterations: 1, batchTolerance: 0, screen: true, screenSize: 2, screenKeep: 3, screenPasses: 1 },
        10,
      ),
    ).toEqual({
      screen: true,
      screenSize: 2,
      screenKeep: 3,
      screenPasses: 1,
      groups: 10,
      restarts: 1,
      maxIterations: 5,
      stableShare: 0.5,
      seed: 4294967295,
      prune: false,
      miniBatch: true,
      batchSize: 1,
      batchIterations: 1,
      batchTolerance: 0,
    });
    const start = Int32Array.from([0, 1, 1]);
    expect(resolveKMeansOptions({ groups: 2, initialAssignments: start }, 3).initialAssignments).toBe(start);
    expect(resolveKMeansOptions({ groups: 3, seed: undefined }, 10).seed).toBe(1);
  });

  const cases: [string, Record<string, unknown>, number, string, string][] = [
    ['fractional groups', { groups: 1.5 }, 57, 'groups must be a whole number from 2 to 57 (the number of non-empty documents); got 1.5', 'groups'],
    ['too many groups', { groups: 58 }, 57, 'groups must be a whole number from 2 to 57 (the number of non-empty documents); got 58', 'groups'],
    ['one group', { groups: 1 }, 57, 'groups must be a whole number from 2 to 57 (the number of non-empty documents); got 1', 'groups'],
    ['missing groups', {}, 57, 'groups must be a whole number from 2 to 57 (the number of non-empty documents); got nothing', 'groups'],
    ['string groups', { groups: '3' }, 57, 'groups must be a whole number from 2 to 57 (the number of non-empty documents); got "3"', 'groups'],
    ['unknown bound', { groups: 0 }, Infinity, 'groups must be a whole number >= 2; got 0', 'groups'],
    ['unknown bound (max safe integer)', { groups: 1 }, Number.MAX_SAFE_INTEGER, 'groups must be a whole number >= 2; got 1', 'groups'],
    ['one document', { groups: 2 }, 1, 'groups needs at least 2 non-empty documents to split; there is 1', 'groups'],
    ['no documents', { groups: 2 }, 0, 'groups needs at least 2 non-empty documents to split; there are 0', 'groups'],
    ['zero restarts', { groups: 2, restarts: 0 }, 9, 'restarts must be a whole number >= 1; got 0', 'restarts'],
    ['fractional restarts', { groups: 2, restarts: 2.5 }, 9, 'restarts must be a whole number >= 1; got 2.5', 'restarts'],
    ['zero iterations', { groups: 2, maxIterations: 0 }, 9, 'maxIterations must be a whole number >= 1; got 0', 'maxIterations'],
    ['NaN iterations', { groups: 2, maxIterations: NaN }, 9, 'maxIterations must be a whole number >= 1; got NaN', 'maxIterations'],
    ['negative stableShare', { groups: 2, stableShare: -0.01 }, 9, 'stableShare must be a number from 0 to 1; got -0.01', 'stableShare'],
    ['stableShare above 1', { groups: 2, stableShare: 2 }, 9, 'stableShare must be a number from 0 to 1; got 2', 'stableShare'],
    ['negative seed', { groups: 2, seed: -1 }, 9, 'seed must be a whole number from 0 to 4294967295; got -1', 'seed'],
    ['seed too large', { groups: 2, seed: 2 ** 32 }, 9, 'seed must be a whole number from 0 to 4294967295; got 4294967296', 'seed'],
    ['string prune', { groups: 2, prune: 'yes' }, 9, 'prune must be true or false; got "yes"', 'prune'],
    ['other miniBatch', { groups: 2, miniBatch: 'always' }, 9, 'miniBatch must be "auto", true or false; got "always"', 'miniBatch'],
    ['zero batchSize', { groups: 2, batchSize: 0 }, 9, 'batchSize must be a whole number >= 1; got 0', 'batchSize'],
    ['fractional batchIterations', { groups: 2, batchIterations: 2.5 }, 9, 'batchIterations must be a whole number >= 1; got 2.5', 'batchIterations'],
    ['negative batchTolerance', { groups: 2, batchTolerance: -0.1 }, 9, 'batchTolerance must be a number >= 0; got -0.1', 'batchTolerance'],
    ['infinite batchTolerance', { groups: 2, batchTolerance: Infinity }, 9, 'batchTolerance must be a number >= 0; got Infinity', 'batchTolerance'],
    ['other screen', { groups: 2, screen: 'on' }, 9, 'screen must be "auto", true or false; got "on"', 'screen'],
    ['one-row screenSize', { groups: 2, screenSize: 1 }, 9, 'screenSize must be a whole number >= 2; got 1', 'screenSize'],
    ['fractional screenSize', { groups: 2, screenSize: 100.5 }, 9, 'screenSize must be a whole number >= 2; got 100.5', 'screenSize'],
    ['zero screenKeep', { groups: 2, screenKeep: 0 }, 9, 'screenKeep must be a whole number >= 1; got 0', 'screenKeep'],
    ['string screenKeep', { groups: 2, screenKeep: '2' }, 9, 'screenKeep must be a whole number >= 1; got "2"', 'screenKeep'],
    ['zero screenPasses', { groups: 2, screenPasses: 0 }, 9, 'screenPasses must be a whole number >= 1; got 0', 'screenPasses'],
    ['object initialAssignments', { groups: 2, initialAssignments: { 0: 1 } }, 9, 'initialAssignments must be an Int32Array or an array of group numbers; got {"0":1}', 'initialAssignments'],
    ['string array initialAssignments', { groups: 2, initialAssignments: ['0', '1'] }, 9, 'initialAssignments must be an Int32Array or an array of group numbers; got an array holding a non-number', 'initialAssignments'],
    ['miniBatch with initialAssignments', { groups: 2, miniBatch: true, initialAssignments: [0, 1] }, 9, 'miniBatch must be false or "auto" when initialAssignments is given (a given partition is refined by full passes); got true', 'miniBatch'],
  ];
  for (const [name, partial, bound, message, option] of cases) {
    it(`rejects ${name}`, () => {
      let caught: unknown;
      try {
        resolveKMeansOptions(partial as never, bound);
      } catch (e) {
        caught = e;
      }
      expect(caught).toBeInstanceOf(UsageError);
      expect((caught as UsageError).message).toBe(message);
      expect((caught as UsageError).option).toBe(option);
    });
  }

  it('sphericalKMeans validates against the non-empty rows of its input', () => {
    const m = csrFromDense([[1, 0], [0, 0], [0, 1]], 2);
    expect(() => sphericalKMeans(m, { groups: 3 })).toThrow(
      'groups must be a whole number from 2 to 2 (the number of non-empty documents); got 3',
    );
  });
});

describe('sphericalKMeans on small hand-made data', () => {
  it('separates three obvious directions and numbers groups canonically', () => {
    // rows 0..2 near term 0, rows 3..6 near term 1, rows 7..8 near term 2, row 9 empty
    const m = csrFromDense(
      [
        [5, 1, 0], [6, 0, 1], [4, 1, 1],
        [0, 5, 1], [1, 6, 0], [0, 7, 1], [1, 5, 0],
        [0, 1, 6], [1, 0, 5],
        [0, 0, 0],
      ],
      3,
    );
    const res = sphericalKMeans(m, { groups: 3, seed: 42 });
    // largest group (4 rows, term 1) is group 0; then 3 rows (term 0); then 2 rows (term 2)
    expect([...res.assignments]).toEqual([1, 1, 1, 0, 0, 0, 0, 2, 2, -1]);
    expect(res.converged).toBe(true);
    expect(res.fit[9]).toBe(0);
    // centroid 0 points mostly along term 1
    expect(res.centroids[1 * 3 + 0]).toBeGreaterThan(0.95);
    checkInvariants(m, res, 3);
  });

  it('with more groups than distinct directions still returns k non-empty groups, by re-seeding', () => {
    const rows = [
      [1, 0, 0], [1, 0, 0], [1, 0, 0],
      [0, 1, 0], [0, 1, 0], [0, 1, 0],
      [0, 0, 1], [0, 0, 1], [0, 0, 1],
    ];
    const m = csrFromDense(rows, 3);
    const res = sphericalKMeans(m, { groups: 4, restarts: 2, maxIterations: 7, seed: 3 });
    expect(res.reseeded).toBeGreaterThan(0);
    checkInvariants(m, res, 4);
    const naive = naiveKMeans(m, 4, 2, 7, 3);
    expect([...res.assignments]).toEqual(naive.assignments);
  });

  it('the same seed gives bit-identical output; another seed may differ but is still valid', () => {
    const rng = createRng(99);
    const rows = Array.from({ length: 60 }, () => Array.from({ length: 8 }, () => (rng.next() < 0.4 ? rng.next() : 0)));
    const m = csrFromDense(rows, 8);
    const a = sphericalKMeans(m, { groups: 4, seed: 5 });
    const b = sphericalKMeans(m, { groups: 4, seed: 5 });
    expect(b.assignments).toEqual(a.assignments);
    expect(Buffer.from(b.centroids.buffer).equals(Buffer.from(a.centroids.buffer))).toBe(true);
    expect(Buffer.from(b.fit.buffer).equals(Buffer.from(a.fit.buffer))).toBe(true);
    expect(b.objective).toBe(a.objective);
    expect([...b.restartObjectives]).toEqual([...a.restartObjectives]);
    checkInvariants(m, sphericalKMeans(m, { groups: 4, seed: 6 }), 4);
  });

  it('stops at maxIterations and then reports fit against the returned centroids', () => {
    const rng = createRng(7);
    const rows = Array.from({ length: 80 }, () => Array.from({ length: 10 }, () => (rng.next() < 0.5 ? rng.next() : 0)));
    const m = csrFromDense(rows, 10);
    const res = sphericalKMeans(m, { groups: 6, restarts: 1, maxIterations: 1, seed: 1 });
    expect(res.iterations).toBe(1);
    expect(res.converged).toBe(false);
    checkInvariants(m, res, 6);
  });

  it('more restarts never give a lower objective than the first restart alone', () => {
    const rng = createRng(12);
    const rows = Array.from({ length: 120 }, () => Array.from({ length: 15 }, () => (rng.next() < 0.3 ? rng.next() : 0)));
    const m = csrFromDense(rows, 15);
    const one = sphericalKMeans(m, { groups: 5, restarts: 1, seed: 8 });
    const many = sphericalKMeans(m, { groups: 5, restarts: 6, seed: 8 });
    expect(many.restartObjectives[0]).toBe(one.objective);
    expect(many.objective).toBeGreaterThanOrEqual(one.objective);
  });
});

describe('sphericalKMeans properties on random sparse unit rows', () => {
  it('keeps its invariants', () => {
    fc.assert(
      fc.property(sparseInput(realValues), ({ matrix, k, seed, restarts }) => {
        const res = sphericalKMeans(matrix, { groups: k, seed, restarts });
        checkInvariants(matrix, res, k);
      }),
      { seed: 2024, numRuns: 200 },
    );
  });

  it('matches the naive dense reference exactly (random values)', () => {
    fc.assert(
      fc.property(sparseInput(realValues), ({ matrix, k, seed, restarts }) => {
        const res = sphericalKMeans(matrix, { groups: k, seed, restarts, maxIterations: 20 });
        const ref = naiveKMeans(matrix, k, restarts, 20, seed);
        expect([...res.assignments]).toEqual(ref.assignments);
        expect(res.objective).toBe(ref.objective);
        expect(res.iterations).toBe(ref.iterations);
        expect(res.converged).toBe(ref.converged);
      }),
      { seed: 77, numRuns: 200 },
    );
  });

  it('matches the naive dense reference exactly (duplicate-heavy values, ties and re-seeding)', () => {
    let reseededRuns = 0;
    fc.assert(
      fc.property(sparseInput(smallValues), ({ matrix, k, seed, restarts }) => {
        const res = sphericalKMeans(matrix, { groups: k, seed, restarts, maxIterations: 15 });
        if (res.reseeded > 0) reseededRuns++;
        const ref = naiveKMeans(matrix, k, restarts, 15, seed);
        expect([...res.assignments]).toEqual(ref.assignments);
        expect(res.objective).toBe(ref.objective);
        checkInvariants(matrix, res, k);
      }),
      { seed: 31, numRuns: 300 },
    );
    // the re-seeding path was exercised
    expect(reseededRuns).toBeGreaterThan(0);
  });

  it('stops once at most stableShare of the rows move, as the naive reference does, with fewer passes', () => {
    let earlier = 0;
    fc.assert(
      fc.property(sparseInput(realValues), ({ matrix, k, seed, restarts }) => {
        const res = sphericalKMeans(matrix, { groups: k, seed, restarts, maxIterations: 20, stableShare: 0.2 });
        const ref = naiveKMeans(matrix, k, restarts, 20, seed, 0.2);
        expect([...res.assignments]).toEqual(ref.assignments);
        expect(res.objective).toBe(ref.objective);
        expect(res.iterations).toBe(ref.iterations);
        const exact = sphericalKMeans(matrix, { groups: k, seed, restarts: 1, maxIterations: 20, stableShare: 0 });
        const loose = sphericalKMeans(matrix, { groups: k, seed, restarts: 1, maxIterations: 20, stableShare: 0.2 });
        expect(loose.iterations).toBeLessThanOrEqual(exact.iterations);
        if (loose.iterations < exact.iterations) earlier++;
        // (checkInvariants does not apply: after an early stop, as at the pass limit, the centroids are the
        // means of the last assignment, which need not be every row's nearest.)
      }),
      { seed: 5, numRuns: 150 },
    );
    // the rule did cut runs short
    expect(earlier).toBeGreaterThan(0);
  });

  it('assignToCentroids reproduces the assignments and fit of a converged run', () => {
    fc.assert(
      fc.property(sparseInput(realValues), ({ matrix, k, seed }) => {
        const res = sphericalKMeans(matrix, { groups: k, seed, restarts: 1 });
        fc.pre(res.converged);
        const out = { assignments: new Int32Array(matrix.rows), fit: new Float32Array(matrix.rows) };
        const applied = assignToCentroids(matrix, res.centroids, k, out);
        expect(applied.assignments).toBe(out.assignments);
        for (let r = 0; r < matrix.rows; r++) {
          const scores = res.assignments[r]! < 0 ? [] : centroidScores(matrix, r, res);
          // equal unless a row ties between two groups (then the lowest group wins)
          if (res.assignments[r]! >= 0) expect(scores[applied.assignments[r]!]).toBe(scores[res.assignments[r]!]);
          else expect(applied.assignments[r]).toBe(-1);
          expect(applied.fit[r]).toBe(res.fit[r]);
        }
      }),
      { seed: 5, numRuns: 100 },
    );
  });
});

describe('assignToCentroids', () => {
  it('scores against term-major centroids and marks empty rows -1', () => {
    const m = csrFromDense([[1, 0], [0, 0], [1, 1], [0, 2]], 2);
    // two groups: g0 = term 0, g1 = term 1; layout [t0g0, t0g1, t1g0, t1g1]
    const centroids = Float32Array.from([1, 0, 0, 1]);
    const { assignments, fit } = assignToCentroids(m, centroids, 2);
    expect([...assignments]).toEqual([0, -1, 0, 1]); // row 2 ties: lowest group
    expect(fit[0]).toBe(1);
    expect(fit[1]).toBe(0);
    expect(fit[2]).toBeCloseTo(Math.SQRT1_2, 6);
    expect(fit[3]).toBe(1);
  });

  it('rejects centroids of the wrong shape', () => {
    const m = csrFromDense([[1, 0]], 2);
    expect(() => assignToCentroids(m, new Float32Array(3), 2)).toThrow(
      'centroids hold 3 values; 2 terms × 2 groups needs 4',
    );
  });
});
