/**
 * The small helpers on {@link Csr} matrices every stage shares: shape checks,
 * which rows hold entries, row selection and exact row dot products.
 *
 * @module
 */
import type { Csr } from '../types.js';

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

/** True when row `r` has a stored non-zero value. */
export function rowIsNonEmpty(matrix: Csr, r: number): boolean {
  const { indptr, values } = matrix;
  for (let j = indptr[r]!; j < indptr[r + 1]!; j++) if (values[j] !== 0) return true;
  return false;
}

/** Rows with no stored entry (no terms), ascending. */
export function rowsWithoutEntries(matrix: Csr): Int32Array {
  const empty: number[] = [];
  for (let r = 0; r < matrix.rows; r++) if (matrix.indptr[r + 1] === matrix.indptr[r]) empty.push(r);
  return Int32Array.from(empty);
}

/** Rows with at least one stored entry, ascending. */
export function rowsWithEntries(matrix: Csr): Int32Array {
  let count = 0;
  for (let r = 0; r < matrix.rows; r++) if (matrix.indptr[r + 1]! > matrix.indptr[r]!) count++;
  const rows = new Int32Array(count);
  for (let r = 0, a = 0; r < matrix.rows; r++) if (matrix.indptr[r + 1]! > matrix.indptr[r]!) rows[a++] = r;
  return rows;
}

/** The given rows of a CSR matrix, as a new CSR matrix (values shared by copy). */
export function selectRows(matrix: Csr, rows: Int32Array): Csr {
  const indptr = new Int32Array(rows.length + 1);
  for (let i = 0; i < rows.length; i++) indptr[i + 1] = indptr[i]! + matrix.indptr[rows[i]! + 1]! - matrix.indptr[rows[i]!]!;
  const nnz = indptr[rows.length]!;
  const indices = new Int32Array(nnz);
  const values = new Float32Array(nnz);
  for (let i = 0; i < rows.length; i++) {
    const from = matrix.indptr[rows[i]!]!;
    const to = matrix.indptr[rows[i]! + 1]!;
    indices.set(matrix.indices.subarray(from, to), indptr[i]);
    values.set(matrix.values.subarray(from, to), indptr[i]);
  }
  return { rows: rows.length, cols: matrix.cols, indptr, indices, values };
}

/**
 * Dot product of row `i` of `a` and row `j` of `b` (columns must mean the
 * same terms), accumulated in float64. For rows of the vectorizer this is
 * their cosine similarity.
 */
export function rowDot(a: Csr, i: number, b: Csr, j: number): number {
  let p = a.indptr[i]!;
  const pe = a.indptr[i + 1]!;
  let q = b.indptr[j]!;
  const qe = b.indptr[j + 1]!;
  let sum = 0;
  while (p < pe && q < qe) {
    const ca = a.indices[p]!;
    const cb = b.indices[q]!;
    if (ca === cb) {
      sum += a.values[p]! * b.values[q]!;
      p++;
      q++;
    } else if (ca < cb) p++;
    else q++;
  }
  return sum;
}

/**
 * Dot product of rows `i` and `j` of one matrix, the one arithmetic every
 * similarity of the near-copy search uses: each product of two float32 values
 * is formed in float64 (exactly, as 24 + 24 significant bits fit in 53) and the
 * products are summed in float64 in increasing column order. The result is
 * therefore the same whichever row comes first. For L2-normalised rows this is
 * their cosine similarity.
 */
export function rowPairDot(matrix: Csr, i: number, j: number): number {
  return rowDot(matrix, i, matrix, j);
}

/** {@link rowPairDot} on the bare arrays of a matrix (for inner loops that hold them already). */
export function rowPairDotArrays(indptr: Int32Array, indices: Int32Array, values: Float32Array, x: number, y: number): number {
  let p = indptr[x]!;
  const pe = indptr[x + 1]!;
  let q = indptr[y]!;
  const qe = indptr[y + 1]!;
  let sum = 0;
  while (p < pe && q < qe) {
    const ca = indices[p]!;
    const cb = indices[q]!;
    if (ca === cb) {
      sum += values[p]! * values[q]!;
      p++;
      q++;
    } else if (ca < cb) p++;
    else q++;
  }
  return sum;
}
