import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Csr } from '../src/types.js';
import { allPairsCosine, duplicateSets } from '../src/duplicates/index.js';

// Fixture: test/fixtures/duplicates/make_fixture.py (run with /usr/bin/python3) writes tfidf.mtx with
// scipy.io.mmwrite (TF-IDF-like float32 rows with planted near-copies) and pairs-sklearn.json with the pairs
// sklearn.metrics.pairwise.cosine_similarity (scikit-learn 1.2.1) finds at or above 0.8 and 0.9.

const dir = new URL('./fixtures/duplicates/', import.meta.url);

/** A minimal MatrixMarket reader: `coordinate real general` only, 1-based entries in any order. */
function readMatrixMarket(text: string): Csr {
  const lines = text.split('\n');
  const header = lines[0]!.trim().toLowerCase().split(/\s+/);
  if (header.join(' ') !== '%%matrixmarket matrix coordinate real general') throw new Error(`unsupported header ${lines[0]}`);
  let k = 1;
  while (lines[k]!.startsWith('%')) k++;
  const [rows, cols, nnz] = lines[k++]!.trim().split(/\s+/).map(Number) as [number, number, number];
  const entries: [number, number, number][] = [];
  for (; k < lines.length; k++) {
    const line = lines[k]!.trim();
    if (line === '' || line.startsWith('%')) continue;
    const [r, c, v] = line.split(/\s+/);
    entries.push([Number(r) - 1, Number(c) - 1, Number.parseFloat(v!)]);
  }
  if (entries.length !== nnz) throw new Error(`expected ${nnz} entries, read ${entries.length}`);
  entries.sort((x, y) => x[0] - y[0] || x[1] - y[1]);
  const indptr = new Int32Array(rows + 1);
  const indices = new Int32Array(nnz);
  const values = new Float32Array(nnz);
  entries.forEach(([r, c, v], e) => {
    indptr[r + 1]!++;
    indices[e] = c;
    values[e] = v;
  });
  for (let r = 0; r < rows; r++) indptr[r + 1] += indptr[r]!;
  return { rows, cols, indptr, indices, values };
}

interface Case {
  threshold: number;
  a: number[];
  b: number[];
  similarity: number[];
}
const fixture = JSON.parse(readFileSync(new URL('pairs-sklearn.json', dir), 'utf8')) as {
  rows: number;
  cols: number;
  nnz: number;
  cases: Case[];
};
const matrix = readMatrixMarket(readFileSync(new URL('tfidf.mtx', dir), 'utf8'));

describe('allPairsCosine against scikit-learn cosine_similarity', () => {
  it('reads the committed MatrixMarket file', () => {
    expect([matrix.rows, matrix.cols, matrix.indptr[matrix.rows]]).toEqual([fixture.rows, fixture.cols, fixture.nnz]);
  });

  for (const c of fixture.cases) {
    it(`finds the same ${c.a.length} pairs and similarities at t = ${c.threshold}`, () => {
      const got = allPairsCosine(matrix, c.threshold);
      expect(Array.from(got.a)).toEqual(c.a);
      expect(Array.from(got.b)).toEqual(c.b);
      for (let k = 0; k < c.similarity.length; k++) {
        expect(Math.abs(got.similarity[k]! - c.similarity[k]!)).toBeLessThanOrEqual(1e-6);
      }
    });
  }

  it('groups the planted copies into sets whose members all pair at 0.9 with someone', () => {
    const c = fixture.cases.find((x) => x.threshold === 0.9)!;
    const { sets, setOf } = duplicateSets(matrix, allPairsCosine(matrix, 0.9));
    const inPair = new Set([...c.a, ...c.b]);
    for (let i = 0; i < matrix.rows; i++) expect(setOf[i]! >= 0).toBe(inPair.has(i));
    expect(sets.reduce((s, x) => s + x.pairs, 0)).toBe(c.a.length);
  });
});
