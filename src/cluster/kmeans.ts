/**
 * Spherical k-means (Dhillon & Modha, "Concept decompositions for large
 * sparse text data using clustering", Machine Learning 42, 2001): partition
 * L2-normalised rows into `groups` groups so that the sum of cosines between
 * each row and its group's mean direction (the normalised sum of its members)
 * is as large as possible.
 *
 * - Seeding: greedy k-means++ (Arthur & Vassilvitskii, "k-means++: the
 *   advantages of careful seeding", SODA 2007). After the first seed
 *   (uniform), each step draws `2 + ⌊ln k⌋` candidates with probability
 *   proportional to `1 − cos(x, nearest seed)` and keeps the one leaving the
 *   least total weight. For unit vectors `‖x − c‖² = 2 (1 − cos)`, so this is
 *   the paper's D² weighting measured on the sphere. Piles above
 *   `max(k, 3 · batchSize)` rows are seeded from a seeded uniform sample of
 *   that many rows (see `seedSampleSize` in `kmeans-engine.ts`).
 * - Batch (Lloyd-style) iterations: assign every row to its most similar
 *   centroid (ties to the lowest group index), then recompute the mean
 *   directions. Stops when no assignment changes, or after `maxIterations`.
 *   With `prune` (the default) a per-row bound skips the full scoring of rows
 *   that cannot change group; the result is bit-identical to the plain loop
 *   (see `kmeans-kernel.ts` for the bound and why it is exact).
 * - A group left empty is re-seeded with the row farthest from its centroid
 *   (lowest cosine at the last assignment, ties to the lowest row index) among
 *   groups that keep at least one member; each move counts in `reseeded`.
 * - Several restarts, each seeded by `createRng(deriveSeed(seed, restart))`;
 *   the best objective is kept, ties to the lowest restart.
 * - Screened restarts, on by default from {@link SCREEN_AUTO_ROWS} non-empty
 *   rows: all restarts run on one seeded sample of `screenSize` rows, the
 *   `screenKeep` best continue on all rows (see `screenedSteps` in
 *   `kmeans-engine.ts`); restarts dropped there report NaN in
 *   `restartObjectives` and their sample objective in `screenObjectives`.
 * - `initialAssignments`: one run that starts from the means of a given
 *   partition instead of seeding (for refining a cut of a tree).
 * - Mini-batch (Sculley 2010), on by default from {@link MINI_BATCH_AUTO_ROWS}
 *   non-empty rows: seeded batch steps with 1/count learning rates on
 *   centroids kept as scale × vector (a step costs its batch's non-zeros),
 *   then one full assignment pass (see `kmeans-engine.ts`).
 * - Output groups are renumbered canonically: by size descending, ties by the
 *   smallest member row index.
 *
 * Rows with no non-zero value take no part: assignment −1, fit 0.
 *
 * Every buffer is allocated once per call; the iteration loop allocates
 * nothing. Same input and seed give bit-identical output. The same run on
 * several threads: `sphericalKMeansParallel` in `src/parallel/`.
 *
 * @module
 */

import type { Csr } from '../types.js';
import { UsageError, show } from '../util/errors.js';
import { stripUndefined } from '../util/options.js';
import { checkKeys } from '../util/constraints.js';
import { runBlock, scoreAll } from './kmeans-kernel.js';
import { rowIsNonEmpty } from '../util/csr.js';
import type { KMeansOptions, KMeansResult } from './kmeans-types.js';
import {
  LOCAL_ALLOCATOR,
  MINI_BATCH_AUTO_ROWS,
  createWorkspace,
  finishResult,
  kmeansSteps,
  validateInitialAssignments,
  type KMeansPlan,
  type KMeansProgress,
} from './kmeans-engine.js';
export type { KMeansProgress } from './kmeans-engine.js';

export type { KMeansOptions, KMeansResult } from './kmeans-types.js';

/**
 * Defaults for everything but `groups`: 10 restarts (bench/quality, six
 * labelled corpora, 5 seeds: 10 instead of 4 raised mean NMI .492 -> .502 and
 * the mean worst seed .443 -> .454, for about 1.5-2.5x the k-means time),
 * at most 100 passes each (text data usually settles in 10–30), stopping once
 * a pass moves at most 0.1% of the documents (the last passes of a long run
 * move a handful of documents each: at 100k generated tickets, 44 passes to no
 * move at all, NMI unchanged to three places; our measurement in
 * bench/results.md), seed 1,
 * pruning on. Mini-batch from {@link MINI_BATCH_AUTO_ROWS} rows, with steps of
 * 4096 rows, at most 200 steps, stopping early once every centroid moves less
 * than 0.001 in a step. With 1/count rates the largest movement decays about
 * as 1/step on diffuse text (0.013 after 100 steps, 0.004 after 380, on
 * generated text-like rows, 100k × 20k, k = 100), so the tolerance ends runs
 * early only on data that settles; 200 steps of 4096 rows are fewer row
 * visits than one full pass over 1M rows. Measured quality in
 * test/kmeans-minibatch.test.ts.
 *
 * Screening (from {@link SCREEN_AUTO_ROWS} rows): every restart seeds and
 * runs its passes on one seeded sample of 10,000 rows, and only the best
 * continues on all rows. Measured with bench/screen-ratio.mjs on the 60k
 * generated export (50-dim reduced rows, k = 100, seeds 1 and 2, one
 * thread): k-means CPU 26.9 / 29.0 s unscreened, 10.7 / 10.7 s screened
 * (2.6x), objective −0.011% / +0.031% of the unscreened one, NMI against the
 * planted topics 0.922 / 0.921 against 0.920 / 0.917. A 5,000-row sample
 * was 4.7x cheaper but lost 0.04% / 0.02% of the objective and 0.005 NMI; a
 * 20,000-row one was 1.7x cheaper for no gain; continuing the two best
 * (`screenKeep: 2`) kept the same restart on both seeds (bench/speed-notes.md §5).
 */
export const DEFAULT_KMEANS_OPTIONS: Readonly<Omit<KMeansOptions, 'groups' | 'initialAssignments'>> = Object.freeze({
  restarts: 10,
  maxIterations: 100,
  stableShare: 0.001,
  seed: 1,
  prune: true,
  miniBatch: 'auto',
  batchSize: 4096,
  batchIterations: 200,
  batchTolerance: 0.001,
  screen: 'auto',
  screenSize: 10_000,
  screenKeep: 1,
  screenPasses: 10,
});

/**
 * Non-empty rows at or above which `screen: 'auto'` screens the restarts on
 * a sample (20 000): far above every labelled corpus of bench/quality (at
 * most 3,000 documents) and the 457-document demo, whose outputs therefore
 * do not change.
 */
export const SCREEN_AUTO_ROWS = 20_000;

/** Non-empty rows at or above which `miniBatch: 'auto'` switches mini-batch on (200 000). */
export { MINI_BATCH_AUTO_ROWS };

const MAX_SEED = 4294967295;

/** The keys of {@link KMeansOptions}. */
const KMEANS_KEYS: readonly string[] = ['groups', ...Object.keys(DEFAULT_KMEANS_OPTIONS), 'initialAssignments'];

/**
 * Throws {@link UsageError} unless `groups` is a whole number from 2 to
 * `nonEmptyRows` (pass `Infinity` when the data is not known yet, to check
 * only the lower bound).
 */
export function checkGroupCount(groups: unknown, nonEmptyRows: number): asserts groups is number {
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
}

/**
 * Merges `partial` over {@link DEFAULT_KMEANS_OPTIONS} and validates once.
 * `nonEmptyRows` is the number of rows that take part (see
 * {@link countNonEmptyRows}); pass `Infinity` when it is not known yet, to
 * check everything except the upper bound on `groups`. The contents of
 * `initialAssignments` are checked against the data by {@link sphericalKMeans}
 * (see {@link planKMeans}). Throws {@link UsageError} naming the option.
 */
export function resolveKMeansOptions(partial: Partial<KMeansOptions>, nonEmptyRows: number): KMeansOptions {
  const merged = { ...DEFAULT_KMEANS_OPTIONS, ...stripUndefined(partial) } as Partial<KMeansOptions>;
  const { groups, restarts, maxIterations, stableShare, seed, prune, miniBatch, batchSize, batchIterations, batchTolerance } = merged;
  const { screen, screenSize, screenKeep, screenPasses } = merged;
  const { initialAssignments } = merged;
  checkKeys(partial, KMEANS_KEYS);
  checkGroupCount(groups, nonEmptyRows);
  if (!isWhole(restarts) || restarts < 1) {
    throw new UsageError(`restarts must be a whole number >= 1; got ${show(restarts)}`, 'restarts');
  }
  if (!isWhole(maxIterations) || maxIterations < 1) {
    throw new UsageError(`maxIterations must be a whole number >= 1; got ${show(maxIterations)}`, 'maxIterations');
  }
  if (typeof stableShare !== 'number' || !(stableShare >= 0 && stableShare <= 1)) {
    throw new UsageError(`stableShare must be a number from 0 to 1; got ${show(stableShare)}`, 'stableShare');
  }
  if (!isWhole(seed) || seed < 0 || seed > MAX_SEED) {
    throw new UsageError(`seed must be a whole number from 0 to ${MAX_SEED}; got ${show(seed)}`, 'seed');
  }
  if (typeof prune !== 'boolean') {
    throw new UsageError(`prune must be true or false; got ${show(prune)}`, 'prune');
  }
  if (miniBatch !== 'auto' && typeof miniBatch !== 'boolean') {
    throw new UsageError(`miniBatch must be "auto", true or false; got ${show(miniBatch)}`, 'miniBatch');
  }
  if (!isWhole(batchSize) || batchSize < 1) {
    throw new UsageError(`batchSize must be a whole number >= 1; got ${show(batchSize)}`, 'batchSize');
  }
  if (!isWhole(batchIterations) || batchIterations < 1) {
    throw new UsageError(`batchIterations must be a whole number >= 1; got ${show(batchIterations)}`, 'batchIterations');
  }
  if (typeof batchTolerance !== 'number' || !(batchTolerance >= 0) || !Number.isFinite(batchTolerance)) {
    throw new UsageError(`batchTolerance must be a number >= 0; got ${show(batchTolerance)}`, 'batchTolerance');
  }
  if (screen !== 'auto' && typeof screen !== 'boolean') {
    throw new UsageError(`screen must be "auto", true or false; got ${show(screen)}`, 'screen');
  }
  if (!isWhole(screenSize) || screenSize < 2) {
    throw new UsageError(`screenSize must be a whole number >= 2; got ${show(screenSize)}`, 'screenSize');
  }
  if (!isWhole(screenKeep) || screenKeep < 1) {
    throw new UsageError(`screenKeep must be a whole number >= 1; got ${show(screenKeep)}`, 'screenKeep');
  }
  if (!isWhole(screenPasses) || screenPasses < 1) {
    throw new UsageError(`screenPasses must be a whole number >= 1; got ${show(screenPasses)}`, 'screenPasses');
  }
  const resolved: KMeansOptions = {
    groups,
    restarts,
    maxIterations,
    stableShare,
    seed,
    prune,
    miniBatch,
    batchSize,
    batchIterations,
    batchTolerance,
    screen,
    screenSize,
    screenKeep,
    screenPasses,
  };
  if (initialAssignments !== undefined) {
    if (!isArrayLikeOfNumbers(initialAssignments)) {
      throw new UsageError(
        `initialAssignments must be an Int32Array or an array of group numbers; got ${describe(initialAssignments)}`,
        'initialAssignments',
      );
    }
    if (miniBatch === true) {
      throw new UsageError(
        'miniBatch must be false or "auto" when initialAssignments is given (a given partition is refined by full passes); got true',
        'miniBatch',
      );
    }
    resolved.initialAssignments = initialAssignments;
  }
  return resolved;
}

function isArrayLikeOfNumbers(value: unknown): value is ArrayLike<number> {
  if (ArrayBuffer.isView(value)) return !(value instanceof DataView) && !(value instanceof BigInt64Array) && !(value instanceof BigUint64Array);
  return Array.isArray(value) && value.every((v) => typeof v === 'number');
}

function describe(value: unknown): string {
  if (Array.isArray(value)) return 'an array holding a non-number';
  if (ArrayBuffer.isView(value)) return `a ${value.constructor.name}`;
  return show(value);
}

function isWhole(value: unknown): value is number {
  return typeof value === 'number' && Number.isInteger(value);
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

/** Whether a run on `nonEmptyRows` rows with these options uses mini-batch steps. */
export function usesMiniBatch(options: KMeansOptions, nonEmptyRows: number): boolean {
  if (options.initialAssignments !== undefined) return false;
  return options.miniBatch === 'auto' ? nonEmptyRows >= MINI_BATCH_AUTO_ROWS : options.miniBatch;
}

/**
 * Rows in the screening sample of a run on `nonEmptyRows` rows, or 0 when
 * its restarts are not screened: never with `initialAssignments` or a
 * single restart; `screen: 'auto'` from {@link SCREEN_AUTO_ROWS} rows. The
 * sample holds `max(screenSize, groups)` rows, and no screening happens when
 * that is not fewer than the rows themselves.
 */
export function screenSampleSize(options: KMeansOptions, nonEmptyRows: number): number {
  if (options.initialAssignments !== undefined || options.restarts < 2) return 0;
  const on = options.screen === 'auto' ? nonEmptyRows >= SCREEN_AUTO_ROWS : options.screen;
  if (!on) return 0;
  const size = Math.max(options.screenSize, options.groups);
  return size < nonEmptyRows ? size : 0;
}

/**
 * Resolves and validates options against `matrix` (the bound on `groups`,
 * the contents of `initialAssignments`) and decides on mini-batch. The
 * first step of {@link sphericalKMeans} and of the parallel runner.
 */
export function planKMeans(matrix: Csr, options: Partial<KMeansOptions> & { groups: number }): KMeansPlan {
  const nonEmpty = countNonEmptyRows(matrix);
  const resolved = resolveKMeansOptions(options, nonEmpty);
  const initial = resolved.initialAssignments ?? null;
  if (initial) validateInitialAssignments(matrix, initial, resolved.groups);
  const screenSize = screenSampleSize(resolved, nonEmpty);
  const screenKeep = Math.min(resolved.screenKeep, resolved.restarts);
  return { matrix, options: resolved, nonEmpty, miniBatch: usesMiniBatch(resolved, nonEmpty), initial, screenSize, screenKeep };
}

/**
 * Runs spherical k-means on the rows of `matrix` (L2-normalised, or all-zero)
 * on the calling thread. Options are merged with
 * {@link DEFAULT_KMEANS_OPTIONS} and validated against the data; a bad value
 * throws {@link UsageError}.
 */
export function sphericalKMeans(matrix: Csr, options: Partial<KMeansOptions> & { groups: number }, onProgress?: KMeansProgress): KMeansResult {
  const plan = planKMeans(matrix, options);
  const ws = createWorkspace(plan, LOCAL_ALLOCATOR);
  const steps = kmeansSteps(ws, plan, onProgress);
  for (;;) {
    const step = steps.next();
    if (step.done) return finishResult(ws, step.value);
    const { work, list, count } = ws.request;
    runBlock(ws, work, list, 0, count, ws.passStats, 0);
  }
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
    // The k-means pass's own sweep (four non-zeros per pass over k): each score adds its products in the row's order.
    scoreAll(indices, values, centroids, k, indptr[i]!, indptr[i + 1]!, scores);
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
