/**
 * The shapes of a k-means run's settings and outcome, apart from the code so
 * that the driver (kmeans.ts) and the engine (kmeans-engine.ts) both import
 * them without importing each other.
 *
 * @module
 */

/** Settings of one k-means run. */
export interface KMeansOptions {
  /** Number of groups k; a whole number from 2 to the number of non-empty rows. */
  groups: number;
  /** Independent seeded starts; the one with the best objective is kept. Whole number >= 1. Ignored (one run) with `initialAssignments`. */
  restarts: number;
  /** Upper bound on assignment passes per restart. Whole number >= 1. */
  maxIterations: number;
  /**
   * Full passes: a restart also stops once a pass moves at most this share of
   * the documents to another group (0 .. 1; 0 waits until none moves). The
   * centroids are then the means of that last assignment, as at the pass limit.
   */
  stableShare: number;
  /** Base seed (whole number 0 .. 2^32 − 1); restart r uses `deriveSeed(seed, r)`. */
  seed: number;
  /**
   * Skip the full scoring of rows that a bound shows cannot change group.
   * Same result either way (bit for bit); `false` runs the plain loop, for
   * comparison and benchmarks.
   */
  prune: boolean;
  /**
   * Mini-batch steps instead of full Lloyd passes: `true`, `false`, or
   * `'auto'` (on from `MINI_BATCH_AUTO_ROWS` non-empty rows, and never
   * with `initialAssignments`).
   */
  miniBatch: 'auto' | boolean;
  /** Mini-batch: rows drawn per step. Whole number >= 1. */
  batchSize: number;
  /** Mini-batch: most steps per restart. Whole number >= 1. */
  batchIterations: number;
  /**
   * Mini-batch: stop once every centroid moves less than this in a step
   * (Euclidean distance between unit vectors, 0 .. 2). A number >= 0; 0 runs
   * every step.
   */
  batchTolerance: number;
  /**
   * Screen the restarts on a sample: `true`, `false`, or `'auto'` (on from
   * `SCREEN_AUTO_ROWS` non-empty rows). Screened, every restart seeds and
   * runs its Lloyd passes on one seeded uniform sample of `screenSize` rows;
   * only the `screenKeep` best (by objective on the sample) continue on all
   * rows from their sample centroids, with Lloyd passes or mini-batch steps.
   * Never with `initialAssignments` or a single restart.
   */
  screen: 'auto' | boolean;
  /** Screening: rows in the sample (at least `groups` are used). Whole number >= 2. */
  screenSize: number;
  /** Screening: restarts continued on all rows, the best on the sample first. Whole number >= 1 (at most `restarts` run). */
  screenKeep: number;
  /**
   * Screening before mini-batch steps: most Lloyd passes per restart on the
   * sample (a brief run to rank the restarts). Whole number >= 1. Full-pass
   * runs screen with `maxIterations` and `stableShare`.
   */
  screenPasses: number;
  /**
   * Start from this partition instead of k-means++ seeding: one group
   * number from 0 to k − 1 per row (empty rows: −1 or any group, ignored),
   * every group used. One run, full passes.
   */
  initialAssignments?: ArrayLike<number> | undefined;
}

/** Outcome of `sphericalKMeans`. Group numbers are canonical (size descending, then smallest member row). */
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
  /** Full assignment passes in the kept restart (including the pass that found nothing to change). */
  readonly iterations: number;
  /**
   * Whether the kept restart stopped because no assignment changed, or at most
   * `stableShare` of the documents did (rather than at `maxIterations`); mini-batch: whether the steps stopped on
   * `batchTolerance` (rather than at `batchIterations`).
   */
  readonly converged: boolean;
  /**
   * Objective on all rows reached by each restart, in restart order; NaN for
   * a restart dropped at screening.
   */
  readonly restartObjectives: Float64Array;
  /** Objective of each restart on the screening sample, in restart order (empty when not screened). */
  readonly screenObjectives: Float64Array;
  /** Rows moved into empty groups during the kept restart. */
  readonly reseeded: number;
  /** Mini-batch steps in the kept restart (0 without mini-batch). */
  readonly batches: number;
  /** Rows scored against all k centroids, over every pass (and mini-batch step) of every restart. */
  readonly scored: number;
  /**
   * Rows the bounds settled without scoring any centroid but (at most) their
   * own, over every pass of every restart.
   */
  readonly skipped: number;
  /** Row–centroid dot products computed over every pass of every restart; a plain pass computes rows × k. */
  readonly dotProducts: number;
  /** Rows skipped in each full assignment pass of the kept restart (length `iterations`). */
  readonly skippedByPass: Int32Array;
  /** Row–centroid dot products in each full assignment pass of the kept restart (length `iterations`). */
  readonly dotsByPass: Float64Array;
}

