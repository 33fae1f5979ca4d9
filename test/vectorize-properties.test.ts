/**
 * fast-check properties of the vectorizer against a naive dense reference
 * implementation written here from the definitions (sublinear tf
 * 1 + ln tf, smoothed idf ln((1 + n)/(1 + df)) + 1, L2 rows, df / total-count
 * pruning), plus invariants: unit or zero rows, sorted columns, document
 * order only permuting rows, transform reproducing fit, and MatrixMarket
 * text parsing back to the same matrix.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { fitTfidf, toMatrixMarket, transformTfidf, type VectorizeOptions } from '../src/vectorize/index.js';
import type { Csr } from '../src/types.js';

const TERMS = ['a', 'b', 'lamp', 'lens', 'Lamp', 'constructor', '__proto__', 'toString', 'hasOwnProperty', 'é', '\u{1F600}', 'x y'];

// Up to 60 documents, so `minDf: 'auto'` is drawn on both sides of its 50-document step.
const docs = fc.array(fc.array(fc.constantFrom(...TERMS), { maxLength: 12 }), { minLength: 1, maxLength: 60 });

const options: fc.Arbitrary<VectorizeOptions> = fc.record({
  minDf: fc.oneof(fc.constant('auto' as const), fc.integer({ min: 1, max: 4 }), fc.double({ min: 0.01, max: 0.6, noNaN: true })),
  maxDf: fc.oneof(fc.double({ min: 0.3, max: 1, noNaN: true }), fc.integer({ min: 2, max: 30 })),
  maxTerms: fc.option(fc.integer({ min: 1, max: 12 }), { nil: null }),
})
  // Same-kind limits that cross are rejected by resolveVectorizeOptions (tested in vectorize.test.ts).
  .filter((o) => o.minDf === 'auto' || (o.minDf < 1) !== (o.maxDf <= 1) || o.maxDf >= o.minDf);

interface Reference {
  terms: string[];
  df: number[];
  idf: number[];
  dense: number[][];
}

/** Straight from the definitions; dense, plain arrays, no shared code with the implementation. */
function reference(input: string[][], o: VectorizeOptions): Reference | null {
  const n = input.length;
  const df = new Map<string, number>();
  const total = new Map<string, number>();
  for (const d of input) {
    for (const t of new Set(d)) df.set(t, (df.get(t) ?? 0) + 1);
    for (const t of d) total.set(t, (total.get(t) ?? 0) + 1);
  }
  // minDf 'auto', as documented: from 50 documents on, at least 2 documents; below, no floor.
  const minDf = o.minDf === 'auto' ? (n >= 50 ? 2 : 1) : o.minDf;
  const maxDf = o.maxDf;
  let terms = [...df.keys()].filter((t) => {
    const f = df.get(t)!;
    const okMin = minDf < 1 ? f / n >= minDf : f >= minDf;
    const okMax = maxDf <= 1 ? f / n <= maxDf : f <= maxDf;
    return okMin && okMax;
  });
  if (o.maxTerms !== null) {
    terms.sort((p, q) => total.get(q)! - total.get(p)! || (p < q ? -1 : 1));
    terms = terms.slice(0, o.maxTerms);
  }
  if (terms.length === 0) return null;
  terms.sort((p, q) => (p < q ? -1 : 1));
  const idf = terms.map((t) => Math.log((1 + n) / (1 + df.get(t)!)) + 1);
  const dense = input.map((d) => {
    const row = terms.map((t, j) => {
      const tf = d.filter((x) => x === t).length;
      return tf === 0 ? 0 : (1 + Math.log(tf)) * idf[j]!;
    });
    const norm = Math.sqrt(row.reduce((s, x) => s + x * x, 0));
    return norm === 0 ? row : row.map((x) => x / norm);
  });
  return { terms, df: terms.map((t) => df.get(t)!), idf, dense };
}

function toDense(m: Csr): number[][] {
  const out: number[][] = [];
  for (let r = 0; r < m.rows; r++) {
    const row = new Array<number>(m.cols).fill(0);
    for (let p = m.indptr[r]!; p < m.indptr[r + 1]!; p++) row[m.indices[p]!] = m.values[p]!;
    out.push(row);
  }
  return out;
}

/** Reads MatrixMarket coordinate text back into a dense matrix (test-side parser). */
function parseMatrixMarket(text: string): { rows: number; cols: number; nnz: number; dense: number[][] } {
  const lines = text.split('\n');
  expect(lines[0]).toBe('%%MatrixMarket matrix coordinate real general');
  expect(lines[lines.length - 1]).toBe('');
  const [rows, cols, nnz] = lines[1]!.split(' ').map(Number) as [number, number, number];
  const dense = Array.from({ length: rows }, () => new Array<number>(cols).fill(0));
  const body = lines.slice(2, -1);
  expect(body).toHaveLength(nnz);
  for (const line of body) {
    const [i, j, v] = line.split(' ');
    dense[Number(i) - 1]![Number(j) - 1] = Math.fround(Number(v));
  }
  return { rows, cols, nnz, dense };
}

describe('fitTfidf equals the naive dense reference', () => {
  it('vocabulary, df, idf and every entry (to float32 rounding)', () => {
    fc.assert(
      fc.property(docs, options, (input, o) => {
        const want = reference(input, o);
        if (want === null) {
          expect(() => fitTfidf(input, o)).toThrow(/no terms left after pruning|none of the/);
          return;
        }
        const { vocabulary, matrix } = fitTfidf(input, o);
        expect(vocabulary.terms).toEqual(want.terms);
        expect(Array.from(vocabulary.df)).toEqual(want.df);
        expect(vocabulary.docCount).toBe(input.length);
        for (let j = 0; j < want.idf.length; j++) expect(Math.abs(vocabulary.idf[j]! - want.idf[j]!)).toBeLessThan(1e-14);
        const got = toDense(matrix);
        for (let r = 0; r < input.length; r++) {
          for (let j = 0; j < want.terms.length; j++) expect(Math.abs(got[r]![j]! - want.dense[r]![j]!)).toBeLessThan(1e-7);
        }
      }),
      { numRuns: 500 },
    );
  });

  it('rows are unit length or all zero, columns strictly increasing, every stored value non-zero', () => {
    fc.assert(
      fc.property(docs, (input) => {
        const { matrix } = fitTfidf([...input, ['lamp']]);
        expect(matrix.indptr[0]).toBe(0);
        expect(matrix.indptr[matrix.rows]).toBe(matrix.indices.length);
        for (let r = 0; r < matrix.rows; r++) {
          let s = 0;
          for (let p = matrix.indptr[r]!; p < matrix.indptr[r + 1]!; p++) {
            if (p > matrix.indptr[r]!) expect(matrix.indices[p]!).toBeGreaterThan(matrix.indices[p - 1]!);
            expect(matrix.values[p]!).toBeGreaterThan(0);
            s += matrix.values[p]! ** 2;
          }
          if (matrix.indptr[r + 1]! > matrix.indptr[r]!) expect(Math.abs(s - 1)).toBeLessThan(1e-6);
        }
      }),
      { numRuns: 300 },
    );
  });
});

describe('invariances', () => {
  it('permuting documents permutes rows and leaves vocabulary, df and idf unchanged', () => {
    fc.assert(
      fc.property(
        docs.chain((d) => fc.tuple(fc.constant(d), fc.shuffledSubarray(d.map((_, i) => i), { minLength: d.length, maxLength: d.length }))),
        options,
        ([input, perm], o) => {
          if (reference(input, o) === null) return;
          const a = fitTfidf(input, o);
          const b = fitTfidf(perm.map((i) => input[i]!), o);
          expect(b.vocabulary.terms).toEqual(a.vocabulary.terms);
          expect(Array.from(b.vocabulary.df)).toEqual(Array.from(a.vocabulary.df));
          expect(Array.from(b.vocabulary.idf)).toEqual(Array.from(a.vocabulary.idf));
          const da = toDense(a.matrix);
          const db = toDense(b.matrix);
          perm.forEach((i, r) => expect(db[r]).toEqual(da[i]));
        },
      ),
      { numRuns: 300 },
    );
  });

  it('term order inside a document does not matter', () => {
    fc.assert(
      fc.property(docs, (input) => {
        const a = fitTfidf(input.concat([['lamp']]));
        const b = fitTfidf(input.map((d) => [...d].reverse()).concat([['lamp']]));
        expect(Array.from(b.matrix.values)).toEqual(Array.from(a.matrix.values));
      }),
      { numRuns: 200 },
    );
  });

  it('transforming the fitting documents reproduces the fitted matrix exactly', () => {
    fc.assert(
      fc.property(docs, options, (input, o) => {
        if (reference(input, o) === null) return;
        const { vocabulary, matrix } = fitTfidf(input, o);
        const again = transformTfidf(input, vocabulary);
        expect(Array.from(again.indptr)).toEqual(Array.from(matrix.indptr));
        expect(Array.from(again.indices)).toEqual(Array.from(matrix.indices));
        expect(Array.from(again.values)).toEqual(Array.from(matrix.values));
      }),
      { numRuns: 300 },
    );
  });
});

describe('MatrixMarket round trip', () => {
  it('toMatrixMarket parses back to the same matrix, value for value', () => {
    fc.assert(
      fc.property(docs, (input) => {
        const { matrix } = fitTfidf(input.concat([['lamp']]));
        const back = parseMatrixMarket(toMatrixMarket(matrix));
        expect([back.rows, back.cols, back.nnz]).toEqual([matrix.rows, matrix.cols, matrix.indices.length]);
        expect(back.dense).toEqual(toDense(matrix));
      }),
      { numRuns: 300 },
    );
  });

  it('any float32 value survives the text form', () => {
    fc.assert(
      fc.property(fc.float({ noNaN: true, noDefaultInfinity: true, min: Math.fround(-1e30), max: Math.fround(1e30) }), (v) => {
        const m: Csr = { rows: 1, cols: 1, indptr: Int32Array.of(0, 1), indices: Int32Array.of(0), values: Float32Array.of(v) };
        expect(parseMatrixMarket(toMatrixMarket(m)).dense[0]![0]).toBe(Math.fround(v) === 0 ? 0 : Math.fround(v));
      }),
      { numRuns: 2000 },
    );
  });
});
