/**
 * Shape checks and exact row products on {@link Csr} matrices, shared by the
 * joins and the duplicate sets.
 *
 * @module
 */
import type { Csr } from '../types.js';
import { rowDot as rowDotOf } from '../vectorize/tfidf.js';

/**
 * Throws a RangeError unless `matrix` is a well-formed CSR matrix: `indptr`
 * of length rows + 1, starting at 0, non-decreasing, ending within
 * `indices`/`values`; column indices in [0, cols) and strictly increasing
 * within each row; values finite, and also >= 0 when `nonNegative`.
 * Malformed matrices are programming errors, not bad usage. O(nnz).
 */
export function checkCsr(matrix: Csr, what: string, nonNegative: boolean): void {
  const { rows, cols, indptr, indices, values } = matrix;
  if (!Number.isInteger(rows) || rows < 0 || !Number.isInteger(cols) || cols < 0) {
    throw new RangeError(`${what}: rows and cols must be whole numbers >= 0; got ${rows} x ${cols}`);
  }
  if (indptr.length !== rows + 1) {
    throw new RangeError(`${what}: indptr must have rows + 1 = ${rows + 1} entries; got ${indptr.length}`);
  }
  if (indptr[0] !== 0) throw new RangeError(`${what}: indptr[0] must be 0; got ${indptr[0]}`);
  const nnz = indptr[rows]!;
  if (nnz > indices.length || nnz > values.length) {
    throw new RangeError(`${what}: indptr[rows] = ${nnz} exceeds the ${Math.min(indices.length, values.length)} stored entries`);
  }
  for (let r = 0; r < rows; r++) {
    const start = indptr[r]!;
    const end = indptr[r + 1]!;
    if (end < start) throw new RangeError(`${what}: indptr decreases at row ${r}`);
    let previous = -1;
    for (let e = start; e < end; e++) {
      const c = indices[e]!;
      if (c <= previous || c >= cols) {
        throw new RangeError(`${what}: row ${r} has column ${c} out of order or outside [0, ${cols})`);
      }
      previous = c;
      const v = values[e]!;
      if (!Number.isFinite(v) || (nonNegative && v < 0)) {
        throw new RangeError(`${what}: row ${r}, column ${c} holds ${v}; values must be finite${nonNegative ? ' and >= 0' : ''}`);
      }
    }
  }
}

/**
 * Dot product of rows `i` and `j`, the one arithmetic every similarity in
 * this module uses: each product of two float32 values is formed in float64
 * (exactly, as 24 + 24 significant bits fit in 53) and the products are
 * summed in float64 in increasing column order. The result is therefore the
 * same whichever row comes first. For L2-normalised rows this is their
 * cosine similarity.
 */
export function rowDot(matrix: Csr, i: number, j: number): number {
  return rowDotOf(matrix, i, matrix, j);
}
