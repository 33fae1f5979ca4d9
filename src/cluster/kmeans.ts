/**
 * Spherical k-means (Dhillon & Modha, "Concept decompositions for large
 * sparse text data using clustering", Machine Learning 42, 2001): partition
 * L2-normalised rows into `groups` groups so that the sum of cosines between
 * each row and its group's mean direction (the normalised sum of its members)
 * is as large as possible.
 *
 * - Seeding: k-means++ (Arthur & Vassilvitskii, "k-means++: the advantages of
 *   careful seeding", SODA 2007). After the first seed (uniform), each next
 *   seed is drawn with probability proportional to `1 − cos(x, nearest seed)`.
 *   For unit vectors `‖x − c‖² = 2 (1 − cos)`, so this is the paper's D²
 *   weighting measured on the sphere (D² weighting, not D).
 * - Batch (Lloyd-style) iterations: assign every row to its most similar
 *   centroid (ties to the lowest group index), then recompute the mean
 *   directions. Stops when no assignment changes, or after `maxIterations`.
 * - A group left empty is re-seeded with the row farthest from its centroid
 *   (lowest cosine at the last assignment, ties to the lowest row index) among
 *   groups that keep at least one member; each move counts in `reseeded`.
 * - Several restarts, each seeded by `createRng(deriveSeed(seed, restart))`;
 *   the best objective is kept, ties to the lowest restart.
 * - Output groups are renumbered canonically: by size descending, ties by the
 *   smallest member row index.
 *
 * Rows with no non-zero value take no part: assignment −1, fit 0.
 *
 * Every buffer is allocated once per call; the iteration loop allocates
 * nothing. Same input and seed give bit-identical output.
 *
 * @module
 */

import type { Csr } from '../types.js';
import { UsageError, show } from '../util/errors.js';
import { stripUndefined } from '../util/options.js';
import { createRng, deriveSeed, type Rng } from '../util/random.js';

/** Settings of one k-means run. */
export interface KMeansOptions {
  /** Number of groups k; a whole number from 2 to the number of non-empty rows. */
  groups: number;
  /** Independent seeded starts; the one with the best objective is kept. Whole number >= 1. */
  restarts: number;
  /** Upper bound on assignment passes per restart. Whole number >= 1. */
  maxIterations: number;
  /** Base seed (whole number 0 .. 2^32 − 1); restart r uses `deriveSeed(seed, r)`. */
  seed: number;
}

/**
 * Defaults for everything but `groups`: 4 restarts (enough to step past a poor
 * seeding on typical text without a large cost; common practice is a handful),
 * at most 100 passes each (text data usually settles in 10–30), seed 1.
 */
export const DEFAULT_KMEANS_OPTIONS: Readonly<Omit<KMeansOptions, 'groups'>> = Object.freeze({
  restarts: 4,
  maxIterations: 100,
  seed: 1,
});

const MAX_SEED = 4294967295;

/**
 * Merges `partial` over {@link DEFAULT_KMEANS_OPTIONS} and validates once.
 * `nonEmptyRows` is the number of rows that take part (see
 * {@link countNonEmptyRows}); pass `Infinity` when it is not known yet, to
 * check everything except the upper bound on `groups`. Throws
 * {@link UsageError} naming the option.
 */
export function resolveKMeansOptions(partial: Partial<KMeansOptions>, nonEmptyRows: number): KMeansOptions {
  const merged = { ...DEFAULT_KMEANS_OPTIONS, ...stripUndefined(partial) } as Partial<KMeansOptions>;
  const { groups, restarts, maxIterations, seed } = merged;
  const bounded = Number.isFinite(nonEmptyRows) && nonEmptyRows < Number.MAX_SAFE_INTEGER;
  if (bounded && nonEmptyRows < 2) {
    throw new UsageError(
      `groups needs at least 2 non-empty documents to split; there ${nonEmptyRows === 1 ? 'is' : 'are'} ${nonEmptyRows}`,
      'groups',
    );
  }
  if (!isWhole(groups) || groups < 2 || (bounded && groups > nonEmptyRows)) {
    const allowed = bounded
      ? `a whole number from 2 to ${nonEmptyRows} (the number of non-empty documents)`
      : 'a whole number >= 2';
    throw new UsageError(`groups must be ${allowed}; got ${show(groups)}`, 'groups');
  }
  if (!isWhole(restarts) || restarts < 1) {
    throw new UsageError(`restarts must be a whole number >= 1; got ${show(restarts)}`, 'restarts');
  }
  if (!isWhole(maxIterations) || maxIterations < 1) {
    throw new UsageError(`maxIterations must be a whole number >= 1; got ${show(maxIterations)}`, 'maxIterations');
  }
  if (!isWhole(seed) || seed < 0 || seed > MAX_SEED) {
    throw new UsageError(`seed must be a whole number from 0 to ${MAX_SEED}; got ${show(seed)}`, 'seed');
  }
  return { groups, restarts, maxIterations, seed };
}

function isWhole(value: unknown): value is number {
  return typeof value === 'number' && Number.isInteger(value);
}

/** Outcome of {@link sphericalKMeans}. Group numbers are canonical (size descending, then smallest member row). */
export interface KMeansResult {
  /** Number of groups k. */
  readonly groups: number;
  /** Group of each row, or −1 for rows with no non-zero value. */
  readonly assignments: Int32Array;
  /** Unit-norm mean directions, term-major: `centroids[term * groups + g]`. */
  readonly centroids: Float32Array;
  /** Cosine of each row to its own centroid (0 for rows that take no part). */
  readonly fit: Float32Array;
  /** Sum over rows that take part of the cosine to their centroid (computed in double precision). */
  readonly objective: number;
  /** Assignment passes in the kept restart (including the pass that found nothing to change). */
  readonly iterations: number;
  /** Whether the kept restart stopped because no assignment changed (rather than at `maxIterations`). */
  readonly converged: boolean;
  /** Objective reached by each restart, in restart order. */
  readonly restartObjectives: Float64Array;
  /** Rows moved into empty groups during the kept restart. */
  readonly reseeded: number;
}

/**
 * Counts the rows that take part in k-means: rows with at least one stored
 * non-zero value.
 */
export function countNonEmptyRows(matrix: Csr): number {
  let m = 0;
  for (let r = 0; r < matrix.rows; r++) if (rowIsNonEmpty(matrix, r)) m++;
  return m;
}

function rowIsNonEmpty(matrix: Csr, r: number): boolean {
  const { indptr, values } = matrix;
  for (let j = indptr[r]!; j < indptr[r + 1]!; j++) if (values[j] !== 0) return true;
  return false;
}

/** All buffers of one call, allocated once and reused by every restart and pass. */
interface Workspace {
  readonly k: number;
  readonly matrix: Csr;
  /** Row indices that take part, increasing. */
  readonly active: Int32Array;
  /** Working and best copies; swapped (not copied) when a restart becomes the best. */
  assign: Int32Array;
  fit: Float64Array;
  centroids: Float32Array;
  bestAssign: Int32Array;
  bestFit: Float64Array;
  bestCentroids: Float32Array;
  /** Float64 sums of member rows, term-major like the centroids. */
  readonly sums: Float64Array;
  readonly counts: Int32Array;
  readonly norms: Float64Array;
  /** Scores of one row against every group. */
  readonly scores: Float64Array;
  /** Seeding: cosine to the nearest seed so far, per row. */
  readonly closest: Float64Array;
  /** Seeding: 1 where a row is already a seed. */
  readonly chosen: Uint8Array;
}

interface RestartOutcome {
  objective: number;
  iterations: number;
  converged: boolean;
  reseeded: number;
}

/**
 * Runs spherical k-means on the rows of `matrix` (L2-normalised, or all-zero).
 * Options are merged with {@link DEFAULT_KMEANS_OPTIONS} and validated against
 * the number of non-empty rows; a bad value throws {@link UsageError}.
 */
export function sphericalKMeans(matrix: Csr, options: Partial<KMeansOptions> & { groups: number }): KMeansResult {
  const n = matrix.rows;
  const d = matrix.cols;
  let m = 0;
  for (let r = 0; r < n; r++) if (rowIsNonEmpty(matrix, r)) m++;
  const opts = resolveKMeansOptions(options, m);
  const k = opts.groups;
  const active = new Int32Array(m);
  for (let r = 0, a = 0; r < n; r++) if (rowIsNonEmpty(matrix, r)) active[a++] = r;

  const ws: Workspace = {
    k,
    matrix,
    active,
    assign: new Int32Array(n),
    fit: new Float64Array(n),
    centroids: new Float32Array(d * k),
    bestAssign: new Int32Array(n),
    bestFit: new Float64Array(n),
    bestCentroids: new Float32Array(d * k),
    sums: new Float64Array(d * k),
    counts: new Int32Array(k),
    norms: new Float64Array(k),
    scores: new Float64Array(k),
    closest: new Float64Array(n),
    chosen: new Uint8Array(n),
  };

  const restartObjectives = new Float64Array(opts.restarts);
  let best: RestartOutcome | undefined;
  for (let r = 0; r < opts.restarts; r++) {
    const outcome = runRestart(ws, opts.maxIterations, createRng(deriveSeed(opts.seed, r)));
    restartObjectives[r] = outcome.objective;
    if (best === undefined || outcome.objective > best.objective) {
      best = outcome;
      swapBest(ws);
    }
  }
  const kept = best!;
  const { assignments, centroids } = canonicalise(ws.bestAssign, ws.bestCentroids, k, d, active);
  const fit = new Float32Array(n);
  for (let a = 0; a < m; a++) {
    const i = active[a]!;
    fit[i] = ws.bestFit[i]!;
  }
  return {
    groups: k,
    assignments,
    centroids,
    fit,
    objective: kept.objective,
    iterations: kept.iterations,
    converged: kept.converged,
    restartObjectives,
    reseeded: kept.reseeded,
  };
}

function swapBest(ws: Workspace): void {
  [ws.assign, ws.bestAssign] = [ws.bestAssign, ws.assign];
  [ws.fit, ws.bestFit] = [ws.bestFit, ws.fit];
  [ws.centroids, ws.bestCentroids] = [ws.bestCentroids, ws.centroids];
}

/** One seeded start: k-means++ seeding, then batch passes until stable or `maxIterations`. */
function runRestart(ws: Workspace, maxIterations: number, rng: Rng): RestartOutcome {
  ws.assign.fill(-1);
  ws.fit.fill(0);
  seedCentroids(ws, rng);
  let iterations = 0;
  let converged = false;
  let reseeded = 0;
  while (iterations < maxIterations) {
    iterations++;
    const changed = assignRange(ws, 0, ws.active.length);
    if (changed === 0) {
      converged = true;
      break;
    }
    reseeded += updateCentroids(ws);
  }
  // Stopped at the limit: the centroids are the means of the current
  // assignment, so measure each row against them.
  if (!converged) refreshFit(ws);
  let objective = 0;
  const { active, fit } = ws;
  for (let a = 0; a < active.length; a++) objective += fit[active[a]!]!;
  return { objective, iterations, converged, reseeded };
}

/** Cosine of row `i` with centroid `g` (sparse walk over the row, stride k in the centroids). */
function dotRowCentroid(matrix: Csr, i: number, centroids: Float32Array, k: number, g: number): number {
  const { indptr, indices, values } = matrix;
  let s = 0;
  for (let j = indptr[i]!; j < indptr[i + 1]!; j++) s += values[j]! * centroids[indices[j]! * k + g]!;
  return s;
}

/** Writes row `i` as centroid `g` (the column must be zero beforehand). */
function placeRow(matrix: Csr, i: number, centroids: Float32Array, k: number, g: number): void {
  const { indptr, indices, values } = matrix;
  for (let j = indptr[i]!; j < indptr[i + 1]!; j++) centroids[indices[j]! * k + g] = values[j]!;
}

/**
 * k-means++ seeding with weights `max(0, 1 − cos(x, nearest seed))` (0 for
 * rows already chosen). Draws one
 * `rng.next()` per seed after the first (`rng.int(m)`); if every remaining
 * weight is 0 (all rows coincide with a seed) it draws `rng.int` among the
 * rows not yet chosen instead.
 */
function seedCentroids(ws: Workspace, rng: Rng): void {
  const { matrix, active, k, centroids, closest, chosen } = ws;
  const m = active.length;
  centroids.fill(0);
  chosen.fill(0);
  let row = active[rng.int(m)]!;
  chosen[row] = 1;
  placeRow(matrix, row, centroids, k, 0);
  for (let a = 0; a < m; a++) {
    const i = active[a]!;
    closest[i] = dotRowCentroid(matrix, i, centroids, k, 0);
  }
  for (let g = 1; g < k; g++) {
    let total = 0;
    for (let a = 0; a < m; a++) {
      const i = active[a]!;
      if (chosen[i]) continue; // a seed's own weight is rounding noise
      const w = 1 - closest[i]!;
      if (w > 0) total += w;
    }
    row = -1;
    if (total > 0) {
      const target = rng.next() * total;
      let acc = 0;
      let lastPositive = -1;
      for (let a = 0; a < m; a++) {
        const i = active[a]!;
        if (chosen[i]) continue;
        const w = 1 - closest[i]!;
        if (w <= 0) continue;
        lastPositive = i;
        acc += w;
        if (acc > target) {
          row = i;
          break;
        }
      }
      if (row < 0) row = lastPositive; // rounding left the target just past the end
    } else {
      let skip = rng.int(m - g);
      for (let a = 0; a < m; a++) {
        const i = active[a]!;
        if (chosen[i]) continue;
        if (skip === 0) {
          row = i;
          break;
        }
        skip--;
      }
    }
    chosen[row] = 1;
    placeRow(matrix, row, centroids, k, g);
    for (let a = 0; a < m; a++) {
      const i = active[a]!;
      const c = dotRowCentroid(matrix, i, centroids, k, g);
      if (c > closest[i]!) closest[i] = c;
    }
  }
}

/**
 * Assignment pass over `active[from .. to)`: scores each row against every
 * centroid by walking its non-zeros and the contiguous term-major slice
 * `centroids[t*k .. t*k+k)`, keeps the best (ties to the lowest group) and
 * records its cosine in `fit`. Returns how many assignments changed.
 *
 * Seams for later speed-ups, deliberately not built yet:
 * - Bounds (Elkan 2003 / Hamerly 2010, adapted to cosine): for unit x and
 *   centroids c, c', |cos(x, c') − cos(x, c)| ≤ ‖c' − c‖. Keeping per row a
 *   lower bound on the similarity to its own centroid and an upper bound on
 *   the best other similarity, and shifting them by each centroid's movement
 *   after `updateCentroids`, lets a row skip scoring when lower ≥ upper.
 *   The bounds would live in the workspace and be consulted here.
 * - Two cores: the pass touches only rows in `[from, to)` and writes only
 *   their `assign`/`fit` entries, so the range can be split across two
 *   workers sharing the centroids (read-only during the pass); the changed
 *   counts add up. `updateCentroids` would sum per worker and add the sums.
 */
function assignRange(ws: Workspace, from: number, to: number): number {
  const { matrix, active, k, centroids, scores, assign, fit } = ws;
  const { indptr, indices, values } = matrix;
  let changed = 0;
  for (let a = from; a < to; a++) {
    const i = active[a]!;
    scores.fill(0);
    for (let j = indptr[i]!; j < indptr[i + 1]!; j++) {
      const v = values[j]!;
      const base = indices[j]! * k;
      for (let g = 0; g < k; g++) scores[g]! += v * centroids[base + g]!;
    }
    let bestG = 0;
    let bestS = scores[0]!;
    for (let g = 1; g < k; g++) {
      const s = scores[g]!;
      if (s > bestS) {
        bestS = s;
        bestG = g;
      }
    }
    if (assign[i] !== bestG) {
      assign[i] = bestG;
      changed++;
    }
    fit[i] = bestS;
  }
  return changed;
}

/** Adds (sign +1) or removes (sign −1) row `i` from the sums of group `g`. */
function addRow(matrix: Csr, i: number, sums: Float64Array, k: number, g: number, sign: number): void {
  const { indptr, indices, values } = matrix;
  for (let j = indptr[i]!; j < indptr[i + 1]!; j++) sums[indices[j]! * k + g]! += sign * values[j]!;
}

/**
 * Recomputes the mean directions from the current assignment, re-seeding
 * empty groups first. Returns the number of rows moved into empty groups.
 */
function updateCentroids(ws: Workspace): number {
  const { matrix, active, k, sums, counts, norms, centroids, assign, fit } = ws;
  const m = active.length;
  sums.fill(0);
  counts.fill(0);
  for (let a = 0; a < m; a++) {
    const i = active[a]!;
    const g = assign[i]!;
    counts[g]!++;
    addRow(matrix, i, sums, k, g, 1);
  }

  let reseeded = 0;
  for (let g = 0; g < k; g++) {
    if (counts[g] !== 0) continue;
    // Farthest row whose group keeps a member after the move. One exists:
    // m >= k rows sit in fewer than k groups, so some group has two.
    let far = -1;
    let farFit = Infinity;
    for (let a = 0; a < m; a++) {
      const i = active[a]!;
      if (counts[assign[i]!]! > 1 && fit[i]! < farFit) {
        farFit = fit[i]!;
        far = i;
      }
    }
    const from = assign[far]!;
    addRow(matrix, far, sums, k, from, -1);
    counts[from]!--;
    addRow(matrix, far, sums, k, g, 1);
    counts[g] = 1;
    assign[far] = g;
    reseeded++;
  }

  norms.fill(0);
  const d = matrix.cols;
  for (let t = 0; t < d; t++) {
    const base = t * k;
    for (let g = 0; g < k; g++) {
      const s = sums[base + g]!;
      norms[g]! += s * s;
    }
  }
  for (let g = 0; g < k; g++) norms[g] = norms[g]! > 0 ? 1 / Math.sqrt(norms[g]!) : 0;
  for (let t = 0; t < d; t++) {
    const base = t * k;
    for (let g = 0; g < k; g++) centroids[base + g] = sums[base + g]! * norms[g]!;
  }
  // Members that cancel out exactly (possible only with negative values):
  // use the group's first member as its direction so every centroid is unit.
  for (let g = 0; g < k; g++) {
    if (norms[g] !== 0) continue;
    for (let a = 0; a < m; a++) {
      const i = active[a]!;
      if (assign[i] === g) {
        placeRow(matrix, i, centroids, k, g);
        break;
      }
    }
  }
  return reseeded;
}

/** Sets `fit` to each row's cosine with its assigned centroid. */
function refreshFit(ws: Workspace): void {
  const { matrix, active, k, centroids, assign, fit } = ws;
  for (let a = 0; a < active.length; a++) {
    const i = active[a]!;
    fit[i] = dotRowCentroid(matrix, i, centroids, k, assign[i]!);
  }
}

/**
 * Renumbers groups by size descending, ties by smallest member row index.
 * Rewrites `assign` in place and returns it with permuted centroids.
 */
function canonicalise(
  assign: Int32Array,
  centroids: Float32Array,
  k: number,
  d: number,
  active: Int32Array,
): { assignments: Int32Array; centroids: Float32Array } {
  const size = new Int32Array(k);
  const first = new Int32Array(k).fill(-1);
  for (let a = 0; a < active.length; a++) {
    const i = active[a]!;
    const g = assign[i]!;
    size[g]!++;
    if (first[g] === -1) first[g] = i;
  }
  const order = Array.from({ length: k }, (_, g) => g);
  // an empty group (not expected: updates always refill) sorts last
  const key = (g: number): number => (first[g] === -1 ? Number.MAX_SAFE_INTEGER : first[g]!);
  order.sort((x, y) => size[y]! - size[x]! || key(x) - key(y) || x - y);
  const newOf = new Int32Array(k);
  for (let g = 0; g < k; g++) newOf[order[g]!] = g;
  for (let a = 0; a < active.length; a++) {
    const i = active[a]!;
    assign[i] = newOf[assign[i]!]!;
  }
  const out = new Float32Array(d * k);
  for (let t = 0; t < d; t++) {
    const base = t * k;
    for (let g = 0; g < k; g++) out[base + newOf[g]!] = centroids[base + g]!;
  }
  return { assignments: assign, centroids: out };
}

/**
 * Assigns each row of `matrix` to its most similar centroid (term-major,
 * `centroids[term * groups + g]`, as in {@link KMeansResult}), ties to the
 * lowest group. Rows with no non-zero value get −1 and fit 0. Used to apply
 * a saved model to new documents. `out`, when given, receives the result
 * (each array of length `matrix.rows`). Throws a RangeError when the shapes
 * disagree.
 */
export function assignToCentroids(
  matrix: Csr,
  centroids: Float32Array,
  groups: number,
  out?: { assignments: Int32Array; fit: Float32Array },
): { assignments: Int32Array; fit: Float32Array } {
  const k = groups;
  if (!Number.isInteger(k) || k < 1) throw new RangeError(`groups must be a whole number >= 1; got ${show(k)}`);
  if (centroids.length !== matrix.cols * k) {
    throw new RangeError(
      `centroids hold ${centroids.length} values; ${matrix.cols} terms × ${k} groups needs ${matrix.cols * k}`,
    );
  }
  const n = matrix.rows;
  const assignments = out?.assignments ?? new Int32Array(n);
  const fit = out?.fit ?? new Float32Array(n);
  if (assignments.length !== n || fit.length !== n) {
    throw new RangeError(`out arrays must have one entry per row (${n})`);
  }
  const { indptr, indices, values } = matrix;
  const scores = new Float64Array(k);
  for (let i = 0; i < n; i++) {
    if (!rowIsNonEmpty(matrix, i)) {
      assignments[i] = -1;
      fit[i] = 0;
      continue;
    }
    scores.fill(0);
    for (let j = indptr[i]!; j < indptr[i + 1]!; j++) {
      const v = values[j]!;
      const base = indices[j]! * k;
      for (let g = 0; g < k; g++) scores[g]! += v * centroids[base + g]!;
    }
    let bestG = 0;
    let bestS = scores[0]!;
    for (let g = 1; g < k; g++) {
      if (scores[g]! > bestS) {
        bestS = scores[g]!;
        bestG = g;
      }
    }
    assignments[i] = bestG;
    fit[i] = bestS;
  }
  return { assignments, fit };
}
