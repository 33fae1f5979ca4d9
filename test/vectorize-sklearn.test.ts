/**
 * TF-IDF checked against scikit-learn: test/fixtures/tfidf/fixture.json is
 * written by make_fixture.py (beside it) from the invented corpus in
 * corpus.json with TfidfVectorizer(sublinear_tf=True, smooth_idf=True,
 * norm='l2') under several min_df / max_df / max_features settings.
 * Our values are float32 (rounded once from float64), so entries are
 * compared to 1e-6 absolute; every value is at most 1 in magnitude.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { builtInStopwords, createAnalyzer } from '../src/analyze/index.js';
import { fitTfidf, rowDot, transformTfidf, type VectorizeOptions } from '../src/vectorize/index.js';
import type { Csr } from '../src/types.js';

interface SparseJson {
  rows: number;
  cols: number;
  indptr: number[];
  indices: number[];
  values: number[];
}
interface Variant {
  name: string;
  sklearn: { min_df?: number; max_df?: number; max_features?: number };
  vocabulary: string[];
  idf: number[];
  matrix: SparseJson;
  cosine: number[][];
}
interface Fixture {
  stopwords: string[];
  tokens: string[][];
  variants: Variant[];
  transform: { sklearn: { min_df: number }; fitDocs: number; vocabulary: string[]; idf: number[]; matrix: SparseJson };
}

const dir = new URL('./fixtures/tfidf/', import.meta.url);
const fixture = JSON.parse(readFileSync(new URL('fixture.json', dir), 'utf8')) as Fixture;
const corpus = (JSON.parse(readFileSync(new URL('corpus.json', dir), 'utf8')) as { texts: string[] }).texts;

function ours(s: Variant['sklearn']): Partial<VectorizeOptions> {
  return { minDf: s.min_df ?? 1, maxDf: s.max_df ?? 1, maxTerms: s.max_features ?? null };
}

function expectSameMatrix(got: Csr, want: SparseJson): void {
  expect(got.rows).toBe(want.rows);
  expect(got.cols).toBe(want.cols);
  expect(Array.from(got.indptr)).toEqual(want.indptr);
  expect(Array.from(got.indices)).toEqual(want.indices);
  let worst = 0;
  for (let p = 0; p < want.values.length; p++) worst = Math.max(worst, Math.abs(got.values[p]! - want.values[p]!));
  expect(worst).toBeLessThan(1e-6);
}

describe('scikit-learn TfidfVectorizer reference (fixture from make_fixture.py)', () => {
  it('the fixture used the same English stop-word list as our analyzer', () => {
    expect(fixture.stopwords).toEqual([...builtInStopwords('en')]);
  });

  it("our analyzer (stem off, numbers on, junk kept) gives scikit-learn's tokens for this corpus", () => {
    // junk: false because scikit-learn keeps digit-heavy tokens (`3am`, `1990s`) that sheaf drops by default.
    const a = createAnalyzer({ lang: 'en', stem: false, numbers: true, junk: false });
    expect(corpus.map((t) => a.analyze(t))).toEqual(fixture.tokens);
  });

  for (const v of fixture.variants) {
    describe(v.name, () => {
      const { vocabulary, matrix } = fitTfidf(fixture.tokens, ours(v.sklearn));

      it('vocabulary and idf', () => {
        expect(vocabulary.terms).toEqual(v.vocabulary);
        expect(vocabulary.docCount).toBe(corpus.length);
        expect(vocabulary.idf).toHaveLength(v.idf.length);
        for (let j = 0; j < v.idf.length; j++) expect(Math.abs(vocabulary.idf[j]! - v.idf[j]!)).toBeLessThan(1e-12);
      });

      it('matrix entries', () => expectSameMatrix(matrix, v.matrix));

      it('pairwise cosines', () => {
        let worst = 0;
        for (let i = 0; i < matrix.rows; i++) {
          for (let j = 0; j < matrix.rows; j++) worst = Math.max(worst, Math.abs(rowDot(matrix, i, matrix, j) - v.cosine[i]![j]!));
        }
        expect(worst).toBeLessThan(1e-6);
      });
    });
  }

  it('variants really differ (the pruning settings took effect)', () => {
    const sizes = fixture.variants.map((v) => v.vocabulary.length);
    expect(new Set(sizes).size).toBe(sizes.length);
  });

  it('transform: fit on the first 30 documents, apply to the last 10', () => {
    const t = fixture.transform;
    const { vocabulary } = fitTfidf(fixture.tokens.slice(0, t.fitDocs), { minDf: t.sklearn.min_df });
    expect(vocabulary.terms).toEqual(t.vocabulary);
    for (let j = 0; j < t.idf.length; j++) expect(Math.abs(vocabulary.idf[j]! - t.idf[j]!)).toBeLessThan(1e-12);
    expectSameMatrix(transformTfidf(fixture.tokens.slice(t.fitDocs), vocabulary), t.matrix);
  });
});
