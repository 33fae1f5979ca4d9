import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import type { Csr } from '../src/types.js';
import { createRng } from '../src/util/random.js';
import { UsageError } from '../src/util/errors.js';
import {
  DEFAULT_REDUCE_OPTIONS,
  denseRowsAsCsr,
  projectRows,
  resolveReduceOptions,
  resolveReduceSetting,
  reductionFor,
  AUTO_REDUCE_MAX_DOCUMENTS,
  termSpacePartition,
  truncatedSvd,
} from '../src/reduce/index.js';
import { partitionFromAssignments } from '../src/cluster/partition.js';

/** A random CSR matrix with L2-normalised rows (some rows may be empty), built from a dense draw. */
function csrFrom(dense: number[][], cols: number): Csr {
  const indptr = new Int32Array(dense.length + 1);
  const idx: number[] = [];
  const val: number[] = [];
  dense.forEach((row, r) => {
    const norm = Math.sqrt(row.reduce((a, x) => a + x * x, 0));
    row.forEach((x, c) => {
      if (x !== 0) {
        idx.push(c);
        val.push(x / norm);
      }
    });
    indptr[r + 1] = idx.length;
  });
  return { rows: dense.length, cols, indptr, indices: Int32Array.from(idx), values: Float32Array.from(val) };
}

function toDense(m: Csr): Matrix {
  const a = new Matrix(m.rows, m.cols);
  for (let r = 0; r < m.rows; r++) for (let p = m.indptr[r]!; p < m.indptr[r + 1]!; p++) a.set(r, m.indices[p]!, m.values[p]!);
  return a;
}

const matrixArb = fc
  .record({ rows: fc.integer({ min: 2, max: 14 }), cols: fc.integer({ min: 2, max: 14 }) })
  .chain(({ rows, cols }) =>
    fc
      .array(fc.array(fc.oneof(fc.constant(0), fc.constant(0), fc.double({ min: 0.05, max: 3, noNaN: true })), { minLength: cols, maxLength: cols }), {
        minLength: rows,
        maxLength: rows,
      })
      .map((dense) => csrFrom(dense, cols)),
  );

describe('resolveReduceOptions', () => {
  it('merges the defaults', () => {
    expect(resolveReduceOptions({})).toEqual({ dims: 50, oversampling: 10, powerIterations: 5 });
    expect(DEFAULT_REDUCE_OPTIONS).toEqual({ dims: 50, oversampling: 10, powerIterations: 5 });
    expect(resolveReduceOptions({ dims: 7, oversampling: undefined })).toEqual({ dims: 7, oversampling: 10, powerIterations: 5 });
  });
  it('names the bad value and what is allowed', () => {
    const msg = (f: () => unknown): string => {
      try {
        f();
      } catch (e) {
        expect(e).toBeInstanceOf(UsageError);
        return `${(e as UsageError).option}: ${(e as Error).message}`;
      }
      return 'no error';
    };
    expect(msg(() => resolveReduceOptions({ dims: 0 }))).toBe('dims: dims must be a whole number >= 1; got 0');
    expect(msg(() => resolveReduceOptions({ dims: 2.5 }))).toBe('dims: dims must be a whole number >= 1; got 2.5');
    expect(msg(() => resolveReduceOptions({ dims: 60 }, 40))).toBe(
      'dims: dims must be a whole number from 1 to 40 (the smaller of the non-empty documents and the terms); got 60',
    );
    expect(msg(() => resolveReduceOptions({ oversampling: -1 }))).toBe('oversampling: oversampling must be a whole number >= 0; got -1');
    expect(msg(() => resolveReduceOptions({ powerIterations: '3' as unknown as number }))).toBe(
      'powerIterations: powerIterations must be a whole number >= 0; got "3"',
    );
    expect(msg(() => resolveReduceSetting('50' as unknown as boolean))).toBe('reduce: reduce must be auto, false, true or an object like { dims: 50 }; got "50"');
    expect(resolveReduceSetting(undefined)).toEqual({ ...DEFAULT_REDUCE_OPTIONS, auto: true });
    expect(resolveReduceSetting('auto')).toEqual({ ...DEFAULT_REDUCE_OPTIONS, auto: true });
    expect(resolveReduceSetting(false)).toBeNull();
    expect(resolveReduceSetting(true)).toEqual({ ...DEFAULT_REDUCE_OPTIONS, auto: false });
    expect(resolveReduceSetting({ dims: 3 })).toEqual({ ...DEFAULT_REDUCE_OPTIONS, dims: 3, auto: false });
  });
  it('reductionFor: auto fits dims to a small pile and stands aside above the size limit; explicit options are kept as given', () => {
    const auto = resolveReduceSetting('auto');
    const given = resolveReduceSetting({ dims: 80 });
    const plain = { oversampling: 10, powerIterations: 5 };
    expect(reductionFor(auto, 3000, 5000)).toEqual({ dims: 50, ...plain });
    expect(reductionFor(auto, 70, 624)).toEqual({ dims: 50, ...plain });
    expect(reductionFor(auto, 40, 624)).toEqual({ dims: 39, ...plain });
    expect(reductionFor(auto, 500, 20)).toEqual({ dims: 19, ...plain });
    expect(reductionFor(auto, 2, 10)).toBeNull();
    expect(reductionFor(auto, AUTO_REDUCE_MAX_DOCUMENTS, 9000)).toEqual({ dims: 50, ...plain });
    expect(reductionFor(auto, AUTO_REDUCE_MAX_DOCUMENTS + 1, 9000)).toBeNull();
    expect(reductionFor(given, AUTO_REDUCE_MAX_DOCUMENTS + 1, 9000)).toEqual({ dims: 80, ...plain });
    expect(reductionFor(given, 40, 624)).toEqual({ dims: 80, ...plain });
    expect(reductionFor(null, 3000, 5000)).toBeNull();
  });
  it('truncatedSvd refuses more dims than the data has', () => {
    const m = csrFrom([[1, 0, 2], [0, 1, 0]], 3);
    expect(() => truncatedSvd(m, { dims: 3 }, createRng(1))).toThrow(
      'dims must be a whole number from 1 to 2 (the smaller of the non-empty documents and the terms); got 3',
    );
  });
});

describe('truncatedSvd against a full SVD (ml-matrix, dense) on random matrices', () => {
  it('with a block as wide as the matrix, the singular values are exact', () => {
    fc.assert(
      fc.property(matrixArb, fc.integer({ min: 0, max: 2 ** 32 - 1 }), fc.integer({ min: 0, max: 3 }), (m, seed, q) => {
        const k = Math.min(m.rows, m.cols);
        const dims = Math.max(1, k - 1);
        const svd = truncatedSvd(m, { dims, oversampling: 1, powerIterations: q }, createRng(seed));
        const full = new SingularValueDecomposition(toDense(m), { autoTranspose: true }).diagonal;
        const s1 = full[0] ?? 0;
        for (let j = 0; j < dims; j++) expect(Math.abs(svd.singularValues[j]! - full[j]!)).toBeLessThanOrEqual(1e-9 * Math.max(1, s1));
      }),
      { numRuns: 150 },
    );
  });

  it('components are orthonormal rows, reduced rows are unit length (zero rows stay zero), and equal the naive projection', () => {
    fc.assert(
      fc.property(matrixArb, fc.integer({ min: 0, max: 2 ** 32 - 1 }), (m, seed) => {
        const k = Math.min(m.rows, m.cols);
        const dims = 1 + (seed % k);
        const svd = truncatedSvd(m, { dims, oversampling: 2, powerIterations: 2 }, createRng(seed));
        const { components: c, terms } = svd;
        expect(terms).toBe(m.cols);
        for (let a = 0; a < dims; a++) {
          for (let b = 0; b < dims; b++) {
            let s = 0;
            for (let t = 0; t < terms; t++) s += c[a * terms + t]! * c[b * terms + t]!;
            expect(Math.abs(s - (a === b ? 1 : 0))).toBeLessThan(1e-5);
          }
        }
        for (let r = 0; r < m.rows; r++) {
          // Naive reference: A·Vᵀ for this row in double precision, then normalised.
          const z = new Float64Array(dims);
          for (let p = m.indptr[r]!; p < m.indptr[r + 1]!; p++) for (let j = 0; j < dims; j++) z[j]! += m.values[p]! * c[j * terms + m.indices[p]!]!;
          const norm = Math.hypot(...z);
          let rowNorm = 0;
          for (let j = 0; j < dims; j++) rowNorm += svd.rows[r * dims + j]! ** 2;
          if (m.indptr[r + 1] === m.indptr[r]) expect(rowNorm).toBe(0);
          else if (norm > 1e-6) {
            expect(Math.abs(Math.sqrt(rowNorm) - 1)).toBeLessThan(1e-6);
            for (let j = 0; j < dims; j++) expect(Math.abs(svd.rows[r * dims + j]! - z[j]! / norm)).toBeLessThan(1e-6);
          }
        }
      }),
      { numRuns: 150 },
    );
  });

  it('the same seed gives the same output, bit for bit', () => {
    fc.assert(
      fc.property(matrixArb, fc.integer({ min: 0, max: 2 ** 32 - 1 }), (m, seed) => {
        const dims = Math.min(m.rows, m.cols);
        const a = truncatedSvd(m, { dims, powerIterations: 1 }, createRng(seed));
        const b = truncatedSvd(m, { dims, powerIterations: 1 }, createRng(seed));
        expect(b.components).toEqual(a.components);
        expect(b.singularValues).toEqual(a.singularValues);
        expect(b.rows).toEqual(a.rows);
      }),
      { numRuns: 60 },
    );
  });

  it('does not modify its input', () => {
    const m = csrFrom([[1, 0, 2, 0], [0, 1, 0, 3], [1, 1, 1, 1]], 4);
    const copy = { ...m, indptr: m.indptr.slice(), indices: m.indices.slice(), values: m.values.slice() };
    truncatedSvd(m, { dims: 2 }, createRng(3));
    expect(m).toEqual(copy);
  });
});

describe('projectRows, denseRowsAsCsr, termSpacePartition', () => {
  it('projectRows on the training matrix gives the rows truncatedSvd returned', () => {
    const m = csrFrom([[1, 0, 2, 0, 1], [0, 1, 0, 3, 0], [1, 1, 1, 1, 0], [0, 0, 0, 0, 0], [2, 0, 1, 0, 0]], 5);
    const svd = truncatedSvd(m, { dims: 3 }, createRng(9));
    expect(projectRows(m, svd.components, 3)).toEqual(svd.rows);
    expect(Array.from(svd.rows.subarray(9, 12))).toEqual([0, 0, 0]);
    expect(() => projectRows(m, svd.components, 2)).toThrow('components hold 15 values; 2 dims × 5 terms needs 10');
  });

  it('denseRowsAsCsr keeps full rows and leaves zero rows without entries', () => {
    const rows = Float32Array.from([0.6, 0.8, 0, 0, 1, 0]);
    const csr = denseRowsAsCsr(rows, 3, 2);
    expect(Array.from(csr.indptr)).toEqual([0, 2, 2, 4]);
    expect(Array.from(csr.indices)).toEqual([0, 1, 0, 1]);
    expect(Array.from(csr.values)).toEqual([Math.fround(0.6), Math.fround(0.8), 1, 0]);
    expect(csr.cols).toBe(2);
    const dense = Float32Array.from([1, 0, 0, 1]);
    const full = denseRowsAsCsr(dense, 2, 2);
    expect(full.values).toBe(dense); // shared, not copied, when no row is zero
    expect(Array.from(full.indptr)).toEqual([0, 2, 4]);
  });

  it('termSpacePartition takes term centroids from the TF-IDF rows and keeps the reduced fits', () => {
    const m = csrFrom([[1, 0, 2], [0, 1, 0], [1, 0, 1], [0, 2, 1]], 3);
    const reduced = { groups: 2, assignments: Int32Array.from([0, 1, 0, 1]), centroids: new Float32Array(4), fit: Float32Array.from([0.9, 0.8, 0.7, 0.6]), objective: 3 };
    const p = termSpacePartition(m, reduced);
    expect(p.centroids).toEqual(partitionFromAssignments(m, reduced.assignments, 2).centroids);
    expect(p.fit).toBe(reduced.fit);
    expect(p.objective).toBe(3);
    expect(p.assignments).toBe(reduced.assignments);
  });
});
