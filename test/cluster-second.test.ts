/**
 * The two closest groups of each document (src/cluster/second.ts) against a
 * naive reference: every cosine computed on dense rows, groups sorted.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { closestTwo, nextGroupsOf } from '../src/cluster/second.js';
import { csrFromDense } from './helpers/csr.js';

/** Naive: dense cosines of a row to every unit centre, groups ordered by cosine (ties: lower group first). */
function naiveOrder(row: number[], centres: number[][]): { order: number[]; cos: number[] } {
  const norm = Math.hypot(...row);
  const cos = centres.map((c) => c.reduce((s, v, t) => s + v * (row[t] / norm), 0));
  const order = cos.map((_, g) => g).sort((a, b) => cos[b] - cos[a] || a - b);
  return { order, cos };
}

function unitCentres(raw: number[][]): number[][] {
  return raw.map((c) => {
    const n = Math.hypot(...c);
    return n > 0 ? c.map((v) => v / n) : c;
  });
}

function termMajor(centres: number[][], cols: number): Float32Array {
  const k = centres.length;
  const out = new Float32Array(cols * k);
  for (let g = 0; g < k; g++) for (let t = 0; t < cols; t++) out[t * k + g] = centres[g][t];
  return out;
}

describe('closestTwo', () => {
  it('a hand-worked case: three centres on the axes of a plane in 3-D', () => {
    // Row (3,4,0)/5: cosines 0.6 to x, 0.8 to y, 0 to z → best y (1), second x (0), margin 0.2.
    const m = csrFromDense([[3, 4, 0], [0, 0, 0], [0, 0, 2]]);
    const centres = termMajor([[1, 0, 0], [0, 1, 0], [0, 0, 1]], 3);
    const two = closestTwo(m, centres, 3);
    expect(Array.from(two.best)).toEqual([1, -1, 2]);
    expect(Array.from(two.second)).toEqual([0, -1, 0]);
    expect(two.bestCosine[0]).toBeCloseTo(0.8, 6);
    expect(two.secondCosine[0]).toBeCloseTo(0.6, 6);
    expect(Number.isNaN(two.bestCosine[1])).toBe(true);
    const next = nextGroupsOf(m, centres, 3, Int32Array.from([1, -1, 0]));
    expect(Array.from(next.group)).toEqual([0, -1, 2]);
    expect(next.margin[0]).toBeCloseTo(0.2, 6);
    expect(Number.isNaN(next.margin[1])).toBe(true);
    // Row 2 sits in group 0 though group 2 is closest: runner-up 2, margin 0 − 1 = −1.
    expect(next.margin[2]).toBeCloseTo(-1, 6);
  });

  it('one group: no second group, no margin', () => {
    const m = csrFromDense([[1, 1]]);
    const two = closestTwo(m, termMajor(unitCentres([[1, 0]]), 2), 1);
    expect(two.best[0]).toBe(0);
    expect(two.second[0]).toBe(-1);
    const next = nextGroupsOf(m, termMajor(unitCentres([[1, 0]]), 2), 1, Int32Array.from([0]));
    expect(next.group[0]).toBe(-1);
  });

  it('refuses centres of the wrong length', () => {
    expect(() => closestTwo(csrFromDense([[1, 0]]), new Float32Array(3), 2)).toThrow('centroids hold 3 values; 2 columns × 2 groups need 4');
  });

  it('matches the naive reference on random rows and centres (fast-check)', () => {
    const cell = fc.oneof({ arbitrary: fc.constant(0), weight: 2 }, { arbitrary: fc.integer({ min: 1, max: 9 }), weight: 3 });
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 6 }).chain((cols) =>
          fc.record({
            rows: fc.array(fc.array(cell, { minLength: cols, maxLength: cols }), { minLength: 1, maxLength: 12 }),
            centres: fc.array(fc.array(fc.integer({ min: 0, max: 9 }), { minLength: cols, maxLength: cols }), { minLength: 2, maxLength: 5 }),
            seed: fc.integer({ min: 0, max: 1000 }),
          }),
        ),
        ({ rows, centres, seed }) => {
          const cols = rows[0].length;
          const unit = unitCentres(centres.map((c) => (c.every((v) => v === 0) ? c.map((_, t) => (t === 0 ? 1 : 0)) : c)));
          const m = csrFromDense(rows);
          const tm = termMajor(unit, cols);
          const two = closestTwo(m, tm, unit.length);
          const assignments = Int32Array.from(rows, (_, r) => (rows[r].every((v) => v === 0) ? -1 : (seed + r) % unit.length));
          const next = nextGroupsOf(m, tm, unit.length, assignments);
          rows.forEach((row, r) => {
            if (row.every((v) => v === 0)) {
              expect(two.best[r]).toBe(-1);
              expect(next.group[r]).toBe(-1);
              return;
            }
            const { order, cos } = naiveOrder(row, unit);
            // Ties within float rounding may order either way: compare cosines, and groups when clearly apart.
            expect(two.bestCosine[r]).toBeCloseTo(cos[order[0]], 5);
            expect(two.secondCosine[r]).toBeCloseTo(cos[order[1]], 5);
            if (cos[order[0]] - cos[order[1]] > 1e-5) expect(two.best[r]).toBe(order[0]);
            if (cos[order[1]] - (cos[order[2]] ?? -Infinity) > 1e-5 && cos[order[0]] - cos[order[1]] > 1e-5) expect(two.second[r]).toBe(order[1]);
            const own = assignments[r];
            const runnerUp = order.find((g) => g !== own)!;
            expect(cos[next.group[r]]).toBeCloseTo(cos[runnerUp], 5);
            expect(next.margin[r]).toBeCloseTo(cos[own] - cos[runnerUp], 5);
          });
        },
      ),
      { numRuns: 300, seed: 13 },
    );
  });
});

describe('next group of a grouping run', () => {
  it('own cosine − runner-up cosine equals the run’s fit − that cosine, in the reduced space the demo was grouped in', async () => {
    const { ingest } = await import('../src/ingest/index.js');
    const { groupDocuments } = await import('../src/pipeline.js');
    const path = await import('node:path');
    const root = path.resolve(__dirname, '..');
    const read = await ingest(['corpus-demo/tickets.csv'], { text: ['subject', 'body'], id: 'ticket_id' }, { cwd: root });
    const result = groupDocuments(read, { groups: 8, seed: 1 });
    expect(result.reduced).not.toBeNull();
    const space = result.reduced!;
    const k = result.partition.groups;
    const { indptr, indices, values } = space.matrix;
    let checked = 0;
    for (let r = 0; r < result.docs.length; r++) {
      const own = result.partition.assignments[r];
      const next = result.next.group[r];
      if (own < 0) {
        expect(next).toBe(-1);
        continue;
      }
      expect(next).not.toBe(own);
      let c = 0;
      for (let p = indptr[r]; p < indptr[r + 1]; p++) c += values[p] * space.centroids[indices[p] * k + next];
      expect(result.next.margin[r]).toBeCloseTo(result.partition.fit[r] - c, 4);
      // No other group is closer than the runner-up.
      for (let g = 0; g < k; g++) {
        if (g === own || g === next) continue;
        let o = 0;
        for (let p = indptr[r]; p < indptr[r + 1]; p++) o += values[p] * space.centroids[indices[p] * k + g];
        expect(o).toBeLessThanOrEqual(c + 1e-6);
      }
      checked++;
    }
    expect(checked).toBe(result.docs.length - result.emptyRows.length);
  }, 60_000);
});
