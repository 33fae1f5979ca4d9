/**
 * The composed pipeline: order independence, the auto choice and its
 * refinement, agglomerative grouping, and the small helpers it rests on
 * (checked against naive references with fast-check).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { canonicalOrder, compareIds, groupDocuments, resolveGroupOptions, selectRows } from '../src/pipeline.js';
import { UsageError } from '../src/util/errors.js';
import { canonicalGroups, partitionFromAssignments } from '../src/cluster/partition.js';
import { cutToGroups, groupAverageLink } from '../src/cluster/tree.js';
import type { Csr, Doc } from '../src/types.js';

const root = path.resolve(__dirname, '..');
const rows = parse(readFileSync(path.join(root, 'corpus-demo', 'tickets.csv')), { columns: true }) as Record<string, string>[];
const demo: Doc[] = rows.map((r) => ({ id: r.ticket_id, source: 'tickets.csv', title: r.subject, text: `${r.subject}\n\n${r.body}`, fields: new Map() }));

function randomCsr(rowsN: number, cols: number, seed: number): Csr {
  let s = seed >>> 0;
  const rnd = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
  const indptr = new Int32Array(rowsN + 1);
  const indices: number[] = [];
  const values: number[] = [];
  for (let r = 0; r < rowsN; r++) {
    const row: [number, number][] = [];
    for (let c = 0; c < cols; c++) if (rnd() < 0.3) row.push([c, rnd()]);
    const norm = Math.hypot(...row.map((x) => x[1]));
    for (const [c, v] of row) {
      indices.push(c);
      values.push(v / norm);
    }
    indptr[r + 1] = indices.length;
  }
  return { rows: rowsN, cols, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) };
}

describe('groupDocuments', () => {
  it('gives the same groups whatever order the documents come in', () => {
    const a = groupDocuments(demo, { groups: 6 });
    const shuffled = [...demo].reverse();
    const b = groupDocuments(shuffled, { groups: 6 });
    expect(b.docs.map((d) => d.id)).toEqual(a.docs.map((d) => d.id));
    expect(Array.from(b.partition.assignments)).toEqual(Array.from(a.partition.assignments));
    expect(b.groups.map((g) => g.label)).toEqual(a.groups.map((g) => g.label));
    // inputOrder maps back to the order given.
    expect(Array.from(b.inputOrder, (r) => b.docs[r].id)).toEqual(shuffled.map((d) => d.id));
  });

  it('auto: picks the cut at the knee of the objective, and k-means from that cut never lowers its objective', () => {
    const r = groupDocuments(demo, { groups: 'auto', choose: { range: [4, 10] } });
    const c = r.choice!;
    expect(c.by).toBe('knee');
    const best = Math.max(...c.tried.map((t) => t.knee));
    expect(c.tried.find((t) => t.groups === c.chosen)!.knee).toBe(best);
    expect(r.partition.groups).toBe(c.chosen);
    // Rebuild the cut the refinement started from: over-cluster, tree, cut (same seed, same code path).
    const over = groupDocuments(demo, { groups: c.treeLeaves });
    const tree = groupAverageLink(over.matrix, over.partition.assignments, c.treeLeaves);
    const leaf = cutToGroups(tree, c.chosen);
    const start = partitionFromAssignments(over.matrix, over.partition.assignments.map((g) => (g < 0 ? -1 : leaf[g])), c.chosen);
    expect(r.partition.objective).toBeGreaterThanOrEqual(start.objective - 1e-9);
  });

  it('agglomerative: every group is a subtree cut, centroids are unit mean directions', () => {
    const notes = demo.slice(0, 120);
    const r = groupDocuments(notes, { groups: 5, method: 'agglomerative' });
    expect(r.method).toBe('agglomerative');
    if (r.method !== 'agglomerative') return;
    expect(r.documentTree.leaves).toBe(120 - r.emptyRows.length);
    expect(r.treeRows).toHaveLength(120 - r.emptyRows.length);
    const sizes = r.groups.map((g) => g.size);
    expect(sizes.reduce((a, b) => a + b, 0)).toBe(120 - r.emptyRows.length);
    expect([...sizes].sort((a, b) => b - a)).toEqual(sizes);
    for (let g = 0; g < 5; g++) {
      let sq = 0;
      for (let t = 0; t < r.matrix.cols; t++) sq += r.partition.centroids[t * 5 + g] ** 2;
      expect(Math.sqrt(sq)).toBeCloseTo(1, 5);
    }
  });

  it('names the option and the allowed values when asked for something unusable', () => {
    expect(() => groupDocuments(demo, {})).toThrow('groups is required: a whole number of at least 2, or auto (or give minSimilarity)');
    expect(() => groupDocuments(demo, { groups: 3, minSimilarity: 0.2 })).toThrow(
      'give either groups or minSimilarity, not both; got groups 3 and minSimilarity 0.2',
    );
    expect(() => groupDocuments(demo, { groups: 'auto', choose: { range: [5, 3] } })).toThrow(
      'range must be two whole numbers from 2 up, the first not above the second (like 4..40); got [5,3]',
    );
    // Not a pair (was a TypeError "not iterable" for a number, and [2, 9, 40] passed as 2..9).
    for (const [range, shown] of [[5, '5'], [null, 'null'], [[2, 9, 40], '[2,9,40]']] as const) {
      expect(() => resolveGroupOptions({ groups: 'auto', choose: { range: range as unknown as [number, number] } })).toThrow(
        new UsageError(`range must be two whole numbers from 2 up, the first not above the second (like 4..40); got ${shown}`, 'range'),
      );
    }
    expect(() => groupDocuments(demo.slice(0, 5), { groups: 'auto', choose: { range: [8, 9] } })).toThrow(
      'range starts at 8 groups but there are only 5 to split into; lower the range',
    );
  });
});

describe('helpers', () => {
  it('compareIds orders digits as numbers and is a total order', () => {
    expect(['row 10', 'row 2', 'row 1', 'a', 'row 02'].sort(compareIds)).toEqual(['a', 'row 1', 'row 02', 'row 2', 'row 10']);
    fc.assert(
      fc.property(fc.array(fc.string({ maxLength: 6 }), { maxLength: 30 }), (ids) => {
        const once = [...ids].sort(compareIds);
        expect([...once].reverse().sort(compareIds)).toEqual(once);
        for (const a of ids) expect(compareIds(a, a)).toBe(0);
      }),
    );
  });

  it('canonicalOrder is a permutation sorted by id', () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.string({ maxLength: 5 }), { maxLength: 40 }), (ids) => {
        const docs: Doc[] = ids.map((id) => ({ id, source: '', title: '', text: '', fields: new Map() }));
        const { docs: sorted, inputOrder } = canonicalOrder(docs);
        expect(sorted.map((d) => d.id)).toEqual([...ids].sort(compareIds));
        ids.forEach((id, i) => expect(sorted[inputOrder[i]].id).toBe(id));
      }),
    );
  });

  it('selectRows equals picking rows of the dense matrix', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 9999 }), fc.array(fc.integer({ min: 0, max: 19 }), { maxLength: 25 }), (seed, pick) => {
        const m = randomCsr(20, 7, seed);
        const sub = selectRows(m, Int32Array.from(pick));
        const dense = (x: Csr, r: number) => {
          const out = new Array<number>(x.cols).fill(0);
          for (let p = x.indptr[r]; p < x.indptr[r + 1]; p++) out[x.indices[p]] = x.values[p];
          return out;
        };
        pick.forEach((r, i) => expect(dense(sub, i)).toEqual(dense(m, r)));
      }),
    );
  });

  it('partitionFromAssignments: unit centroids, fit = cosine to own centroid, objective = sum of fits', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 9999 }), (seed) => {
        const m = randomCsr(30, 6, seed);
        const assign = Int32Array.from({ length: 30 }, (_, r) => (r % 4 === 3 ? -1 : r % 3));
        const p = partitionFromAssignments(m, assign, 3);
        let total = 0;
        for (let r = 0; r < 30; r++) {
          const g = assign[r];
          if (g < 0) {
            expect(p.fit[r]).toBe(0);
            continue;
          }
          const sum = new Float64Array(6);
          for (let q = 0; q < 30; q++) if (assign[q] === g) for (let e = m.indptr[q]; e < m.indptr[q + 1]; e++) sum[m.indices[e]] += m.values[e];
          const norm = Math.hypot(...sum);
          let dot = 0;
          for (let e = m.indptr[r]; e < m.indptr[r + 1]; e++) dot += (m.values[e] * sum[m.indices[e]]) / norm;
          expect(p.fit[r]).toBeCloseTo(dot, 5);
          total += p.fit[r];
        }
        expect(p.objective).toBeCloseTo(total, 5);
      }),
      { numRuns: 30 },
    );
  });

  it('canonicalGroups numbers groups by size, then first member', () => {
    expect(Array.from(canonicalGroups(Int32Array.from([2, 2, 0, 1, 1, 1, -1, 0]), 3))).toEqual([1, 1, 2, 0, 0, 0, -1, 2]);
  });
});
