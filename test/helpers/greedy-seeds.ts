import type { Rng } from '../../src/util/random.js';

/**
 * Naive greedy k-means++ (Arthur & Vassilvitskii 2007, local trials as in
 * scikit-learn's `_kmeans_plusplus`: `2 + ⌊ln k⌋` candidates a step, the one
 * leaving the least total weight kept): the obvious loops over `pool` (row
 * numbers, in order), weights `1 − cos` to the nearest seed, chosen rows
 * weigh nothing. The same random draws as the engine: `rng.int(pool.length)`
 * for the first seed, then per candidate one `rng.next()` (or, when every
 * weight is 0, `rng.int` among the rows not chosen). Returns the seed rows.
 */
export function naiveGreedySeeds(pool: readonly number[], k: number, rng: Rng, cos: (i: number, j: number) => number): number[] {
  const trials = 2 + Math.floor(Math.log(k));
  const chosen = new Set<number>();
  const closest = new Map<number, number>();
  const seeds: number[] = [];
  const draw = (g: number): number => {
    let total = 0;
    for (const i of pool) if (!chosen.has(i) && 1 - closest.get(i)! > 0) total += 1 - closest.get(i)!;
    if (total > 0) {
      const target = rng.next() * total;
      let acc = 0;
      let last = -1;
      for (const i of pool) {
        if (chosen.has(i) || 1 - closest.get(i)! <= 0) continue;
        last = i;
        acc += 1 - closest.get(i)!;
        if (acc > target) return i;
      }
      return last;
    }
    return pool.filter((i) => !chosen.has(i))[rng.int(pool.length - g)]!;
  };
  for (let g = 0; g < k; g++) {
    let pick: number;
    if (g === 0) pick = pool[rng.int(pool.length)]!;
    else {
      const candidates = Array.from({ length: trials }, () => draw(g));
      let bestLeft = Infinity;
      pick = candidates[0]!;
      for (const c of candidates) {
        let left = 0;
        for (const i of pool) {
          if (chosen.has(i) || i === c) continue;
          const w = 1 - Math.max(closest.get(i)!, cos(i, c));
          if (w > 0) left += w;
        }
        if (left < bestLeft) {
          bestLeft = left;
          pick = c;
        }
      }
    }
    chosen.add(pick);
    seeds.push(pick);
    for (const i of pool) closest.set(i, Math.max(closest.get(i) ?? -Infinity, cos(i, pick)));
  }
  return seeds;
}
