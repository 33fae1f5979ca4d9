/**
 * What every grouping method shares: the settings a method reads, how the
 * number of groups is chosen when it is not given (a cut of a tree by
 * the knee of the objective or by similarity), and the record of that choice.
 *
 * @module
 */
import type { KMeansOptions } from '../cluster/kmeans-types.js';
import type { TreeOptions } from '../cluster/tree.js';
import { UsageError } from '../util/errors.js';
import { checkGroupCount } from '../cluster/kmeans.js';
import { chooseFromTree, type CutChoice, type CutScore, type TreeChoice } from '../cluster/choose.js';
import { cutAtSimilarity, type Dendrogram } from '../cluster/tree.js';
import type { Csr } from '../types.js';

/** Settings for choosing the number of groups (`groups: 'auto'`). */
export interface ChooseOptions {
  /** Smallest and largest number of groups tried. */
  readonly range: readonly [number, number];
  /** Rows sampled for the silhouette (seeded; cost grows with its square, not with n²). */
  readonly sampleSize: number;
  /** Groups of the over-clustering whose tree is cut; null = max(2 × range end, 40), capped by the documents. */
  readonly overGroups: number | null;
}

/** Defaults of {@link ChooseOptions}. */
export const DEFAULT_CHOOSE_OPTIONS: Readonly<ChooseOptions> = Object.freeze({
  range: Object.freeze([2, 20]) as readonly [number, number],
  sampleSize: 2000,
  overGroups: null,
});

/** The resolved settings a grouping method reads (a part of the pipeline's resolved options). */
export interface MethodSettings {
  /** A number of groups, `'auto'`, or null when `minSimilarity` is given. */
  readonly groups: number | 'auto' | null;
  readonly minSimilarity: number | null;
  /** The run's seed: k-means seeding and every sample. */
  readonly seed: number;
  readonly choose: ChooseOptions;
  /** k-means settings (their `seed` equals the run's seed). */
  readonly kmeans: Omit<KMeansOptions, 'groups'>;
  readonly tree: TreeOptions;
}

/** How the number of groups was chosen, when it was. */
export interface GroupChoice {
  /** `knee` for `groups: 'auto'` (Kneedle on the objective of the tree's cuts, see cluster/choose.ts), `similarity` for `minSimilarity`. */
  readonly by: 'knee' | 'similarity';
  readonly chosen: number;
  /** Leaves of the tree that was cut (over-clustering groups, or documents). */
  readonly treeLeaves: number;
  /** Scores of each cut tried (by knee only): objective, knee difference, silhouette. */
  readonly tried: readonly CutScore[];
  /** Rows in the silhouette sample. */
  readonly sampled: number;
  /** How the knee was taken (by knee only). */
  readonly rule?: CutChoice['rule'];
  /** Sentences for the person when the choice sits on an edge of the range or is unclear; empty otherwise. */
  readonly warnings: readonly string[];
}

/** The record of a choice by knee. */
export function kneeChoice(c: TreeChoice, treeLeaves: number): GroupChoice {
  return { by: 'knee', chosen: c.chosen, treeLeaves, tried: c.tried, sampled: c.sampled, rule: c.rule, warnings: c.warnings };
}

/** The numbers of groups tried: the range, capped by the leaves of the tree that is cut. */
export function cutRange(settings: MethodSettings, leaves: number): number[] {
  const [lo, hi] = settings.choose.range;
  const top = Math.min(hi, leaves);
  if (top < lo) {
    throw new UsageError(`range starts at ${lo} groups but there are only ${leaves} to split into; lower the range`, 'range');
  }
  const cuts: number[] = [];
  for (let c = lo; c <= top; c++) cuts.push(c);
  return cuts;
}

/** Number of clusters in a cut (labels 0 … max). */
export function countGroups(leafClusters: Int32Array): number {
  let max = -1;
  for (let i = 0; i < leafClusters.length; i++) if (leafClusters[i]! > max) max = leafClusters[i]!;
  return max + 1;
}

/** The usual data check of a method: a given number of groups from 2 to the documents with terms (and at least 2 of those). */
export function checkGroupsFit(settings: MethodSettings, nonEmpty: number): void {
  checkGroupCount(typeof settings.groups === 'number' ? settings.groups : 2, nonEmpty);
}

/**
 * Cuts a tree whose leaves are `leaves` items (row r of `matrix` in leaf
 * `leafOf[r]`, -1 for none) as the settings ask: where the average similarity
 * falls below `minSimilarity`, or else at the knee of the objective over the
 * range of numbers of groups. Returns each leaf's cluster and the record of
 * the choice. Throws {@link UsageError} when a similarity leaves one group.
 */
export function cutTree(
  matrix: Csr,
  leafOf: Int32Array,
  tree: Dendrogram,
  leaves: number,
  settings: MethodSettings,
): { leafClusters: Int32Array; choice: GroupChoice } {
  if (settings.minSimilarity !== null) {
    const leafClusters = cutAtSimilarity(tree, settings.minSimilarity);
    const chosen = countGroups(leafClusters);
    if (chosen < 2) throw new UsageError(`minSimilarity ${settings.minSimilarity} leaves a single group; raise it`, 'minSimilarity');
    return { leafClusters, choice: { by: 'similarity', chosen, treeLeaves: leaves, tried: [], sampled: 0, warnings: [] } };
  }
  const picked = chooseFromTree(matrix, leafOf, tree, cutRange(settings, leaves), settings.choose.range, {
    sampleSize: settings.choose.sampleSize,
    seed: settings.seed,
  });
  return { leafClusters: picked.leafClusters, choice: kneeChoice(picked, leaves) };
}
