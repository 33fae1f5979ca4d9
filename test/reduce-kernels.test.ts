import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr } from '../src/types.js';
import { gramUpper, multiplyCsrDense, multiplyCsrTransposeDense, projectRows, solveUpperRows, termMajorComponents, transposeCsr } from '../src/reduce/svd.js';
import { combineRange, gramUpperRange, multiplyCsrDenseRange, projectRange, solveUpperRange } from '../src/reduce/svd-kernels.js';

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
  it('multiplyCsrDense (eight, then four stored values per sweep) equals the plain row loop', () => {
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

  it('gramUpper (eight rows per sweep) and solveUpperRows (four rows against Rᵀ) equal the plain loops', () => {
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

/** The plain projection: Σ v · component (Float32 components, Float64 sums in storage order), then unit length. */
function naiveProject(a: Csr, byTerm: Float32Array, d: number): Float32Array {
  const out = new Float32Array(a.rows * d);
  for (let r = 0; r < a.rows; r++) {
    const acc = new Float64Array(d);
    for (let p = a.indptr[r]!; p < a.indptr[r + 1]!; p++) for (let j = 0; j < d; j++) acc[j]! += a.values[p]! * byTerm[a.indices[p]! * d + j]!;
    const s = acc.reduce((x, v) => x + v * v, 0);
    for (let j = 0; j < d; j++) out[r * d + j] = s > 0 ? acc[j]! * (1 / Math.sqrt(s)) : 0;
  }
  return out;
}

describe('SVD row kernels split into ranges (as threads run them)', () => {
  const cutArb = fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 0, maxLength: 3 });
  /** Range bounds 0 = c0 ≤ c1 ≤ … ≤ total from fractions. */
  const cutsOf = (fractions: number[], total: number): number[] => [0, ...fractions.map((f) => Math.floor(f * total)).sort((x, y) => x - y), total];

  it('products, Gram rows, solves, V = QW and projections give the same bits over any split as over the whole range', () => {
    fc.assert(
      fc.property(csrArb, cutArb, fc.integer({ min: 1, max: 5 }), ({ a, l, x, y }, fractions, d) => {
        const whole = new Float64Array(a.rows * l);
        multiplyCsrDenseRange(a, x, l, whole, 0, a.rows);
        expect(bits(whole)).toEqual(bits(naiveProduct(a, x, l)));
        const split = new Float64Array(a.rows * l).fill(5);
        const rowCuts = cutsOf(fractions, a.rows);
        for (let i = 0; i + 1 < rowCuts.length; i++) multiplyCsrDenseRange(a, x, l, split, rowCuts[i]!, rowCuts[i + 1]!);
        expect(bits(split)).toEqual(bits(whole));

        // Gram of y (rows × l) by ranges of G's rows.
        const g = new Float64Array(l * l);
        gramUpperRange(y, a.rows, l, g, 0, l);
        const gSplit = new Float64Array(l * l);
        const gCuts = cutsOf(fractions, l);
        for (let i = 0; i + 1 < gCuts.length; i++) gramUpperRange(y, a.rows, l, gSplit, gCuts[i]!, gCuts[i + 1]!);
        const naive = naiveGram(y, a.rows, l);
        for (let i = 0; i < l; i++) {
          for (let j = i; j < l; j++) {
            expect(g[i * l + j]).toBe(naive[i * l + j]);
            expect(gSplit[i * l + j]).toBe(naive[i * l + j]);
          }
        }

        // Solve against an upper R with a safe diagonal, by ranges of rows.
        const r = new Float64Array(l * l);
        for (let i = 0; i < l; i++) for (let j = i; j < l; j++) r[i * l + j] = i === j ? 1 + (x[j % x.length] ?? 0) ** 2 : (y[(i + j) % y.length] ?? 0) / 3;
        const rt = new Float64Array(l * l);
        for (let i = 0; i < l; i++) for (let j = 0; j < l; j++) rt[j * l + i] = r[i * l + j]!;
        const solved = Float64Array.from(y);
        for (let i = 0; i + 1 < rowCuts.length; i++) solveUpperRange(solved, l, rt, rowCuts[i]!, rowCuts[i + 1]!);
        expect(bits(solved)).toEqual(bits(naiveSolve(y, a.rows, l, r)));

        // V = QW (terms × l times l × d) by ranges of terms, against the plain triple loop.
        const w = Float64Array.from({ length: l * d }, (_, i) => y[i % y.length]! - 0.5);
        const v = new Float64Array(a.cols * d).fill(9);
        const termCuts = cutsOf(fractions, a.cols);
        for (let i = 0; i + 1 < termCuts.length; i++) combineRange(x, l, w, d, v, termCuts[i]!, termCuts[i + 1]!);
        const vNaive = new Float64Array(a.cols * d);
        for (let t = 0; t < a.cols; t++) for (let i = 0; i < l; i++) for (let j = 0; j < d; j++) if (x[t * l + i] !== 0) vNaive[t * d + j]! += x[t * l + i]! * w[i * d + j]!;
        expect(bits(v)).toEqual(bits(vNaive));

        // Projection on Float32 components by ranges of rows.
        const byTerm = Float32Array.from({ length: a.cols * d }, (_, i) => x[i % x.length]!);
        const proj = new Float32Array(a.rows * d).fill(2);
        const acc = new Float64Array(d);
        for (let i = 0; i + 1 < rowCuts.length; i++) projectRange(a, byTerm, d, proj, acc, rowCuts[i]!, rowCuts[i + 1]!);
        expect(Array.from(proj)).toEqual(Array.from(naiveProject(a, byTerm, d)));
      }),
      { numRuns: 300 },
    );
  });
});

describe('term-major components', () => {
  it('projectRows transposes a component array once and reuses the copy on later calls', () => {
    const a: Csr = { rows: 2, cols: 3, indptr: Int32Array.from([0, 2, 3]), indices: Int32Array.from([0, 2, 1]), values: Float32Array.from([0.6, 0.8, 1]) };
    const components = Float32Array.from([1, 0, 0, 0, 0.6, 0.8]); // d = 2, terms = 3
    const first = termMajorComponents(components, 2);
    expect(Array.from(first)).toEqual([1, 0, 0, 0.6000000238418579, 0, 0.800000011920929]);
    expect(termMajorComponents(components, 2)).toBe(first);
    const rows = projectRows(a, components, 2);
    expect(termMajorComponents(components, 2)).toBe(first);
    // Row 0: (0.6·1, 0.8·0.8) re-normalised; row 1: (0, 0.6).
    const n0 = Math.hypot(0.6000000238418579, 0.800000011920929 * 0.800000011920929);
    expect(rows[0]).toBe(Math.fround(0.6000000238418579 * (1 / n0)));
    expect(rows[2]).toBe(0);
    expect(rows[3]).toBe(1);
  });
});
