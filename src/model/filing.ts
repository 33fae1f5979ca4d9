/**
 * Filing rows into a model's groups, row by row: the best and the second
 * group with their fits, and the novelty thresholds calibrated from the
 * training fits. Pure; shared by `sheaf assign` and any streaming variant
 * (one row in, one row out: {@link fileRows} works on any block of rows).
 *
 * @module
 */
import type { Csr } from '../types.js';
import { closestTwo } from '../cluster/second.js';
import { UsageError } from '../util/errors.js';

/** Best and second group of each row, with their fits (cosines to the unit centres). */
export interface BestTwo {
  /** Nearest group per row, -1 for rows with no terms. */
  readonly best: Int32Array;
  /** Cosine to the nearest centre (0 for rows with no terms). */
  readonly bestFit: Float32Array;
  /** Second-nearest group per row, -1 when there is none (empty row, or a single group). */
  readonly second: Int32Array;
  /** Cosine to the second-nearest centre (0 when there is none). */
  readonly secondFit: Float32Array;
}

/**
 * Scores every row of `matrix` against every unit centre (term-major
 * `centroids[term * groups + g]`) and keeps the best two. Ties go to the lower
 * group number, as k-means' own scoring does ({@link closestTwo}, the same
 * scoring the grouping uses for `next_group`).
 */
export function bestTwoGroups(matrix: Csr, centroids: Float32Array, groups: number): BestTwo {
  const k = groups;
  if (!Number.isInteger(k) || k < 1) throw new RangeError(`groups must be a whole number >= 1; got ${k}`);
  if (centroids.length !== matrix.cols * k) throw new RangeError(`centroids hold ${centroids.length} values; ${matrix.cols} × ${k} needed`);
  // The scoring is the grouping's own (cluster/second.ts); filing reports 0, not NaN, where there is no group.
  const two = closestTwo(matrix, centroids, k);
  for (let i = 0; i < matrix.rows; i++) {
    if (two.best[i]! < 0) two.bestCosine[i] = 0;
    if (two.second[i]! < 0) two.secondCosine[i] = 0;
  }
  return { best: two.best, bestFit: two.bestCosine, second: two.second, secondFit: two.secondCosine };
}

/** How the per-group novelty thresholds are drawn from the training fits. */
export interface NoveltyOptions {
  /** Share of a group's own training documents allowed below its threshold (before the margin): 0 to 0.5. */
  readonly quantile: number;
  /** Cosine subtracted from that quantile: 0 to 1. */
  readonly margin: number;
}

/**
 * Default calibration: the 1% quantile of a group's training fits, lowered by
 * 0.01 cosine.
 *
 * Why a low quantile and not median − c·MAD (our choice, measured on the
 * SpamAssassin corpus in test/model-novelty.test.ts): fit distributions inside
 * a group are skewed, with a long tail of loosely fitting members, so a
 * median/MAD bound flags a share of the group's own members that varies from
 * group to group; a quantile bounds that share by construction (at most 1% of
 * each group's members fall below it). The margin absorbs the small
 * differences between a fit computed while grouping and the same document's
 * fit recomputed by `assign` (Float32 storage of centres and projection).
 * Before model version 3 the threshold was the 5% quantile with no margin,
 * which flagged about 5% of the model's own training documents as new.
 */
export const DEFAULT_NOVELTY_OPTIONS: NoveltyOptions = Object.freeze({ quantile: 0.01, margin: 0.01 });

/** Checks and completes novelty options; throws `UsageError` naming the bad value. */
export function resolveNoveltyOptions(partial: Partial<NoveltyOptions> = {}): NoveltyOptions {
  const o = { ...DEFAULT_NOVELTY_OPTIONS, ...partial };
  for (const key of Object.keys(partial)) {
    if (!(key in DEFAULT_NOVELTY_OPTIONS)) throw new UsageError(`unknown option novelty.${key}; allowed: quantile, margin`, key);
  }
  if (typeof o.quantile !== 'number' || !(o.quantile >= 0 && o.quantile <= 0.5)) {
    throw new UsageError(`quantile must be a number from 0 to 0.5; got ${String(o.quantile)}`, 'quantile');
  }
  if (typeof o.margin !== 'number' || !(o.margin >= 0 && o.margin <= 1)) {
    throw new UsageError(`margin must be a number from 0 to 1; got ${String(o.margin)}`, 'margin');
  }
  return Object.freeze(o);
}

/**
 * Per-group novelty thresholds: for each group, the `quantile` of its members'
 * training fits (lower nearest rank: the value at index ⌊q·(n−1)⌋ of the sorted
 * fits) minus `margin`, floored at −1. A group with no member gets −1 (nothing
 * filed there is flagged by its own threshold: it has no evidence).
 */
export function calibrateThresholds(assignments: Int32Array, fit: Float32Array, groups: number, options: NoveltyOptions = DEFAULT_NOVELTY_OPTIONS): Float32Array {
  const counts = new Int32Array(groups + 1);
  for (let r = 0; r < assignments.length; r++) if (assignments[r]! >= 0) counts[assignments[r]! + 1]!++;
  for (let g = 0; g < groups; g++) counts[g + 1]! += counts[g]!;
  const sorted = new Float32Array(counts[groups]!);
  const fill = counts.slice(0, groups);
  for (let r = 0; r < assignments.length; r++) {
    const g = assignments[r]!;
    if (g >= 0) sorted[fill[g]!++] = fit[r]!;
  }
  const out = new Float32Array(groups);
  for (let g = 0; g < groups; g++) {
    const part = sorted.subarray(counts[g]!, counts[g + 1]!).sort();
    out[g] = part.length ? Math.max(-1, part[Math.floor(options.quantile * (part.length - 1))]! - options.margin) : -1;
  }
  return out;
}
