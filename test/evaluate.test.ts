import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  adjustedRand,
  contingency,
  encodeLabels,
  externalScores,
  nmi,
  purity,
  randIndex,
  vMeasure,
} from '../src/evaluate/index.js';

/** Expands per-group class counts into parallel truth/predicted code arrays. */
function fromTable(table: number[][]): { truth: Int32Array; predicted: Int32Array } {
  const truth: number[] = [];
  const predicted: number[] = [];
  table.forEach((classCounts, group) => {
    classCounts.forEach((count, cls) => {
      for (let i = 0; i < count; i++) {
        truth.push(cls);
        predicted.push(group);
      }
    });
  });
  return { truth: Int32Array.from(truth), predicted: Int32Array.from(predicted) };
}

describe('encodeLabels', () => {
  it('codes labels by their sorted position, independent of input order', () => {
    const { codes, names } = encodeLabels(['spam', 'ham', 'spam', 'hard', 'ham']);
    expect(names).toEqual(['ham', 'hard', 'spam']);
    expect([...codes]).toEqual([2, 0, 2, 1, 0]);
    const again = encodeLabels(['hard', 'ham', 'spam']);
    expect(again.names).toEqual(names);
  });

  it('treats labels such as __proto__ and constructor as ordinary strings', () => {
    const { codes, names } = encodeLabels(['constructor', '__proto__', 'constructor']);
    expect(names).toEqual(['__proto__', 'constructor']);
    expect([...codes]).toEqual([1, 0, 1]);
  });

  it('handles no labels', () => {
    const { codes, names } = encodeLabels([]);
    expect(codes.length).toBe(0);
    expect(names).toEqual([]);
  });
});

describe('contingency', () => {
  it('counts truth-major and leaves out negative codes', () => {
    const c = contingency(Int32Array.from([0, 0, 1, 2, -1, 1]), Int32Array.from([1, 1, 0, 1, 0, -1]));
    expect(c.rows).toBe(3);
    expect(c.cols).toBe(2);
    expect(c.n).toBe(4);
    expect([...c.counts]).toEqual([0, 2, 1, 0, 0, 1]);
    expect([...c.rowTotals]).toEqual([2, 1, 1]);
    expect([...c.colTotals]).toEqual([1, 3]);
  });

  it('rejects labelings of different lengths', () => {
    expect(() => contingency(new Int32Array(3), new Int32Array(2))).toThrow(
      'truth and predicted labelings differ in length: 3 vs 2',
    );
  });
});

// Manning, Raghavan & Schütze, Introduction to Information Retrieval (2008), §16.3,
// Figure 16.4 and the text after it: 17 points in three clusters with class counts
// x/o/◇ = (5,1,0), (1,4,1), (2,0,3). The book gives purity ≈ 0.71, NMI ≈ 0.36,
// TP = 20, FP = 20, FN = 24, TN = 72 and RI ≈ 0.68 (values from memory).
describe('IIR §16.3 worked example', () => {
  const { truth, predicted } = fromTable([
    [5, 1, 0],
    [1, 4, 1],
    [2, 0, 3],
  ]);
  const c = contingency(truth, predicted);

  it('has 17 points', () => {
    expect(c.n).toBe(17);
  });

  it('purity is 12/17 ≈ 0.71', () => {
    expect(purity(c)).toBe(12 / 17);
    expect(purity(c)).toBeCloseTo(0.71, 2);
  });

  it('NMI ≈ 0.36', () => {
    expect(nmi(c)).toBeCloseTo(0.36, 2);
  });

  it('Rand index is (TP + TN) / C(17,2) = (20 + 72) / 136 ≈ 0.68', () => {
    expect(randIndex(c)).toBe(92 / 136);
    expect(randIndex(c)).toBeCloseTo(0.68, 2);
  });

  it('ARI follows from the same pair counts (Hubert & Arabie 1985 formula)', () => {
    // pairs: together 20, same group 40, same class 44, all 136
    const expected = 40 * 44 / 136;
    expect(adjustedRand(c)).toBeCloseTo((20 - expected) / ((40 + 44) / 2 - expected), 15);
  });
});

describe('edge cases (documented conventions, as scikit-learn)', () => {
  it('n = 0: every score is 1', () => {
    const s = externalScores(new Int32Array(0), new Int32Array(0));
    expect(s.contingency.n).toBe(0);
    expect([s.purity, s.nmi, s.ari, s.randIndex, s.homogeneity, s.completeness, s.vMeasure]).toEqual([
      1, 1, 1, 1, 1, 1, 1,
    ]);
  });

  it('n = 0 after leaving out negative codes: every score is 1', () => {
    const s = externalScores(Int32Array.from([-1, 0]), Int32Array.from([3, -1]));
    expect(s.contingency.n).toBe(0);
    expect([s.purity, s.nmi, s.ari, s.randIndex, s.vMeasure]).toEqual([1, 1, 1, 1, 1]);
  });

  it('prediction a single group: NMI 0, ARI 0, homogeneity 0, completeness 1, purity = majority share', () => {
    const s = externalScores(Int32Array.from([0, 1, 1, 2, 1]), new Int32Array(5));
    expect(s.purity).toBe(3 / 5);
    expect(s.nmi).toBe(0);
    expect(s.ari).toBe(0);
    expect(s.homogeneity).toBe(0);
    expect(s.completeness).toBe(1);
    expect(s.vMeasure).toBe(0);
    // agreeing pairs are the pairs of one class: C(3,2) = 3 of C(5,2) = 10
    expect(s.randIndex).toBe(3 / 10);
  });

  it('both a single group: every score is 1', () => {
    const s = externalScores(Int32Array.from([4, 4, 4]), Int32Array.from([0, 0, 0]));
    expect([s.purity, s.nmi, s.ari, s.randIndex, s.homogeneity, s.completeness, s.vMeasure]).toEqual([
      1, 1, 1, 1, 1, 1, 1,
    ]);
  });

  it('prediction all singletons: purity 1, homogeneity 1, ARI 0, NMI = H(C) / ((H(C) + ln n) / 2)', () => {
    const truth = Int32Array.from([0, 0, 1, 1]);
    const s = externalScores(truth, Int32Array.from([0, 1, 2, 3]));
    expect(s.purity).toBe(1);
    expect(s.homogeneity).toBeCloseTo(1, 15);
    expect(s.ari).toBe(0);
    const hc = Math.log(2);
    expect(s.nmi).toBeCloseTo(hc / ((hc + Math.log(4)) / 2), 15);
    expect(s.completeness).toBeCloseTo(hc / Math.log(4), 15);
    // agreeing pairs: the 4 cross-class pairs apart in both, of 6
    expect(s.randIndex).toBe(4 / 6);
  });

  it('both all singletons: every score is 1', () => {
    const s = externalScores(Int32Array.from([3, 2, 1, 0]), Int32Array.from([0, 1, 2, 3]));
    expect(s.purity).toBe(1);
    expect(s.nmi).toBeCloseTo(1, 15);
    expect(s.ari).toBe(1);
    expect(s.randIndex).toBe(1);
    expect(s.vMeasure).toBeCloseTo(1, 15);
  });

  it('a single item: every score is 1', () => {
    const s = externalScores(Int32Array.from([0]), Int32Array.from([0]));
    expect([s.purity, s.nmi, s.ari, s.randIndex, s.vMeasure]).toEqual([1, 1, 1, 1, 1]);
  });
});

describe('properties on random labelings', () => {
  const labeling = fc
    .integer({ min: 1, max: 60 })
    .chain((n) =>
      fc.tuple(
        fc.array(fc.integer({ min: 0, max: 6 }), { minLength: n, maxLength: n }),
        fc.array(fc.integer({ min: 0, max: 6 }), { minLength: n, maxLength: n }),
      ),
    );

  it('are invariant under renaming codes and symmetric where they should be', () => {
    fc.assert(
      fc.property(labeling, ([t, p]) => {
        const truth = Int32Array.from(t);
        const predicted = Int32Array.from(p);
        const renamed = predicted.map((x) => 6 - x);
        const a = externalScores(truth, predicted);
        const b = externalScores(truth, renamed);
        const swapped = externalScores(predicted, truth);
        expect(b.nmi).toBeCloseTo(a.nmi, 12);
        expect(b.ari).toBeCloseTo(a.ari, 12);
        expect(b.purity).toBe(a.purity);
        expect(swapped.nmi).toBeCloseTo(a.nmi, 12);
        expect(swapped.ari).toBeCloseTo(a.ari, 12);
        expect(swapped.randIndex).toBeCloseTo(a.randIndex, 12);
        expect(swapped.homogeneity).toBeCloseTo(a.completeness, 12);
        for (const v of [a.purity, a.nmi, a.randIndex, a.homogeneity, a.completeness, a.vMeasure]) {
          expect(v).toBeGreaterThanOrEqual(0);
          expect(v).toBeLessThanOrEqual(1 + 1e-12);
        }
        expect(a.ari).toBeLessThanOrEqual(1 + 1e-12);
      }),
      { seed: 7, numRuns: 300 },
    );
  });

  it('Rand index and ARI equal brute-force counts over all item pairs', () => {
    fc.assert(
      fc.property(labeling, ([t, p]) => {
        const n = t.length;
        let tp = 0;
        let fp = 0;
        let fn = 0;
        let tn = 0;
        for (let i = 0; i < n; i++) {
          for (let j = i + 1; j < n; j++) {
            const sameClass = t[i] === t[j];
            const sameGroup = p[i] === p[j];
            if (sameClass && sameGroup) tp++;
            else if (sameGroup) fp++;
            else if (sameClass) fn++;
            else tn++;
          }
        }
        const c = contingency(Int32Array.from(t), Int32Array.from(p));
        const all = tp + fp + fn + tn;
        expect(randIndex(c)).toBeCloseTo(all === 0 ? 1 : (tp + tn) / all, 14);
        // ARI in pair-count form (as in scikit-learn's adjusted_rand_score)
        const ari = fn === 0 && fp === 0 ? 1 : (2 * (tp * tn - fn * fp)) / ((tp + fn) * (fn + tn) + (tp + fp) * (fp + tn));
        expect(adjustedRand(c)).toBeCloseTo(ari, 12);
        // purity: for each predicted group, its most common class
        let majority = 0;
        for (const g of new Set(p)) {
          const counts = new Map<number, number>();
          t.forEach((cls, i) => {
            if (p[i] === g) counts.set(cls, (counts.get(cls) ?? 0) + 1);
          });
          majority += Math.max(...counts.values());
        }
        expect(purity(c)).toBe(majority / n);
      }),
      { seed: 3, numRuns: 300 },
    );
  });

  it('V-measure with beta = 1 equals arithmetic NMI', () => {
    fc.assert(
      fc.property(labeling, ([t, p]) => {
        const c = contingency(Int32Array.from(t), Int32Array.from(p));
        const v = vMeasure(c).vMeasure;
        const m = nmi(c);
        // they differ only in the degenerate case of one side single-group
        // (NMI 0; V-measure 0 too, as homogeneity or completeness is 0)
        expect(v).toBeCloseTo(m, 12);
      }),
      { seed: 11, numRuns: 300 },
    );
  });
});
