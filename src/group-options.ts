/**
 * The options of a grouping run: one object per stage, resolved once at the
 * boundary ({@link resolveGroupOptions}) before any heavy work.
 *
 * @module
 */
import { resolveAnalyzerOptions, type AnalyzerOptions, type AnalyzerSettings } from './analyze/index.js';
import { resolveVectorizeOptions, type VectorizeOptions } from './vectorize/index.js';
import { resolveKMeansOptions, type KMeansOptions } from './cluster/kmeans.js';
import { resolveTreeOptions, type TreeOptions } from './cluster/tree.js';
import { resolveLabelOptions, type LabelOptions } from './label/index.js';
import { DEFAULT_CHOOSE_OPTIONS, METHOD_NAMES, findMethod, type ChooseOptions, type GroupMethod, type MethodSettings } from './methods/index.js';
import { stripUndefined } from './util/options.js';
import { UsageError, show } from './util/errors.js';

/** Options for {@link groupDocuments}, one object per stage. */
export interface GroupOptions {
  /** A number of groups, or `'auto'` to choose one by silhouette. Not with `minSimilarity`. */
  readonly groups?: number | 'auto';
  /** Cut the tree where average similarity drops below this, instead of giving `groups`. */
  readonly minSimilarity?: number;
  /** A registered grouping method: `kmeans` (default; any size) or `agglomerative` (document-level average-link, within a memory limit). */
  readonly method?: GroupMethod;
  /** Seed of every random choice (k-means seeding, samples); the same seed and input give the same output. Default 1. */
  readonly seed?: number;
  readonly choose?: Partial<Omit<ChooseOptions, 'range'>> & { readonly range?: readonly [number, number] };
  readonly analyzer?: Partial<AnalyzerOptions>;
  readonly vectorize?: Partial<VectorizeOptions>;
  /** k-means settings; `groups` here is accepted as the number of groups too. The seed is the top-level `seed`. */
  readonly kmeans?: Partial<Omit<KMeansOptions, 'groups' | 'seed' | 'initialAssignments'>> & { readonly groups?: number | 'auto' };
  readonly tree?: Partial<TreeOptions>;
  readonly label?: Partial<LabelOptions>;
}

/** Every stage's options after defaults were merged and values validated. */
export interface ResolvedGroupOptions extends MethodSettings {
  readonly method: GroupMethod;
  readonly analyzer: AnalyzerSettings;
  readonly vectorize: VectorizeOptions;
  readonly label: LabelOptions;
}

/**
 * Validates every stage's options before any heavy work. Bounds that depend
 * on the data (groups up to the number of non-empty documents) are checked
 * once the vectors exist.
 */
export function resolveGroupOptions(options: GroupOptions): ResolvedGroupOptions {
  const analyzer = resolveAnalyzerOptions(options.analyzer ?? {});
  const vectorize = resolveVectorizeOptions(options.vectorize ?? {});
  const { groups: kmGroups, ...kmRest } = options.kmeans ?? {};
  if ('seed' in kmRest && (kmRest as { seed?: unknown }).seed !== undefined) {
    throw new UsageError('kmeans.seed has moved: give seed at the top level of the options (it seeds sampling too)', 'seed');
  }
  const seed = options.seed ?? 1;
  const groupsRaw = options.groups ?? kmGroups;
  const minSimilarity = options.minSimilarity ?? null;
  if (groupsRaw !== undefined && minSimilarity !== null) {
    throw new UsageError(`give either groups or minSimilarity, not both; got groups ${show(groupsRaw)} and minSimilarity ${minSimilarity}`, 'minSimilarity');
  }
  if (groupsRaw === undefined && minSimilarity === null) {
    throw new UsageError('groups is required: a whole number of at least 2, or auto (or give minSimilarity)', 'groups');
  }
  if (minSimilarity !== null && !(typeof minSimilarity === 'number' && minSimilarity > -1 && minSimilarity < 1)) {
    throw new UsageError(`minSimilarity must be a number between -1 and 1; got ${show(minSimilarity)}`, 'minSimilarity');
  }
  if (groupsRaw !== undefined && groupsRaw !== 'auto') {
    resolveKMeansOptions({ ...kmRest, seed, groups: groupsRaw as number }, Infinity);
  }
  const kmeansFull = resolveKMeansOptions({ ...kmRest, seed, groups: 2 }, Infinity);
  const { groups: _unused, ...kmeans } = kmeansFull;
  const method = options.method ?? 'kmeans';
  if (findMethod(method) === undefined) {
    throw new UsageError(`method must be one of ${METHOD_NAMES.join(', ')}; got ${show(method)}`, 'method');
  }
  const c = { ...DEFAULT_CHOOSE_OPTIONS, ...stripUndefined(options.choose ?? {}) };
  const [lo, hi] = c.range;
  if (!Number.isInteger(lo) || !Number.isInteger(hi) || lo < 2 || hi < lo) {
    throw new UsageError(`range must be two whole numbers from 2 up, the first not above the second (like 4..40); got ${show(c.range)}`, 'range');
  }
  if (!Number.isInteger(c.sampleSize) || c.sampleSize < 2) {
    throw new UsageError(`sampleSize must be a whole number >= 2; got ${show(c.sampleSize)}`, 'sampleSize');
  }
  if (c.overGroups !== null && (!Number.isInteger(c.overGroups) || c.overGroups < hi)) {
    throw new UsageError(`overGroups must be a whole number no smaller than the range end (${hi}); got ${show(c.overGroups)}`, 'overGroups');
  }
  const tree = resolveTreeOptions(options.tree ?? {});
  const label = resolveLabelOptions(options.label ?? {});
  return {
    groups: (groupsRaw ?? null) as number | 'auto' | null,
    minSimilarity,
    method,
    seed: kmeans.seed,
    choose: { range: [lo, hi], sampleSize: c.sampleSize, overGroups: c.overGroups },
    analyzer,
    vectorize,
    kmeans,
    tree,
    label,
  };
}

