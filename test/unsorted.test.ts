/**
 * The unsorted share, mixed groups and bisecting spherical k-means (Steinbach,
 * Karypis & Kumar 2000): hand cases, properties with fast-check, the demo, and
 * the CLI outputs.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bisectRows, splitGroups } from '../src/cluster/bisect.js';
import { selectRows } from '../src/util/csr.js';
import { sphericalKMeans } from '../src/cluster/kmeans.js';
import { median, mixedGroups, refineGroups, resolveRefineOptions, unsortedRows, unsortedThreshold } from '../src/cluster/unsorted.js';
import { partitionFromAssignments } from '../src/cluster/partition.js';
import { encodeLabels, externalScores } from '../src/evaluate/index.js';
import { groupDocuments } from '../src/pipeline.js';
import { demoDocs } from './helpers/demo.js';
import { csrFromDense } from './helpers/csr.js';

describe('the unsorted threshold', () => {
  it('is median − 2 · 1.4826 · MAD of the grouped rows’ fits (by hand)', () => {
    // Fits 0.1, 0.5, 0.6, 0.7, 0.8: median 0.6, absolute deviations 0.5, 0.1, 0, 0.1, 0.2, MAD 0.1,
    // threshold 0.6 − 2 · 1.4826 · 0.1 = 0.30348. The row in no group (fit 0) does not count.
    const a = Int32Array.from([0, 0, 1, 1, 1, -1]);
    const fit = Float32Array.from([0.1, 0.5, 0.6, 0.7, 0.8, 0]);
    expect(unsortedThreshold(a, fit, 2)).toBeCloseTo(0.30348, 5);
    expect(Array.from(unsortedRows(a, fit, 2, 0.30348))).toEqual([0]);
    expect(median(Float64Array.from([3, 1, 2, 10]))).toBe(2.5);
  });

  it('with more than half the fits equal (MAD 0), uses the mean absolute deviation instead of setting apart every fit below the median', () => {
    // Six exact copies (fit 1) in groups 0 and 1; group 2 has fits 0.95, 0.9, 0.92, 0.3. Median 1, MAD 0 (before: threshold 1,
    // so 0.9 and 0.92 were set apart too). Absolute deviations 0 ×6, .05, .1, .08, .7: mean .093;
    // threshold 1 − 2 · 1.253314 · .093 = 0.76688 (√(π/2) = 1.253314: mean absolute deviation over σ under normality).
    const a = Int32Array.from([0, 0, 0, 1, 1, 1, 2, 2, 2, 2]);
    const fit = Float32Array.from([1, 1, 1, 1, 1, 1, 0.95, 0.9, 0.92, 0.3]);
    const t = unsortedThreshold(a, fit, 2);
    expect(t).toBeCloseTo(0.76688, 5);
    expect(Array.from(unsortedRows(a, fit, 3, t))).toEqual([9]);
  });

  it('never takes a group’s most central member, so no group empties', () => {
    const a = Int32Array.from([0, 0, 1]);
    const fit = Float32Array.from([0.1, 0.2, 0.9]);
    expect(Array.from(unsortedRows(a, fit, 2, 0.5))).toEqual([0]);
  });

  it('rows set apart are exactly the grouped, non-central rows below the threshold (fast-check)', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.integer({ min: -1, max: 3 }), fc.integer({ min: 0, max: 100 })), { minLength: 1, maxLength: 80 }), (pairs) => {
        const a = Int32Array.from(pairs.map((p) => p[0]));
        const fit = Float32Array.from(pairs.map((p) => p[1] / 100));
        const t = unsortedThreshold(a, fit, 2);
        const got = Array.from(unsortedRows(a, fit, 4, t));
        const central = [0, 1, 2, 3].map((g) => [...a.keys()].filter((r) => a[r] === g).sort((x, y) => fit[y] - fit[x] || x - y)[0]);
        const want = [...a.keys()].filter((r) => a[r] >= 0 && fit[r] < t && central[a[r]] !== r);
        expect(got).toEqual(want);
      }),
    );
  });
});

describe('mixed groups', () => {
  it('flags groups of 4+ documents with cohesion below 0.8 × the median cohesion', () => {
    // Median of 0.5, 0.45, 0.3, 0.2, 0.15 is 0.3; 0.8 × 0.3 = 0.24: groups 3 (0.2) and 4 (0.15) are below,
    // but group 3 has 3 documents only.
    const flags = mixedGroups(Float64Array.from([0.5, 0.45, 0.3, 0.2, 0.15]), Int32Array.from([10, 8, 6, 3, 5]), 0.8);
    expect(Array.from(flags)).toEqual([0, 0, 0, 0, 1]);
  });

  it('options are validated with exact messages', () => {
    expect(resolveRefineOptions({})).toEqual({ unsorted: false, spread: 2, mixedRatio: 0.8, splitMixed: false });
    expect(() => resolveRefineOptions({ spread: 0 })).toThrow('spread must be a number above 0 and at most 100; got 0');
    expect(() => resolveRefineOptions({ mixedRatio: 2 })).toThrow('mixedRatio must be a number from 0 to 1; got 2');
    expect(() => resolveRefineOptions({ unsorted: 'yes' as unknown as boolean })).toThrow('unsorted must be true or false; got "yes"');
  });
});

describe('bisecting spherical k-means', () => {
  it('bisectRows equals k-means (k = 2) run on the selected rows alone (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.array(fc.integer({ min: 0, max: 3 }), { minLength: 6, maxLength: 6 }), { minLength: 4, maxLength: 30 }),
        fc.integer({ min: 0, max: 1000 }),
        (dense, seed) => {
          const rows = dense.map((r, i) => (r.some((v) => v > 0) ? r : r.map((_, j) => (j === i % 6 ? 1 : 0))));
          const m = csrFromDense(rows);
          const pick = Int32Array.from([...rows.keys()].filter((i) => i % 3 !== 1));
          if (pick.length < 2) return;
          const sub = csrFromDense(Array.from(pick, (i) => rows[i]));
          const want = sphericalKMeans(sub, { groups: 2, seed, restarts: 2 }).assignments;
          expect(Array.from(bisectRows(m, pick, { seed, restarts: 2 })!)).toEqual(Array.from(want));
          expect(selectRows(m, pick).indptr.length).toBe(pick.length + 1);
        },
      ),
      { numRuns: 50 },
    );
  });

  it('splits a group that holds two planted themes and leaves the others alone (hand case)', () => {
    // Terms 0–1: theme A; 2–3: theme B; 4–5: theme C; 6–7: theme D. Group 0 = A, group 1 = B + C (mixed), group 2 = D.
    const themes = [0, 0, 0, 1, 1, 1, 2, 2, 2, 3, 3, 3];
    const rows = themes.map((t, i) => {
      const r = new Array<number>(8).fill(0);
      r[2 * t] = 1 + (i % 3) / 10;
      r[2 * t + 1] = 1 - (i % 3) / 10;
      return r;
    });
    const m = csrFromDense(rows);
    const a = Int32Array.from([0, 0, 0, 1, 1, 1, 1, 1, 1, 2, 2, 2]);
    const s = splitGroups(m, a, 3, [1], { seed: 1 });
    expect(s.groups).toBe(4);
    const score = externalScores(Int32Array.from(themes), s.assignments);
    expect(score.ari).toBe(1);
    // Through refineGroups: the mixed group is flagged and split; nothing is flagged afterwards.
    const refined = refineGroups(m, partitionFromAssignments(m, a, 3), resolveRefineOptions({ splitMixed: true }), { seed: 1 });
    expect(refined.split).toEqual([1]);
    expect(refined.partition.groups).toBe(4);
    expect(Array.from(refined.mixed)).toEqual([0, 0, 0, 0]);
  });

  it('a group with fewer than two rows with terms is not split', () => {
    const m = csrFromDense([[1, 0], [0, 1], [1, 1]]);
    expect(bisectRows(m, Int32Array.from([2]))).toBeNull();
  });
});

describe('on the demo', () => {
  const docs = demoDocs();
  const nmi = (r: ReturnType<typeof groupDocuments>) => {
    const truth = encodeLabels(r.docs.map((d) => d.fields.get('category') ?? ''));
    return externalScores(truth.codes, r.partition.assignments).nmi;
  };

  it('unsorted documents leave their group, keep their fit, and lie below the threshold', () => {
    const off = groupDocuments(docs, { groups: 8, seed: 1, reduce: false, clean: { mode: 'none' } });
    const on = groupDocuments(docs, { groups: 8, seed: 1, reduce: false, clean: { mode: 'none' }, refine: { unsorted: true } });
    const rows = Array.from(on.unsorted.rows);
    expect(rows.length).toBeGreaterThan(0);
    expect(rows.length).toBeLessThan(docs.length * 0.1);
    for (const r of rows) {
      expect(on.partition.assignments[r]).toBe(-1);
      expect(on.partition.fit[r]).toBe(off.partition.fit[r]);
      expect(on.partition.fit[r]).toBeLessThan(on.unsorted.threshold);
    }
    const sizes = on.groups.reduce((s, g) => s + g.size, 0);
    expect(sizes + rows.length + on.emptyRows.length).toBe(docs.length);
    expect(Number.isNaN(off.unsorted.threshold)).toBe(true);
    expect(off.unsorted.rows.length).toBe(0);
  });

  // Pinned to the TF-IDF rows of the texts as written (reduce: false, no cleaning), where these cases were found. There, no seed from 0 to 11 leaves a mixed group at the planted 8 groups; asked for 6 (two
  // themes must share a group), seed 2 flags one, and splitting it recovers part of the planted structure.
  it('seed 0 at 4 groups flags one mixed group; splitting it raises NMI against the planted themes', () => {
    // Since greedy k-means++ seeding, seeds 0-15 at 6 groups leave no mixed group; at 4, seed 0 does (NMI .658 -> .749).
    const off = groupDocuments(docs, { groups: 4, seed: 0, reduce: false, clean: { mode: 'none' } });
    expect(Array.from(off.mixed).filter((x) => x === 1)).toHaveLength(1);
    const split = groupDocuments(docs, { groups: 4, seed: 0, reduce: false, clean: { mode: 'none' }, refine: { splitMixed: true } });
    expect(split.partition.groups).toBe(5);
    expect(nmi(split)).toBeGreaterThan(nmi(off) + 0.03);
  });
});
