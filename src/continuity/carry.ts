/**
 * Carrying a previous run's numbers and names into this run's grouping: the
 * pipeline calls {@link carryGroups} right after the groups are final and
 * before the tree, scores and names, so every output (documents.csv,
 * groups.json, the tree, model.json) uses the carried numbers. Pure.
 *
 * @module
 */
import type { Partition } from '../cluster/partition.js';
import type { Refined } from '../cluster/unsorted.js';
import type { GroupLabel } from '../label/index.js';
import type { Model } from '../model/index.js';
import { groupSizes, matchGroups, renumberCentres, renumberPartition, renumberValues, type Continuity, type ContinuityOptions, type PreviousGroups } from './match.js';

/** The final groups renumbered, and the continuity report. */
export interface Carried {
  /** The term-space partition, renumbered. */
  readonly partition: Partition;
  /** The refine result with its partition (the space the groups were formed in) and mixed flags renumbered. */
  readonly refined: Refined;
  readonly continuity: Continuity;
}

/**
 * Matches the final groups (`partition`: term-space centres) to the previous
 * run's and renumbers `partition` and `refined` alike.
 */
export function carryGroups(
  previous: { readonly groups: PreviousGroups; readonly options: ContinuityOptions },
  partition: Partition,
  refined: Refined,
  terms: readonly string[],
): Carried {
  const continuity = matchGroups(previous.groups, { centroids: partition.centroids, terms, groups: partition.groups, sizes: groupSizes(partition) }, previous.options);
  const r = continuity.renumber;
  const p = renumberPartition(partition, r);
  const formedSpace =
    refined.partition === partition
      ? p
      : { ...refined.partition, assignments: p.assignments, centroids: renumberCentres(refined.partition.centroids, refined.partition.groups, r) };
  return { partition: p, refined: { ...refined, partition: formedSpace, mixed: renumberValues(refined.mixed, r) }, continuity };
}

/** Names of continued groups replaced by the names they had in the previous run (terms and the rest kept as found now). */
export function carriedNames(labels: readonly GroupLabel[], continuity: Continuity): GroupLabel[] {
  return labels.map((l) => {
    const c = continuity.groups[l.id];
    return c?.previous ? { ...l, label: c.previous.label } : l;
  });
}

/** The groups of a saved model as a previous run (`source` is how the file is shown). */
export function previousGroupsOf(model: Model, source: string): PreviousGroups {
  return { source, groups: model.groups, terms: model.vocabulary.terms, centroids: model.centroids, labels: model.labels };
}
