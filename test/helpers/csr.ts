/**
 * Test helper: an L2-normalised CSR matrix from dense rows (an all-zero row
 * stays empty), for hand-worked cases.
 */
import type { Csr } from '../../src/types.js';

/** Builds an L2-normalised CSR from dense rows. */
export function csrFromDense(rows: number[][]): Csr {
  const cols = rows[0].length;
  const indptr = new Int32Array(rows.length + 1);
  const indices: number[] = [];
  const values: number[] = [];
  rows.forEach((r, i) => {
    const norm = Math.hypot(...r);
    r.forEach((v, j) => {
      if (v !== 0 && norm > 0) {
        indices.push(j);
        values.push(v / norm);
      }
    });
    indptr[i + 1] = indices.length;
  });
  return { rows: rows.length, cols, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) };
}
