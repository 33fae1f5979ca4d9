import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr } from '../src/types.js';
import { UsageError } from '../src/util/errors.js';
import { createRng } from '../src/util/random.js';
import { countNonEmptyRows, planKMeans, sphericalKMeans, type KMeansResult } from '../src/cluster/kmeans.js';
import { LOCAL_ALLOCATOR, createWorkspace, kmeansSteps } from '../src/cluster/kmeans-engine.js';
import {
  LIST_ACTIVE,
  STAT_CHANGED,
  STAT_DOTS,
  STAT_LENGTH,
  WORK_ASSIGN_PRUNED,
  WORK_FIT,
  assignRows,
  runBlock,
  type KernelArrays,
} from '../src/cluster/kmeans-kernel.js';

/**
 * Sparse unit rows around planted topics: each topic owns a few "core"
 * terms; a row draws 1–9 terms, each from its topic's core with
 * probability `focus`, otherwise uniformly; about 3% of rows stay empty.
 * Values are drawn from `palette` when given (so ties and duplicates happen),
 * else uniform in [0.1, 1.1).
 */
function planted(seed: number, n: number, d: number, topics: number, focus: number, palette?: readonly number[]): Csr {
  const rng = createRng(seed);
  const cores: number[][] = [];
  for (let z = 0; z < topics; z++) {
    const size = 2 + rng.int(4);
    cores.push(Array.from({ length: size }, () => rng.int(d)));
  }
  const indptr = new Int32Array(n + 1);
  const indices: number[] = [];
  const values: number[] = [];
  for (let r = 0; r < n; r++) {
    if (rng.next() >= 0.03) {
      const z = rng.int(topics);
      const row = new Map<number, number>();
      const len = 1 + rng.int(9);
      for (let w = 0; w < len; w++) {
        const core = cores[z]!;
        const t = rng.next() < focus ? core[rng.int(core.length)]! : rng.int(d);
        const v = palette ? palette[rng.int(palette.length)]! : 0.1 + rng.next();
        row.set(t, (row.get(t) ?? 0) + v);
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

/** Asserts two results are the same bit for bit, apart from the work counts. */
function expectSameResult(a: KMeansResult, b: KMeansResult): void {
  expect(b.groups).toBe(a.groups);
  expect([...b.assignments]).toEqual([...a.assignments]);
  expect(bytesOf(b.centroids).equals(bytesOf(a.centroids))).toBe(true);
  expect(bytesOf(b.fit).equals(bytesOf(a.fit))).toBe(true);
  expect(b.objective).toBe(a.objective);
  expect(b.iterations).toBe(a.iterations);
  expect(b.converged).toBe(a.converged);
  expect(b.reseeded).toBe(a.reseeded);
  expect(b.batches).toBe(a.batches);
  expect([...b.restartObjectives]).toEqual([...a.restartObjectives]);
}

const plantedInput = fc
  .record({
    seed: fc.integer({ min: 0, max: 0xffffffff }),
    n: fc.integer({ min: 20, max: 400 }),
    d: fc.integer({ min: 4, max: 80 }),
    topics: fc.integer({ min: 1, max: 10 }),
    focus: fc.double({ min: 0, max: 1, noNaN: true }),
    k: fc.integer({ min: 2, max: 12 }),
    restarts: fc.integer({ min: 1, max: 3 }),
    maxIterations: fc.integer({ min: 1, max: 40 }),
    runSeed: fc.integer({ min: 0, max: 0xffffffff }),
  })
  .map((x) => {
    const matrix = planted(x.seed, x.n, x.d, x.topics, x.focus);
    const m = countNonEmptyRows(matrix);
    return { ...x, matrix, m, k: Math.min(x.k, m) };
  })
  .filter((x) => x.m >= 2);

describe('pruned assignment passes give exactly the plain loop', () => {
  it('same result bit for bit on random planted-topic data, with fewer dot products', () => {
    let plainDots = 0;
    let prunedDots = 0;
    let skipped = 0;
    let cutShort = 0;
    fc.assert(
      fc.property(plantedInput, ({ matrix, m, k, restarts, maxIterations, runSeed }) => {
        const opts = { groups: k, restarts, maxIterations, seed: runSeed, miniBatch: false } as const;
        const plain = sphericalKMeans(matrix, { ...opts, prune: false });
        const pruned = sphericalKMeans(matrix, { ...opts, prune: true });
        expectSameResult(plain, pruned);
        // the plain loop scores every row against every centroid on every pass
        expect(plain.skipped).toBe(0);
        expect(plain.scored % m).toBe(0);
        expect(plain.dotProducts).toBe(plain.scored * k);
        expect([...plain.dotsByPass]).toEqual(new Array(plain.iterations).fill(m * k));
        expect([...plain.skippedByPass]).toEqual(new Array(plain.iterations).fill(0));
        // pruned: same rows visited; a row costs at most one extra dot product (its own score)
        expect(pruned.scored + pruned.skipped).toBeLessThanOrEqual(plain.scored);
        expect(pruned.dotProducts).toBeLessThanOrEqual(plain.scored * (k + 1));
        expect(pruned.dotsByPass.length).toBe(pruned.iterations);
        expect(pruned.dotsByPass[0]).toBe(m * k); // nothing is known before the first pass
        for (let p = 0; p < pruned.iterations; p++) {
          expect(pruned.skippedByPass[p]).toBeLessThanOrEqual(m);
          expect(pruned.dotsByPass[p]).toBeLessThanOrEqual(m * (k + 1));
        }
        plainDots += plain.dotProducts;
        prunedDots += pruned.dotProducts;
        skipped += pruned.skipped;
        if (!pruned.converged) cutShort++;
      }),
      { seed: 20240611, numRuns: 300 },
    );
    // The bounds did real work (measured: 71% of the plain loop's products
    // over these small inputs, 315k rows settled without scoring), and runs
    // cut short by maxIterations were among them.
    expect(skipped).toBeGreaterThan(0);
    expect(prunedDots).toBeLessThan(0.85 * plainDots);
    expect(cutShort).toBeGreaterThan(0);
  });

  it('same result with duplicate-heavy values (ties between groups, re-seeding)', () => {
    let reseededAfterSkips = 0;
    fc.assert(
      fc.property(
        fc.record({
          seed: fc.integer({ min: 0, max: 0xffffffff }),
          n: fc.integer({ min: 10, max: 80 }),
          d: fc.integer({ min: 2, max: 8 }),
          k: fc.integer({ min: 2, max: 16 }),
          runSeed: fc.integer({ min: 0, max: 0xffffffff }),
        }),
        ({ seed, n, d, k, runSeed }) => {
          const matrix = planted(seed, n, d, 3, 0.7, [1, 1, 2]);
          const m = countNonEmptyRows(matrix);
          fc.pre(m >= 2);
          const opts = { groups: Math.min(k, m), restarts: 2, maxIterations: 25, seed: runSeed, miniBatch: false };
          const plain = sphericalKMeans(matrix, { ...opts, prune: false });
          const pruned = sphericalKMeans(matrix, { ...opts, prune: true });
          expectSameResult(plain, pruned);
          // re-seeding after passes that left rows unscored (their fit is refreshed first)
          if (pruned.reseeded > 0 && pruned.skipped > 0) reseededAfterSkips++;
        },
      ),
      { seed: 99, numRuns: 300 },
    );
    expect(reseededAfterSkips).toBeGreaterThan(0);
  });

  it('skips most of the work once the groups settle (3000 rows, 12 topics, k = 12)', () => {
    const matrix = planted(5, 3000, 300, 12, 0.8);
    const m = countNonEmptyRows(matrix);
    const k = 12;
    const pruned = sphericalKMeans(matrix, { groups: k, restarts: 1, seed: 2, miniBatch: false });
    const plain = sphericalKMeans(matrix, { groups: k, restarts: 1, seed: 2, miniBatch: false, prune: false });
    expectSameResult(plain, pruned);
    expect(pruned.converged).toBe(true);
    const last = pruned.iterations - 1;
    // Measured: the last of 10 passes computes 6.3% of the plain pass's
    // products and settles 94% of rows without scoring another centroid; the
    // whole run 41% of the plain products. Floors well below.
    expect(pruned.dotsByPass[last]! / (m * k)).toBeLessThan(0.2);
    expect(pruned.skippedByPass[last]! / m).toBeGreaterThan(0.8);
    expect(pruned.dotProducts / plain.dotProducts).toBeLessThan(0.6);
  });
});

describe('the assignment kernel on arbitrary valid bounds', () => {
  // Straight at the kernel: random rows, old and new centroids (some
  // identical, so rows tie between groups; some unmoved), any assignment,
  // and bounds that are valid for the old centroids with random slack.
  // Pruned and plain passes must pick the same groups, every score the
  // pruned pass writes must be the plain one, and the bounds it leaves must
  // hold for the new centroids.
  const state = fc
    .record({
      seed: fc.integer({ min: 0, max: 0xffffffff }),
      n: fc.integer({ min: 1, max: 60 }),
      d: fc.integer({ min: 1, max: 12 }),
      k: fc.integer({ min: 2, max: 40 }),
      palette: fc.boolean(),
      twins: fc.double({ min: 0, max: 0.6, noNaN: true }),
      movers: fc.integer({ min: 0, max: 4 }),
      step: fc.double({ min: 0, max: 1, noNaN: true }),
      slack: fc.double({ min: 0, max: 0.5, noNaN: true }),
    })
    .map((x) => buildState(x));

  function buildState(x: {
    seed: number;
    n: number;
    d: number;
    k: number;
    palette: boolean;
    twins: number;
    movers: number;
    step: number;
    slack: number;
  }) {
    const { n, d, k } = x;
    const rng = createRng(x.seed);
    const value = (): number => (x.palette ? [0, 0, 1, 2][rng.int(4)]! : rng.next() < 0.5 ? 0 : rng.next());
    const matrix = planted(x.seed, n, d, 3, 0.5, x.palette ? [1, 2] : undefined);
    const column = (): Float64Array => {
      const c = new Float64Array(d);
      for (let t = 0; t < d; t++) c[t] = value();
      if (c.every((v) => v === 0)) c[rng.int(d)] = 1;
      return c;
    };
    const unit = (c: Float64Array): Float32Array => {
      const norm = Math.sqrt(c.reduce((a, v) => a + v * v, 0));
      return Float32Array.from(c, (v) => v / norm);
    };
    // a few groups move (as late in a run), the rest stay; a twin copies
    // its original, before and (usually) after the move
    const moving = new Set(Array.from({ length: x.movers }, () => rng.int(k)));
    const oldC: Float32Array[] = [];
    const newC: Float32Array[] = [];
    for (let g = 0; g < k; g++) {
      const twin = g > 0 && rng.next() < x.twins ? rng.int(g) : -1;
      oldC.push(twin >= 0 ? oldC[twin]!.slice() : unit(column()));
      if (twin >= 0 && rng.next() < 0.8) newC.push(newC[twin]!.slice());
      else if (!moving.has(g)) newC.push(oldC[g]!.slice());
      else {
        const c = Float64Array.from(oldC[g]!);
        const delta = column();
        for (let t = 0; t < d; t++) c[t] = c[t]! + x.step * delta[t]!;
        newC.push(unit(c));
      }
    }
    const termMajor = (cs: Float32Array[]): Float32Array => {
      const out = new Float32Array(d * k);
      for (let g = 0; g < k; g++) for (let t = 0; t < d; t++) out[t * k + g] = cs[g]![t]!;
      return out;
    };
    const score = (C: Float32Array, i: number, g: number): number => {
      let s = 0;
      for (let j = matrix.indptr[i]!; j < matrix.indptr[i + 1]!; j++) s += matrix.values[j]! * C[matrix.indices[j]! * k + g]!;
      return s;
    };
    const before = termMajor(oldC);
    const centroids = termMajor(newC);
    const active = Int32Array.from([...Array(n).keys()].filter((i) => matrix.indptr[i + 1]! > matrix.indptr[i]!));
    const assign = new Int32Array(n).fill(-1);
    const lower = new Float64Array(n);
    const upper = new Float64Array(n);
    const rowNorm = new Float64Array(n);
    for (const i of active) {
      let s2 = 0;
      for (let j = matrix.indptr[i]!; j < matrix.indptr[i + 1]!; j++) s2 += matrix.values[j]! ** 2;
      rowNorm[i] = Math.sqrt(s2);
      // mostly the row's best group at the old centroids (as after a pass), sometimes any group
      let g = rng.next() < 0.1 ? -1 : rng.int(k);
      if (g >= 0 && rng.next() < 0.7) {
        for (let h = 0; h < k; h++) if (score(before, i, h) > score(before, i, g)) g = h;
      }
      assign[i] = g;
      if (g < 0 || rng.next() < 0.05) {
        lower[i] = -Infinity;
        upper[i] = Infinity;
        continue;
      }
      let other = -Infinity;
      for (let h = 0; h < k; h++) if (h !== g) other = Math.max(other, score(before, i, h));
      lower[i] = score(before, i, g) - (rng.next() < 0.5 ? 0 : x.slack * rng.next());
      upper[i] = other + (rng.next() < 0.5 ? 0 : x.slack * rng.next());
    }
    const move = new Float64Array(k);
    for (let g = 0; g < k; g++) {
      let s2 = 0;
      for (let t = 0; t < d; t++) s2 += (newC[g]![t]! - oldC[g]![t]!) ** 2;
      move[g] = Math.sqrt(s2);
    }
    const order = Int32Array.from([...Array(k).keys()].sort((a, b) => move[b]! - move[a]! || a - b));
    const moved = Float64Array.from(order, (g) => move[g]!);
    const arrays = (fit: Float64Array): KernelArrays => ({
      k,
      indptr: matrix.indptr,
      indices: matrix.indices,
      values: matrix.values,
      rowNorm,
      centroids,
      assign: assign.slice(),
      fit,
      upper: upper.slice(),
      lower: lower.slice(),
      move,
      order,
      moved,
      closest: new Float64Array(n),
      dense: new Float64Array(d),
      trials: new Float64Array(0),
      active,
      batch: new Int32Array(0),
      sample: new Int32Array(0),
      screen: new Int32Array(0),
      wide: new Float32Array(0),
      scale: new Float64Array(0),
      scores: new Float64Array(k),
    });
    return { matrix, k, active, arrays, score: (i: number, g: number) => score(centroids, i, g) };
  }

  it('picks the plain groups, writes plain scores, leaves valid bounds', () => {
    let partialWins = 0;
    fc.assert(
      fc.property(state, ({ k, active, arrays, score }) => {
        const plain = arrays(new Float64Array(arrays(new Float64Array(0)).assign.length));
        const pruned = arrays(new Float64Array(plain.fit.length).fill(NaN));
        const startAssign = pruned.assign.slice();
        const plainStats = new Float64Array(STAT_LENGTH);
        const prunedStats = new Float64Array(STAT_LENGTH);
        assignRows(plain, active, 0, active.length, false, plainStats, 0);
        // one row at a time, to see what each row cost
        const dots = new Map<number, number>();
        for (let a = 0; a < active.length; a++) {
          const before = prunedStats[STAT_DOTS]!;
          assignRows(pruned, active, a, a + 1, true, prunedStats, 0);
          dots.set(active[a]!, prunedStats[STAT_DOTS]! - before);
        }
        expect([...pruned.assign]).toEqual([...plain.assign]);
        expect(prunedStats[STAT_CHANGED]).toBe(plainStats[STAT_CHANGED]);
        for (const i of active) {
          const g = pruned.assign[i]!;
          // a row is left unscored only when it keeps its group
          if (Number.isNaN(pruned.fit[i]!)) expect(g).toBe(startAssign[i]);
          else expect(pruned.fit[i]).toBe(plain.fit[i]);
          const own = score(i, g);
          let other = -Infinity;
          for (let h = 0; h < k; h++) if (h !== g) other = Math.max(other, score(i, h));
          expect(pruned.lower[i]!).toBeLessThanOrEqual(own + 1e-12);
          expect(pruned.upper[i]!).toBeGreaterThanOrEqual(other - 1e-12);
          // own score plus some candidates, not all k: a partial scoring
          const cost = dots.get(i)!;
          const partial = startAssign[i]! >= 0 && cost >= 2 && cost <= k;
          if (partial && g !== startAssign[i]) partialWins++;
        }
      }),
      { seed: 5150, numRuns: 400 },
    );
    // partial scorings that moved a row occurred
    expect(partialWins).toBeGreaterThan(0);
  });

  it('a tie met in a partial scoring goes to the lowest group, as in the plain loop', () => {
    // Worked by hand: k = 3 in 2 terms. Old centroids c0 = (1, 0) and twins
    // c1 = c2 = (0.6, 0.8); c1 and c2 move together to (0.8, 0.6), c0 stays.
    // Row x = (0.8, 0.6) scores 0.8, 0.96, 0.96 before and 0.8, 1, 1 after.
    // Whether it sat in group 1 or 2, the bounds (lower 0.96, upper 0.96)
    // fail Hamerly's test, its own score is 1, and the only candidate is the
    // twin (moved 0.283 >= 1 − 0.96; c0 did not move): a partial scoring
    // that ties, and the plain loop's answer is group 1 either way.
    const col = (c: number[][]): Float32Array => Float32Array.from([c[0]![0]!, c[1]![0]!, c[2]![0]!, c[0]![1]!, c[1]![1]!, c[2]![1]!]);
    const before = [[1, 0], [0.6, 0.8], [0.6, 0.8]];
    const after = col([[1, 0], [0.8, 0.6], [0.8, 0.6]]);
    const C0 = col(before);
    const shift = Math.hypot(Math.fround(0.8) - Math.fround(0.6), Math.fround(0.6) - Math.fround(0.8));
    const x = Float32Array.from([0.8, 0.6]);
    const old = (g: number): number => x[0]! * C0[g]! + x[1]! * C0[3 + g]!;
    for (const start of [1, 2]) {
      const s: KernelArrays = {
        k: 3,
        indptr: Int32Array.from([0, 2]),
        indices: Int32Array.from([0, 1]),
        values: x,
        rowNorm: Float64Array.from([Math.hypot(x[0]!, x[1]!)]),
        centroids: after,
        assign: Int32Array.from([start]),
        fit: Float64Array.from([NaN]),
        lower: Float64Array.from([old(start)]),
        upper: Float64Array.from([Math.max(old(0), old(3 - start))]),
        move: Float64Array.from([0, shift, shift]),
        order: Int32Array.from([1, 2, 0]),
        moved: Float64Array.from([shift, shift, 0]),
        closest: new Float64Array(1),
        dense: new Float64Array(2),
        trials: new Float64Array(0),
        active: Int32Array.from([0]),
        batch: new Int32Array(0),
        sample: new Int32Array(0),
        screen: new Int32Array(0),
        wide: new Float32Array(0),
        scale: new Float64Array(0),
        scores: new Float64Array(3),
      };
      const stats = new Float64Array(STAT_LENGTH);
      assignRows(s, s.active, 0, 1, true, stats, 0);
      expect(stats[STAT_DOTS]).toBe(2); // own score and the twin's: a partial scoring
      expect(s.assign[0]).toBe(1);
      expect(s.fit[0]).toBe(x[0]! * after[1]! + x[1]! * after[4]!);
      expect(s.upper[0]).toBe(s.fit[0]); // the runner-up is the other twin
    }
  });
});

describe('the engine refreshes stale fits before anything reads them', () => {
  // Rows settled by Hamerly's test are not scored, so their `fit` can lag
  // behind a centroid that moved. Re-seeding reads `fit` (farthest row), so
  // a pass that leaves a group empty must be followed by a fit refresh. In
  // practice the stale value rarely decides the farthest row (a search over
  // 400k small random runs found none), so the order of requests is checked
  // directly here, and the refreshed values are checked against exact scores.
  it('a pruned pass that leaves a group empty is followed by a WORK_FIT pass', () => {
    let emptied = 0;
    let staleSeen = 0;
    fc.assert(
      fc.property(
        fc.record({
          seed: fc.integer({ min: 0, max: 0xffffffff }),
          n: fc.integer({ min: 10, max: 80 }),
          d: fc.integer({ min: 2, max: 8 }),
          k: fc.integer({ min: 2, max: 16 }),
          runSeed: fc.integer({ min: 0, max: 0xffffffff }),
        }),
        ({ seed, n, d, k, runSeed }) => {
          const matrix = planted(seed, n, d, 3, 0.7, [1, 1, 2]);
          const m = countNonEmptyRows(matrix);
          fc.pre(m >= 2);
          const plan = planKMeans(matrix, { groups: Math.min(k, m), restarts: 2, maxIterations: 25, seed: runSeed, miniBatch: false });
          const ws = createWorkspace(plan, LOCAL_ALLOCATOR);
          const steps = kmeansSteps(ws, plan);
          let mustRefresh = false;
          for (let step = steps.next(); !step.done; step = steps.next()) {
            const { work, list, count } = ws.request;
            if (mustRefresh) expect(work).toBe(WORK_FIT);
            mustRefresh = false;
            if (work === WORK_FIT) {
              const before = Float64Array.from(ws.fit);
              runBlock(ws, work, list, 0, count, ws.passStats, 0);
              for (let a = 0; a < ws.active.length; a++) {
                const i = ws.active[a]!;
                let exact = 0;
                for (let j = matrix.indptr[i]!; j < matrix.indptr[i + 1]!; j++) {
                  exact += matrix.values[j]! * ws.centroids[matrix.indices[j]! * ws.k + ws.assign[i]!]!;
                }
                expect(ws.fit[i]).toBe(exact);
                if (before[i] !== exact) staleSeen++;
              }
              continue;
            }
            runBlock(ws, work, list, 0, count, ws.passStats, 0);
            if (work === WORK_ASSIGN_PRUNED && list === LIST_ACTIVE) {
              const used = new Set<number>();
              for (let a = 0; a < ws.active.length; a++) used.add(ws.assign[ws.active[a]!]!);
              if (used.size < ws.k) {
                mustRefresh = true;
                emptied++;
              }
            }
          }
        },
      ),
      { seed: 99, numRuns: 300 },
    );
    expect(emptied).toBeGreaterThan(0);
    expect(staleSeen).toBeGreaterThan(0); // refreshes do change values that had gone stale
  });
});

/**
 * Naive Lloyd from a given partition, dense and obvious: means of the
 * partition, then passes (ties to the lowest group), re-seeding an empty
 * group with the row of lowest fit among groups keeping a member.
 */
function naiveFromPartition(
  m: Csr,
  k: number,
  start: ArrayLike<number>,
  maxIterations: number,
): { assignments: number[]; objective: number; iterations: number; converged: boolean } {
  const n = m.rows;
  const d = m.cols;
  const X: Float32Array[] = [];
  for (let r = 0; r < n; r++) {
    const row = new Float32Array(d);
    for (let j = m.indptr[r]!; j < m.indptr[r + 1]!; j++) row[m.indices[j]!] = m.values[j]!;
    X.push(row);
  }
  const dot = (a: Float32Array, b: Float32Array): number => {
    let s = 0;
    for (let t = 0; t < d; t++) s += a[t]! * b[t]!;
    return s;
  };
  const active = [...Array(n).keys()].filter((i) => X[i]!.some((v) => v !== 0));
  const assign = new Array<number>(n).fill(-1);
  for (const i of active) assign[i] = start[i]!;
  const fit = new Array<number>(n).fill(0);
  const C: Float32Array[] = Array.from({ length: k }, () => new Float32Array(d));
  const update = (): void => {
    const sums = Array.from({ length: k }, () => new Float64Array(d));
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
  };
  update();
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
    update();
  }
  if (!converged) for (const i of active) fit[i] = dot(X[i]!, C[assign[i]!]!);
  let objective = 0;
  for (const i of active) objective += fit[i]!;
  const groups = Array.from({ length: k }, (_, g) => ({
    g,
    size: assign.filter((a) => a === g).length,
    first: assign.indexOf(g),
  }));
  groups.sort((x, y) => y.size - x.size || x.first - y.first);
  const newOf = new Map(groups.map((x, idx) => [x.g, idx]));
  return { assignments: assign.map((a) => (a < 0 ? -1 : newOf.get(a)!)), objective, iterations, converged };
}

describe('initialAssignments', () => {
  /** A random partition of the rows in which every group has a non-empty row. */
  function randomPartition(matrix: Csr, k: number, seed: number): Int32Array {
    const rng = createRng(seed);
    const start = new Int32Array(matrix.rows);
    const nonEmpty: number[] = [];
    for (let r = 0; r < matrix.rows; r++) {
      start[r] = rng.int(k);
      if (matrix.indptr[r + 1]! > matrix.indptr[r]!) nonEmpty.push(r);
      else start[r] = -1;
    }
    for (let g = 0; g < k; g++) start[nonEmpty[g]!] = g;
    return start;
  }

  it('matches a naive Lloyd started from the same partition, pruned or not', () => {
    fc.assert(
      fc.property(plantedInput, ({ matrix, k, maxIterations, runSeed }) => {
        const start = randomPartition(matrix, k, runSeed);
        const ref = naiveFromPartition(matrix, k, start, maxIterations);
        for (const prune of [true, false]) {
          const res = sphericalKMeans(matrix, { groups: k, maxIterations, initialAssignments: start, prune });
          expect([...res.assignments]).toEqual(ref.assignments);
          expect(res.objective).toBe(ref.objective);
          expect(res.iterations).toBe(ref.iterations);
          expect(res.converged).toBe(ref.converged);
          expect(res.restartObjectives.length).toBe(1); // one run, whatever `restarts` says
          expect(res.batches).toBe(0);
        }
      }),
      { seed: 4242, numRuns: 150 },
    );
  });

  it('a converged partition given back is stable after one pass and keeps its groups', () => {
    const matrix = planted(11, 800, 120, 6, 0.8);
    const first = sphericalKMeans(matrix, { groups: 6, seed: 3 });
    expect(first.converged).toBe(true);
    // any numbering of the same partition: reverse the canonical numbers
    const given = first.assignments.map((g) => (g < 0 ? -1 : 5 - g));
    const again = sphericalKMeans(matrix, { groups: 6, initialAssignments: given, restarts: 4, miniBatch: 'auto' });
    expect(again.iterations).toBe(1);
    expect(again.converged).toBe(true);
    expect([...again.assignments]).toEqual([...first.assignments]);
    expect(again.objective).toBeCloseTo(first.objective, 9);
  });

  it('refines a coarse start: the objective does not go down from the start', () => {
    const matrix = planted(12, 1000, 150, 8, 0.7);
    const start = randomPartition(matrix, 8, 1);
    const res = sphericalKMeans(matrix, { groups: 8, initialAssignments: start, maxIterations: 100 });
    // objective of the start partition: sum of cosines to its own normalised means
    const once = sphericalKMeans(matrix, { groups: 8, initialAssignments: start, maxIterations: 1 });
    expect(res.objective).toBeGreaterThanOrEqual(once.objective);
    expect(res.converged).toBe(true);
  });

  it('accepts -1 or any group for empty rows, and an ordinary array', () => {
    // rows: 0 empty, 1..4 data
    const matrix: Csr = {
      rows: 5,
      cols: 2,
      indptr: Int32Array.from([0, 0, 1, 2, 3, 4]),
      indices: Int32Array.from([0, 0, 1, 1]),
      values: Float32Array.from([1, 1, 1, 1]),
    };
    const a = sphericalKMeans(matrix, { groups: 2, initialAssignments: [-1, 0, 0, 1, 1] });
    const b = sphericalKMeans(matrix, { groups: 2, initialAssignments: Int32Array.from([1, 0, 0, 1, 1]) });
    expect([...a.assignments]).toEqual([-1, 0, 0, 1, 1]);
    expect([...b.assignments]).toEqual([...a.assignments]);
  });

  const matrix3: Csr = {
    rows: 4,
    cols: 2,
    indptr: Int32Array.from([0, 1, 2, 2, 3]),
    indices: Int32Array.from([0, 1, 0]),
    values: Float32Array.from([1, 1, 1]),
  };
  const bad: [string, ArrayLike<number>, string][] = [
    ['a short partition', [0, 1, 0], 'initialAssignments must have one entry per row (4); got 3'],
    ['a group out of range', [0, 2, -1, 1], 'initialAssignments must hold a group number from 0 to 1 at row 1; got 2'],
    ['a fractional group', [0, 0.5, -1, 1], 'initialAssignments must hold a group number from 0 to 1 at row 1; got 0.5'],
    ['-1 on a non-empty row', [-1, 1, -1, 0], 'initialAssignments must hold a group number from 0 to 1 at row 0; got -1'],
    ['a bad value on an empty row', [0, 1, 7, 0], 'initialAssignments must hold -1 or a group number from 0 to 1 at row 2 (an empty row); got 7'],
    ['an unused group', [0, 0, 1, 0], 'initialAssignments must give every group from 0 to 1 at least one non-empty row; group 1 has none'],
  ];
  for (const [name, start, message] of bad) {
    it(`rejects ${name}`, () => {
      let caught: unknown;
      try {
        sphericalKMeans(matrix3, { groups: 2, initialAssignments: start });
      } catch (e) {
        caught = e;
      }
      expect(caught).toBeInstanceOf(UsageError);
      expect((caught as UsageError).message).toBe(message);
      expect((caught as UsageError).option).toBe('initialAssignments');
    });
  }
});

describe('no allocation in the passes', () => {
  // Source check: the functions that run once per pass (or per row) create
  // no object with `new`, no array literal copies and no typed-array
  // slices; every buffer comes from the workspace, allocated once per call.
  const read = (p: string): string => readFileSync(new URL(`../src/${p}`, import.meta.url), 'utf8');
  const body = (source: string, head: RegExp): string => {
    const at = source.search(head);
    expect(at, String(head)).toBeGreaterThanOrEqual(0);
    return source.slice(at, source.indexOf('\n}\n', at));
  };
  const fresh = /\bnew\s|Array\.from|\.slice\(|\[\.\.\.|\.map\(|\.filter\(|Promise\.(race|all)/;
  const cases: [string, string[]][] = [
    ['cluster/kmeans-kernel.ts', ['scoreOne', 'scoreAll', 'assignRows', 'scoreTrials', 'refreshFit', 'rowList', 'runBlock']],
    [
      'cluster/kmeans-engine.ts',
      ['ask', 'tally', 'lloydRestart', 'objectiveOf', 'placeRow', 'scatterRow', 'seedCentroids', 'drawSeed', 'addRow',
        'farthestMovable', 'updateCentroids', 'sortMoves', 'miniBatchRestart', 'countMembers', 'hasEmptyGroup',
        'placeColumn', 'ownScore', 'miniBatchStep'],
    ],
  ];
  for (const [file, names] of cases) {
    for (const name of names) {
      it(`${file}: ${name}`, () => {
        const text = body(read(file), new RegExp(`function\\*? ${name}\\(`));
        expect(text.match(fresh)?.[0] ?? null).toBeNull();
      });
    }
  }
  it('parallel/kmeans-worker.ts: the serve loop; parallel/kmeans-parallel.ts: a pass and its wait', () => {
    const worker = read('parallel/kmeans-worker.ts');
    const loop = worker.slice(worker.indexOf('for (;;)'), worker.indexOf('\n}\n', worker.indexOf('for (;;)')));
    expect(loop.length).toBeGreaterThan(100);
    expect(loop.match(fresh)?.[0] ?? null).toBeNull();
    const runner = read('parallel/kmeans-parallel.ts');
    for (const head of ['async pass(', 'private async waitFor(']) {
      const method = runner.slice(runner.indexOf(head), runner.indexOf('\n  }\n', runner.indexOf(head)));
      expect(method.length).toBeGreaterThan(100);
      expect(method.match(fresh)?.[0] ?? null).toBeNull();
    }
  });
});
