/**
 * The machinery behind {@link sphericalKMeans} and the parallel runner in
 * `src/parallel/`: the workspace of typed arrays, k-means++ seeding, the
 * centroid update, Lloyd restarts, mini-batch restarts and the canonical
 * result.
 *
 * The algorithm is written once, as a generator ({@link kmeansSteps}). Each
 * time it needs a pass over many rows (an assignment pass, a mini-batch
 * assignment, a seeding update, a fit refresh) it describes the pass in
 * `workspace.request` and yields; the runner does the pass, sums its
 * statistics into `workspace.passStats` and resumes it. The single-thread
 * runner does the pass inline with {@link runBlock}; the parallel runner
 * splits it into contiguous blocks, one per thread, which call the same
 * {@link runBlock}. Everything else (seeding draws, centroid sums, restarts,
 * numbering) runs on the calling thread in a fixed order, so both runners
 * give bit-identical results.
 *
 * Internal to the k-means modules; the public surface is `kmeans.ts` and
 * `src/parallel/`.
 *
 * @module
 */

import type { Csr } from '../types.js';
import { UsageError } from '../util/errors.js';
import { createRng, deriveSeed, type Rng } from '../util/random.js';
import { rowIsNonEmpty } from '../util/csr.js';
import {
  LIST_ACTIVE,
  LIST_BATCH,
  LIST_SAMPLE,
  LIST_SCREEN,
  STAT_CHANGED,
  STAT_DOTS,
  STAT_LENGTH,
  STAT_SCORED,
  STAT_SKIPPED,
  WORK_ASSIGN_PLAIN,
  WORK_ASSIGN_PRUNED,
  WORK_ASSIGN_SCALED,
  WORK_FIT,
  WORK_SEED,
  rowList,
  seedTrials,
  type KernelArrays,
} from './kmeans-kernel.js';
import type { KMeansOptions, KMeansResult } from './kmeans-types.js';

/** Allocates the typed arrays of a workspace: ordinary ones, or views on shared memory for threads. */
export interface Allocator {
  /** An Int32Array of `length` zeros. */
  int32(length: number): Int32Array;
  /** A Float32Array of `length` zeros. */
  float32(length: number): Float32Array;
  /** A Float64Array of `length` zeros. */
  float64(length: number): Float64Array;
}

/** Ordinary (not shared) typed arrays. */
export const LOCAL_ALLOCATOR: Allocator = Object.freeze({
  int32: (length: number) => new Int32Array(length),
  float32: (length: number) => new Float32Array(length),
  float64: (length: number) => new Float64Array(length),
});

/** Non-empty rows at or above which `miniBatch: 'auto'` switches mini-batch on. */
export const MINI_BATCH_AUTO_ROWS = 200_000;

/** Repair passes after a mini-batch run when its final pass leaves a group empty (see {@link miniBatchRestart}). */
const REPAIR_ROUNDS = 3;

/** A validated run: resolved options and what was learnt from the data. */
export interface KMeansPlan {
  readonly matrix: Csr;
  readonly options: KMeansOptions;
  /** Number of rows that take part. */
  readonly nonEmpty: number;
  /** Whether restarts use mini-batch steps. */
  readonly miniBatch: boolean;
  /** The validated starting partition, or null to seed with k-means++. */
  readonly initial: ArrayLike<number> | null;
  /** Rows in the screening sample (see {@link screenedSteps}), or 0 when restarts run on all rows from the start. */
  readonly screenSize: number;
  /** Restarts continued on all rows after screening (1 .. restarts; unused when `screenSize` is 0). */
  readonly screenKeep: number;
}

/**
 * Checks a starting partition against the data: one entry per row, a group
 * number from 0 to k − 1 for every non-empty row (empty rows may hold −1 or
 * any group; they are ignored), and every group used by a non-empty row.
 * Throws {@link UsageError} naming `initialAssignments`.
 */
export function validateInitialAssignments(matrix: Csr, initial: ArrayLike<number>, k: number): void {
  const n = matrix.rows;
  if (initial.length !== n) {
    throw new UsageError(
      `initialAssignments must have one entry per row (${n}); got ${initial.length}`,
      'initialAssignments',
    );
  }
  const used = new Uint8Array(k);
  for (let r = 0; r < n; r++) {
    const g = initial[r]!;
    const empty = !rowIsNonEmpty(matrix, r);
    if (empty && g === -1) continue;
    if (!Number.isInteger(g) || g < 0 || g >= k) {
      const allowed = empty ? `-1 or a group number from 0 to ${k - 1}` : `a group number from 0 to ${k - 1}`;
      throw new UsageError(
        `initialAssignments must hold ${allowed} at row ${r}${empty ? ' (an empty row)' : ''}; got ${String(g)}`,
        'initialAssignments',
      );
    }
    if (!empty) used[g] = 1;
  }
  for (let g = 0; g < k; g++) {
    if (used[g] === 0) {
      throw new UsageError(
        `initialAssignments must give every group from 0 to ${k - 1} at least one non-empty row; group ${g} has none`,
        'initialAssignments',
      );
    }
  }
}

/** Everything one call needs, allocated once; the passes allocate nothing. */
export interface Workspace extends KernelArrays {
  readonly matrix: Csr;
  readonly options: KMeansOptions;
  /** Best restart so far (copied into, not swapped, so shared arrays stay put). */
  readonly bestAssign: Int32Array;
  readonly bestFit: Float64Array;
  readonly bestCentroids: Float32Array;
  /** Float64 sums of member rows, term-major like the centroids. */
  readonly sums: Float64Array;
  readonly counts: Int32Array;
  readonly norms: Float64Array;
  /** Group of each row at the last centroid update (−1 before the first), to find the groups that changed. */
  readonly previous: Int32Array;
  /** Groups whose members changed since the last update, as flags and as a list. */
  readonly dirty: Uint8Array;
  readonly dirtyList: Int32Array;
  /** Re-seeding moves of one update: row, group it left, group it filled. */
  readonly movedRow: Int32Array;
  readonly movedFrom: Int32Array;
  readonly movedTo: Int32Array;
  /** Seeding: 1 where a row is already a seed. */
  readonly chosen: Uint8Array;
  /** Seeding: the candidate rows of one step. */
  readonly candidates: Int32Array;
  /** Mini-batch: rows each centroid has absorbed so far (the 1/count learning rate). */
  readonly absorbed: Float64Array;
  /** Mini-batch: members of each group in the current step. */
  readonly stepSizes: Int32Array;
  /** Mini-batch: ‖wide[·, g]‖² of each group's unscaled vector. */
  readonly wideNorm: Float64Array;
  /** Mini-batch: 1 at each (term, group) entry of `wide` the current step touches, listed in `touched`. */
  readonly mark: Uint8Array;
  readonly touched: Int32Array;
  /** Mini-batch: the value of each touched entry before the step. */
  readonly before: Float64Array;
  /** Mini-batch: per group, the sums of squares of its touched entries before and after the step. */
  readonly oldSq: Float64Array;
  readonly newSq: Float64Array;
  /** Skipped rows and dot products per full assignment pass of the current restart, and of the best. */
  readonly skippedByPass: Int32Array;
  readonly bestSkippedByPass: Int32Array;
  readonly dotsByPass: Float64Array;
  readonly bestDotsByPass: Float64Array;
  /** The pass the generator asks for: a `WORK_*` code, a `LIST_*` code and how many rows of that list. */
  readonly request: { work: number; list: number; count: number };
  /** Sums over the blocks of the last pass: changed, scored, skipped (see `STAT_*`). */
  readonly passStats: Float64Array;
  /**
   * The rows the Lloyd passes, centroid updates and objective walk, and the
   * kernel list that names them: `active` / {@link LIST_ACTIVE}, or the
   * screening sample `screen` / {@link LIST_SCREEN} while screening.
   */
  pile: Int32Array;
  pileList: number;
  /** Screening: centroids and member counts of the restarts kept so far, `screenKeep` slots. */
  readonly keptCentroids: Float32Array;
  readonly keptCounts: Int32Array;
  /** Rows scored in full, rows skipped and dot products, over every pass of every restart. */
  scoredTotal: number;
  skippedTotal: number;
  dotsTotal: number;
}

/** Size of the per-pass record of skipped rows. */
function passSlots(plan: KMeansPlan): number {
  return plan.miniBatch ? REPAIR_ROUNDS + 1 : plan.options.maxIterations;
}

/**
 * Allocates the workspace of `plan`. The arrays the kernel reads or writes
 * come from `alloc` (shared memory for threads); the rest are ordinary.
 * Note that `plan.matrix` is used as given: for threads, pass a matrix whose
 * arrays are already shared.
 */
export function createWorkspace(plan: KMeansPlan, alloc: Allocator): Workspace {
  const { matrix, options } = plan;
  const n = matrix.rows;
  const d = matrix.cols;
  const k = options.groups;
  const active = alloc.int32(plan.nonEmpty);
  for (let r = 0, a = 0; r < n; r++) if (rowIsNonEmpty(matrix, r)) active[a++] = r;
  const rowNorm = alloc.float64(n);
  const { indptr, values } = matrix;
  for (let r = 0; r < n; r++) {
    let s = 0;
    for (let j = indptr[r]!; j < indptr[r + 1]!; j++) s += values[j]! * values[j]!;
    rowNorm[r] = Math.sqrt(s);
  }
  const slots = passSlots(plan);
  // Entries a mini-batch step can touch: at most the batch's non-zeros (the longest rows), at most d × k.
  let longest = 0;
  for (let a = 0; a < active.length; a++) longest = Math.max(longest, indptr[active[a]! + 1]! - indptr[active[a]!]!);
  const touchable = plan.miniBatch ? Math.min(d * k, options.batchSize * longest) : 0;
  return {
    k,
    matrix,
    options,
    indptr: matrix.indptr,
    indices: matrix.indices,
    values: matrix.values,
    rowNorm,
    centroids: alloc.float32(d * k),
    assign: alloc.int32(n),
    fit: alloc.float64(n),
    upper: alloc.float64(n),
    lower: alloc.float64(n),
    move: alloc.float64(k),
    order: alloc.int32(k),
    moved: alloc.float64(k),
    closest: alloc.float64(n),
    dense: alloc.float64(d * seedTrials(k)),
    trials: alloc.float64(seedTrials(k) * seedSampleSize(plan.nonEmpty, k, options.batchSize)),
    active,
    batch: alloc.int32(plan.miniBatch ? options.batchSize : 0),
    sample: alloc.int32(
      plan.miniBatch || plan.screenSize > 0 || plan.nonEmpty > seedSampleSize(plan.nonEmpty, k, options.batchSize) ? plan.nonEmpty : 0,
    ),
    screen: alloc.int32(plan.screenSize),
    scores: new Float64Array(k),
    bestAssign: new Int32Array(n),
    bestFit: new Float64Array(n),
    bestCentroids: new Float32Array(d * k),
    sums: new Float64Array(d * k),
    counts: new Int32Array(k),
    norms: new Float64Array(k),
    previous: new Int32Array(n),
    dirty: new Uint8Array(k),
    dirtyList: new Int32Array(k),
    movedRow: new Int32Array(k),
    movedFrom: new Int32Array(k),
    movedTo: new Int32Array(k),
    chosen: new Uint8Array(n),
    candidates: new Int32Array(seedTrials(k)),
    absorbed: new Float64Array(k),
    stepSizes: new Int32Array(k),
    wide: alloc.float32(plan.miniBatch ? d * k : 0),
    scale: alloc.float64(k),
    wideNorm: new Float64Array(k),
    mark: new Uint8Array(plan.miniBatch ? d * k : 0),
    touched: new Int32Array(touchable),
    before: new Float64Array(touchable),
    oldSq: new Float64Array(k),
    newSq: new Float64Array(k),
    skippedByPass: new Int32Array(slots),
    bestSkippedByPass: new Int32Array(slots),
    dotsByPass: new Float64Array(slots),
    bestDotsByPass: new Float64Array(slots),
    request: { work: WORK_ASSIGN_PLAIN, list: LIST_ACTIVE, count: 0 },
    passStats: new Float64Array(STAT_LENGTH),
    pile: active,
    pileList: LIST_ACTIVE,
    keptCentroids: new Float32Array(plan.screenSize > 0 ? plan.screenKeep * d * k : 0),
    keptCounts: new Int32Array(plan.screenSize > 0 ? plan.screenKeep * k : 0),
    scoredTotal: 0,
    skippedTotal: 0,
    dotsTotal: 0,
  };
}

/** Outcome of one restart. */
interface RestartOutcome {
  objective: number;
  iterations: number;
  converged: boolean;
  reseeded: number;
  batches: number;
}

/**
 * Progress of a k-means run: steps done and the most there can be (restarts ×
 * `maxIterations` Lloyd passes, or × `batchIterations` mini-batch steps; a
 * restart that converges early counts in full). Data for the caller to show;
 * the engine never prints.
 */
export type KMeansProgress = (done: number, total: number) => void;

/** What {@link kmeansSteps} returns once every restart is done. */
export interface RunSummary {
  readonly kept: RestartOutcome;
  readonly restartObjectives: Float64Array;
  /** Objective of each restart on the screening sample (empty without screening). */
  readonly screenObjectives: Float64Array;
}

/** Describes the next pass in `ws.request` and clears `ws.passStats`; the caller then yields. */
function ask(ws: Workspace, work: number, list: number, count: number): void {
  ws.request.work = work;
  ws.request.list = list;
  ws.request.count = count;
  ws.passStats.fill(0);
}

/** Folds the statistics of the pass just done into the totals; `pass` >= 0 also records them as that full pass. */
function tally(ws: Workspace, pass: number): void {
  ws.scoredTotal += ws.passStats[STAT_SCORED]!;
  ws.skippedTotal += ws.passStats[STAT_SKIPPED]!;
  ws.dotsTotal += ws.passStats[STAT_DOTS]!;
  if (pass >= 0 && pass < ws.skippedByPass.length) {
    ws.skippedByPass[pass] = ws.passStats[STAT_SKIPPED]!;
    ws.dotsByPass[pass] = ws.passStats[STAT_DOTS]!;
  }
}

/**
 * The whole run as a generator: every restart (k-means++ or the given
 * partition, then Lloyd passes; or mini-batch steps and a final pass), the
 * best kept in `ws.best*`. Yields whenever `ws.request` holds a pass to do;
 * returns the kept restart's outcome and every restart's objective.
 */
export function* kmeansSteps(ws: Workspace, plan: KMeansPlan, onProgress?: KMeansProgress): Generator<void, RunSummary, void> {
  if (plan.screenSize > 0) return yield* screenedSteps(ws, plan, onProgress);
  const opts = plan.options;
  const restarts = plan.initial ? 1 : opts.restarts;
  // Progress: steps of every restart (Lloyd passes or mini-batch steps), a restart that stops early jumps to its end.
  const per = plan.miniBatch ? opts.batchIterations : opts.maxIterations;
  const step = (r: number) => (onProgress ? (s: number) => onProgress(r * per + Math.min(s, per), restarts * per) : undefined);
  const restartObjectives = new Float64Array(restarts);
  let kept: RestartOutcome | undefined;
  for (let r = 0; r < restarts; r++) {
    const rng = createRng(deriveSeed(opts.seed, r));
    const outcome = plan.miniBatch ? yield* miniBatchRestart(ws, rng, step(r)) : yield* lloydRestart(ws, rng, plan.initial, step(r));
    onProgress?.((r + 1) * per, restarts * per);
    restartObjectives[r] = outcome.objective;
    if (kept === undefined || outcome.objective > kept.objective) {
      kept = outcome;
      ws.bestAssign.set(ws.assign);
      ws.bestFit.set(ws.fit);
      ws.bestCentroids.set(ws.centroids);
      ws.bestSkippedByPass.set(ws.skippedByPass);
      ws.bestDotsByPass.set(ws.dotsByPass);
    }
  }
  return { kept: kept!, restartObjectives, screenObjectives: new Float64Array(0) };
}

/** Keeps the current restart's outcome in `ws.best*` when it beats `kept` (ties to the earlier restart). */
function keepIfBetter(ws: Workspace, kept: RestartOutcome | undefined, outcome: RestartOutcome): RestartOutcome {
  if (kept !== undefined && !(outcome.objective > kept.objective)) return kept;
  ws.bestAssign.set(ws.assign);
  ws.bestFit.set(ws.fit);
  ws.bestCentroids.set(ws.centroids);
  ws.bestSkippedByPass.set(ws.skippedByPass);
  ws.bestDotsByPass.set(ws.dotsByPass);
  return outcome;
}

/** Index of the seed stream of the screening sample (restarts use 0 .. restarts − 1). */
const SCREEN_STREAM = 0x7fffffff;

/**
 * The run with screened restarts. A seeded uniform sample of `screenSize`
 * active rows (drawn once, kept in row order in `ws.screen`) stands in for
 * the pile: every restart seeds (k-means++, from restart r's stream, as
 * unscreened) and runs its Lloyd passes on the sample only (with mini-batch
 * steps to follow, at most `screenPasses` of them). The
 * `screenKeep` restarts with the best sample objective (ties to the earlier
 * restart) then continue, in restart order, on all rows from their sample
 * centroids: Lloyd passes, or mini-batch steps with each centroid's learning
 * count starting at its sample members, then the final full pass. The best
 * objective on all rows is kept (ties to the earlier restart). Every draw
 * comes from seeded streams and every sum runs in a fixed order on the
 * calling thread, so the result is the same on any number of threads.
 */
function* screenedSteps(ws: Workspace, plan: KMeansPlan, onProgress?: KMeansProgress): Generator<void, RunSummary, void> {
  const opts = plan.options;
  const { k, active, screen, keptCentroids, keptCounts } = ws;
  const restarts = opts.restarts;
  const keep = Math.min(plan.screenKeep, restarts);
  const dk = ws.centroids.length;
  const fullPer = plan.miniBatch ? opts.batchIterations : opts.maxIterations;
  // Mini-batch runs screen briefly: at most `screenPasses` Lloyd passes per restart on the sample.
  const screenPer = plan.miniBatch ? Math.min(opts.screenPasses, opts.maxIterations) : opts.maxIterations;
  const total = restarts * screenPer + keep * fullPer;
  let done = 0;
  const step = (per: number) => (onProgress ? (s: number) => onProgress(done + Math.min(s, per), total) : undefined);

  drawSample(ws, active, screen.length, createRng(deriveSeed(opts.seed, SCREEN_STREAM)));
  screen.set(ws.sample.subarray(0, screen.length));
  screen.sort();

  const screenObjectives = new Float64Array(restarts);
  const slotObjective = new Float64Array(keep);
  const slotRestart = new Int32Array(keep).fill(-1);
  ws.pile = screen;
  ws.pileList = LIST_SCREEN;
  for (let r = 0; r < restarts; r++) {
    const outcome = yield* lloydRestart(ws, createRng(deriveSeed(opts.seed, r)), null, step(screenPer), screenPer);
    done += screenPer;
    onProgress?.(done, total);
    screenObjectives[r] = outcome.objective;
    // The slot to fill: a free one, else the worst kept (lowest objective, the later restart on ties) if this beats it.
    let slot = -1;
    for (let q = 0; q < keep && slot < 0; q++) if (slotRestart[q] === -1) slot = q;
    if (slot < 0) {
      let worst = 0;
      for (let q = 1; q < keep; q++) {
        if (slotObjective[q]! < slotObjective[worst]! || (slotObjective[q] === slotObjective[worst] && slotRestart[q]! > slotRestart[worst]!)) worst = q;
      }
      if (outcome.objective > slotObjective[worst]!) slot = worst;
    }
    if (slot < 0) continue;
    slotObjective[slot] = outcome.objective;
    slotRestart[slot] = r;
    keptCentroids.set(ws.centroids, slot * dk);
    keptCounts.set(ws.counts, slot * k);
  }

  ws.pile = active;
  ws.pileList = LIST_ACTIVE;
  const restartObjectives = new Float64Array(restarts).fill(NaN);
  let kept: RestartOutcome | undefined;
  for (let r = 0; r < restarts; r++) {
    const slot = slotRestart.indexOf(r);
    if (slot < 0) continue;
    ws.centroids.set(keptCentroids.subarray(slot * dk, (slot + 1) * dk));
    let outcome: RestartOutcome;
    if (plan.miniBatch) {
      for (let g = 0; g < k; g++) ws.absorbed[g] = keptCounts[slot * k + g]!;
      const rng = createRng(deriveSeed(deriveSeed(opts.seed, r), 1));
      outcome = yield* miniBatchFrom(ws, rng, step(fullPer));
    } else {
      resetLloyd(ws);
      outcome = yield* lloydPasses(ws, step(fullPer));
    }
    done += fullPer;
    onProgress?.(done, total);
    restartObjectives[r] = outcome.objective;
    kept = keepIfBetter(ws, kept, outcome);
  }
  return { kept: kept!, restartObjectives, screenObjectives };
}

/**
 * Rows k-means++ seeding draws from: all `m` rows up to `max(k, 3 · batchSize)`
 * (12,288 by default), else a seeded uniform sample of that many. Mini-batch
 * runs always seeded on such a sample (as scikit-learn's MiniBatchKMeans does
 * with `init_size = 3 · batch_size`, from memory); full passes do so too since
 * greedy seeding scores `2 + ln k` candidates per seed: on all 60k rows of a
 * generated export it cost more than all the Lloyd passes after it (profile in
 * bench/results.md). The seeds are rows of the pile drawn by the same D²
 * rule, only from fewer candidates; the passes then run over every row. Piles
 * up to the sample size (every labelled corpus of bench/quality) seed exactly
 * as before.
 */
function seedSampleSize(m: number, k: number, batchSize: number): number {
  return Math.min(m, Math.max(k, 3 * batchSize));
}

/** Puts a seeded uniform sample of `size` of `rows` in `ws.sample[0 .. size)` (partial Fisher–Yates). */
function drawSample(ws: Workspace, rows: Int32Array, size: number, rng: Rng): void {
  const { sample } = ws;
  const m = rows.length;
  sample.set(rows);
  for (let s = 0; s < size; s++) {
    const j = s + rng.int(m - s);
    const t = sample[s]!;
    sample[s] = sample[j]!;
    sample[j] = t;
  }
}

/**
 * One Lloyd restart: k-means++ seeding (or the means of `initial`), then
 * passes until stable or `maxIterations`. With pruning, rows the bounds
 * settle keep a stale `fit`, so a {@link WORK_FIT} pass refreshes it before
 * a re-seeding reads it; every restart ends with one, which also gives the
 * fit against the final means when the limit stopped it.
 */
function* lloydRestart(
  ws: Workspace,
  rng: Rng,
  initial: ArrayLike<number> | null,
  onStep?: (done: number) => void,
  limit = ws.options.maxIterations,
): Generator<void, RestartOutcome, void> {
  const { pile, assign, options } = ws;
  const m = pile.length;
  resetLloyd(ws);
  if (initial) {
    for (let a = 0; a < m; a++) assign[pile[a]!] = initial[pile[a]!]!;
    countMembers(ws);
    updateCentroids(ws); // every group has a member (validated): no re-seeding
  } else {
    const size = seedSampleSize(m, ws.k, options.batchSize);
    if (size < m) {
      drawSample(ws, pile, size, rng);
      yield* seedCentroids(ws, LIST_SAMPLE, size, rng);
    } else yield* seedCentroids(ws, ws.pileList, m, rng);
  }
  return yield* lloydPasses(ws, onStep, limit);
}

/** Clears the per-row state of a Lloyd run: no group, no fit, bounds unknown. */
function resetLloyd(ws: Workspace): void {
  ws.fit.fill(0);
  ws.upper.fill(Infinity);
  ws.lower.fill(-Infinity);
  ws.previous.fill(-1);
  ws.skippedByPass.fill(0);
  ws.dotsByPass.fill(0);
  ws.assign.fill(-1);
}

/** Lloyd passes over `ws.pile` from the centroids in `ws.centroids` until stable or `maxIterations` (see {@link lloydRestart}). */
function* lloydPasses(ws: Workspace, onStep?: (done: number) => void, limit = ws.options.maxIterations): Generator<void, RestartOutcome, void> {
  const { options, pile, pileList } = ws;
  const m = pile.length;
  const work = options.prune ? WORK_ASSIGN_PRUNED : WORK_ASSIGN_PLAIN;
  let iterations = 0;
  let converged = false;
  let reseeded = 0;
  while (iterations < limit) {
    ask(ws, work, pileList, m);
    yield;
    tally(ws, iterations);
    iterations++;
    onStep?.(iterations);
    const changed = ws.passStats[STAT_CHANGED]!;
    if (changed === 0) {
      converged = true;
      break;
    }
    countMembers(ws);
    if (options.prune && hasEmptyGroup(ws)) {
      ask(ws, WORK_FIT, pileList, m);
      yield;
    }
    reseeded += updateCentroids(ws);
    // Few enough moved: stable for our purpose (the centroids are the means of this assignment).
    if (changed <= options.stableShare * m) {
      converged = true;
      break;
    }
  }
  // Exact fit of every row against the final centroids: those of the last
  // pass when it converged, the means of the current assignment otherwise.
  ask(ws, WORK_FIT, pileList, m);
  yield;
  return { objective: objectiveOf(ws), iterations, converged, reseeded, batches: 0 };
}

/** Sum of `fit` over the rows that take part, in row order. */
function objectiveOf(ws: Workspace): number {
  const { pile: active, fit } = ws;
  let objective = 0;
  for (let a = 0; a < active.length; a++) objective += fit[active[a]!]!;
  return objective;
}

/** Writes row `i` as centroid `g` (the column must be zero beforehand). */
function placeRow(matrix: Csr, i: number, centroids: Float32Array, k: number, g: number): void {
  const { indptr, indices, values } = matrix;
  for (let j = indptr[i]!; j < indptr[i + 1]!; j++) centroids[indices[j]! * k + g] = values[j]!;
}

/** Scatters row `i` into slot `slot` of the dense candidate array (or clears it again). */
function scatterRow(ws: Workspace, i: number, slot: number, keep: boolean): void {
  const { indptr, indices, values } = ws.matrix;
  const base = slot * ws.matrix.cols;
  for (let j = indptr[i]!; j < indptr[i + 1]!; j++) ws.dense[base + indices[j]!] = keep ? values[j]! : 0;
}

/**
 * Greedy k-means++ seeding over the first `count` rows of `list`: k-means++
 * (Arthur & Vassilvitskii, SODA 2007) with weights `max(0, 1 − cos(x, nearest
 * seed))` (0 for rows already chosen; for unit rows `‖x − c‖² = 2 (1 − cos)`,
 * so this is D² weighting on the sphere), where each step draws
 * {@link seedTrials}`(k)` candidates and keeps the one that leaves the least
 * total weight — the local trials of the paper's §6, as scikit-learn seeds
 * (from memory: its `_kmeans_plusplus` with `n_local_trials = 2 + ⌊ln k⌋`).
 * Draws `rng.int(count)` for the first seed and one `rng.next()` per
 * candidate; if every remaining weight is 0 (all rows coincide with a seed) a
 * candidate is drawn with `rng.int` among the rows not yet chosen instead. The
 * scores against the candidates are one pass ({@link WORK_SEED}) per step;
 * the totals and the choice run here, in row order (ties to the earliest
 * candidate), so the seeds do not depend on the thread count.
 */
function* seedCentroids(ws: Workspace, list: number, count: number, rng: Rng): Generator<void, void, void> {
  const { matrix, k, centroids, closest, chosen, trials, candidates } = ws;
  const rows = rowList(ws, list);
  const t = seedTrials(k);
  centroids.fill(0);
  chosen.fill(0);
  closest.fill(-Infinity);
  for (let g = 0; g < k; g++) {
    // The first seed is one uniform draw; later ones the best of t weighted draws.
    const drawn = g === 0 ? 1 : t;
    if (g === 0) candidates[0] = rows[rng.int(count)]!;
    else for (let c = 0; c < t; c++) candidates[c] = drawSeed(ws, rows, count, g, rng);
    for (let c = 0; c < drawn; c++) scatterRow(ws, candidates[c]!, c, true);
    ask(ws, WORK_SEED, list, count);
    yield;
    for (let c = 0; c < drawn; c++) scatterRow(ws, candidates[c]!, c, false);
    let best = 0;
    if (drawn > 1) {
      let bestLeft = Infinity;
      for (let c = 0; c < drawn; c++) {
        let left = 0;
        for (let a = 0; a < count; a++) {
          const i = rows[a]!;
          if (chosen[i] || i === candidates[c]) continue;
          const w = 1 - Math.max(closest[i]!, trials[a * t + c]!);
          if (w > 0) left += w;
        }
        if (left < bestLeft) {
          bestLeft = left;
          best = c;
        }
      }
    }
    const row = candidates[best]!;
    chosen[row] = 1;
    placeRow(matrix, row, centroids, k, g);
    for (let a = 0; a < count; a++) {
      const i = rows[a]!;
      const v = trials[a * t + best]!;
      if (v > closest[i]!) closest[i] = v;
    }
  }
}

/** Draws one candidate for seed number `g` (see {@link seedCentroids}). */
function drawSeed(ws: Workspace, rows: Int32Array, count: number, g: number, rng: Rng): number {
  const { closest, chosen } = ws;
  let total = 0;
  for (let a = 0; a < count; a++) {
    const i = rows[a]!;
    if (chosen[i]) continue; // a seed's own weight is rounding noise
    const w = 1 - closest[i]!;
    if (w > 0) total += w;
  }
  if (total > 0) {
    const target = rng.next() * total;
    let acc = 0;
    let lastPositive = -1;
    for (let a = 0; a < count; a++) {
      const i = rows[a]!;
      if (chosen[i]) continue;
      const w = 1 - closest[i]!;
      if (w <= 0) continue;
      lastPositive = i;
      acc += w;
      if (acc > target) return i;
    }
    return lastPositive; // rounding left the target just past the end
  }
  let skip = rng.int(count - g);
  for (let a = 0; a < count; a++) {
    const i = rows[a]!;
    if (chosen[i]) continue;
    if (skip === 0) return i;
    skip--;
  }
  return -1; // not reached: count - g rows are not chosen
}

/** Adds (sign +1) or removes (sign −1) row `i` from the sums of group `g`. */
function addRow(matrix: Csr, i: number, sums: Float64Array, k: number, g: number, sign: number): void {
  const { indptr, indices, values } = matrix;
  for (let j = indptr[i]!; j < indptr[i + 1]!; j++) sums[indices[j]! * k + g]! += sign * values[j]!;
}

/**
 * Index of the row to move into an empty group: the lowest `fit` (ties to
 * the lowest row) among rows whose group has more than one member. One
 * exists: m >= k rows sit in fewer than k groups, so some group has two.
 */
function farthestMovable(ws: Workspace): number {
  const { pile: active, assign, fit, counts } = ws;
  let far = -1;
  let farFit = Infinity;
  for (let a = 0; a < active.length; a++) {
    const i = active[a]!;
    if (counts[assign[i]!]! > 1 && fit[i]! < farFit) {
      farFit = fit[i]!;
      far = i;
    }
  }
  return far;
}

/**
 * Recomputes the mean directions from the current assignment (members
 * counted in `ws.counts` by {@link countMembers}), re-seeding empty groups
 * first, and records how far each centroid moved (for the bounds; see
 * `kmeans-kernel.ts`). Only groups whose members changed since the last
 * update are recomputed: a group with the same members in the same row order
 * sums to the same bits, so the others keep their centroid and move 0.
 * Returns the number of rows moved into empty groups.
 */
function updateCentroids(ws: Workspace): number {
  const { matrix, pile: active, k, sums, counts, norms, centroids, assign, move, upper, lower, previous, dirty, dirtyList } = ws;
  const { movedRow, movedFrom, movedTo } = ws;
  const m = active.length;
  dirty.fill(0);
  for (let a = 0; a < m; a++) {
    const i = active[a]!;
    const g = assign[i]!;
    const before = previous[i]!;
    if (g !== before) {
      dirty[g] = 1;
      if (before >= 0) dirty[before] = 1;
    }
  }

  // Re-seeding: decide every move first (each sees the earlier ones), then
  // sum the members as they were and apply the moves to the sums one by one,
  // the order of the plain algorithm's arithmetic.
  let reseeded = 0;
  for (let g = 0; g < k; g++) {
    if (counts[g] !== 0) continue;
    const far = farthestMovable(ws);
    const from = assign[far]!;
    counts[from]!--;
    counts[g] = 1;
    assign[far] = g;
    dirty[from] = 1;
    dirty[g] = 1;
    upper[far] = Infinity; // its bounds were about another group
    lower[far] = -Infinity;
    movedRow[reseeded] = far;
    movedFrom[reseeded] = from;
    movedTo[reseeded] = g;
    reseeded++;
  }
  for (let r = 0; r < reseeded; r++) assign[movedRow[r]!] = movedFrom[r]!;

  let nd = 0;
  for (let g = 0; g < k; g++) if (dirty[g]) dirtyList[nd++] = g;
  move.fill(0);
  const d = matrix.cols;
  if (nd * 2 > k) {
    sums.fill(0);
  } else {
    for (let t = 0; t < d; t++) {
      const base = t * k;
      for (let q = 0; q < nd; q++) sums[base + dirtyList[q]!] = 0;
    }
  }
  for (let a = 0; a < m; a++) {
    const i = active[a]!;
    const g = assign[i]!;
    if (dirty[g]) addRow(matrix, i, sums, k, g, 1);
  }
  for (let r = 0; r < reseeded; r++) {
    const far = movedRow[r]!;
    const from = movedFrom[r]!;
    const g = movedTo[r]!;
    addRow(matrix, far, sums, k, from, -1);
    addRow(matrix, far, sums, k, g, 1);
    assign[far] = g;
  }
  for (let a = 0; a < m; a++) previous[active[a]!] = assign[active[a]!]!;
  for (let q = 0; q < nd; q++) norms[dirtyList[q]!] = 0;
  for (let t = 0; t < d; t++) {
    const base = t * k;
    for (let q = 0; q < nd; q++) {
      const g = dirtyList[q]!;
      const s = sums[base + g]!;
      norms[g]! += s * s;
    }
  }
  for (let q = 0; q < nd; q++) {
    const g = dirtyList[q]!;
    norms[g] = norms[g]! > 0 ? 1 / Math.sqrt(norms[g]!) : 0;
  }
  for (let t = 0; t < d; t++) {
    const base = t * k;
    for (let q = 0; q < nd; q++) {
      const g = dirtyList[q]!;
      const c = Math.fround(sums[base + g]! * norms[g]!);
      const step = c - centroids[base + g]!;
      move[g]! += step * step;
      centroids[base + g] = c;
    }
  }
  // Members that cancel out exactly (possible only with negative values):
  // use the group's first member as its direction so every centroid is unit.
  for (let q = 0; q < nd; q++) {
    const g = dirtyList[q]!;
    if (norms[g] !== 0) continue;
    for (let a = 0; a < m; a++) {
      const i = active[a]!;
      if (assign[i] === g) {
        placeRow(matrix, i, centroids, k, g);
        break;
      }
    }
    move[g] = Infinity;
  }
  sortMoves(ws);
  return reseeded;
}

/**
 * From the squared movements in `move`, sets `move` to movements and lists
 * the groups by decreasing movement in `order` / `moved` (ties by group), for
 * the bound of the next pass. Insertion sort: k is small and nothing is
 * allocated.
 */
function sortMoves(ws: Workspace): void {
  const { k, move, order, moved } = ws;
  for (let g = 0; g < k; g++) {
    const v = Math.sqrt(move[g]!);
    move[g] = v;
    let p = g;
    while (p > 0 && moved[p - 1]! < v) {
      moved[p] = moved[p - 1]!;
      order[p] = order[p - 1]!;
      p--;
    }
    moved[p] = v;
    order[p] = g;
  }
}

/**
 * One mini-batch restart (Sculley, "Web-scale k-means clustering", WWW 2010,
 * Algorithm 1), on the sphere:
 *
 * 1. k-means++ seeding on a seeded sample of `min(m, max(k, 3 · batchSize))`
 *    rows (drawn without replacement by a partial Fisher–Yates shuffle).
 * 2. Up to `batchIterations` steps; each draws `batchSize` rows uniformly
 *    with replacement, assigns them to their nearest centroid (all against
 *    the centroids before the step, as in the paper), then moves each
 *    centroid c that got members with the per-centroid learning rate
 *    1/count: applied one member x at a time, `c ← (1 − 1/v) c + (1/v) x`
 *    with v the centroid's running count, which telescopes to
 *    `c ← (v₀ c + Σ x) / (v₀ + b_c)`; the sum is then projected back onto
 *    the unit sphere. Stops early once every centroid moved less than
 *    `batchTolerance` (Euclidean, between unit vectors) in a step.
 * 3. One full assignment pass, so every row gets its nearest centroid.
 *    If a centroid then has no member, it is replaced by the row that fits
 *    its group worst (as in the Lloyd re-seeding) and the pass is repeated,
 *    up to {@link REPAIR_ROUNDS} times; groups still empty after that take
 *    their row without a further pass.
 */
function* miniBatchRestart(ws: Workspace, rng: Rng, onStep?: (done: number) => void): Generator<void, RestartOutcome, void> {
  const { active, options, k } = ws;
  const m = active.length;
  const sampleSize = seedSampleSize(m, k, options.batchSize);
  drawSample(ws, active, sampleSize, rng);
  yield* seedCentroids(ws, LIST_SAMPLE, sampleSize, rng);
  ws.absorbed.fill(0);
  return yield* miniBatchFrom(ws, rng, onStep);
}

/**
 * Steps 2 and 3 of {@link miniBatchRestart}: mini-batch steps from the
 * centroids in `ws.centroids` with the learning counts in `ws.absorbed`,
 * then the full pass and its repairs.
 */
function* miniBatchFrom(ws: Workspace, rng: Rng, onStep?: (done: number) => void): Generator<void, RestartOutcome, void> {
  const { active, batch, assign, fit, upper, options, k } = ws;
  const m = active.length;
  assign.fill(-1);
  fit.fill(0);
  ws.skippedByPass.fill(0);
  ws.dotsByPass.fill(0);
  let batches = 0;
  let converged = false;
  startScaled(ws);
  while (batches < options.batchIterations) {
    for (let b = 0; b < batch.length; b++) batch[b] = active[rng.int(m)]!;
    ask(ws, WORK_ASSIGN_SCALED, LIST_BATCH, batch.length);
    yield;
    tally(ws, -1);
    batches++;
    onStep?.(batches);
    if (miniBatchStep(ws) < options.batchTolerance) {
      converged = true;
      break;
    }
  }

  materialise(ws);
  upper.fill(Infinity);
  let iterations = 0;
  let reseeded = 0;
  for (;;) {
    ask(ws, WORK_ASSIGN_PLAIN, LIST_ACTIVE, m);
    yield;
    tally(ws, iterations);
    iterations++;
    countMembers(ws);
    if (!hasEmptyGroup(ws)) break;
    const lastRound = iterations > REPAIR_ROUNDS;
    for (let g = 0; g < k; g++) {
      if (ws.counts[g] !== 0) continue;
      const far = farthestMovable(ws);
      ws.counts[assign[far]!]!--;
      ws.counts[g] = 1;
      assign[far] = g;
      reseeded++;
      placeColumn(ws, far, g);
      if (lastRound) fit[far] = ownScore(ws, far);
    }
    if (lastRound) break;
  }
  return { objective: objectiveOf(ws), iterations, converged, reseeded, batches };
}

/** Members per group of the current assignment, into `ws.counts`. */
function countMembers(ws: Workspace): void {
  const { pile: active, assign, counts } = ws;
  counts.fill(0);
  for (let a = 0; a < active.length; a++) counts[assign[active[a]!]!]!++;
}

function hasEmptyGroup(ws: Workspace): boolean {
  for (let g = 0; g < ws.k; g++) if (ws.counts[g] === 0) return true;
  return false;
}

/** Replaces centroid `g` by row `i`. */
function placeColumn(ws: Workspace, i: number, g: number): void {
  const { centroids, k, matrix } = ws;
  for (let t = 0; t < matrix.cols; t++) centroids[t * k + g] = 0;
  placeRow(matrix, i, centroids, k, g);
}

function ownScore(ws: Workspace, i: number): number {
  const { indptr, indices, values } = ws.matrix;
  const { centroids, k } = ws;
  const g = ws.assign[i]!;
  let s = 0;
  for (let j = indptr[i]!; j < indptr[i + 1]!; j++) s += values[j]! * centroids[indices[j]! * k + g]!;
  return s;
}

/**
 * Starts the scaled form of the centroids for mini-batch steps: `wide` holds
 * the float32 centroids as they are, `wideNorm` their squared norms and
 * `scale` = 1 / ‖wide[·, g]‖; the step sums are cleared. Dense over d × k, once per run.
 */
function startScaled(ws: Workspace): void {
  const { k, centroids, wide, wideNorm, scale, sums } = ws;
  const d = ws.matrix.cols;
  wideNorm.fill(0);
  for (let t = 0; t < d; t++) {
    const base = t * k;
    for (let g = 0; g < k; g++) {
      const c = centroids[base + g]!;
      wide[base + g] = c;
      wideNorm[g]! += c * c;
    }
  }
  for (let g = 0; g < k; g++) scale[g] = wideNorm[g]! > 0 ? 1 / Math.sqrt(wideNorm[g]!) : 0;
  sums.fill(0);
}

/** Writes the float32 centroids `scale[g] · wide[·, g]` once, after the mini-batch steps. */
function materialise(ws: Workspace): void {
  const { k, centroids, wide, scale } = ws;
  const d = ws.matrix.cols;
  for (let t = 0; t < d; t++) {
    const base = t * k;
    for (let g = 0; g < k; g++) centroids[base + g] = Math.fround(wide[base + g]! * scale[g]!);
  }
}

/** Largest and smallest scale kept before a group's vector is rescaled to unit length. */
const SCALE_HIGH = 2 ** 200;
const SCALE_LOW = 2 ** -200;

/**
 * The centroid move of one mini-batch step (see {@link miniBatchRestart}),
 * on centroids kept as `c_g = scale[g] · w_g` (`w_g` = `wide[·, g]`), at a
 * cost in proportion to the batch's non-zeros rather than d × k.
 *
 * The update `c ← (v₀ c + S) / ‖v₀ c + S‖` (S the sum of the group's batch
 * rows, v₀ its running count) is `v₀ s (w + S / (v₀ s))` normalised, so only
 * the entries S touches change: `w ← w + S / (v₀ s)`, and the new scale is
 * `1 / ‖w‖`, with `‖w‖²` kept up to date (over the stored float32 values) from the touched entries (old and
 * new squares). The movement `‖c_new − c_old‖` is summed over the touched
 * entries, plus `(s' − s)² · Σ w²` over the untouched ones (that sum being
 * `‖w‖²` less the touched entries' old squares). A group that had absorbed
 * nothing (v₀ = 0: the first step after seeding) takes `S / ‖S‖`, dense over
 * its column, once. Members that cancel exactly (possible only with
 * negative values) leave the centroid as it was. A scale outside
 * 2^±200 rescales its vector to unit length. Returns the largest movement.
 */
function miniBatchStep(ws: Workspace): number {
  const { matrix, batch, assign, k, sums, wide, scale, wideNorm, absorbed, stepSizes, move, mark, touched, before, oldSq, newSq, norms, dirty } = ws;
  const { indptr, indices, values } = matrix;
  const d = matrix.cols;
  stepSizes.fill(0);
  let nt = 0;
  for (let b = 0; b < batch.length; b++) {
    const i = batch[b]!;
    const g = assign[i]!;
    stepSizes[g]!++;
    for (let j = indptr[i]!; j < indptr[i + 1]!; j++) {
      const e = indices[j]! * k + g;
      if (mark[e] === 0) {
        mark[e] = 1;
        touched[nt++] = e;
      }
      sums[e]! += values[j]!;
    }
  }
  move.fill(0);
  oldSq.fill(0);
  newSq.fill(0);
  dirty.fill(0);
  // Groups that absorbed nothing yet: the batch mean direction replaces the centroid (dense, once per run).
  for (let g = 0; g < k; g++) {
    if (stepSizes[g] === 0 || absorbed[g] !== 0) continue;
    dirty[g] = 1;
    let n2 = 0;
    for (let t = 0; t < d; t++) n2 += sums[t * k + g]! * sums[t * k + g]!;
    if (!(n2 > 0)) continue; // members cancel: centroid stays
    const s = scale[g]!;
    let r2 = 0;
    for (let t = 0; t < d; t++) {
      const w = Math.fround(sums[t * k + g]!);
      r2 += w * w;
    }
    const inv = 1 / Math.sqrt(r2);
    let mv = 0;
    for (let t = 0; t < d; t++) {
      const e = t * k + g;
      const w = Math.fround(sums[e]!);
      const step = w * inv - s * wide[e]!;
      mv += step * step;
      wide[e] = w;
    }
    move[g] = mv;
    wideNorm[g] = r2;
    scale[g] = inv;
  }
  for (let p = 0; p < nt; p++) {
    const e = touched[p]!;
    const g = e % k;
    const old = wide[e]!;
    before[p] = old;
    if (dirty[g]) continue;
    const now = Math.fround(old + sums[e]! / (absorbed[g]! * scale[g]!));
    wide[e] = now;
    oldSq[g]! += old * old;
    newSq[g]! += now * now;
  }
  for (let g = 0; g < k; g++) {
    norms[g] = 0;
    if (stepSizes[g] === 0 || dirty[g]) continue;
    const n2 = wideNorm[g]! - oldSq[g]! + newSq[g]!;
    if (n2 > 0) norms[g] = 1 / Math.sqrt(n2);
  }
  for (let p = 0; p < nt; p++) {
    const e = touched[p]!;
    const g = e % k;
    sums[e] = 0;
    mark[e] = 0;
    if (dirty[g] || stepSizes[g] === 0) continue;
    if (norms[g] === 0) {
      wide[e] = before[p]!; // members cancel: centroid stays
      continue;
    }
    const step = norms[g]! * wide[e]! - scale[g]! * before[p]!;
    move[g]! += step * step;
  }
  let largest = 0;
  for (let g = 0; g < k; g++) {
    if (stepSizes[g] !== 0 && !dirty[g] && norms[g] !== 0) {
      const ds = norms[g]! - scale[g]!;
      move[g]! += ds * ds * Math.max(0, wideNorm[g]! - oldSq[g]!);
      wideNorm[g] = wideNorm[g]! - oldSq[g]! + newSq[g]!;
      scale[g] = norms[g]!;
    }
    if (scale[g]! > SCALE_HIGH || scale[g]! < SCALE_LOW) rescale(ws, g);
    absorbed[g]! += stepSizes[g]!;
    const v = Math.sqrt(move[g]!);
    if (v > largest) largest = v;
  }
  return largest;
}

/** Rewrites group `g`'s vector as the unit centroid itself (scale 1), its squared norm summed afresh. */
function rescale(ws: Workspace, g: number): void {
  const { k, wide, scale, wideNorm } = ws;
  const d = ws.matrix.cols;
  const s = scale[g]!;
  let n2 = 0;
  for (let t = 0; t < d; t++) {
    const v = Math.fround(wide[t * k + g]! * s);
    wide[t * k + g] = v;
    n2 += v * v;
  }
  wideNorm[g] = n2;
  scale[g] = n2 > 0 ? 1 / Math.sqrt(n2) : 0;
}

/**
 * Builds the public result from the kept restart: canonical numbering
 * (size descending, ties by smallest member row), float32 fits, counts of
 * scored and skipped rows.
 */
export function finishResult(ws: Workspace, summary: RunSummary): KMeansResult {
  const { k, matrix, active } = ws;
  const n = matrix.rows;
  const kept = summary.kept;
  const { assignments, centroids } = canonicalise(ws.bestAssign, ws.bestCentroids, k, matrix.cols, active);
  const fit = new Float32Array(n);
  for (let a = 0; a < active.length; a++) {
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
    restartObjectives: summary.restartObjectives,
    screenObjectives: summary.screenObjectives,
    reseeded: kept.reseeded,
    batches: kept.batches,
    scored: ws.scoredTotal,
    skipped: ws.skippedTotal,
    dotProducts: ws.dotsTotal,
    skippedByPass: ws.bestSkippedByPass.slice(0, Math.min(kept.iterations, ws.bestSkippedByPass.length)),
    dotsByPass: ws.bestDotsByPass.slice(0, Math.min(kept.iterations, ws.bestDotsByPass.length)),
  };
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
