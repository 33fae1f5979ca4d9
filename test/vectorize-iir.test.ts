/**
 * The weighting arithmetic on the worked example of Manning, Raghavan &
 * Schütze, *Introduction to Information Retrieval* (Cambridge University
 * Press, 2008), §6.3 "The vector space model for scoring": term counts of
 * four terms in three novels, weighted 1 + log10 tf (no idf), length
 * normalised, then compared by cosine. All values below are the book's,
 * recalled from memory (the book prints three decimals for the vectors and
 * two for the cosines).
 */
import { describe, expect, it } from 'vitest';
import { weightRow } from '../src/vectorize/index.js';

//                 affection jealous gossip wuthering
const SaS = [115, 10, 2, 0]; // Sense and Sensibility
const PaP = [58, 7, 0, 0]; // Pride and Prejudice
const WH = [20, 11, 6, 38]; // Wuthering Heights

const dot = (a: ArrayLike<number>, b: ArrayLike<number>): number => {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i]! * b[i]!;
  return s;
};

function expectRounded(got: Float64Array, book: number[], places: number): void {
  expect(Array.from(got, (x) => Number(x.toFixed(places)))).toEqual(book);
}

describe('IIR 2008 §6.3: three novels, log-frequency weighting and cosine normalisation', () => {
  const sas = weightRow(SaS, null, 10);
  const pap = weightRow(PaP, null, 10);
  const wh = weightRow(WH, null, 10);

  it('length-normalised vectors match the book to three decimals', () => {
    expectRounded(sas, [0.789, 0.515, 0.335, 0], 3);
    expectRounded(pap, [0.832, 0.555, 0, 0], 3);
    expectRounded(wh, [0.524, 0.465, 0.405, 0.588], 3);
  });

  it('cosines: SaS-PaP 0.94, SaS-WH 0.79, PaP-WH 0.69', () => {
    expect(dot(sas, pap).toFixed(2)).toBe('0.94');
    expect(dot(sas, wh).toFixed(2)).toBe('0.79');
    expect(dot(pap, wh).toFixed(2)).toBe('0.69');
  });

  it('rows are unit length; the natural-log weighting the vectorizer uses differs from the log10 one', () => {
    for (const r of [sas, pap, wh]) expect(Math.abs(dot(r, r) - 1)).toBeLessThan(1e-12);
    const sasE = weightRow(SaS);
    expect(Math.abs(sasE[0]! - sas[0]!)).toBeGreaterThan(0.01);
  });

  it('an idf factor multiplies before normalising; an all-zero row stays zero', () => {
    const w = weightRow([1, 1], [1, 3]);
    expect(w[0]).toBeCloseTo(1 / Math.sqrt(10), 15);
    expect(w[1]).toBeCloseTo(3 / Math.sqrt(10), 15);
    expect(Array.from(weightRow([0, 0, 0]))).toEqual([0, 0, 0]);
  });

  it('rejects mismatched idf and a base that is not > 1', () => {
    expect(() => weightRow([1, 2], [1])).toThrow('idf has 1 entries but counts has 2');
    expect(() => weightRow([1], null, 1)).toThrow('base must be a finite number > 1; got 1');
  });
});
