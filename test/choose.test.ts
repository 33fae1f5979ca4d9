/**
 * Choosing the number of groups: Kneedle against the paper's worked curve and
 * hand-derived curves, properties with fast-check, the objective of a tree's
 * cuts against a naive reference, the edge warnings, and the demo.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import fc from 'fast-check';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { chooseCut, kneedle, objectiveForCuts, sphericalObjective, type CutScore } from '../src/cluster/choose.js';
import { cutToGroups, groupAverageLink } from '../src/cluster/tree.js';
import { sphericalKMeans } from '../src/cluster/kmeans.js';
import { groupDocuments } from '../src/pipeline.js';
import { encodeLabels, externalScores } from '../src/evaluate/index.js';
import type { Csr, Doc } from '../src/types.js';

function randomCsr(rows: number, cols: number, seed: number, density = 0.3): Csr {
  let s = seed >>> 0;
  const rnd = () => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32;
  const indptr = new Int32Array(rows + 1);
  const indices: number[] = [];
  const values: number[] = [];
  for (let r = 0; r < rows; r++) {
    const row: [number, number][] = [];
    for (let c = 0; c < cols; c++) if (rnd() < density) row.push([c, rnd() + 0.01]);
    if (row.length === 0) row.push([r % cols, 1]);
    const norm = Math.hypot(...row.map((x) => x[1]));
    for (const [c, v] of row) {
      indices.push(c);
      values.push(v / norm);
    }
    indptr[r + 1] = indices.length;
  }
  return { rows, cols, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) };
}

describe('kneedle', () => {
  it('finds the knee of the paper’s worked curve y = −1/(x + 0.1) + 5 at x = 0.22', () => {
    // Satopaa, Albrecht, Irwin & Raghavan 2011, "Finding a 'Kneedle' in a Haystack", ICDCS Workshops,
    // §III and its Figure 2 (10 evenly spaced x in [0, 1]); the knee 0.22 is the value the kneed package's
    // test_figure2 ("from the kneedle manuscript") asserts (recalled from memory). By hand: y spans
    // −5 … 4.0909 (9.0909); the difference y_n − x_n is 0.4678 at x = 1/9, 0.5364 at 2/9, 0.5128 at 3/9;
    // the threshold 0.5364 − 1/9 = 0.4253 is crossed at the last point (0), so x = 2/9 is a knee.
    const x = Array.from({ length: 10 }, (_, i) => i / 9);
    const y = x.map((v) => -1 / (v + 0.1) + 5);
    const k = kneedle(x, y);
    expect(k.index).toBe(2);
    expect(k.detected).toBe(true);
    expect(x[k.index]).toBeCloseTo(0.22, 2);
    expect(k.difference[1]).toBeCloseTo(0.4678, 4);
    expect(k.difference[2]).toBeCloseTo(0.5364, 4);
    expect(k.difference[3]).toBeCloseTo(0.5128, 4);
    expect(k.difference[0]).toBe(0);
    expect(k.difference[9]).toBeCloseTo(0, 12);
  });

  it('a hand-derived four-point curve: knee at the second point', () => {
    // x_n = 0, 1/3, 2/3, 1; y_n = 0, .8, .9, 1; difference 0, .4667, .2333, 0; threshold .4667 − 1/3 = .1333,
    // passed at the last point.
    const k = kneedle([0, 1, 2, 3], [0, 0.8, 0.9, 1]);
    expect(k.index).toBe(1);
    expect(k.detected).toBe(true);
    expect(Array.from(k.difference, (v) => Math.round(v * 1e4) / 1e4)).toEqual([0, 0.4667, 0.2333, 0]);
  });

  it('a sensitivity so high that no local maximum passes: the highest difference, not detected', () => {
    const k = kneedle([0, 1, 2, 3], [0, 0.8, 0.9, 1], 2);
    expect(k.index).toBe(1);
    expect(k.detected).toBe(false);
  });

  it('a straight line or a flat curve has no knee; fewer than three points neither', () => {
    expect(kneedle([1, 2, 3, 4], [2, 4, 6, 8]).index).toBe(-1);
    expect(kneedle([1, 2, 3, 4], [5, 5, 5, 5]).index).toBe(-1);
    expect(kneedle([1, 2], [0, 1]).index).toBe(-1);
  });

  it('rejects x that does not increase, and lengths that differ', () => {
    expect(() => kneedle([1, 1, 2], [0, 1, 2])).toThrow('kneedle: x must be strictly increasing');
    expect(() => kneedle([1, 2, 3], [0, 1])).toThrow('kneedle: x has 3 values, y has 2');
  });

  const concave = fc
    .array(fc.double({ min: 0.01, max: 10, noNaN: true }), { minLength: 2, maxLength: 40 })
    .map((steps) => {
      // Increments sorted descending: a strictly increasing, concave curve.
      const inc = [...steps].sort((a, b) => b - a);
      const y = [0];
      for (const d of inc) y.push(y[y.length - 1] + d);
      return y;
    });

  it('on a concave increasing curve the knee is the highest point of the difference curve (fast-check)', () => {
    fc.assert(
      fc.property(concave, (y) => {
        const x = y.map((_, i) => i + 2);
        const k = kneedle(x, y);
        let arg = -1;
        for (let i = 1; i < y.length - 1; i++) if (arg < 0 || k.difference[i] > k.difference[arg]) arg = i;
        if (arg < 0 || !(k.difference[arg] > 1e-12)) return k.index === -1 || k.difference[k.index] === k.difference[arg];
        return k.difference[k.index] === k.difference[arg] && k.index > 0 && k.index < y.length - 1;
      }),
    );
  });

  /** True when the inner difference values and their thresholds are all at least 1e-9 apart. */
  function wellSeparated(d: Float64Array): boolean {
    const step = 1 / (d.length - 1);
    const inner = Array.from(d.subarray(1, d.length - 1));
    const vals = [...inner, ...inner.map((v) => v - step), 0].sort((p, q) => p - q);
    for (let i = 1; i < vals.length; i++) if (vals[i]! - vals[i - 1]! < 1e-9) return false;
    return true;
  }

  it('does not change when y is scaled and shifted or x is shifted (fast-check)', () => {
    fc.assert(
      fc.property(concave, fc.double({ min: 0.5, max: 100, noNaN: true }), fc.double({ min: -100, max: 100, noNaN: true }), fc.integer({ min: 0, max: 50 }), (y, a, b, dx) => {
        const x = y.map((_, i) => i);
        const k1 = kneedle(x, y);
        // Only curves whose decision is well conditioned: every difference value and every threshold (value − one
        // mean step) at least 1e-9 from every other. On a nearly straight curve the differences are rounding noise
        // (fast-check found [0, 9.999999999999956, 19.999999999999872]), and scaling y may reorder them.
        fc.pre(wellSeparated(k1.difference));
        const k2 = kneedle(
          x.map((v) => v + dx),
          y.map((v) => a * v + b),
        );
        return k1.index === k2.index && k1.detected === k2.detected;
      }),
    );
  });
});

describe('objective of the cuts of a tree', () => {
  it('the Gram path equals summing each cut’s rows (naive reference), never falls as cuts get finer, and scores cuts already made alike (fast-check)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e6 }), fc.integer({ min: 6, max: 30 }), (seed, rows) => {
        const m = randomCsr(rows, 12, seed);
        const leaves = Math.min(rows, 6);
        const km = sphericalKMeans(m, { groups: leaves, seed, restarts: 1 });
        const tree = groupAverageLink(m, km.assignments, leaves);
        const cuts = Array.from({ length: leaves - 1 }, (_, i) => i + 2);
        const gram = objectiveForCuts(m, km.assignments, tree, cuts);
        const direct = objectiveForCuts(m, km.assignments, tree, cuts, 0);
        // The cuts made by the caller (chooseFromTree passes those the silhouette made): the same values on both paths.
        const made = cuts.map((c) => cutToGroups(tree, c));
        const gramMade = objectiveForCuts(m, km.assignments, tree, cuts, undefined, made);
        const directMade = objectiveForCuts(m, km.assignments, tree, cuts, 0, made);
        if (gramMade.some((v, c) => v !== gram[c]) || directMade.some((v, c) => v !== direct[c])) return false;
        for (let c = 0; c < cuts.length; c++) {
          const cluster = cutToGroups(tree, cuts[c]);
          const naive = sphericalObjective(m, km.assignments.map((g) => (g < 0 ? -1 : cluster[g])), cuts[c]);
          if (Math.abs(gram[c] - naive) > 1e-6 * Math.max(1, naive)) return false;
          if (Math.abs(direct[c] - naive) > 1e-9 * Math.max(1, naive)) return false;
          if (c > 0 && gram[c] < gram[c - 1] - 1e-9) return false;
        }
        return true;
      }),
      { numRuns: 40 },
    );
  });

  it('equals k-means’ own objective when every row is its own leaf', () => {
    const m = randomCsr(10, 8, 7);
    const km = sphericalKMeans(m, { groups: 3, seed: 1, restarts: 1 });
    expect(sphericalObjective(m, km.assignments, 3)).toBeCloseTo(km.objective, 5);
  });
});

describe('chooseCut: the choice and its warnings', () => {
  const table = (objective: number[], from = 2): CutScore[] =>
    objective.map((o, i) => ({ groups: from + i, objective: o, knee: 0, silhouette: 0.1 + i / 100 }));

  it('a knee in the middle: no warning', () => {
    const c = chooseCut(table([10, 20, 28, 30, 31, 32, 33]), [2, 8]);
    expect(c).toEqual({ chosen: 4, rule: 'knee', warnings: [] });
  });

  it('a knee at the top of the range says so and suggests a wider range', () => {
    // Convex at first, bending only at the end: the highest difference is the last point Kneedle can return.
    const c = chooseCut(table([0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 30, 31]), [2, 20]);
    expect(c.chosen).toBe(19);
    expect(c.warnings).toEqual([
      'no clear knee in the objective curve over 2..20; took the point farthest above the straight line',
      'the choice sits at the top of the range 2..20; try --range 2..40',
    ]);
  });

  it('a knee at the bottom of a range that starts above 2 says so', () => {
    const c = chooseCut(table([0, 10, 10.5, 11, 11.5, 12], 5), [5, 10]);
    expect(c.chosen).toBe(6);
    expect(c.warnings).toEqual(['the choice sits at the bottom of the range 5..10; try --range 2..10']);
  });

  it('a straight objective has no knee: the middle, with a warning', () => {
    const c = chooseCut(table([1, 2, 3, 4, 5]), [2, 6]);
    expect(c.chosen).toBe(4);
    expect(c.rule).toBe('knee-fallback');
    expect(c.warnings).toEqual(['the objective curve over 2..6 has no knee; took the middle of the range; try another --range']);
  });

  it('fewer than three cuts: the best silhouette, with a warning', () => {
    const c = chooseCut(table([1, 2]), [2, 3]);
    expect(c).toEqual({
      chosen: 3,
      rule: 'silhouette',
      warnings: ['the range 2..3 holds fewer than three numbers of groups, too few for a knee; chose by silhouette; try --range 2..6'],
    });
  });

  it('fewer than three cuts because the tree has few leaves: the warning names the cap, not a wider range', () => {
    // Range 2..20 over a tree of 3 leaves: only cuts 2 and 3 exist; a wider --range would not help.
    const c = chooseCut(table([1, 2]), [2, 20]);
    expect(c).toEqual({
      chosen: 3,
      rule: 'silhouette',
      warnings: ['only 2..3 groups can be tried (the tree has only 3 leaves), too few for a knee; chose by silhouette'],
    });
  });

  it('cuts capped by the leaves of the tree: the warning names the cap', () => {
    // Difference curve 0, −.1, −.2, −.3, .1, 0: the highest point is groups 6, the last Kneedle can return.
    const c = chooseCut(table([0, 1, 2, 3, 9, 10]), [2, 20]);
    expect(c.chosen).toBe(6);
    expect(c.warnings).toEqual([
      'no clear knee in the objective curve over 2..7; took the point farthest above the straight line',
      'the choice sits at the top of the cuts available (2..7: the tree has only 7 leaves)',
    ]);
  });
});

describe('--groups auto on the demo', () => {
  const root = path.resolve(__dirname, '..');
  const rows = parse(readFileSync(path.join(root, 'corpus-demo', 'tickets.csv')), { columns: true }) as Record<string, string>[];
  const demo: Doc[] = rows.map((r) => ({ id: r.ticket_id, source: 'tickets.csv', title: r.subject, text: `${r.subject}\n\n${r.body}`, fields: new Map([['category', r.category]]) }));

  it('picks 6 to 10 groups (8 planted themes) for seeds 1..5, away from the edges of 2..20, without warnings', () => {
    const picked: number[] = [];
    for (let seed = 1; seed <= 5; seed++) {
      const r = groupDocuments(demo, { groups: 'auto', seed });
      const c = r.choice!;
      picked.push(c.chosen);
      expect(c.by).toBe('knee');
      expect(c.warnings).toEqual([]);
      expect(c.tried.map((t) => t.groups)).toEqual(Array.from({ length: 19 }, (_, i) => i + 2));
      const truth = encodeLabels(r.docs.map((d) => d.fields.get('category') ?? ''));
      const nmi = externalScores(truth.codes, r.partition.assignments).nmi;
      expect(nmi).toBeGreaterThan(0.85);
    }
    for (const k of picked) {
      expect(k).toBeGreaterThanOrEqual(6);
      expect(k).toBeLessThanOrEqual(10);
    }
  });

  it('a range whose top is below the knee warns that the choice sits at the top', () => {
    // Three cuts: Kneedle can only return the middle one, which is also the last it can return.
    const r = groupDocuments(demo, { groups: 'auto', choose: { range: [2, 4] } });
    expect(r.choice!.chosen).toBe(3);
    expect(r.choice!.warnings).toContain('the choice sits at the top of the range 2..4; try --range 2..8');
  });
});
