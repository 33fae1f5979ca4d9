/**
 * MatrixMarket exchange format (NIST, "The Matrix Market Exchange Formats:
 * Initial Design", Boisvert, Pozo & Remington, 1996; citation from memory), coordinate real
 * general: a header line, a size line `rows cols entries`, then one
 * `row col value` line per stored entry, 1-based.
 *
 * @module
 */

import type { Csr } from '../types.js';

/** The header line this writer emits. */
export const MATRIX_MARKET_HEADER = '%%MatrixMarket matrix coordinate real general';

/**
 * Shortest decimal (at most 9 significant digits) that reads back to the
 * same float32 value: `Math.fround(Number(s)) === v`.
 */
export function formatFloat32(v: number): string {
  if (v === 0) return '0';
  for (let p = 6; p < 9; p++) {
    const s = Number(v.toPrecision(p));
    if (Math.fround(s) === v) return String(s);
  }
  return String(Number(v.toPrecision(9)));
}

/**
 * The MatrixMarket text of `matrix` in pieces of about `rowsPerChunk`
 * rows each (the first piece holds the header and size lines), so a writer
 * can stream a large matrix without building one huge string.
 */
export function* matrixMarketChunks(matrix: Csr, rowsPerChunk = 1024): Generator<string> {
  const { rows, cols, indptr, indices, values } = matrix;
  yield `${MATRIX_MARKET_HEADER}\n${rows} ${cols} ${indptr[rows] ?? 0}\n`;
  const step = Math.max(1, Math.floor(rowsPerChunk));
  for (let r0 = 0; r0 < rows; r0 += step) {
    const lines: string[] = [];
    const r1 = Math.min(rows, r0 + step);
    for (let r = r0; r < r1; r++) {
      for (let p = indptr[r]!, end = indptr[r + 1]!; p < end; p++) {
        lines.push(`${r + 1} ${indices[p]! + 1} ${formatFloat32(values[p]!)}\n`);
      }
    }
    if (lines.length > 0) yield lines.join('');
  }
}

/**
 * The whole matrix as MatrixMarket text: `%%MatrixMarket matrix coordinate
 * real general`, the size line, then entries row by row, 1-based, values
 * with enough digits to round-trip float32.
 */
export function toMatrixMarket(matrix: Csr): string {
  let out = '';
  for (const chunk of matrixMarketChunks(matrix)) out += chunk;
  return out;
}
