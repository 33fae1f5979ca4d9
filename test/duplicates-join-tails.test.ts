import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr } from '../src/types.js';
import { allPairsCosine, permuteRows, MAX_PAIR_TAIL, type JoinCounts } from '../src/duplicates/cosine.js';
import { createRng, type Rng } from '../src/util/random.js';

// The join's two kinds of rows (see src/duplicates/cosine.ts): rows with a
// two-shared tail, whose pairs are found where they share two tail
// dimensions, and one-shared rows (a value that alone could reach the
// threshold, or a tail longer than MAX_PAIR_TAIL), found through posting
// lists. Every test here checks the result against a brute-force join with
// the same arithmetic, and the work counters show which paths ran.

/** Rows as (column, weight) lists -> CSR, each row L2-normalised in float64 and stored as float32. */
function unitCsr(rows: readonly (readonly [number, number][])[], cols: number): Csr {
  const indptr = new Int32Array(rows.length + 1);
  const indices: number[] = [];
  const values: number[] = [];
  rows.forEach((row, r) => {
    const merged = new Map<number, number>();
    for (const [c, w] of row) merged.set(c, (merged.get(c) ?? 0) + w);
    const sorted = [...merged.entries()].filter(([, w]) => w > 0).sort((x, y) => x[0] - y[0]);
    const norm = Math.sqrt(sorted.reduce((s, [, w]) => s + w * w, 0));
    for (const [c, w] of sorted) {
      indices.push(c);
      values.push(w / norm);
    }
    indptr[r + 1] = indices.length;
  });
  return { rows: rows.length, cols, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) };
}

/**
 * Brute force with the join's arithmetic: row i scattered into a dense
 * array, then for every j > i the float64 sum of float32 products over j's
 * entries in column order (the zeros added for columns i lacks change no
 * sum of non-negative terms). Pairs (i, j) with dot >= t, in (i, j) order.
 */
function bruteForce(m: Csr, t: number): { a: number[]; b: number[]; s: number[] } {
  const out = { a: [] as number[], b: [] as number[], s: [] as number[] };
  const dense = new Float64Array(m.cols);
  for (let i = 0; i < m.rows; i++) {
    for (let p = m.indptr[i]!; p < m.indptr[i + 1]!; p++) dense[m.indices[p]!] = m.values[p]!;
    for (let j = i + 1; j < m.rows; j++) {
      let dot = 0;
      for (let q = m.indptr[j]!; q < m.indptr[j + 1]!; q++) dot += dense[m.indices[q]!]! * m.values[q]!;
      if (dot >= t) {
        out.a.push(i);
        out.b.push(j);
        out.s.push(Math.fround(dot));
      }
    }
    for (let p = m.indptr[i]!; p < m.indptr[i + 1]!; p++) dense[m.indices[p]!] = 0;
  }
  return out;
}

function zeroCounts(): JoinCounts {
  return { twoSharedRows: 0, oneSharedRows: 0, tailSteps: 0, postingsScanned: 0, verified: 0 };
}

/** Joins, checks the result equals the brute force exactly (pairs and float32 similarities), returns both. */
function joinAndCheck(m: Csr, t: number, counts: JoinCounts): { a: number[]; b: number[]; s: number[] } {
  const got = allPairsCosine(m, t, counts);
  const want = bruteForce(m, t);
  expect(Array.from(got.a)).toEqual(want.a);
  expect(Array.from(got.b)).toEqual(want.b);
  expect(Array.from(got.similarity)).toEqual(want.s);
  return want;
}

/** Uniform weight in [lo, hi). */
function between(rng: Rng, lo: number, hi: number): number {
  return lo + (hi - lo) * rng.next();
}

/**
 * A deliberately mixed set of rows over 1000 columns: short rows (two-shared
 * at any threshold here), rows with one dominant value (0.95 of the norm
 * after normalising, so one-shared for t <= 0.95) each followed by a
 * "softened" near-copy whose largest value is about 0.85 (two-shared, and
 * similar to its original: a cross-kind pair), and long flat rows of 400
 * entries (their tails would need more than MAX_PAIR_TAIL entries: one-shared)
 * with perturbed copies, plus plain near-copies of the short rows.
 */
function mixedRows(seed: number): { m: Csr; dominant: Set<number>; softened: Set<number> } {
  const rng = createRng(seed);
  const cols = 1000;
  const rows: [number, number][][] = [];
  const dominant = new Set<number>();
  const softened = new Set<number>();
  const shortRow = (): [number, number][] => {
    const len = 3 + rng.int(9);
    const row: [number, number][] = [];
    for (let k = 0; k < len; k++) row.push([Math.floor(cols * rng.next() ** 3), between(rng, 0.2, 1)]);
    return row;
  };
  for (let g = 0; g < 12; g++) {
    const base = shortRow();
    rows.push(base);
    rows.push(base.map(([c, w], k) => [c, k === 0 ? w * between(rng, 1, 1.3) : w] as [number, number]));
    if (rng.next() < 0.5) rows.push([...base.slice(1), [Math.floor(cols * rng.next()), between(rng, 0.05, 0.3)]]);
  }
  for (let g = 0; g < 6; g++) {
    // Dominant: one column at weight 0.95, the rest sharing sqrt(1 - 0.95²).
    const rest = 2 + rng.int(5);
    const others: [number, number][] = [];
    for (let k = 0; k < rest; k++) others.push([Math.floor(cols * rng.next()), between(rng, 0.5, 1)]);
    const restNorm = Math.sqrt(others.reduce((s, [, w]) => s + w * w, 0));
    const head = Math.floor(cols * rng.next());
    const scaleD = Math.sqrt(1 - 0.95 ** 2) / restNorm;
    dominant.add(rows.length);
    rows.push([[head, 0.95], ...others.map(([c, w]) => [c, w * scaleD] as [number, number])]);
    const scaleS = Math.sqrt(1 - 0.85 ** 2) / restNorm;
    softened.add(rows.length);
    rows.push([[head, 0.85], ...others.map(([c, w]) => [c, w * scaleS] as [number, number])]);
  }
  for (let g = 0; g < 3; g++) {
    const base: [number, number][] = [];
    const offset = rng.int(cols);
    for (let k = 0; k < 400; k++) base.push([(offset + k * 7) % cols, between(rng, 0.9, 1.1)]);
    rows.push(base);
    rows.push(base.map(([c, w], k) => [c, k % 50 === 0 ? w * 1.5 : w] as [number, number]));
  }
  // Shuffle so that the kinds interleave in row order.
  for (let i = rows.length - 1; i > 0; i--) {
    const j = rng.int(i + 1);
    [rows[i], rows[j]] = [rows[j]!, rows[i]!];
    for (const set of [dominant, softened]) {
      const hi = set.has(i);
      const hj = set.has(j);
      set.delete(i);
      set.delete(j);
      if (hi) set.add(j);
      if (hj) set.add(i);
    }
  }
  return { m: unitCsr(rows, cols), dominant, softened };
}

describe('allPairsCosine: both kinds of rows against a brute-force join', () => {
  it('agrees exactly on mixed rows, with pairs found on every path', () => {
    const counts = zeroCounts();
    let crossKind = 0;
    let pairs = 0;
    for (let seed = 1; seed <= 12; seed++) {
      const { m, dominant, softened } = mixedRows(seed);
      for (const t of [0.6, 0.8, 0.9, 0.95]) {
        const want = joinAndCheck(m, t, counts);
        pairs += want.a.length;
        for (let k = 0; k < want.a.length; k++) {
          const a = want.a[k]!;
          const b = want.b[k]!;
          if ((dominant.has(a) && softened.has(b)) || (dominant.has(b) && softened.has(a))) crossKind++;
        }
      }
    }
    // Both kinds took part, pairs of a one-shared row with a two-shared row
    // were found, and both phases did work.
    expect(counts.oneSharedRows).toBeGreaterThan(0);
    expect(counts.twoSharedRows).toBeGreaterThan(counts.oneSharedRows);
    expect(crossKind).toBeGreaterThan(0);
    expect(counts.tailSteps).toBeGreaterThan(0);
    expect(counts.postingsScanned).toBeGreaterThan(0);
    expect(pairs).toBeGreaterThan(100);
  });

  it('adds its work to the counters it is given', () => {
    const { m } = mixedRows(99);
    const once = zeroCounts();
    allPairsCosine(m, 0.9, once);
    const twice = { ...once };
    allPairsCosine(m, 0.9, twice);
    expect(twice.verified).toBe(2 * once.verified);
    expect(twice.tailSteps).toBe(2 * once.tailSteps);
    expect(twice.twoSharedRows + twice.oneSharedRows).toBe(2 * m.rows);
  });

  it('treats a row whose tail would exceed MAX_PAIR_TAIL as one-shared, and keeps long tails below it', () => {
    // 6 · MAX_PAIR_TAIL equal weights: at t = 0.9 the tail must hold more
    // than 1 - 0.9² = 0.19 of the squared norm, i.e. more than
    // 0.19 · 6 · MAX_PAIR_TAIL > MAX_PAIR_TAIL entries.
    const len = 6 * MAX_PAIR_TAIL;
    const flat: [number, number][] = [];
    for (let k = 0; k < len; k++) flat.push([k, 1]);
    const copy = flat.map(([c, w], k) => [c, k === 3 ? 1.2 : w] as [number, number]);
    // 100 equal weights: a two-shared tail of about 0.19 · 100 = 20 entries.
    const mid: [number, number][] = [];
    for (let k = 0; k < 100; k++) mid.push([len + k, 1]);
    const midCopy = mid.map(([c, w], k) => [c, k === 50 ? 1.3 : w] as [number, number]);
    const m = unitCsr([flat, copy, [[0, 1], [1, 1]], mid, midCopy], len + 100);
    const counts = zeroCounts();
    const want = joinAndCheck(m, 0.9, counts);
    expect(want.a).toEqual([0, 3]);
    expect(want.b).toEqual([1, 4]);
    expect(counts.oneSharedRows).toBe(2);
    expect(counts.twoSharedRows).toBe(3);
  });
});

/**
 * A seeded corpus shaped like the benchmark's tickets: documents of 20..79
 * words drawn from a Zipf–Mandelbrot vocabulary (weight 1 / (rank + 6)), 5%
 * of them near-copies of a recent document with one or two words redrawn,
 * weighted by TF-IDF (sublinear tf, smoothed idf, as scikit-learn's
 * TfidfVectorizer with sublinear_tf does; common practice) and
 * L2-normalised.
 */
function zipfCorpus(seed: number, n: number, vocab: number): Csr {
  const rng = createRng(seed);
  const cdf = new Float64Array(vocab);
  let acc = 0;
  for (let r = 0; r < vocab; r++) cdf[r] = acc += 1 / (r + 6);
  const draw = (): number => {
    const u = rng.next() * acc;
    let lo = 0;
    let hi = vocab - 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (cdf[mid]! > u) hi = mid;
      else lo = mid + 1;
    }
    return lo;
  };
  const docs: number[][] = [];
  for (let i = 0; i < n; i++) {
    if (i > 0 && rng.next() < 0.05) {
      const words = [...docs[i - 1 - rng.int(Math.min(i, 200))]!];
      const edits = 1 + rng.int(2);
      for (let e = 0; e < edits; e++) words[rng.int(words.length)] = draw();
      docs.push(words);
    } else {
      const len = 20 + rng.int(60);
      const words: number[] = [];
      for (let k = 0; k < len; k++) words.push(draw());
      docs.push(words);
    }
  }
  const df = new Float64Array(vocab);
  const tfs = docs.map((words) => {
    const tf = new Map<number, number>();
    for (const w of words) tf.set(w, (tf.get(w) ?? 0) + 1);
    for (const w of tf.keys()) df[w]!++;
    return tf;
  });
  const rows = tfs.map((tf) => [...tf.entries()].map(([w, c]) => [w, (1 + Math.log(c)) * (Math.log((1 + n) / (1 + df[w]!)) + 1)] as [number, number]));
  return unitCsr(rows, vocab);
}

describe('allPairsCosine: work on a skewed corpus (counters, not time)', () => {
  // The old failure mode: on Zipf-distributed text every pair of rows that
  // shares one rare word in its indexed part became a candidate, so the
  // candidates grew with n² while the pairs found grew with n. With the
  // two-shared tails the pairs whose exact dot product is computed stay
  // within a small multiple of the pairs found, and the tail steps (the
  // rows' tail pairs, Σ |tail|·(|tail| - 1) / 2) within a small multiple of n.
  const n = 3000;
  const m = zipfCorpus(2024, n, 8000);

  for (const t of [0.8, 0.9]) {
    it(`verifies few more pairs than it finds (t = ${t})`, () => {
      const counts = zeroCounts();
      const want = joinAndCheck(m, t, counts);
      expect(want.a.length).toBeGreaterThan(50); // the planted near-copies
      expect(counts.oneSharedRows).toBe(0);
      expect(counts.verified).toBeLessThanOrEqual(3 * want.a.length + 20);
      expect(counts.tailSteps).toBeLessThanOrEqual((t === 0.8 ? 120 : 40) * n);
    });
  }
});

describe('permuteRows', () => {
  it('writes the rows in the given order, entries sorted by rank, zeros left out', () => {
    fc.assert(
      fc.property(
        fc.array(fc.uniqueArray(fc.nat(299), { maxLength: 200 }), { minLength: 1, maxLength: 12 }),
        fc.nat(),
        (columnSets, seed) => {
          const rng = createRng(seed);
          const cols = 300;
          const indptr = new Int32Array(columnSets.length + 1);
          const indices: number[] = [];
          const values: number[] = [];
          columnSets.forEach((set, r) => {
            for (const c of [...set].sort((x, y) => x - y)) {
              indices.push(c);
              values.push(rng.next() < 0.1 ? 0 : 1 + rng.int(1000));
            }
            indptr[r + 1] = indices.length;
          });
          const matrix: Csr = { rows: columnSets.length, cols, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) };
          const rank = new Int32Array(cols);
          const perm = Array.from({ length: cols }, (_, c) => c);
          for (let i = cols - 1; i > 0; i--) {
            const j = rng.int(i + 1);
            [perm[i], perm[j]] = [perm[j]!, perm[i]!];
          }
          perm.forEach((c, k) => (rank[c] = k));
          const order = Int32Array.from(Array.from({ length: columnSets.length }, (_, r) => r).sort(() => rng.next() - 0.5));
          const got = permuteRows(matrix, order, rank);
          let maxLen = 0;
          order.forEach((row, p) => {
            const want: [number, number][] = [];
            for (let e = indptr[row]!; e < indptr[row + 1]!; e++) if (values[e] !== 0) want.push([rank[indices[e]!]!, values[e]!]);
            want.sort((x, y) => x[0] - y[0]);
            maxLen = Math.max(maxLen, want.length);
            const have: [number, number][] = [];
            for (let k = got.start[p]!; k < got.start[p + 1]!; k++) have.push([got.rankOf[k]!, got.valueOf[k]!]);
            expect(have).toEqual(want);
          });
          expect(got.maxLen).toBe(maxLen);
        },
      ),
      { numRuns: 150 },
    );
  });
});
