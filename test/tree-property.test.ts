import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { documentAverageLink, groupAverageLink, type Dendrogram } from '../src/cluster/tree.js';
import type { Csr } from '../src/types.js';

/** Dense rows -> L2-normalised Float32 CSR (all-zero rows stay empty). */
function toCsr(dense: number[][], cols: number): Csr {
  const indptr = [0];
  const indices: number[] = [];
  const values: number[] = [];
  for (const row of dense) {
    const norm = Math.hypot(...row);
    row.forEach((v, j) => {
      if (v !== 0) {
        indices.push(j);
        values.push(v / norm);
      }
    });
    indptr.push(indices.length);
  }
  return {
    rows: dense.length,
    cols,
    indptr: Int32Array.from(indptr),
    indices: Int32Array.from(indices),
    values: Float32Array.from(values),
  };
}

function denseRow(m: Csr, r: number): Float64Array {
  const out = new Float64Array(m.cols);
  for (let p = m.indptr[r]!; p < m.indptr[r + 1]!; p++) out[m.indices[p]!] = m.values[p]!;
  return out;
}

interface NaiveMerge {
  leaves: string; // sorted leaf ids of the new cluster
  similarity: number;
}

/**
 * Brute-force average link: clusters start as the given initial clusters (lists of documents);
 * the similarity of two clusters is recomputed at every step as the mean over all document pairs.
 * `cosine` divides each dot product by both norms (for the document-level tree).
 * Reports `tie` when the best and second-best pair are within 1e-10.
 */
function naiveAverageLink(m: Csr, initial: number[][], cosine: boolean): { merges: NaiveMerge[]; tie: boolean } {
  const rows = Array.from({ length: m.rows }, (_, r) => denseRow(m, r));
  const sim = (a: number, b: number): number => {
    let dot = 0;
    let na = 0;
    let nb = 0;
    for (let j = 0; j < m.cols; j++) {
      dot += rows[a]![j]! * rows[b]![j]!;
      na += rows[a]![j]! ** 2;
      nb += rows[b]![j]! ** 2;
    }
    return cosine ? dot / Math.sqrt(na * nb) : dot;
  };
  let clusters = initial.map((docs, leaf) => ({ docs, leaves: [leaf] }));
  const merges: NaiveMerge[] = [];
  let tie = false;
  while (clusters.length > 1) {
    let best = -Infinity;
    let second = -Infinity;
    let bi = -1;
    let bj = -1;
    for (let i = 0; i < clusters.length; i++) {
      for (let j = i + 1; j < clusters.length; j++) {
        let total = 0;
        for (const a of clusters[i]!.docs) for (const b of clusters[j]!.docs) total += sim(a, b);
        const s = total / (clusters[i]!.docs.length * clusters[j]!.docs.length);
        if (s > best) {
          second = best;
          best = s;
          bi = i;
          bj = j;
        } else if (s > second) second = s;
      }
    }
    if (best - second < 1e-10) tie = true;
    const merged = {
      docs: [...clusters[bi]!.docs, ...clusters[bj]!.docs],
      leaves: [...clusters[bi]!.leaves, ...clusters[bj]!.leaves].sort((x, y) => x - y),
    };
    merges.push({ leaves: merged.leaves.join(','), similarity: best });
    clusters = clusters.filter((_, k) => k !== bi && k !== bj);
    clusters.push(merged);
  }
  return { merges, tie };
}

function treeMerges(tree: Dendrogram): NaiveMerge[] {
  const n = tree.leaves;
  const sets: number[][] = [];
  const leavesOf = (id: number): number[] => (id < n ? [id] : sets[id - n]!);
  const out: NaiveMerge[] = [];
  for (let m = 0; m < n - 1; m++) {
    const s = [...leavesOf(tree.left[m]!), ...leavesOf(tree.right[m]!)].sort((a, b) => a - b);
    sets.push(s);
    out.push({ leaves: s.join(','), similarity: tree.similarity[m]! });
  }
  return out;
}

function expectSameMerges(ours: NaiveMerge[], naive: NaiveMerge[]): void {
  expect(ours.map((x) => x.leaves)).toEqual(naive.map((x) => x.leaves));
  ours.forEach((x, i) => expect(Math.abs(x.similarity - naive[i]!.similarity)).toBeLessThan(1e-9));
}

// non-negative entries, mostly non-zero, so exact ties (e.g. many orthogonal pairs) are rare;
// runs that still have a near-tie are discarded with fc.pre, since tie order is arbitrary.
const entry: fc.Arbitrary<number> = fc.oneof(
  { arbitrary: fc.constant(0), weight: 1 },
  { arbitrary: fc.double({ min: 0.05, max: 1, noNaN: true }), weight: 4 },
);
const matrixArb = fc
  .record({ cols: fc.integer({ min: 3, max: 7 }), n: fc.integer({ min: 2, max: 22 }) })
  .chain(({ cols, n }) =>
    fc.record({
      cols: fc.constant(cols),
      dense: fc.array(fc.array(entry, { minLength: cols, maxLength: cols }), { minLength: n, maxLength: n }),
    }),
  );

describe('groupAverageLink equals brute-force average link started from the partition', () => {
  it('random partitions (with -1 rows and all-zero rows), term blocks of 1..4 or all, same merges and heights to 1e-9', () => {
    fc.assert(
      fc.property(
        matrixArb,
        fc.integer({ min: 1, max: 6 }),
        fc.array(fc.integer({ min: -1, max: 5 }), { minLength: 22, maxLength: 22 }),
        fc.integer({ min: 1, max: 4 }),
        ({ cols, dense }, kWanted, raw, blockTerms) => {
          const m = toCsr(dense, cols);
          const n = m.rows;
          const k = Math.min(kWanted, n);
          // first k rows seed groups 0..k-1 so none is empty; the rest take raw labels (mod k, -1 kept)
          const assign = Int32Array.from({ length: n }, (_, r) => (r < k ? r : raw[r]! < 0 ? -1 : raw[r]! % k));
          const initial: number[][] = Array.from({ length: k }, () => []);
          assign.forEach((g, r) => {
            if (g >= 0) initial[g]!.push(r);
          });
          const naive = naiveAverageLink(m, initial, false);
          fc.pre(!naive.tie);
          const tree = groupAverageLink(m, assign, k);
          expect(tree.leaves).toBe(k);
          expectSameMerges(treeMerges(tree), naive.merges);
          // the same with the term dimension taken a few terms at a time
          expectSameMerges(treeMerges(groupAverageLink(m, assign, k, { blockTerms })), naive.merges);
        },
      ),
      { numRuns: 200, seed: 20240611 },
    );
  });
});

describe('documentAverageLink equals brute-force average link from singletons', () => {
  it('random non-zero rows, same merges and heights to 1e-9', () => {
    fc.assert(
      fc.property(matrixArb, ({ cols, dense }) => {
        for (const row of dense) if (Math.max(...row) === 0) row[0] = 0.5;
        const m = toCsr(dense, cols);
        const naive = naiveAverageLink(
          m,
          Array.from({ length: m.rows }, (_, r) => [r]),
          true,
        );
        fc.pre(!naive.tie);
        expectSameMerges(treeMerges(documentAverageLink(m)), naive.merges);
      }),
      { numRuns: 200, seed: 7 },
    );
  });
});
