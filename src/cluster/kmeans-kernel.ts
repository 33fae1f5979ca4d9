/**
 * The inner loops of spherical k-means that may run on several threads:
 * the assignment pass over a block of rows and the k-means++ seeding update
 * over a block of rows. Pure functions over typed arrays; they import nothing
 * at run time, so the single-thread path (`kmeans-engine.ts`) and the worker
 * (`src/parallel/kmeans-worker.ts`) call the very same code.
 *
 * ## Skipping scores with a bound
 *
 * Hamerly ("Making k-means even faster", SDM 2010) keeps, per row, an upper
 * bound on the distance to the assigned centre and a lower bound on the
 * distance to the second-closest one, widened after each update by how far
 * the centres moved. On the sphere we maximise a dot product instead, and we
 * keep per row
 *
 *   `lower[i] ≤ x_i · c_assign[i]`  and  `upper[i] ≥ max over h ≠ assign[i] of x_i · c_h`.
 *
 * After an update, for every centroid h, by Cauchy–Schwarz
 *   `x · c_h(new) = x · c_h(old) + x · (c_h(new) − c_h(old)) ≤ x · c_h(old) + ‖x‖ · δ_h`,
 * with `δ_h = ‖c_h(new) − c_h(old)‖` measured on the stored float32 values:
 * the triangle-inequality bound of Elkan ("Using the triangle inequality to
 * accelerate k-means", ICML 2003) in inner-product form. It holds for any
 * vectors, so it does not rely on rows or centroids being exactly unit after
 * float32 rounding. (The angular form `cos(max(0, θ − φ))` of Schubert, Lang
 * & Feher, "Accelerating spherical k-means", SISAP 2021, from memory, is
 * tighter at high cosines but needs exactly unit vectors; text rows sit at
 * low cosines to their centroids, where the two differ little, so it is not
 * used.)
 *
 * and likewise `x · c_g(new) ≥ x · c_g(old) − ‖x‖ δ_g`. A row assigned to g
 * keeps its group without any scoring when `lower − ‖x‖ δ_g` beats
 * `upper + ‖x‖ max over h ≠ g of δ_h` (less a rounding margin): Hamerly's
 * test. Otherwise its own score s is computed exactly, and it then needs
 * scoring only against the centroids h ≠ g with `u + ‖x‖ δ_h ≥ s` (u the
 * old upper bound, less the margin): every other centroid provably scores
 * below s. This is the local filter of Yinyang k-means (Ding, Zhao, Shen,
 * Musuvathi & Mytkowicz, ICML 2015, §3, from memory) with a single group of
 * centroids; with no candidate left the row keeps its group after one dot
 * product. The centroids sorted by
 * movement (`order`, `moved`) make the candidates a prefix. Few candidates:
 * each is scored by its own sparse dot product; many: the row is scored
 * against all k in one contiguous sweep, and the bound restarts from the
 * exact runner-up score.
 *
 * ## Why the result is exactly the plain loop's
 *
 * A floating-point dot product of n terms differs from the exact one by at
 * most `γ_n Σ|x_j c_j|`, `γ_n = n·2⁻⁵³ / (1 − n·2⁻⁵³)` (Higham, *Accuracy and
 * Stability of Numerical Algorithms*, 2nd ed., 2002, §3.1, from memory). The
 * bounds start from computed scores and are compared with computed scores,
 * so up to four such roundings add; the margin {@link SKIP_MARGIN} `· ‖x‖`
 * covers them for rows of up to about 10⁶ non-zeros with unit-norm
 * centroids. So a
 * centroid left out provably has a computed score strictly below the own
 * computed score, and the best of the scored ones, ties to the lowest group,
 * is the plain loop's choice. Every score, whether from a single dot product
 * or from the full sweep, is summed over the row's non-zeros in the same
 * order, so it has the same bits. Rows settled by Hamerly's test skip their
 * own score; a {@link WORK_FIT} pass fills in their exact `fit` before
 * anything reads it (a re-seeding, the end of a restart).
 *
 * @module
 */

/** The typed arrays one pass reads and writes. In the parallel path every array but `scores` lives in shared memory. */
export interface KernelArrays {
  /** Number of groups. */
  readonly k: number;
  /** CSR row pointers, column indices and values of the data. */
  readonly indptr: Int32Array;
  readonly indices: Int32Array;
  readonly values: Float32Array;
  /** Euclidean norm of each row (double precision, from the float32 values). */
  readonly rowNorm: Float64Array;
  /** Centroids, term-major: `centroids[t * k + g]`. */
  readonly centroids: Float32Array;
  /** Group of each row (−1 before the first pass). */
  readonly assign: Int32Array;
  /**
   * Score of each row against its group's centroid at the pass that last
   * scored it; rows the bound settled without scoring keep an older value
   * until a {@link WORK_FIT} pass.
   */
  readonly fit: Float64Array;
  /** Per row: upper bound on the best score against any group but its own (`Infinity` when unknown). */
  readonly upper: Float64Array;
  /** Per row: lower bound on the score against its own group (`-Infinity` when unknown). */
  readonly lower: Float64Array;
  /** Per group: how far its centroid moved in the last update. */
  readonly move: Float64Array;
  /** Groups by decreasing movement in the last centroid update. */
  readonly order: Int32Array;
  /** `moved[p]`: the movement of group `order[p]` (so non-increasing). */
  readonly moved: Float64Array;
  /** k-means++ seeding: per row, the best score against the seeds so far. */
  readonly closest: Float64Array;
  /**
   * k-means++ seeding: the candidate seed rows of one draw scattered into a dense, candidate-major array
   * of `seedTrials(k) × cols` entries (`dense[c * cols + t]`, zero elsewhere).
   */
  readonly dense: Float64Array;
  /** k-means++ seeding: each listed row's score against each candidate, `trials[a * seedTrials(k) + c]` (a = position in the list). */
  readonly trials: Float64Array;
  /** Rows that take part (non-empty), increasing. */
  readonly active: Int32Array;
  /** Rows of the current mini-batch step. */
  readonly batch: Int32Array;
  /** Rows of the seeded sample that mini-batch seeding draws from (a prefix is used). */
  readonly sample: Int32Array;
  /** Rows of the screening sample that restarts are first run on, increasing (empty when not screening). */
  readonly screen: Int32Array;
  /**
   * Mini-batch steps: each centroid as `scale[g] · wide[t * k + g]` (term-major
   * float32 vectors like the centroids, empty without mini-batch), so a step rewrites only the
   * entries its batch rows hold (see `miniBatchStep` in `kmeans-engine.ts`).
   */
  readonly wide: Float32Array;
  readonly scale: Float64Array;
  /** Scratch for one row's k scores; one per thread, never shared. */
  readonly scores: Float64Array;
}

/**
 * Rounding margin of the bound test, relative to the row norm: 2⁻³⁰ ≈ 9.3·10⁻¹⁰,
 * far above the ≈ 2·n·2⁻⁵³ rounding of two n-term double dot products for
 * any realistic row length, far below the gaps between scores that matter.
 */
export const SKIP_MARGIN = 2 ** -30;

/** Offsets in a pass's statistics: rows whose group changed. */
export const STAT_CHANGED = 0;
/** Rows scored against all k centroids. */
export const STAT_SCORED = 1;
/** Rows the bounds settled without scoring any other centroid (their own scored at most). */
export const STAT_SKIPPED = 2;
/** Row–centroid dot products computed (a plain pass computes rows × k). */
export const STAT_DOTS = 3;
/** Length of a statistics record. */
export const STAT_LENGTH = 4;

/**
 * Sparse dot product of row `[start, end)` with centroid `g`, summed in the
 * row's order: the same bits as entry g of {@link scoreAll}.
 */
function scoreOne(
  indices: Int32Array,
  values: Float32Array,
  centroids: Float32Array,
  k: number,
  start: number,
  end: number,
  g: number,
): number {
  let s = 0;
  for (let j = start; j < end; j++) s += values[j]! * centroids[indices[j]! * k + g]!;
  return s;
}

/**
 * Scores row `[start, end)` against all k centroids into `scores`. Eight
 * (then four) non-zeros per sweep over the contiguous term slices, so each
 * score is loaded and stored once per eight products; each `scores[g]` still
 * adds the products one at a time in the row's order, so the sums are the
 * bits of the one-at-a-time loop.
 */
export function scoreAll(
  indices: Int32Array,
  values: Float32Array,
  centroids: Float32Array,
  k: number,
  start: number,
  end: number,
  scores: Float64Array,
): void {
  scores.fill(0);
  let j = start;
  for (; j + 7 < end; j += 8) {
    const v0 = values[j]!;
    const v1 = values[j + 1]!;
    const v2 = values[j + 2]!;
    const v3 = values[j + 3]!;
    const v4 = values[j + 4]!;
    const v5 = values[j + 5]!;
    const v6 = values[j + 6]!;
    const v7 = values[j + 7]!;
    const b0 = indices[j]! * k;
    const b1 = indices[j + 1]! * k;
    const b2 = indices[j + 2]! * k;
    const b3 = indices[j + 3]! * k;
    const b4 = indices[j + 4]! * k;
    const b5 = indices[j + 5]! * k;
    const b6 = indices[j + 6]! * k;
    const b7 = indices[j + 7]! * k;
    for (let g = 0; g < k; g++) {
      let s = scores[g]!;
      s += v0 * centroids[b0 + g]!;
      s += v1 * centroids[b1 + g]!;
      s += v2 * centroids[b2 + g]!;
      s += v3 * centroids[b3 + g]!;
      s += v4 * centroids[b4 + g]!;
      s += v5 * centroids[b5 + g]!;
      s += v6 * centroids[b6 + g]!;
      s += v7 * centroids[b7 + g]!;
      scores[g] = s;
    }
  }
  for (; j + 3 < end; j += 4) {
    const v0 = values[j]!;
    const v1 = values[j + 1]!;
    const v2 = values[j + 2]!;
    const v3 = values[j + 3]!;
    const b0 = indices[j]! * k;
    const b1 = indices[j + 1]! * k;
    const b2 = indices[j + 2]! * k;
    const b3 = indices[j + 3]! * k;
    for (let g = 0; g < k; g++) {
      let s = scores[g]!;
      s += v0 * centroids[b0 + g]!;
      s += v1 * centroids[b1 + g]!;
      s += v2 * centroids[b2 + g]!;
      s += v3 * centroids[b3 + g]!;
      scores[g] = s;
    }
  }
  for (; j < end; j++) {
    const v = values[j]!;
    const base = indices[j]! * k;
    for (let g = 0; g < k; g++) scores[g]! += v * centroids[base + g]!;
  }
}

/**
 * Assignment pass over `rows[from .. to)`: puts each row in its most similar
 * group (ties to the lowest group) and records its score in `fit`. With
 * `prune` set it uses and maintains the bound `upper` (see the module notes)
 * to score only the centroids that could beat the row's own; unset, it is
 * the plain loop (every row against every centroid; `upper` still gets the
 * runner-up score). Adds the pass's counts to `stats[at + STAT_*]`. Writes
 * only the `assign`, `fit` and `upper` entries of the rows in the block, so
 * disjoint blocks can run at the same time.
 */
export function assignRows(
  s: KernelArrays,
  rows: Int32Array,
  from: number,
  to: number,
  prune: boolean,
  stats: Float64Array,
  at: number,
): void {
  const { k, indptr, indices, values, rowNorm, centroids, assign, fit, upper, lower, move, order, moved, scores } = s;
  // Beyond this many candidates one contiguous sweep over all k is cheaper
  // than separate strided dot products, and it resets the upper bound to the
  // exact runner-up (a bound kept from partial scorings only grows). Measured
  // on 100k text-like rows, k = 100: k/16 spent about 10% less time than k/8
  // or k/4 (noisy, shared machine).
  const fewest = Math.max(2, k >> 4);
  let changed = 0;
  let scored = 0;
  let skipped = 0;
  let dots = 0;
  for (let a = from; a < to; a++) {
    const i = rows[a]!;
    const start = indptr[i]!;
    const end = indptr[i + 1]!;
    const own = assign[i]!;
    if (prune && own >= 0) {
      const norm = rowNorm[i]!;
      const u = upper[i]!;
      const low = lower[i]! - norm * move[own]!;
      const high = u + norm * (order[0] === own ? moved[1]! : moved[0]!);
      if (low - high > SKIP_MARGIN * norm) {
        lower[i] = low;
        upper[i] = high;
        skipped++;
        continue;
      }
      const ownScore = scoreOne(indices, values, centroids, k, start, end, own);
      dots++;
      // Candidates: groups h != own with u + norm * moved(h) >= ownScore - margin.
      const least = (ownScore - u) / norm - SKIP_MARGIN;
      let p = 0;
      let candidates = 0;
      while (p < k && moved[p]! >= least) {
        if (order[p] !== own) candidates++;
        p++;
      }
      if (candidates <= fewest && p < k) {
        let bestG = own;
        let bestS = ownScore;
        let second = u + norm * moved[p]!; // every group not scored here
        for (let q = 0; q < p; q++) {
          const h = order[q]!;
          if (h === own) continue;
          const v = scoreOne(indices, values, centroids, k, start, end, h);
          if (v > bestS || (v === bestS && h < bestG)) {
            if (bestS > second) second = bestS;
            bestS = v;
            bestG = h;
          } else if (v > second) {
            second = v;
          }
        }
        dots += candidates;
        if (candidates === 0) skipped++;
        if (bestG !== own) {
          assign[i] = bestG;
          changed++;
        }
        fit[i] = bestS;
        lower[i] = bestS;
        upper[i] = second;
        continue;
      }
    }
    scoreAll(indices, values, centroids, k, start, end, scores);
    dots += k;
    let bestG = 0;
    let bestS = scores[0]!;
    let second = -Infinity;
    for (let g = 1; g < k; g++) {
      const v = scores[g]!;
      if (v > bestS) {
        second = bestS;
        bestS = v;
        bestG = g;
      } else if (v > second) {
        second = v;
      }
    }
    if (own !== bestG) {
      assign[i] = bestG;
      changed++;
    }
    fit[i] = bestS;
    lower[i] = bestS;
    upper[i] = second;
    scored++;
  }
  stats[at + STAT_CHANGED]! += changed;
  stats[at + STAT_SCORED]! += scored;
  stats[at + STAT_SKIPPED]! += skipped;
  stats[at + STAT_DOTS]! += dots;
}

/**
 * Candidate seeds drawn per k-means++ step in greedy seeding: `2 + ⌊ln k⌋`, the
 * number scikit-learn's `_kmeans_plusplus` uses (its comment credits Arthur &
 * Vassilvitskii 2007 for local trials; from memory).
 */
export function seedTrials(k: number): number {
  return 2 + Math.floor(Math.log(k));
}

/**
 * Scores each row of `rows[from .. to)` against every candidate seed scattered
 * in `dense`, into `trials[a * seedTrials(k) + c]`. Each score sums the row's
 * non-zeros in order, so it has the same bits on any thread.
 */
export function scoreTrials(s: KernelArrays, rows: Int32Array, from: number, to: number): void {
  const { indptr, indices, values, dense, trials } = s;
  const t = seedTrials(s.k);
  const cols = dense.length / t;
  for (let a = from; a < to; a++) {
    const i = rows[a]!;
    const start = indptr[i]!;
    const end = indptr[i + 1]!;
    // One tight sparse dot product per candidate (candidate-major `dense`): the same sums, term by term.
    for (let c = 0; c < t; c++) {
      const base = c * cols;
      let sum = 0;
      for (let j = start; j < end; j++) sum += values[j]! * dense[base + indices[j]!]!;
      trials[a * t + c] = sum;
    }
  }
}

/** Sets `fit[i]` to the exact score of each row of `rows[from .. to)` against its own centroid. */
export function refreshFit(s: KernelArrays, rows: Int32Array, from: number, to: number): void {
  const { k, indptr, indices, values, centroids, assign, fit } = s;
  for (let a = from; a < to; a++) {
    const i = rows[a]!;
    fit[i] = scoreOne(indices, values, centroids, k, indptr[i]!, indptr[i + 1]!, assign[i]!);
  }
}

/**
 * Mini-batch assignment over `rows[from .. to)` against the centroids
 * `scale[g] · wide[·, g]`: each score is the dot product with the unscaled
 * vector, times the group's scale (ties to the lowest group). Writes the
 * rows' `assign` and `fit`; counts every row as scored.
 */
export function assignScaled(s: KernelArrays, rows: Int32Array, from: number, to: number, stats: Float64Array, at: number): void {
  const { k, indptr, indices, values, wide, scale, assign, fit, scores } = s;
  let changed = 0;
  for (let a = from; a < to; a++) {
    const i = rows[a]!;
    scoreAll(indices, values, wide, k, indptr[i]!, indptr[i + 1]!, scores);
    let bestG = 0;
    let bestS = scores[0]! * scale[0]!;
    for (let g = 1; g < k; g++) {
      const v = scores[g]! * scale[g]!;
      if (v > bestS) {
        bestS = v;
        bestG = g;
      }
    }
    if (assign[i] !== bestG) changed++;
    assign[i] = bestG;
    fit[i] = bestS;
  }
  stats[at + STAT_CHANGED]! += changed;
  stats[at + STAT_SCORED]! += to - from;
  stats[at + STAT_DOTS]! += (to - from) * k;
}

/** Work kind of a block request: assignment pass using the bound. */
export const WORK_ASSIGN_PRUNED = 0;
/** Assignment pass scoring every row against every centroid. */
export const WORK_ASSIGN_PLAIN = 1;
/** k-means++ seeding: scores against the candidate seeds ({@link scoreTrials}). */
export const WORK_SEED = 2;
/** Exact `fit` of every row ({@link refreshFit}). */
export const WORK_FIT = 3;
/** Mini-batch assignment against scaled centroids ({@link assignScaled}). */
export const WORK_ASSIGN_SCALED = 4;

/** Row lists a request can walk: {@link KernelArrays.active}. */
export const LIST_ACTIVE = 0;
/** {@link KernelArrays.batch}. */
export const LIST_BATCH = 1;
/** {@link KernelArrays.sample}. */
export const LIST_SAMPLE = 2;

/** {@link KernelArrays.screen}. */
export const LIST_SCREEN = 3;

/** The row list a request names. */
export function rowList(s: KernelArrays, list: number): Int32Array {
  return list === LIST_ACTIVE ? s.active : list === LIST_BATCH ? s.batch : list === LIST_SAMPLE ? s.sample : s.screen;
}

/**
 * Runs one block `[from, to)` of a request (`work` one of the `WORK_*`
 * codes, `list` one of the `LIST_*` codes), adding its counts to
 * `stats[at + STAT_*]`. The single dispatch used by the single-thread runner
 * and by every worker.
 */
export function runBlock(
  s: KernelArrays,
  work: number,
  list: number,
  from: number,
  to: number,
  stats: Float64Array,
  at: number,
): void {
  const rows = rowList(s, list);
  if (work === WORK_SEED) scoreTrials(s, rows, from, to);
  else if (work === WORK_FIT) refreshFit(s, rows, from, to);
  else if (work === WORK_ASSIGN_SCALED) assignScaled(s, rows, from, to, stats, at);
  else assignRows(s, rows, from, to, work === WORK_ASSIGN_PRUNED, stats, at);
}
