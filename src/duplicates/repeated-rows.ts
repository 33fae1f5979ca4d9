/**
 * Which rows of a matrix may be exact copies of another row: those whose
 * stored columns and values hash to a value another row's also hash to.
 * Documents whose normalised texts are equal have equal vectors (TF-IDF or
 * shingle rows are functions of the normalised text's words), so the
 * exact-copy keys, a second pass over the texts, are only needed for these
 * rows. Pure.
 *
 * @module
 */
import type { Csr } from '../types.js';

/**
 * 1 for every row whose content (column indices and the bits of its values,
 * in order) hashes like another row's, 0 for a row no other row can equal.
 * A superset of the rows equal to another row (two equal rows always hash
 * alike; a hash collision only adds rows).
 */
export function rowsThatMayRepeat(matrix: Csr): Uint8Array {
  const n = matrix.rows;
  const { indptr, indices, values } = matrix;
  const bits = new Int32Array(values.buffer, values.byteOffset, values.length);
  const out = new Uint8Array(n);
  const firstOf = new Map<number, number>();
  for (let r = 0; r < n; r++) {
    const from = indptr[r]!;
    const to = indptr[r + 1]!;
    // FNV-1a style over 32-bit words: the length, then each (index, value bits) pair.
    let h = Math.imul(0x811c9dc5 ^ (to - from), 0x01000193);
    for (let p = from; p < to; p++) {
      h = Math.imul(h ^ indices[p]!, 0x01000193);
      h = Math.imul(h ^ bits[p]!, 0x01000193);
    }
    const f = firstOf.get(h);
    if (f === undefined) firstOf.set(h, r);
    else {
      out[f] = 1;
      out[r] = 1;
    }
  }
  return out;
}
