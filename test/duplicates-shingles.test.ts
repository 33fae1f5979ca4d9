import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr } from '../src/types.js';
import {
  allPairsResemblance,
  containment,
  resemblance,
  shingleMatrix,
  wordShingles,
} from '../src/duplicates/index.js';
import { UsageError } from '../src/util/errors.js';
import { createRng } from '../src/util/random.js';

const words = (s: string): string[] => s.split(' ');
const row = (m: Csr, r: number): Int32Array => m.indices.slice(m.indptr[r]!, m.indptr[r + 1]!);

// A. Z. Broder, "On the resemblance and containment of documents", Compression and Complexity of
// Sequences (SEQUENCES '97), 1997, pp. 21-29: the section that defines resemblance and containment
// (p. 3 of the SRC preprint). It defines S(D, w), r(A, B) = |S(A) ∩ S(B)| / |S(A) ∪ S(B)| and
// c(A, B) = |S(A) ∩ S(B)| / |S(A)|, with the worked examples checked below.
describe('Broder (1997): definitions and worked examples', () => {
  const rose = words('a rose is a rose is a rose');
  const flower = words('a rose is a flower which is a rose');

  it('the 4-shingling of (a,rose,is,a,rose,is,a,rose) is the bag of five, the set of three shingles', () => {
    expect(wordShingles(rose, 4)).toEqual([
      'a rose is a',
      'rose is a rose',
      'is a rose is',
      'a rose is a',
      'rose is a rose',
    ]);
    expect(new Set(wordShingles(rose, 4))).toEqual(new Set(['a rose is a', 'rose is a rose', 'is a rose is']));
    const m = shingleMatrix([rose], 4);
    expect(m.cols).toBe(3);
    expect(Array.from(row(m, 0))).toEqual([0, 1, 2]);
    expect(Array.from(m.values)).toEqual([1, 1, 1]);
  });

  it('"option B" (sets): A resembles B 60% for w = 1, 50% for w = 2, 42.85% for w = 3', () => {
    const printed = [60, 50, 42.85]; // the paper's percentages, truncated to two decimals
    const byHand = [3 / 5, 3 / 6, 3 / 7]; // |S(A) ∩ S(B)| / |S(A) ∪ S(B)| counted by hand
    for (let w = 1; w <= 3; w++) {
      const m = shingleMatrix([rose, flower], w);
      const r = resemblance(row(m, 0), row(m, 1));
      expect(r).toBe(byHand[w - 1]);
      expect(Math.floor(r * 10000) / 100).toBe(printed[w - 1]);
    }
  });

  it('"option A" (labelled shingles): 70% for w = 1, 50% for w = 2, 30% for w = 3', () => {
    // Label each shingle with its occurrence number, then take the sets (width 1 over the labelled shingles).
    const labelled = (tokens: string[], w: number): string[] => {
      const seen = new Map<string, number>();
      return wordShingles(tokens, w).map((s) => {
        const k = (seen.get(s) ?? 0) + 1;
        seen.set(s, k);
        return `${s}#${k}`;
      });
    };
    const expected = [0.7, 0.5, 0.3];
    for (let w = 1; w <= 3; w++) {
      const m = shingleMatrix([labelled(rose, w), labelled(flower, w)], 1);
      expect(resemblance(row(m, 0), row(m, 1))).toBeCloseTo(expected[w - 1]!, 12);
    }
  });

  it('r(A, A) = 1; c(A, B) = 1 when A is a contiguous subsequence of B; containment is not symmetric', () => {
    const m = shingleMatrix([rose, flower, words('rose is a flower which'), words('a flower')], 3);
    expect(resemblance(row(m, 0), row(m, 0))).toBe(1);
    expect(containment(row(m, 2), row(m, 1))).toBe(1); // (rose,is,a,flower,which) lies inside B
    // By hand for w = 3: S(B) has 7 shingles, S(C) its 3 that lie in the middle: c(B, C) = 3/7.
    expect(containment(row(m, 1), row(m, 2))).toBeCloseTo(3 / 7, 12);
    // S(A) ∩ S(B) = {(a,rose,is), (rose,is,a), (is,a,rose)}: all of S(A), 3 of the 7 of S(B).
    expect(containment(row(m, 0), row(m, 1))).toBe(1);
    expect(containment(row(m, 1), row(m, 0))).toBeCloseTo(3 / 7, 12);
    // Short text rule (ours): (a, flower) has fewer than 3 words, so it is one shingle "a flower".
    expect(row(m, 3).length).toBe(1);
  });
});

describe('resemblance and containment on small sets, by hand from the definitions', () => {
  it('computes |A∩B|/|A∪B| and |A∩B|/|A|', () => {
    expect(resemblance([1, 2, 3], [2, 3, 4])).toBe(2 / 4);
    expect(containment([1, 2, 3], [2, 3, 4])).toBe(2 / 3);
    expect(containment([2, 3], [1, 2, 3, 4])).toBe(1);
    expect(containment([1, 2, 3, 4], [2, 3])).toBe(2 / 4);
    expect(resemblance([1, 5, 9], [2, 6])).toBe(0);
    expect(resemblance(Int32Array.from([0, 7]), Int32Array.from([7]))).toBe(1 / 2);
  });

  it('gives 0 for empty sets and rejects unsorted ones', () => {
    expect(resemblance([], [])).toBe(0);
    expect(containment([], [1])).toBe(0);
    expect(() => resemblance([2, 1], [1])).toThrow('resemblance: first set must be strictly increasing ids; position 1 holds 1 after 2');
    expect(() => containment([1], [3, 3])).toThrow(RangeError);
  });
});

describe('wordShingles and shingleMatrix', () => {
  it('handles short and empty texts (one shingle of everything / none)', () => {
    expect(wordShingles(['hello'], 4)).toEqual(['hello']);
    expect(wordShingles([], 4)).toEqual([]);
    expect(wordShingles(words('a b c'), 3)).toEqual(['a b c']);
    expect(wordShingles(words('a b c'), 1)).toEqual(['a', 'b', 'c']);
    const m = shingleMatrix([[], ['x']], 2);
    expect(Array.from(m.indptr)).toEqual([0, 0, 1]);
  });

  it('interns shingles exactly: tokens with spaces do not collide', () => {
    const m = shingleMatrix(
      [
        ['a b', 'c'],
        ['a', 'b c'],
      ],
      2,
    );
    expect(wordShingles(['a b', 'c'], 2)).toEqual(wordShingles(['a', 'b c'], 2)); // same printed text
    expect(m.cols).toBe(2); // but two different shingles
    expect(resemblance(row(m, 0), row(m, 1))).toBe(0);
  });

  it('numbers columns by first appearance, sorts each row and keeps each shingle once', () => {
    const m = shingleMatrix([words('x y z'), words('z y x y z')], 1);
    expect(m.cols).toBe(3);
    expect(Array.from(m.indptr)).toEqual([0, 3, 6]);
    expect(Array.from(m.indices)).toEqual([0, 1, 2, 0, 1, 2]);
    const m2 = shingleMatrix([words('z y x y z')], 2); // (z,y) (y,x) (x,y) (y,z)
    expect(m2.cols).toBe(4);
    expect(Array.from(m2.indices)).toEqual([0, 1, 2, 3]);
  });

  it('matches a naive string-keyed interning exactly, columns and all (fast-check, tables large enough to grow)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.array(fc.integer({ min: 0, max: 60 }), { maxLength: 40 }), { maxLength: 60 }),
        fc.integer({ min: 1, max: 5 }),
        (docs, width) => {
          const lists = docs.map((d) => d.map((w) => `t${w}`));
          const col = new Map<string, number>();
          const ptr = [0];
          const idx: number[] = [];
          for (const tokens of lists) {
            const ids = wordShingles(tokens, width).map((sh) => {
              if (!col.has(sh)) col.set(sh, col.size);
              return col.get(sh)!;
            });
            idx.push(...[...new Set(ids)].sort((p, q) => p - q));
            ptr.push(idx.length);
          }
          const m = shingleMatrix(lists, width);
          expect(m.rows).toBe(lists.length);
          expect(m.cols).toBe(col.size);
          expect(Array.from(m.indptr)).toEqual(ptr);
          expect(Array.from(m.indices)).toEqual(idx);
        },
      ),
      { numRuns: 150 },
    );
  });

  it('stays exact when the intern tables grow (many distinct shingles; many repeats after growth)', () => {
    const rng = createRng(7);
    for (const [vocab, atLeast] of [
      [500, 8000],
      [12, 1500],
    ] as const) {
      const lists = Array.from({ length: 300 }, () => Array.from({ length: 30 }, () => `t${rng.int(vocab)}`));
      const col = new Map<string, number>();
      const idx: number[] = [];
      for (const tokens of lists) {
        const ids = wordShingles(tokens, 3).map((sh) => {
          if (!col.has(sh)) col.set(sh, col.size);
          return col.get(sh)!;
        });
        idx.push(...[...new Set(ids)].sort((p, q) => p - q));
      }
      const m = shingleMatrix(lists, 3);
      expect(col.size).toBeGreaterThan(atLeast);
      expect(m.cols).toBe(col.size);
      expect(Array.from(m.indices)).toEqual(idx);
    }
  });

  it('validates the width', () => {
    let error: unknown;
    try {
      wordShingles(['a'], 0);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(UsageError);
    expect((error as UsageError).message).toBe('width must be a whole number from 1 to 100; got 0');
    expect(() => shingleMatrix([], 1.5)).toThrow('width must be a whole number from 1 to 100; got 1.5');
  });
});

/** Brute force over all pairs with the same arithmetic: |x∩y| / (|x| + |y| - |x∩y|) >= t. */
function bruteJaccard(m: Csr, t: number): { a: number[]; b: number[]; s: number[] } {
  const sets = Array.from({ length: m.rows }, (_, r) => new Set(row(m, r)));
  const out = { a: [] as number[], b: [] as number[], s: [] as number[] };
  for (let i = 0; i < m.rows; i++) {
    for (let j = i + 1; j < m.rows; j++) {
      const x = sets[i]!;
      const y = sets[j]!;
      if (x.size === 0 || y.size === 0) continue;
      let both = 0;
      for (const v of x) if (y.has(v)) both++;
      const jac = both / (x.size + y.size - both);
      if (jac >= t) {
        out.a.push(i);
        out.b.push(j);
        out.s.push(jac);
      }
    }
  }
  return out;
}

function expectSameAsBrute(m: Csr, t: number): void {
  const got = allPairsResemblance(m, t);
  const want = bruteJaccard(m, t);
  expect(Array.from(got.a)).toEqual(want.a);
  expect(Array.from(got.b)).toEqual(want.b);
  for (let k = 0; k < want.s.length; k++) expect(Math.abs(got.similarity[k]! - want.s[k]!)).toBeLessThanOrEqual(1e-6);
}

const texts = fc
  .record({
    vocab: fc.integer({ min: 2, max: 8 }),
    docs: fc.array(fc.array(fc.nat(7), { maxLength: 14 }), { maxLength: 25 }),
    edits: fc.array(fc.tuple(fc.nat(), fc.nat(), fc.nat(7)), { maxLength: 10 }),
    width: fc.integer({ min: 1, max: 3 }),
  })
  .map(({ vocab, docs, edits, width }) => {
    const lists = docs.map((d) => d.map((w) => `w${w % vocab}`));
    for (const [from, at, w] of edits) {
      if (lists.length === 0) break;
      const copy = [...lists[from % lists.length]!];
      if (copy.length > 0) copy[at % copy.length] = `w${w % vocab}`;
      lists.push(copy);
    }
    return shingleMatrix(lists, width);
  });

describe('allPairsResemblance against brute-force Jaccard (fast-check)', () => {
  it('finds exactly the pairs at or above random thresholds', () => {
    fc.assert(
      fc.property(texts, fc.double({ min: 0.05, max: 1, noNaN: true }), (m, t) => expectSameAsBrute(m, t)),
      { numRuns: 400 },
    );
  });

  it('decides ties at the threshold identically (t = an existing pair\'s resemblance, and the usual fractions)', () => {
    fc.assert(
      fc.property(texts, fc.nat(), fc.nat(), fc.constantFrom(0.5, 0.6, 0.7, 0.75, 0.8, 0.9, 1), (m, i, j, fixed) => {
        expectSameAsBrute(m, fixed);
        fc.pre(m.rows >= 2);
        const x = i % m.rows;
        const y = (x + 1 + (j % (m.rows - 1))) % m.rows;
        const r = resemblance(row(m, x), row(m, y));
        fc.pre(r > 0);
        expectSameAsBrute(m, r);
      }),
      { numRuns: 400 },
    );
  });

  it('treats any non-zero stored value as membership in binary matrices built by hand', () => {
    fc.assert(
      fc.property(
        fc.array(fc.uniqueArray(fc.nat(30), { maxLength: 12 }), { maxLength: 30 }),
        fc.double({ min: 0.05, max: 1, noNaN: true }),
        (sets, t) => {
          const indptr = new Int32Array(sets.length + 1);
          const idx: number[] = [];
          sets.forEach((s, r) => {
            idx.push(...[...s].sort((p, q) => p - q));
            indptr[r + 1] = idx.length;
          });
          const m: Csr = { rows: sets.length, cols: 31, indptr, indices: Int32Array.from(idx), values: new Float32Array(idx.length).fill(1) };
          expectSameAsBrute(m, t);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('keeps a pair whose threshold times size rounds above a whole number (0.28 × 25 = 7.000000000000001 in float64)', () => {
    // y = 7 of x's 25 ids, so r = 7/25 = t exactly. x's other 18 ids are rarer than y's, so a prefix cut from
    // ceil(t·|x|) = 8 instead of 7 would hold only ids y lacks and the pair would be lost.
    const t = 7 / 25;
    expect(t * 25).toBeGreaterThan(7);
    const x = Array.from({ length: 25 }, (_, i) => i);
    const y = x.slice(18);
    const m: Csr = {
      rows: 2,
      cols: 25,
      indptr: Int32Array.from([0, 25, 32]),
      indices: Int32Array.from([...x, ...y]),
      values: new Float32Array(32).fill(1),
    };
    const got = allPairsResemblance(m, t);
    expect(Array.from(got.a)).toEqual([0]);
    expect(Array.from(got.b)).toEqual([1]);
    expect(got.similarity[0]).toBeCloseTo(0.28, 7);
  });

  it('rejects bad thresholds with the shared message', () => {
    const m = shingleMatrix([words('a b')], 1);
    expect(() => allPairsResemblance(m, 0)).toThrow('threshold must be a number in (0, 1]; got 0');
    expect(() => allPairsResemblance(m, 0)).toThrow(UsageError);
  });
});
