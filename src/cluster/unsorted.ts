/**
 * An "unsorted" share and "mixed" groups: the documents that fit no group
 * well are set apart instead of inflating a group, groups much less cohesive
 * than the others are flagged, and (as an option) split in two by bisecting
 * spherical k-means.
 *
 * Rules (ours; the robust statistics are common practice):
 * - **Unsorted**: over every grouped document, the fit (cosine to its group's
 *   unit centre) has median M and median absolute deviation D, scaled by
 *   1.4826 so it estimates a standard deviation under normality. A document
 *   with fit below `M − spread · 1.4826 · D` is unsorted (one threshold for the
 *   pile). When more than half the fits are equal, D is 0; the mean absolute
 *   deviation scaled by √(π/2) ≈ 1.253314 stands in for 1.4826 · D.
 *   A group always keeps its most central member, so no group empties.
 *   The centres are then recomputed from the members that stay; an unsorted
 *   document keeps the fit it had.
 * - **Mixed**: a group of at least 4 documents whose cohesion (mean fit) is
 *   below `mixedRatio` × the median cohesion of the groups.
 *
 * @module
 */
import type { Csr } from '../types.js';
import { UsageError, show } from '../util/errors.js';
import { stripUndefined } from '../util/options.js';
import type { KMeansOptions } from './kmeans.js';
import { partitionFromAssignments, type Partition } from './partition.js';
import { splitGroups } from './bisect.js';

/** Options of the refining stage that follows forming the groups. */
export interface RefineOptions {
  /** Set apart documents whose fit is below the pile's threshold (see the module notes). */
  readonly unsorted: boolean;
  /** How many scaled median absolute deviations below the median fit the threshold sits (> 0). */
  readonly spread: number;
  /** A group is mixed when its cohesion is below this share of the groups' median cohesion (0 to 1). */
  readonly mixedRatio: number;
  /** Split each mixed group in two by bisecting spherical k-means (once; before setting documents apart). */
  readonly splitMixed: boolean;
}

/** Defaults of {@link RefineOptions}. */
export const DEFAULT_REFINE_OPTIONS: Readonly<RefineOptions> = Object.freeze({
  unsorted: false,
  spread: 2,
  mixedRatio: 0.8,
  splitMixed: false,
});

/** Merges the defaults once and validates every value; throws {@link UsageError} naming the option. */
export function resolveRefineOptions(partial: Partial<RefineOptions> = {}): RefineOptions {
  const o: RefineOptions = { ...DEFAULT_REFINE_OPTIONS, ...stripUndefined(partial) };
  for (const key of ['unsorted', 'splitMixed'] as const) {
    if (typeof o[key] !== 'boolean') throw new UsageError(`${key} must be true or false; got ${show(o[key])}`, key);
  }
  if (typeof o.spread !== 'number' || !(o.spread > 0 && o.spread <= 100)) {
    throw new UsageError(`spread must be a number above 0 and at most 100; got ${show(o.spread)}`, 'spread');
  }
  if (typeof o.mixedRatio !== 'number' || !(o.mixedRatio >= 0 && o.mixedRatio <= 1)) {
    throw new UsageError(`mixedRatio must be a number from 0 to 1; got ${show(o.mixedRatio)}`, 'mixedRatio');
  }
  return o;
}

/** Median of the values (NaN when empty); sorts a copy. */
export function median(values: Float64Array): number {
  if (values.length === 0) return NaN;
  const s = Float64Array.from(values).sort();
  const h = s.length >> 1;
  return s.length % 2 === 1 ? s[h] : (s[h - 1] + s[h]) / 2;
}

/** The fit below which a grouped document is unsorted: median − spread · 1.4826 · MAD over grouped rows (MAD 0: 1.253314 · mean absolute deviation instead). */
export function unsortedThreshold(assignments: Int32Array, fit: Float32Array, spread: number): number {
  let n = 0;
  for (let r = 0; r < assignments.length; r++) if (assignments[r] >= 0) n++;
  const f = new Float64Array(n);
  for (let r = 0, i = 0; r < assignments.length; r++) if (assignments[r] >= 0) f[i++] = fit[r];
  const m = median(f);
  let meanAd = 0;
  for (let i = 0; i < n; i++) {
    f[i] = Math.abs(f[i] - m);
    meanAd += f[i] / n;
  }
  const mad = median(f);
  // More than half the fits equal (exact copies, one-member groups): MAD is 0 and would set apart every fit below
  // the median; the mean absolute deviation (× √(π/2) ≈ 1.253314 to estimate σ) stands in (common practice, from memory).
  return mad > 0 ? m - spread * 1.4826 * mad : m - spread * 1.253314 * meanAd;
}

/**
 * Rows to set apart: grouped rows with fit below `threshold`, except each
 * group's most central member (highest fit, then lowest row). Ascending rows.
 */
export function unsortedRows(assignments: Int32Array, fit: Float32Array, groups: number, threshold: number): Int32Array {
  const keep = new Int32Array(groups).fill(-1);
  for (let r = 0; r < assignments.length; r++) {
    const g = assignments[r];
    if (g >= 0 && (keep[g] < 0 || fit[r] > fit[keep[g]])) keep[g] = r;
  }
  const out: number[] = [];
  for (let r = 0; r < assignments.length; r++) {
    const g = assignments[r];
    if (g >= 0 && fit[r] < threshold && keep[g] !== r) out.push(r);
  }
  return Int32Array.from(out);
}

/** Groups flagged as mixed: size >= 4 and cohesion below `ratio` × the median cohesion. 1 = mixed. */
export function mixedGroups(cohesion: Float64Array, sizes: Int32Array, ratio: number): Uint8Array {
  const finite = Float64Array.from(Array.from(cohesion).filter((c) => Number.isFinite(c)));
  const m = median(finite);
  const out = new Uint8Array(cohesion.length);
  for (let g = 0; g < cohesion.length; g++) if (sizes[g] >= 4 && cohesion[g] < ratio * m) out[g] = 1;
  return out;
}

/** What refining did. */
export interface Refined {
  /** The final partition: unsorted rows have assignment -1 and keep the fit they had. */
  readonly partition: Partition;
  /** Rows set apart as unsorted, ascending. */
  readonly unsorted: Int32Array;
  /** The fit threshold used (NaN when setting apart was off). */
  readonly threshold: number;
  /** Per final group: 1 when mixed. */
  readonly mixed: Uint8Array;
  /** Groups of the formed partition that were split in two (their numbers before the split). */
  readonly split: readonly number[];
}

function cohesionAndSizes(p: Partition): { cohesion: Float64Array; sizes: Int32Array } {
  const sizes = new Int32Array(p.groups);
  const sum = new Float64Array(p.groups);
  for (let r = 0; r < p.assignments.length; r++) {
    const g = p.assignments[r];
    if (g < 0) continue;
    sizes[g]++;
    sum[g] += p.fit[r];
  }
  return { cohesion: sum.map((s, g) => (sizes[g] > 0 ? s / sizes[g] : NaN)), sizes };
}

/**
 * Refines formed groups: split the mixed ones (option), set apart the
 * unsorted documents (option), flag the groups that are mixed in the result.
 * With both options off, the partition is returned unchanged.
 */
export function refineGroups(
  matrix: Csr,
  formed: Partition,
  options: RefineOptions,
  kmeans: Partial<Omit<KMeansOptions, 'groups' | 'initialAssignments'>> = {},
): Refined {
  let p = formed;
  let split: number[] = [];
  if (options.splitMixed) {
    const { cohesion, sizes } = cohesionAndSizes(p);
    const flags = mixedGroups(cohesion, sizes, options.mixedRatio);
    split = [];
    for (let g = 0; g < p.groups; g++) if (flags[g] === 1) split.push(g);
    if (split.length > 0) {
      const s = splitGroups(matrix, p.assignments, p.groups, split, kmeans);
      p = partitionFromAssignments(matrix, s.assignments, s.groups);
    }
  }
  let unsorted: Int32Array = new Int32Array(0);
  let threshold = NaN;
  if (options.unsorted) {
    threshold = unsortedThreshold(p.assignments, p.fit, options.spread);
    unsorted = unsortedRows(p.assignments, p.fit, p.groups, threshold);
    if (unsorted.length > 0) {
      const assignments = Int32Array.from(p.assignments);
      for (const r of unsorted) assignments[r] = -1;
      const kept = partitionFromAssignments(matrix, assignments, p.groups);
      const fit = Float32Array.from(kept.fit);
      for (const r of unsorted) fit[r] = p.fit[r];
      p = { ...kept, fit };
    }
  }
  const { cohesion, sizes } = cohesionAndSizes(p);
  return { partition: p, unsorted, threshold, mixed: mixedGroups(cohesion, sizes, options.mixedRatio), split };
}
