/**
 * Continuity across runs: this run's groups matched to a previous model's by
 * the cosine between their term-space centres, with an optimal one-to-one
 * assignment (the Hungarian method, Kuhn 1955: `./assignment.ts`). A match at
 * or above `minSimilarity` continues the old group: it keeps the old number
 * (when that number exists in this run) and the old name. Every group is
 * reported as continued, grown, shrunk or new, and every old group left
 * unmatched as gone, with sizes. Pure.
 *
 * @module
 */
import type { Partition } from '../cluster/partition.js';
import { UsageError } from '../util/errors.js';
import { optimalAssignment } from './assignment.js';

/** The groups of a previous run, as its model keeps them. */
export interface PreviousGroups {
  /** Where they came from (shown in messages and run.json). */
  readonly source: string;
  readonly groups: number;
  /** The previous vocabulary's terms, in column order. */
  readonly terms: readonly string[];
  /** Unit term-space centres, term-major `[term * groups + g]`. */
  readonly centroids: Float32Array;
  readonly labels: readonly { readonly id: number; readonly label: string; readonly size: number }[];
}

/** How close is close enough, and how much a share must change to count as grown or shrunk. */
export interface ContinuityOptions {
  /** Least centre cosine for a matched pair to continue the old group: 0 to 1. */
  readonly minSimilarity: number;
  /** A continued group is grown when its share of the grouped documents is at least (1 + sizeChange) × the old share, shrunk when at most the old share / (1 + sizeChange): above 0. */
  readonly sizeChange: number;
}

/**
 * Defaults (our choice): a centre cosine of 0.5 (planted themes re-drawn in
 * test/continuity.test.ts match at 0.9 and above; unrelated themes stay near
 * 0.1), and a 25% change of share for grown or shrunk.
 */
export const DEFAULT_CONTINUITY_OPTIONS: ContinuityOptions = Object.freeze({ minSimilarity: 0.5, sizeChange: 0.25 });

/** Checks and completes continuity options; one `UsageError` line naming the bad value. */
export function resolveContinuityOptions(partial: Partial<ContinuityOptions> = {}): ContinuityOptions {
  for (const key of Object.keys(partial)) {
    if (!(key in DEFAULT_CONTINUITY_OPTIONS)) throw new UsageError(`unknown option continuity.${key}; allowed: minSimilarity, sizeChange`, key);
  }
  const o = { ...DEFAULT_CONTINUITY_OPTIONS, ...partial };
  if (typeof o.minSimilarity !== 'number' || !(o.minSimilarity >= 0 && o.minSimilarity <= 1)) {
    throw new UsageError(`matchSimilarity must be a number from 0 to 1; got ${String(o.minSimilarity)}`, 'matchSimilarity');
  }
  if (typeof o.sizeChange !== 'number' || !(o.sizeChange > 0 && Number.isFinite(o.sizeChange))) {
    throw new UsageError(`sizeChange must be a number above 0; got ${String(o.sizeChange)}`, 'sizeChange');
  }
  return Object.freeze(o);
}

/** What became of one group of this run. */
export type GroupChange = 'continued' | 'grown' | 'shrunk' | 'new';

/** One group of this run, against the previous run. */
export interface GroupContinuity {
  /** Its number in this run (the carried one when continued). */
  readonly id: number;
  readonly change: GroupChange;
  readonly size: number;
  /** The old group it continues, or null for a new group. */
  readonly previous: { readonly id: number; readonly label: string; readonly size: number } | null;
  /** Centre cosine with its matched old group (also for a match below the threshold), null when unmatched. */
  readonly similarity: number | null;
}

/** The "since last run" view. */
export interface Continuity {
  readonly source: string;
  readonly options: ContinuityOptions;
  /** By this run's group number. */
  readonly groups: readonly GroupContinuity[];
  /** Old groups no group of this run continues, with the best centre cosine any group of this run had with them. */
  readonly gone: readonly { readonly id: number; readonly label: string; readonly size: number; readonly closest: number }[];
  /** For each group as formed (before renumbering), its number in this run. */
  readonly renumber: Int32Array;
}

/**
 * Cosines between this run's centres and the previous ones, `[g * previous.groups + h]`,
 * over the terms the two vocabularies share (a term only one of them has
 * contributes 0: both centres are unit vectors in the union of the terms).
 */
export function centreSimilarities(previous: PreviousGroups, centroids: Float32Array, terms: readonly string[], groups: number): Float64Array {
  const kOld = previous.groups;
  const oldIndex = new Map<string, number>();
  previous.terms.forEach((t, i) => oldIndex.set(t, i));
  const sim = new Float64Array(groups * kOld);
  for (let t = 0; t < terms.length; t++) {
    const o = oldIndex.get(terms[t]!);
    if (o === undefined) continue;
    for (let g = 0; g < groups; g++) {
      const c = centroids[t * groups + g]!;
      if (c === 0) continue;
      for (let h = 0; h < kOld; h++) sim[g * kOld + h]! += c * previous.centroids[o * kOld + h]!;
    }
  }
  return sim;
}

/**
 * Matches this run's groups (term-space unit centres, term-major, and sizes)
 * to the previous ones and decides the carried numbers: a continued group
 * keeps its old number when that number is below this run's group count and
 * not taken; every other group takes the lowest free number, in the order the
 * groups were formed (largest first).
 */
export function matchGroups(
  previous: PreviousGroups,
  current: { readonly centroids: Float32Array; readonly terms: readonly string[]; readonly groups: number; readonly sizes: Int32Array },
  options: ContinuityOptions = DEFAULT_CONTINUITY_OPTIONS,
): Continuity {
  const k = current.groups;
  const kOld = previous.groups;
  const sim = centreSimilarities(previous, current.centroids, current.terms, k);
  const cost = new Float64Array(k * kOld);
  for (let i = 0; i < cost.length; i++) cost[i] = 1 - sim[i]!;
  const pairs = optimalAssignment(cost, k, kOld);
  const matchOf = new Int32Array(k).fill(-1);
  const oldTaken = new Uint8Array(kOld);
  for (let i = 0; i < pairs.rows.length; i++) {
    const g = pairs.rows[i]!;
    const h = pairs.cols[i]!;
    matchOf[g] = h;
    if (sim[g * kOld + h]! >= options.minSimilarity) oldTaken[h] = 1;
  }
  const continues = (g: number): boolean => matchOf[g]! >= 0 && sim[g * kOld + matchOf[g]!]! >= options.minSimilarity;
  const renumber = new Int32Array(k).fill(-1);
  const used = new Uint8Array(k);
  for (let g = 0; g < k; g++) {
    if (!continues(g)) continue;
    const oldId = previous.labels[matchOf[g]!]!.id;
    if (oldId < k && !used[oldId]) {
      renumber[g] = oldId;
      used[oldId] = 1;
    }
  }
  let free = 0;
  for (let g = 0; g < k; g++) {
    if (renumber[g]! >= 0) continue;
    while (used[free]) free++;
    renumber[g] = free;
    used[free] = 1;
  }
  let totalNew = 0;
  for (let g = 0; g < k; g++) totalNew += current.sizes[g]!;
  let totalOld = 0;
  for (const l of previous.labels) totalOld += l.size;
  const byId: GroupContinuity[] = new Array(k);
  for (let g = 0; g < k; g++) {
    const size = current.sizes[g]!;
    const h = matchOf[g]!;
    const similarity = h >= 0 ? Math.round(sim[g * kOld + h]! * 1e6) / 1e6 : null;
    if (!continues(g)) {
      byId[renumber[g]!] = { id: renumber[g]!, change: 'new', size, previous: null, similarity };
      continue;
    }
    const old = previous.labels[h]!;
    const ratio = totalOld > 0 && totalNew > 0 && old.size > 0 ? size / totalNew / (old.size / totalOld) : 1;
    const change: GroupChange = ratio >= 1 + options.sizeChange ? 'grown' : ratio <= 1 / (1 + options.sizeChange) ? 'shrunk' : 'continued';
    byId[renumber[g]!] = { id: renumber[g]!, change, size, previous: { id: old.id, label: old.label, size: old.size }, similarity };
  }
  const gone: { id: number; label: string; size: number; closest: number }[] = [];
  for (let h = 0; h < kOld; h++) {
    if (oldTaken[h]) continue;
    let closest = -1;
    for (let g = 0; g < k; g++) closest = Math.max(closest, sim[g * kOld + h]!);
    const l = previous.labels[h]!;
    gone.push({ id: l.id, label: l.label, size: l.size, closest: Math.round(closest * 1e6) / 1e6 });
  }
  return { source: previous.source, options, groups: byId, gone, renumber };
}

/** A partition with its groups renumbered (`renumber[g]` is the new number of group g); fits and objective unchanged. */
export function renumberPartition(p: Partition, renumber: Int32Array): Partition {
  const k = p.groups;
  const assignments = new Int32Array(p.assignments.length);
  for (let r = 0; r < assignments.length; r++) assignments[r] = p.assignments[r]! >= 0 ? renumber[p.assignments[r]!]! : p.assignments[r]!;
  return { groups: k, assignments, centroids: renumberCentres(p.centroids, k, renumber), fit: p.fit, objective: p.objective };
}

/** Centres laid out `[dim * groups + g]`, moved to their new numbers. */
export function renumberCentres(centroids: Float32Array, groups: number, renumber: Int32Array): Float32Array {
  const out = new Float32Array(centroids.length);
  for (let i = 0; i < centroids.length; i++) {
    const g = i % groups;
    out[i - g + renumber[g]!] = centroids[i]!;
  }
  return out;
}

/** Per-group values moved to their new numbers. */
export function renumberValues<T extends Uint8Array | Int32Array | Float32Array | Float64Array>(values: T, renumber: Int32Array): T {
  const out = values.slice() as T;
  for (let g = 0; g < values.length; g++) out[renumber[g]!] = values[g]!;
  return out;
}

/** Group sizes of a partition (rows in no group left out). */
export function groupSizes(p: Partition): Int32Array {
  const sizes = new Int32Array(p.groups);
  for (let r = 0; r < p.assignments.length; r++) if (p.assignments[r]! >= 0) sizes[p.assignments[r]!]!++;
  return sizes;
}
