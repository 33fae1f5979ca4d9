import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr } from '../src/types.js';
import { allPairsCosine, findNearDuplicates, resolveDuplicatesOptions, DEFAULT_DUPLICATES_OPTIONS } from '../src/duplicates/index.js';
import { UsageError } from '../src/util/errors.js';

/** Rows as (column, weight) lists -> CSR with each row L2-normalised in float64 and stored as float32. */
function unitCsr(rows: readonly (readonly [number, number][])[], cols: number, normalise = true): Csr {
  const indptr = new Int32Array(rows.length + 1);
  const indices: number[] = [];
  const values: number[] = [];
  rows.forEach((row, r) => {
    const sorted = [...new Map(row.map(([c, w]) => [c, w] as const)).entries()].sort((x, y) => x[0] - y[0]);
    const norm = Math.sqrt(sorted.reduce((s, [, w]) => s + w * w, 0));
    for (const [c, w] of sorted) {
      indices.push(c);
      values.push(normalise && norm > 0 ? w / norm : w);
    }
    indptr[r + 1] = indices.length;
  });
  return { rows: rows.length, cols, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) };
}

/** Reference dot product: merge of the two rows, float64 products of the float32 values, summed in column order. */
function refDot(m: Csr, i: number, j: number): number {
  let s = 0;
  for (let p = m.indptr[i]!; p < m.indptr[i + 1]!; p++) {
    for (let q = m.indptr[j]!; q < m.indptr[j + 1]!; q++) {
      if (m.indices[p] === m.indices[q]) s += m.values[p]! * m.values[q]!;
    }
  }
  return s;
}

/** Brute force: every pair i < j, in (i, j) order, with dot >= t. */
function bruteForce(m: Csr, t: number): { a: number[]; b: number[]; s: number[] } {
  const out = { a: [] as number[], b: [] as number[], s: [] as number[] };
  for (let i = 0; i < m.rows; i++) {
    for (let j = i + 1; j < m.rows; j++) {
      const d = refDot(m, i, j);
      if (d >= t) {
        out.a.push(i);
        out.b.push(j);
        out.s.push(d);
      }
    }
  }
  return out;
}

function expectSameAsBruteForce(m: Csr, t: number): void {
  const got = allPairsCosine(m, t);
  const want = bruteForce(m, t);
  expect(Array.from(got.a)).toEqual(want.a);
  expect(Array.from(got.b)).toEqual(want.b);
  expect(got.similarity.length).toBe(want.s.length);
  for (let k = 0; k < want.s.length; k++) {
    expect(Math.abs(got.similarity[k]! - want.s[k]!)).toBeLessThanOrEqual(1e-6);
  }
}

/** Random sparse rows with planted exact copies, perturbed copies and empty rows. */
const corpus = fc
  .record({
    cols: fc.integer({ min: 1, max: 12 }),
    base: fc.array(
      fc.array(fc.tuple(fc.nat(11), fc.integer({ min: 1, max: 1000 })), { minLength: 0, maxLength: 6 }),
      { minLength: 0, maxLength: 30 },
    ),
    copies: fc.array(fc.tuple(fc.nat(), fc.boolean(), fc.integer({ min: 1, max: 50 })), { maxLength: 10 }),
  })
  .map(({ cols, base, copies }) => {
    const rows = base.map((row) => row.map(([c, w]) => [c % cols, w] as [number, number]));
    for (const [from, perturb, bump] of copies) {
      if (rows.length === 0) break;
      const src = rows[from % rows.length]!;
      rows.push(perturb && src.length > 0 ? src.map(([c, w], k) => [c, k === 0 ? w + bump : w] as [number, number]) : [...src]);
    }
    return unitCsr(rows, cols);
  });

describe('allPairsCosine against a brute-force reference (fast-check)', () => {
  it('finds exactly the pairs at or above random thresholds', () => {
    fc.assert(
      fc.property(corpus, fc.double({ min: 0.05, max: 1, noNaN: true }), (m, t) => {
        expectSameAsBruteForce(m, t);
      }),
      { numRuns: 400 },
    );
  });

  it('decides ties exactly at the threshold identically (t = the dot of an existing pair)', () => {
    fc.assert(
      fc.property(corpus, fc.nat(), fc.nat(), (m, i, j) => {
        fc.pre(m.rows >= 2);
        const x = i % m.rows;
        const y = (x + 1 + (j % (m.rows - 1))) % m.rows;
        const d = refDot(m, x, y);
        fc.pre(d > 0);
        const t = d <= 1 ? d : 1;
        expectSameAsBruteForce(m, t);
        if (d <= 1) {
          const got = allPairsCosine(m, t);
          const lo = Math.min(x, y);
          const hi = Math.max(x, y);
          let found = false;
          for (let k = 0; k < got.a.length; k++) if (got.a[k] === lo && got.b[k] === hi) found = true;
          expect(found).toBe(true);
        }
      }),
      { numRuns: 400 },
    );
  });

  it('handles t = 1 with duplicate rows exactly like the reference', () => {
    fc.assert(
      fc.property(corpus, (m) => {
        expectSameAsBruteForce(m, 1);
      }),
      { numRuns: 200 },
    );
  });

  it('agrees on larger skewed inputs where the index prunes (Zipf-like columns, planted copies)', () => {
    const big = fc
      .record({
        seedRows: fc.array(
          fc.array(fc.tuple(fc.double({ min: 0, max: 1, noNaN: true }), fc.integer({ min: 1, max: 20 })), {
            minLength: 1,
            maxLength: 12,
          }),
          { minLength: 50, maxLength: 160 },
        ),
        dupEvery: fc.integer({ min: 2, max: 6 }),
      })
      .map(({ seedRows, dupEvery }) => {
        const cols = 300;
        const rows = seedRows.map((row) => row.map(([u, w]) => [Math.floor(cols * u * u * u) % cols, w] as [number, number]));
        const n = rows.length;
        for (let r = 0; r < n; r += dupEvery) rows.push(rows[r]!.map(([c, w], k) => [c, k === 0 ? w + 1 : w] as [number, number]));
        return unitCsr(rows, cols);
      });
    fc.assert(
      fc.property(big, fc.constantFrom(0.5, 0.7, 0.8, 0.9, 0.95, 0.99), (m, t) => {
        expectSameAsBruteForce(m, t);
      }),
      { numRuns: 60 },
    );
  });

  it('is exact for rows that are not unit length (the bounds do not assume it)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.array(fc.tuple(fc.nat(7), fc.double({ min: 0, max: 0.8, noNaN: true })), { maxLength: 5 }), { maxLength: 25 }),
        fc.double({ min: 0.05, max: 1, noNaN: true }),
        (rows, t) => {
          expectSameAsBruteForce(unitCsr(rows, 8, false), t);
        },
      ),
      { numRuns: 200 },
    );
  });
});

describe('allPairsCosine on hand-made rows', () => {
  // Unit vectors (1,0), (0.6,0.8), (0.8,0.6): pairwise cosines 0.6, 0.8 and 0.6·0.8 + 0.8·0.6 = 0.96.
  const m = unitCsr(
    [
      [[0, 1]],
      [
        [0, 0.6],
        [1, 0.8],
      ],
      [
        [0, 0.8],
        [1, 0.6],
      ],
      [],
    ],
    2,
  );

  it('returns the pairs at or above the threshold, sorted, with their cosines', () => {
    const p = allPairsCosine(m, 0.7);
    expect(Array.from(p.a)).toEqual([0, 1]);
    expect(Array.from(p.b)).toEqual([2, 2]);
    expect(p.similarity[0]).toBeCloseTo(0.8, 6);
    expect(p.similarity[1]).toBeCloseTo(0.96, 6);
    expect(p.threshold).toBe(0.7);
    expect(allPairsCosine(m, 0.5).a.length).toBe(3);
    expect(allPairsCosine(m, 0.97).a.length).toBe(0);
  });

  it('never pairs an all-zero row', () => {
    const p = allPairsCosine(m, 0.01);
    expect(Array.from(p.b)).not.toContain(3);
    expect(Array.from(p.a)).not.toContain(3);
  });

  it('copes with an empty matrix', () => {
    const empty: Csr = { rows: 0, cols: 0, indptr: new Int32Array(1), indices: new Int32Array(0), values: new Float32Array(0) };
    expect(allPairsCosine(empty, 0.9).a.length).toBe(0);
  });
});

describe('options and input checks', () => {
  const m = unitCsr([[[0, 1]], [[0, 1]]], 1);

  it('rejects thresholds outside (0, 1] with a one-line message naming the value', () => {
    for (const [bad, shown] of [
      [0, '0'],
      [-0.5, '-0.5'],
      [1.5, '1.5'],
      [Number.NaN, 'NaN'],
    ] as const) {
      let error: unknown;
      try {
        allPairsCosine(m, bad);
      } catch (e) {
        error = e;
      }
      expect(error).toBeInstanceOf(UsageError);
      expect((error as UsageError).message).toBe(`threshold must be a number in (0, 1]; got ${shown}`);
      expect((error as UsageError).option).toBe('threshold');
    }
  });

  it('rejects negative values and malformed matrices as programming errors', () => {
    const neg: Csr = { ...m, values: Float32Array.from([1, -1]) };
    expect(() => allPairsCosine(neg, 0.5)).toThrow(RangeError);
    expect(() => allPairsCosine(neg, 0.5)).toThrow('allPairsCosine: row 1, column 0 holds -1; values must be finite and >= 0');
    const unsorted: Csr = { rows: 1, cols: 3, indptr: Int32Array.from([0, 2]), indices: Int32Array.from([2, 1]), values: Float32Array.from([0.6, 0.8]) };
    expect(() => allPairsCosine(unsorted, 0.5)).toThrow('allPairsCosine: row 0 has column 1 out of order or outside [0, 3)');
  });

  it('resolves the stage options with defaults and exact messages', () => {
    expect(resolveDuplicatesOptions({})).toEqual(DEFAULT_DUPLICATES_OPTIONS);
    expect(resolveDuplicatesOptions({ threshold: 0.8, shingleWidth: undefined }).threshold).toBe(0.8);
    const cases: [Partial<Record<string, unknown>>, string, string][] = [
      [{ threshold: 2 }, 'threshold', 'threshold must be a number in (0, 1]; got 2'],
      [{ chainWarningMargin: 1 }, 'chainWarningMargin', 'chainWarningMargin must be a number in [0, 1); got 1'],
      [{ chainWarningMargin: -0.1 }, 'chainWarningMargin', 'chainWarningMargin must be a number in [0, 1); got -0.1'],
      [{ shingleWidth: 0 }, 'shingleWidth', 'shingleWidth must be a whole number from 1 to 100; got 0'],
      [{ shingleWidth: 2.5 }, 'shingleWidth', 'shingleWidth must be a whole number from 1 to 100; got 2.5'],
      [{ resemblanceThreshold: '0.8' }, 'resemblanceThreshold', 'resemblanceThreshold must be a number in (0, 1]; got "0.8"'],
      [{ diffContext: -1 }, 'diffContext', 'diffContext must be a whole number from 0 to 1000; got -1'],
      [{ diffMaxPieces: 0 }, 'diffMaxPieces', 'diffMaxPieces must be a whole number from 1 to 1000000; got 0'],
    ];
    for (const [partial, option, message] of cases) {
      let error: unknown;
      try {
        resolveDuplicatesOptions(partial as never);
      } catch (e) {
        error = e;
      }
      expect(error).toBeInstanceOf(UsageError);
      expect((error as UsageError).message).toBe(message);
      expect((error as UsageError).option).toBe(option);
    }
  });

  it('findNearDuplicates runs the join and the sets with the resolved options', () => {
    const three = unitCsr([[[0, 1]], [[0, 1]], [[1, 1]]], 2);
    const r = findNearDuplicates(three, { threshold: 0.99 });
    expect(r.options.threshold).toBe(0.99);
    expect(Array.from(r.pairs.a)).toEqual([0]);
    expect(Array.from(r.pairs.b)).toEqual([1]);
    expect(Array.from(r.setOf)).toEqual([0, 0, -1]);
    expect(r.sets[0]!.representative).toBe(0);
    expect(r.chainFloor).toBeCloseTo(0.89, 12);
  });
});
