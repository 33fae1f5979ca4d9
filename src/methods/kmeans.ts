/**
 * Grouping method `kmeans`: spherical k-means with the given number of groups;
 * for `groups: 'auto'` or `minSimilarity`, over-cluster, build the
 * average-link tree over those groups, cut it, and refine the cut with k-means.
 *
 * @module
 */
import type { Csr } from '../types.js';
import type { KMeansResult } from '../cluster/kmeans.js';
import { groupAverageLink } from '../cluster/tree.js';
import type { Partition } from '../cluster/partition.js';
import type { PipelineHooks } from '../hooks.js';
import type { PipelineStep, StepReply } from '../runners.js';
import { round } from '../util/round.js';
import { checkGroupsFit, cutTree, type GroupChoice, type MethodSettings } from './choose.js';
import type { GroupingMethod } from './method.js';

/** The fields method `kmeans` adds to the result. */
export interface KMeansOutcome {
  /** The final k-means run. */
  readonly kmeans: KMeansResult;
}

function kmeansPartition(km: KMeansResult): Partition {
  return { groups: km.groups, assignments: km.assignments, centroids: km.centroids, fit: km.fit, objective: km.objective };
}

/** Spherical k-means (Dhillon & Modha 2001), with the number of groups given or chosen on a tree over an over-clustering. */
export const kmeansMethod: GroupingMethod<'kmeans', KMeansOutcome> = {
  name: 'kmeans',
  title: 'spherical k-means',
  stage: 'k-means',
  leaves: { short: 'groups', long: 'k-means groups' },
  checkData: checkGroupsFit,
  *form({ matrix, nonEmpty, settings, hooks }) {
    const { partition, kmeans, choice } = yield* formByKMeans(matrix, nonEmpty, settings, hooks);
    return { partition, choice, outcome: { kmeans } };
  },
  runRecord({ kmeans: km }) {
    return {
      kmeans: {
        groups: km.groups,
        objective: round(km.objective, 6),
        iterations: km.iterations,
        converged: km.converged,
        restartObjectives: Array.from(km.restartObjectives, (v) => round(v, 6)),
        reseeded: km.reseeded,
      },
    };
  },
  outputs() {
    return new Map();
  },
};

function* formByKMeans(
  matrix: Csr,
  nonEmpty: number,
  settings: MethodSettings,
  hooks: PipelineHooks,
): Generator<PipelineStep, { partition: Partition; kmeans: KMeansResult; choice: GroupChoice | null }, StepReply> {
  function* run(groups: number, initialAssignments?: Int32Array): Generator<PipelineStep, KMeansResult, StepReply> {
    const onProgress = hooks.progress ? (done: number, total: number) => hooks.progress?.('k-means', done, total) : undefined;
    const km = (yield { kind: 'kmeans', matrix, options: { ...settings.kmeans, groups, ...(initialAssignments ? { initialAssignments } : {}) }, onProgress }) as KMeansResult;
    return km;
  }
  if (typeof settings.groups === 'number') {
    const km = yield* run(settings.groups);
    return { partition: kmeansPartition(km), kmeans: km, choice: null };
  }
  // Over-cluster, build the tree over those groups, cut it, then refine the cut with k-means.
  const [, hi] = settings.choose.range;
  const over = Math.min(nonEmpty, settings.choose.overGroups ?? Math.max(2 * hi, 40));
  const first = yield* run(over);
  const overTree = groupAverageLink(matrix, first.assignments, over);
  const { leafClusters, choice } = cutTree(matrix, first.assignments, overTree, over, settings);
  // Refine the chosen cut: k-means started from the partition the cut gives (each row in its over-group's cluster).
  const initial = first.assignments.map((g) => (g < 0 ? -1 : leafClusters[g]!));
  const km = yield* run(choice.chosen, initial);
  return { partition: kmeansPartition(km), kmeans: km, choice };
}
