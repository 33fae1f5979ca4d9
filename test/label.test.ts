import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { exemplarRows, labelGroups, mutualInformation, resolveLabelOptions } from '../src/label/index.js';
import { csrFromDense } from './helpers/csr.js';

describe('mutualInformation', () => {
  it('matches the worked example of IIR §13.5.1 (class poultry, term export, Reuters-RCV1)', () => {
    // Manning, Raghavan & Schütze, Introduction to Information Retrieval (2008), §13.5.1, Example 13.3:
    // N11 = 49, N10 = 27,652, N01 = 141, N00 = 774,106 gives I(U;C) ≈ 0.0001105 (values from memory).
    expect(mutualInformation(49, 27652, 141, 774106)).toBeCloseTo(0.0001105, 6);
  });

  it('is zero for independent variables and one bit for a perfect binary split', () => {
    expect(mutualInformation(10, 10, 10, 10)).toBeCloseTo(0, 12);
    expect(mutualInformation(5, 0, 0, 5)).toBeCloseTo(1, 12);
    expect(mutualInformation(0, 0, 0, 0)).toBe(0);
  });
});

describe('labelGroups', () => {
  // Terms: 0 shared, 1 refund, 2 invoice, 3 engine, 4 fuel.
  const terms = ['shared', 'refund', 'invoice', 'engine', 'fuel'];
  const m = csrFromDense([
    [3, 2, 1, 0, 0],
    [3, 1, 2, 0, 0],
    [3, 2, 2, 0, 0],
    [3, 0, 0, 2, 1],
    [3, 0, 0, 1, 2],
    [0, 0, 0, 0, 0],
  ]);
  const assignments = Int32Array.from([0, 0, 0, 1, 1, -1]);
  const centroids = new Float32Array(5 * 2);
  for (let g = 0; g < 2; g++) {
    const sum = new Float64Array(5);
    for (let r = 0; r < m.rows; r++) {
      if (assignments[r] !== g) continue;
      for (let p = m.indptr[r]; p < m.indptr[r + 1]; p++) sum[m.indices[p]] += m.values[p];
    }
    const norm = Math.hypot(...sum);
    for (let t = 0; t < 5; t++) centroids[t * 2 + g] = sum[t] / norm;
  }
  const fit = new Float32Array(m.rows);
  for (let r = 0; r < m.rows; r++) {
    const g = assignments[r];
    if (g < 0) continue;
    for (let p = m.indptr[r]; p < m.indptr[r + 1]; p++) fit[r] += m.values[p] * centroids[m.indices[p] * 2 + g];
  }

  it('names groups by distinctive centroid terms, never by a term every document has', () => {
    const labels = labelGroups({ matrix: m, assignments, fit, groups: 2, centroids, terms }, { nameTerms: 2, terms: 4 });
    expect(labels.map((l) => l.size)).toEqual([3, 2]);
    expect(labels[0].label).toBe('refund · invoice');
    expect(labels[1].label).toMatch(/^(engine · fuel|fuel · engine)$/);
    // "shared" is in every grouped document: no information, weight 0, ranked last.
    expect(labels[0].terms.at(-1)?.term).toBe('shared');
    expect(labels[0].terms.at(-1)?.weight).toBe(0);
    expect(labels[0].terms[0].inGroup).toBe(1);
    expect(labels[0].terms[0].outside).toBe(0);
  });

  it('reports cohesion as the mean fit and exemplars by fit when diversity is off', () => {
    // λ = 1 and a near-copy threshold of 1 turn maximal marginal relevance into the closest-first rule.
    const labels = labelGroups({ matrix: m, assignments, fit, groups: 2, centroids, terms }, { exemplarRelevance: 1, nearCopy: 1 });
    expect(labels[0].cohesion).toBeCloseTo((fit[0] + fit[1] + fit[2]) / 3, 6);
    const order = [0, 1, 2].sort((a, b) => fit[b] - fit[a] || a - b);
    expect(labels[0].exemplars).toEqual(order);
  });

  it('by default leaves out exemplars that are near-copies of one already taken', () => {
    const labels = labelGroups({ matrix: m, assignments, fit, groups: 2, centroids, terms });
    const order = [0, 1, 2].sort((a, b) => fit[b] - fit[a] || a - b);
    expect(labels[0].exemplars[0]).toBe(order[0]);
    for (const r of labels[0].exemplars.slice(1)) {
      let dot = 0;
      for (let p = m.indptr[r]; p < m.indptr[r + 1]; p++)
        for (let q = m.indptr[order[0]]; q < m.indptr[order[0] + 1]; q++) if (m.indices[p] === m.indices[q]) dot += m.values[p] * m.values[q];
      expect(dot).toBeLessThan(0.9);
    }
  });

  it('treats terms such as __proto__ and constructor as ordinary words', () => {
    const odd = ['__proto__', 'constructor', 'toString', 'valueOf', 'hasOwnProperty'];
    const labels = labelGroups({ matrix: m, assignments, fit, groups: 2, centroids, terms: odd }, { nameTerms: 1 });
    expect(labels[0].label).toBe('constructor');
  });
});

describe('exemplarRows', () => {
  it('equals a sort-based reference on random fits', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: -1, max: 3 }), fc.integer({ min: 0, max: 20 })), { maxLength: 60 }),
        fc.integer({ min: 1, max: 5 }),
        (pairs, count) => {
          const assignments = Int32Array.from(pairs.map((p) => p[0]));
          const fit = Float32Array.from(pairs.map((p) => p[1] / 20));
          const got = exemplarRows(assignments, fit, 4, count);
          for (let g = 0; g < 4; g++) {
            const want = [...assignments.keys()]
              .filter((r) => assignments[r] === g)
              .sort((a, b) => fit[b] - fit[a] || a - b)
              .slice(0, count);
            expect(got[g]).toEqual(want);
          }
        },
      ),
    );
  });
});

describe('resolveLabelOptions', () => {
  it('names the bad value', () => {
    expect(() => resolveLabelOptions({ terms: 0 })).toThrow('terms must be a whole number from 1 to 1000; got 0');
    expect(() => resolveLabelOptions({ terms: 2, nameTerms: 3 })).toThrow('nameTerms must not exceed terms (2); got 3');
  });
});
