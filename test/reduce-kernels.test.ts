import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr } from '../src/types.js';
import { gramUpper, multiplyCsrDense, multiplyCsrTransposeDense, solveUpperRows, transposeCsr } from '../src/reduce/svd.js';

/** Random sparse matrix (rows × cols, some empty rows, unsorted-free CSR) and a dense block width. */
const csrArb = fc
  .record({ rows: fc.integer({ min: 1, max: 12 }), cols: fc.integer({ min: 1, max: 12 }), l: fc.integer({ min: 1, max: 9 }) })
  .chain(({ rows, cols, l }) =>
    fc
      .array(fc.array(fc.oneof(fc.constant(0), fc.float({ min: -3, max: 3, noNaN: true }), fc.float({ min: -3, max: 3, noNaN: true })), { minLength: cols, maxLength: cols }), {
        minLength: rows,
        maxLength: rows,
      })
      .chain((dense) => {
        const indptr = new Int32Array(rows + 1);
        const idx: number[] = [];
        const val: number[] = [];
        dense.forEach((row, r) => {
          row.forEach((x, c) => {
            if (x !== 0) {
              idx.push(c);
              val.push(x);
            }
          });
          indptr[r + 1] = idx.length;
        });
        const a: Csr = { rows, cols, indptr, indices: Int32Array.from(idx), values: Float32Array.from(val) };
        return fc
          .tuple(
            fc.array(fc.double({ min: -2, max: 2, noNaN: true }), { minLength: cols * l, maxLength: cols * l }),
            fc.array(fc.double({ min: -2, max: 2, noNaN: true }), { minLength: rows * l, maxLength: rows * l }),
          )
          .map(([x, y]) => ({ a, l, x: Float64Array.from(x), y: Float64Array.from(y) }));
      }),
  );

/** The plain loops the fast kernels replaced (the arithmetic each output entry must repeat bit for bit). */
function naiveProduct(a: Csr, x: Float64Array, l: number): Float64Array {
  const out = new Float64Array(a.rows * l);
  for (let r = 0; r < a.rows; r++) {
    for (let p = a.indptr[r]!; p < a.indptr[r + 1]!; p++) {
      for (let c = 0; c < l; c++) out[r * l + c]! += a.values[p]! * x[a.indices[p]! * l + c]!;
    }
  }
  return out;
}
function naiveGram(q: Float64Array, rows: number, l: number): Float64Array {
  const g = new Float64Array(l * l);
  for (let i = 0; i < rows; i++) for (let a = 0; a < l; a++) for (let b = a; b < l; b++) g[a * l + b]! += q[i * l + a]! * q[i * l + b]!;
  return g;
}
function naiveSolve(q: Float64Array, rows: number, l: number, r: Float64Array): Float64Array {
  const out = Float64Array.from(q);
  for (let i = 0; i < rows; i++) {
    for (let c = 0; c < l; c++) {
      let t = out[i * l + c]!;
      for (let k = 0; k < c; k++) t -= out[i * l + k]! * r[k * l + c]!;
      out[i * l + c] = t / r[c * l + c]!;
    }
  }
  return out;
}
const bits = (a: Float64Array): number[] => Array.from(a, (v) => (Object.is(v, -0) ? -0 : v));

describe('SVD kernels against the plain loops, bit for bit', () => {
  it('multiplyCsrDense (four stored values per sweep) equals the plain row loop', () => {
    fc.assert(
      fc.property(csrArb, ({ a, l, x }) => {
        const out = new Float64Array(a.rows * l).fill(7); // stale content must not leak
        multiplyCsrDense(a, x, l, out);
        expect(bits(out)).toEqual(bits(naiveProduct(a, x, l)));
      }),
      { numRuns: 300 },
    );
  });

  it('the product with transposeCsr(A) equals multiplyCsrTransposeDense (the scattering loop)', () => {
    fc.assert(
      fc.property(csrArb, ({ a, l, y }) => {
        const at = transposeCsr(a);
        expect(at.rows).toBe(a.cols);
        expect(at.cols).toBe(a.rows);
        const viaT = new Float64Array(a.cols * l);
        multiplyCsrDense(at, y, l, viaT);
        const scattered = new Float64Array(a.cols * l);
        multiplyCsrTransposeDense(a, y, l, scattered);
        expect(bits(viaT)).toEqual(bits(scattered));
      }),
      { numRuns: 300 },
    );
  });

  it('gramUpper (four rows per sweep) and solveUpperRows (two rows against Rᵀ) equal the plain loops', () => {
    const blockArb = fc
      .record({ rows: fc.integer({ min: 1, max: 11 }), l: fc.integer({ min: 1, max: 7 }) })
      .chain(({ rows, l }) =>
        fc
          .tuple(
            fc.array(fc.oneof(fc.constant(0), fc.double({ min: -2, max: 2, noNaN: true })), { minLength: rows * l, maxLength: rows * l }),
            fc.array(fc.double({ min: 0.5, max: 2, noNaN: true }), { minLength: l * l, maxLength: l * l }),
          )
          .map(([q, r]) => ({ rows, l, q: Float64Array.from(q), r: Float64Array.from(r, (v, i) => (Math.floor(i / l) <= i % l ? v : 0)) })),
      );
    fc.assert(
      fc.property(blockArb, ({ rows, l, q, r }) => {
        const g = new Float64Array(l * l).fill(3);
        gramUpper(q, rows, l, g);
        expect(bits(g)).toEqual(bits(naiveGram(q, rows, l)));
        const solved = Float64Array.from(q);
        solveUpperRows(solved, rows, l, r, new Float64Array(l * l));
        expect(bits(solved)).toEqual(bits(naiveSolve(q, rows, l, r)));
      }),
      { numRuns: 300 },
    );
  });
});
