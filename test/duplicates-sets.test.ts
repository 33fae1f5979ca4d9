import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr } from '../src/types.js';
import { allPairsCosine, duplicateSets, exactCopies, rowDot, type SimilarPairs } from '../src/duplicates/index.js';
import { UsageError } from '../src/util/errors.js';

const deg = Math.PI / 180;

/** Builds a CSR from rows given as column -> value maps (columns sorted here). */
function csr(rows: readonly Record<number, number>[], cols: number): Csr {
  const indptr = new Int32Array(rows.length + 1);
  const indices: number[] = [];
  const values: number[] = [];
  rows.forEach((r, i) => {
    for (const c of Object.keys(r).map(Number).sort((x, y) => x - y)) {
      indices.push(c);
      values.push(r[c]!);
    }
    indptr[i + 1] = indices.length;
  });
  return { rows: rows.length, cols, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) };
}

/** A unit vector at `angle` degrees in the plane of columns (c, c + 1). */
const at = (c: number, angle: number): Record<number, number> => ({ [c]: Math.cos(angle * deg), [c + 1]: Math.sin(angle * deg) });

describe('duplicateSets on hand-checked graphs', () => {
  // Plane (0,1): a chain of four at 0°, 20°, 40°, 60° (rows 0, 3, 6, 8).
  // Plane (2,3): a chain of three at 40°, 0°, 20° (rows 5, 2, 7): only neighbours are >= 0.9 (cos 20° = 0.9397, cos 40° = 0.7660).
  // Plane (4,5): an exact copy pair (rows 1, 4). Row 9: alone.
  const rows: Record<number, number>[] = [];
  rows[0] = at(0, 0);
  rows[3] = at(0, 20);
  rows[6] = at(0, 40);
  rows[8] = at(0, 60);
  rows[5] = at(2, 40);
  rows[2] = at(2, 0);
  rows[7] = at(2, 20);
  rows[1] = at(4, 30);
  rows[4] = at(4, 30);
  rows[9] = at(6, 10);
  const m = csr(rows, 8);
  const pairs = allPairsCosine(m, 0.9);
  const c20 = Math.cos(20 * deg);
  const c40 = Math.cos(40 * deg);
  const c60 = Math.cos(60 * deg);

  it('finds the pairs the hand computation predicts', () => {
    expect(Array.from(pairs.a)).toEqual([0, 1, 2, 3, 5, 6]);
    expect(Array.from(pairs.b)).toEqual([3, 4, 7, 6, 7, 8]);
  });

  it('orders sets strongest first: mean pair similarity 1, then (2c20 + c40)/3, then (3c20 + 2c40 + c60)/6', () => {
    const { sets, setOf } = duplicateSets(m, pairs);
    expect(sets.map((s) => Array.from(s.members))).toEqual([
      [1, 4],
      [2, 5, 7],
      [0, 3, 6, 8],
    ]);
    expect(sets.map((s) => s.id)).toEqual([0, 1, 2]);
    expect(sets[0]!.meanSimilarity).toBeCloseTo(1, 6);
    expect(sets[1]!.meanSimilarity).toBeCloseTo((2 * c20 + c40) / 3, 6);
    expect(sets[2]!.meanSimilarity).toBeCloseTo((3 * c20 + 2 * c40 + c60) / 6, 6);
    expect(Array.from(setOf)).toEqual([2, 0, 1, 2, 0, 1, 2, 1, 2, -1]);
    expect(sets.map((s) => s.pairs)).toEqual([1, 2, 3]);
  });

  it('picks the member with the highest mean similarity; ties go to the lowest row', () => {
    const { sets } = duplicateSets(m, pairs);
    // Exact copies: both means equal -> lowest row, 1.
    expect(sets[0]!.representative).toBe(1);
    // Chain of three: the 20° member (row 7) has mean c20, the ends (c20 + c40) / 2.
    expect(sets[1]!.representative).toBe(7);
    expect(Array.from(sets[1]!.similarityToRepresentative)).toEqual([
      Math.fround(rowDot(m, 2, 7)),
      Math.fround(rowDot(m, 5, 7)),
      1,
    ]);
    expect(sets[1]!.similarityToRepresentative[0]).toBeCloseTo(c20, 6);
    // Chain of four: 20° (row 3) and 40° (row 6) both have mean (2c20 + c40) / 3 (up to float32 storage,
    // about 1e-8 apart) -> the lower row, 3.
    expect(sets[2]!.representative).toBe(3);
    const sims = Array.from(sets[2]!.similarityToRepresentative);
    [c20, 1, c20, c40].forEach((want, k) => expect(sims[k]).toBeCloseTo(want, 6));
  });

  it('warns about the chain of four: its weakest member (cos 40° = 0.766) is below 0.9 - 0.1', () => {
    const r = duplicateSets(m, pairs);
    expect(r.chainFloor).toBeCloseTo(0.8, 12);
    expect(r.sets.map((s) => s.chained)).toEqual([false, false, true]);
    expect(Array.from(r.chained)).toEqual([2]);
    expect(r.sets[2]!.weakest).toBeCloseTo(c40, 6);
    expect(r.sets[1]!.weakest).toBeCloseTo(c20, 6);
    // A wider margin (floor 0.7) accepts it; a threshold given explicitly overrides pairs.threshold.
    expect(Array.from(duplicateSets(m, pairs, { chainWarningMargin: 0.2 }).chained)).toEqual([]);
    expect(Array.from(duplicateSets(m, pairs, { threshold: 0.95, chainWarningMargin: 0 }).chained)).toEqual([1, 2]);
  });

  it('without a known threshold, measures the chain from the weakest pair', () => {
    const bare: SimilarPairs = { a: pairs.a, b: pairs.b, similarity: pairs.similarity };
    const r = duplicateSets(m, bare);
    expect(r.chainFloor).toBeCloseTo(Math.fround(c20) - 0.1, 6);
  });

  it('breaks equal means by size, then by lowest row', () => {
    // Three identical-value exact-copy sets: a pair at rows 0,1, a triple at rows 2,3,4, a pair at rows 5,6.
    const v = { 0: 0.6, 1: 0.8 };
    const w = { 2: 0.6, 3: 0.8 };
    const u = { 4: 0.6, 5: 0.8 };
    const mm = csr([v, v, w, w, w, u, u], 6);
    const r = duplicateSets(mm, allPairsCosine(mm, 0.99));
    expect(r.sets.map((s) => Array.from(s.members))).toEqual([[2, 3, 4], [0, 1], [5, 6]]);
  });

  it('rejects bad options and pairs', () => {
    let error: unknown;
    try {
      duplicateSets(m, pairs, { chainWarningMargin: 1.5 });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(UsageError);
    expect((error as UsageError).message).toBe('chainWarningMargin must be a number in [0, 1); got 1.5');
    expect((error as UsageError).option).toBe('chainWarningMargin');
    const bad: SimilarPairs = { a: Int32Array.from([3]), b: Int32Array.from([3]), similarity: Float32Array.from([1]) };
    expect(() => duplicateSets(m, bad)).toThrow('duplicateSets: pair 0 (3, 3) is not two distinct rows of 10');
  });
});

describe('duplicateSets against a naive reference on random graphs (fast-check)', () => {
  const input = fc
    .record({
      rows: fc.array(fc.array(fc.tuple(fc.nat(5), fc.integer({ min: 1, max: 9 })), { minLength: 1, maxLength: 4 }), {
        minLength: 1,
        maxLength: 24,
      }),
      t: fc.constantFrom(0.3, 0.5, 0.7, 0.9),
    })
    .map(({ rows, t }) => {
      const maps = rows.map((r) => {
        const o: Record<number, number> = {};
        for (const [c, w] of r) o[c] = w;
        const norm = Math.sqrt(Object.values(o).reduce((s, x) => s + x * x, 0));
        for (const k of Object.keys(o)) o[Number(k)] = o[Number(k)]! / norm;
        return o;
      });
      return { m: csr(maps, 6), t };
    });

  it('matches components, representatives (pairwise means), similarities, order and chaining', () => {
    fc.assert(
      fc.property(input, ({ m, t }) => {
        const pairs = allPairsCosine(m, t);
        const r = duplicateSets(m, pairs);
        // Reference components by repeated relabelling.
        const label = Array.from({ length: m.rows }, (_, i) => i);
        for (let changed = true; changed; ) {
          changed = false;
          for (let k = 0; k < pairs.a.length; k++) {
            const lo = Math.min(label[pairs.a[k]!]!, label[pairs.b[k]!]!);
            for (const v of [pairs.a[k]!, pairs.b[k]!]) if (label[v] !== lo) ((label[v] = lo), (changed = true));
          }
        }
        const groups = new Map<number, number[]>();
        label.forEach((l, i) => groups.set(l, [...(groups.get(l) ?? []), i]));
        const comps = [...groups.values()].filter((g) => g.length >= 2);
        expect(r.sets.length).toBe(comps.length);
        const seenMembers = new Set(r.sets.map((s) => Array.from(s.members).join(',')));
        for (const g of comps) expect(seenMembers.has(g.join(','))).toBe(true);
        for (let i = 0; i < m.rows; i++) {
          const s = r.setOf[i]!;
          if (s === -1) expect(groups.get(label[i]!)!.length).toBe(1);
          else expect(Array.from(r.sets[s]!.members)).toContain(i);
        }
        const keyOf: number[] = [];
        for (const s of r.sets) {
          const mem = Array.from(s.members);
          const means = mem.map((i) => mem.filter((j) => j !== i).reduce((acc, j) => acc + rowDot(m, i, j), 0) / (mem.length - 1));
          const best = Math.max(...means);
          const repAt = mem.indexOf(s.representative);
          expect(means[repAt]!).toBeGreaterThanOrEqual(best - 1e-6 - 1e-12);
          for (let k = 0; k < repAt; k++) expect(means[k]!).toBeLessThan(best - 1e-6 + 1e-12);
          const meanPair = means.reduce((x, y) => x + y, 0) / means.length;
          expect(s.meanSimilarity).toBeCloseTo(meanPair, 9);
          mem.forEach((i, k) => {
            const want = i === s.representative ? 1 : Math.fround(rowDot(m, i, s.representative));
            expect(s.similarityToRepresentative[k]).toBe(want);
          });
          const others = mem.filter((i) => i !== s.representative).map((i) => Math.fround(rowDot(m, i, s.representative)));
          expect(s.weakest).toBe(Math.min(...others));
          expect(s.chained).toBe(s.weakest < t - 0.1);
          let edges = 0;
          for (let k = 0; k < pairs.a.length; k++) if (mem.includes(pairs.a[k]!)) edges++;
          expect(s.pairs).toBe(edges);
          keyOf.push(Math.round(meanPair * 1e6));
        }
        for (let k = 1; k < r.sets.length; k++) {
          const p = r.sets[k - 1]!;
          const q = r.sets[k]!;
          const ordered =
            keyOf[k - 1]! > keyOf[k]! ||
            (keyOf[k - 1] === keyOf[k] &&
              (p.members.length > q.members.length || (p.members.length === q.members.length && p.members[0]! < q.members[0]!)));
          expect(ordered).toBe(true);
        }
      }),
      { numRuns: 300 },
    );
  });
});

describe('exactCopies', () => {
  it('numbers keys seen twice or more by first occurrence; unique and empty keys get -1', () => {
    expect(Array.from(exactCopies(['a', 'b', 'a', '', '', 'c', 'b', 'a']))).toEqual([0, 1, 0, -1, -1, -1, 1, 0]);
    expect(Array.from(exactCopies([]))).toEqual([]);
  });

  it('treats keys such as __proto__ and constructor as ordinary text', () => {
    expect(Array.from(exactCopies(['__proto__', 'constructor', '__proto__', 'toString']))).toEqual([0, -1, 0, -1]);
  });
});
