/**
 * Vectorizer options, errors, small worked cases, streaming input, saved
 * vocabularies and the MatrixMarket writer.
 */
import { describe, expect, it } from 'vitest';
import {
  ADAPTIVE_DF_MIN_DOCS,
  DEFAULT_VECTORIZE_OPTIONS,
  adaptiveDocumentFrequency,
  MATRIX_MARKET_HEADER,
  createVocabulary,
  fitTfidf,
  formatFloat32,
  resolveVectorizeOptions,
  smoothIdf,
  toMatrixMarket,
  transformTfidf,
  type VectorizeOptions,
} from '../src/vectorize/index.js';
import { UsageError } from '../src/util/errors.js';
import type { Csr } from '../src/types.js';

function usageError(f: () => unknown): UsageError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(UsageError);
    return e as UsageError;
  }
  throw new Error('expected a UsageError');
}

describe('options', () => {
  it('defaults: a floor that adapts to the pile (minDf auto), no maxDf or maxTerms limit', () => {
    expect(DEFAULT_VECTORIZE_OPTIONS).toEqual({ minDf: 'auto', maxDf: 1, maxTerms: null });
    expect(resolveVectorizeOptions()).toEqual(DEFAULT_VECTORIZE_OPTIONS);
    expect(resolveVectorizeOptions({ minDf: undefined, maxTerms: undefined })).toEqual(DEFAULT_VECTORIZE_OPTIONS);
    expect(resolveVectorizeOptions({ minDf: 0.2, maxDf: 40, maxTerms: 5 })).toEqual({ minDf: 0.2, maxDf: 40, maxTerms: 5 });
  });

  it('minDf auto: from 50 documents on, terms found in one document are left out; below 50, none are', () => {
    expect(ADAPTIVE_DF_MIN_DOCS).toBe(50);
    expect(adaptiveDocumentFrequency(49)).toBe(1);
    expect(adaptiveDocumentFrequency(50)).toBe(2);
    expect(adaptiveDocumentFrequency(1_000_000)).toBe(2);
    // Every document: 'lamp', a word of its own, 'lens' in every other one, 'keeper' in the first two.
    const pile = (n: number): string[][] =>
      Array.from({ length: n }, (_, i) => ['lamp', `only${i}`, ...(i % 2 === 0 ? ['lens'] : []), ...(i < 2 ? ['keeper'] : [])]);
    expect(fitTfidf(pile(50)).vocabulary.terms).toEqual(['keeper', 'lamp', 'lens']);
    expect(fitTfidf(pile(50), { minDf: 1 }).vocabulary.terms).toHaveLength(3 + 50);
    expect(fitTfidf(pile(49)).vocabulary.terms).toHaveLength(3 + 49);
    expect(resolveVectorizeOptions({ minDf: 'auto', maxDf: 0.3 })).toEqual({ minDf: 'auto', maxDf: 0.3, maxTerms: null });
    const e = (() => {
      try {
        fitTfidf(Array.from({ length: 60 }, (_, i) => [`only${i}`]));
      } catch (err) {
        return err as Error;
      }
      throw new Error('expected a UsageError');
    })();
    expect(e.message).toBe('no terms left after pruning (minDf auto (2), maxDf 1, maxTerms none) over 60 documents; lower minDf or raise maxDf');
  });

  it('rejects bad values with exact one-line messages', () => {
    const cases: [unknown, string, string | undefined][] = [
      [{ minDf: -2 }, 'minDf must be a whole number >= 1, a fraction in (0, 1) or auto; got -2', 'minDf'],
      [{ minDf: 0 }, 'minDf must be a whole number >= 1, a fraction in (0, 1) or auto; got 0', 'minDf'],
      [{ minDf: 2.5 }, 'minDf must be a whole number >= 1, a fraction in (0, 1) or auto; got 2.5', 'minDf'],
      [{ minDf: Number.NaN }, 'minDf must be a whole number >= 1, a fraction in (0, 1) or auto; got NaN', 'minDf'],
      [{ minDf: '2' }, 'minDf must be a whole number >= 1, a fraction in (0, 1) or auto; got "2"', 'minDf'],
      [{ maxDf: 0 }, 'maxDf must be a fraction in (0, 1] or a whole number > 1; got 0', 'maxDf'],
      [{ maxDf: 1.5 }, 'maxDf must be a fraction in (0, 1] or a whole number > 1; got 1.5', 'maxDf'],
      [{ maxDf: Number.POSITIVE_INFINITY }, 'maxDf must be a fraction in (0, 1] or a whole number > 1; got Infinity', 'maxDf'],
      [{ maxTerms: 0 }, 'maxTerms must be a whole number >= 1, or null for no limit; got 0', 'maxTerms'],
      [{ maxTerms: 2.5 }, 'maxTerms must be a whole number >= 1, or null for no limit; got 2.5', 'maxTerms'],
      [{ minDf: 5, maxDf: 3 }, 'maxDf must not be below minDf; got maxDf 3 with minDf 5', 'maxDf'],
      [{ minDf: 0.5, maxDf: 0.25 }, 'maxDf must not be below minDf; got maxDf 0.25 with minDf 0.5', 'maxDf'],
      [{ mindf: 2 }, 'unknown vectorize option "mindf"; allowed: minDf, maxDf, maxTerms, idfCounts', 'mindf'],
      [[], 'vectorize options must be an object; got []', undefined],
    ];
    for (const [input, message, option] of cases) {
      const e = usageError(() => resolveVectorizeOptions(input as Partial<VectorizeOptions>));
      expect(e.message).toBe(message);
      expect(e.option).toBe(option);
    }
  });

  it('a share and a count are not compared with each other at resolve time', () => {
    expect(resolveVectorizeOptions({ minDf: 5, maxDf: 0.5 })).toEqual({ minDf: 5, maxDf: 0.5, maxTerms: null });
  });
});

describe('fitTfidf on small cases', () => {
  it('computes 1 + ln tf, smoothed idf and L2 rows; an empty document gives an all-zero row', () => {
    const { vocabulary, matrix } = fitTfidf([['b', 'a', 'a'], ['c', 'b'], []]);
    expect(vocabulary.terms).toEqual(['a', 'b', 'c']);
    expect(Array.from(vocabulary.df)).toEqual([1, 2, 1]);
    const idfA = Math.log(4 / 2) + 1;
    const idfB = Math.log(4 / 3) + 1;
    expect(vocabulary.idf[0]).toBe(idfA);
    expect(vocabulary.idf[1]).toBe(idfB);
    expect(smoothIdf(2, 3)).toBe(idfB);
    expect(Array.from(matrix.indptr)).toEqual([0, 2, 4, 4]);
    expect(Array.from(matrix.indices)).toEqual([0, 1, 1, 2]);
    const a0 = (1 + Math.log(2)) * idfA;
    const b0 = idfB;
    const n0 = Math.hypot(a0, b0);
    const n1 = Math.hypot(idfB, idfA);
    expect(Array.from(matrix.values)).toEqual([a0 / n0, b0 / n0, idfB / n1, idfA / n1].map(Math.fround));
  });

  it('orders columns by code unit whatever order terms first appear in', () => {
    const { vocabulary } = fitTfidf([['zeta', 'Alpha', 'éclair', 'alpha', '\u{1F600}', '\uFF21']]);
    expect(vocabulary.terms).toEqual(['Alpha', 'alpha', 'zeta', 'éclair', '\u{1F600}', '\uFF21']);
  });

  it('terms named like Object.prototype members are ordinary terms', () => {
    const docs = [['constructor', '__proto__', 'toString'], ['__proto__', 'hasOwnProperty'], ['constructor']];
    const { vocabulary, matrix } = fitTfidf(docs);
    expect(vocabulary.terms).toEqual(['__proto__', 'constructor', 'hasOwnProperty', 'toString']);
    expect(vocabulary.index.get('__proto__')).toBe(0);
    expect(Array.from(vocabulary.df)).toEqual([2, 2, 1, 1]);
    expect(matrix.indptr[3]).toBe(6);
    const t = transformTfidf([['toString', 'valueOf', 'constructor']], vocabulary);
    expect(Array.from(t.indices)).toEqual([1, 3]);
  });

  it('prunes by df count and share, and keeps the most frequent terms with ties by term order', () => {
    const docs = [
      ['lamp', 'lens', 'tower', 'tower', 'roof'],
      ['lamp', 'lens', 'gear'],
      ['lamp', 'tower', 'gear', 'slate'],
      ['lamp', 'keeper'],
    ];
    // df: lamp 4, lens 2, tower 2, gear 2, roof 1, slate 1, keeper 1
    expect(fitTfidf(docs, { minDf: 2 }).vocabulary.terms).toEqual(['gear', 'lamp', 'lens', 'tower']);
    expect(fitTfidf(docs, { minDf: 0.5 }).vocabulary.terms).toEqual(['gear', 'lamp', 'lens', 'tower']);
    expect(fitTfidf(docs, { minDf: 0.51 }).vocabulary.terms).toEqual(['lamp']);
    expect(fitTfidf(docs, { maxDf: 0.75 }).vocabulary.terms).toEqual(['gear', 'keeper', 'lens', 'roof', 'slate', 'tower']);
    expect(fitTfidf(docs, { maxDf: 2 }).vocabulary.terms).toEqual(['gear', 'keeper', 'lens', 'roof', 'slate', 'tower']);
    // totals: lamp 4, tower 3, then gear = lens = 2 (tie: gear first), then keeper = roof = slate = 1
    expect(fitTfidf(docs, { maxTerms: 3 }).vocabulary.terms).toEqual(['gear', 'lamp', 'tower']);
    expect(fitTfidf(docs, { maxTerms: 5, maxDf: 0.75 }).vocabulary.terms).toEqual(['gear', 'keeper', 'lens', 'roof', 'tower']);
  });

  it('a share minDf keeps terms in exactly that share (0.1 of 30 documents -> df 3 stays)', () => {
    const docs: string[][] = [];
    for (let i = 0; i < 30; i++) docs.push(i < 3 ? ['rare', 'common'] : ['common']);
    expect(fitTfidf(docs, { minDf: 0.1 }).vocabulary.terms).toEqual(['common', 'rare']);
    expect(fitTfidf(docs, { minDf: 0.11 }).vocabulary.terms).toEqual(['common']);
  });

  it('reads a one-shot generator once', () => {
    let runs = 0;
    function* docs(): Generator<string[]> {
      runs++;
      yield ['lamp', 'lens'];
      yield ['lens'];
    }
    const { vocabulary, matrix } = fitTfidf(docs());
    expect(runs).toBe(1);
    expect(vocabulary.docCount).toBe(2);
    expect(matrix.rows).toBe(2);
    expect(Array.from(matrix.indptr)).toEqual([0, 2, 3]);
  });

  it('explains an empty result, naming the settings', () => {
    const docs: string[][] = [];
    for (let i = 0; i < 12; i++) docs.push([`t${i}`, 'all']);
    const e = usageError(() => fitTfidf(docs, { minDf: 5, maxDf: 0.5 }));
    expect(e.message).toBe(
      'no terms left after pruning (minDf 5, maxDf 0.5, maxTerms none) over 12 documents; lower minDf or raise maxDf',
    );
    expect(e.option).toBe('minDf');
    expect(usageError(() => fitTfidf([])).message).toBe('no documents to vectorize');
    expect(usageError(() => fitTfidf([[], []])).message).toBe(
      'none of the 2 documents has any terms after analysis; nothing to vectorize',
    );
  });
});

describe('transformTfidf', () => {
  it('ignores unknown terms and uses the fitted idf; an all-unknown document is a zero row', () => {
    const { vocabulary } = fitTfidf([['lamp', 'lens'], ['lens', 'roof']]);
    const m = transformTfidf([['lens', 'lens', 'gear'], ['gear'], ['roof', 'lamp']], vocabulary);
    expect(m.rows).toBe(3);
    expect(m.cols).toBe(3);
    expect(Array.from(m.indptr)).toEqual([0, 1, 1, 3]);
    expect(Array.from(m.indices)).toEqual([1, 0, 2]);
    expect(m.values[0]).toBe(1);
    expect(m.values[1]).toBe(Math.fround(Math.SQRT1_2));
  });

  it('accepts an empty stream', () => {
    const { vocabulary } = fitTfidf([['lamp']]);
    const m = transformTfidf([], vocabulary);
    expect([m.rows, m.cols, m.indptr.length, m.indices.length]).toEqual([0, 1, 1, 0]);
  });
});

describe('createVocabulary (rebuilding a saved vocabulary)', () => {
  it('rebuilds index and idf from terms, df and the document count', () => {
    const { vocabulary, matrix } = fitTfidf([['lamp', 'lens'], ['lens', 'roof'], ['lamp']]);
    const again = createVocabulary([...vocabulary.terms], Array.from(vocabulary.df), vocabulary.docCount);
    expect(again.terms).toEqual(vocabulary.terms);
    expect(Array.from(again.idf)).toEqual(Array.from(vocabulary.idf));
    expect([...again.index]).toEqual([...vocabulary.index]);
    const m = transformTfidf([['lamp', 'lens'], ['lens', 'roof'], ['lamp']], again);
    expect(Array.from(m.values)).toEqual(Array.from(matrix.values));
  });

  it('rejects unsorted terms, wrong df and bad counts', () => {
    expect(usageError(() => createVocabulary(['b', 'a'], [1, 1], 2)).message).toBe(
      'vocabulary terms must be unique and in sorted order; "a" at position 2 follows "b"',
    );
    expect(usageError(() => createVocabulary(['a', 'a'], [1, 1], 2)).message).toBe(
      'vocabulary terms must be unique and in sorted order; "a" at position 2 follows "a"',
    );
    expect(usageError(() => createVocabulary(['a'], [3], 2)).message).toBe(
      'document frequency of "a" must be a whole number from 1 to 2; got 3',
    );
    expect(usageError(() => createVocabulary(['a'], [1, 2], 2)).message).toBe('vocabulary has 1 terms but 2 document frequencies');
    expect(usageError(() => createVocabulary(['a'], [1], 0)).message).toBe(
      'vocabulary document count must be a whole number >= 1; got 0',
    );
  });
});

describe('MatrixMarket', () => {
  it('writes the coordinate real general header, the size line and 1-based entries', () => {
    const matrix: Csr = {
      rows: 3,
      cols: 2,
      indptr: Int32Array.from([0, 2, 2, 3]),
      indices: Int32Array.from([0, 1, 1]),
      values: Float32Array.from([Math.SQRT1_2, 0.25, 1]),
    };
    expect(toMatrixMarket(matrix)).toBe(`${MATRIX_MARKET_HEADER}\n3 2 3\n1 1 0.70710677\n1 2 0.25\n3 2 1\n`);
    const { matrix: fitted } = fitTfidf([['a', 'b'], [], ['a', 'b']]);
    expect(toMatrixMarket(fitted)).toBe(`${MATRIX_MARKET_HEADER}\n3 2 4\n1 1 0.70710677\n1 2 0.70710677\n3 1 0.70710677\n3 2 0.70710677\n`);
    expect(MATRIX_MARKET_HEADER).toBe('%%MatrixMarket matrix coordinate real general');
  });

  it('formats float32 values with the fewest digits that read back exactly', () => {
    expect(formatFloat32(Math.fround(0.1))).toBe('0.1');
    expect(formatFloat32(0.5)).toBe('0.5');
    expect(formatFloat32(0)).toBe('0');
    expect(formatFloat32(Math.fround(Math.SQRT1_2))).toBe('0.70710677');
    expect(formatFloat32(Math.fround(1 / 3))).toBe('0.33333334');
    expect(formatFloat32(Math.fround(1e-7))).toBe('1e-7');
    expect(Math.fround(Number(formatFloat32(Math.fround(0.123456789))))).toBe(Math.fround(0.123456789));
  });
});
