/**
 * The options of a grouping run: one object per stage, resolved once at the
 * boundary ({@link resolveGroupOptions}) before any heavy work.
 *
 * @module
 */
import { DEFAULT_ANALYZER_OPTIONS, resolveAnalyzerOptions, type AnalyzerOptions, type AnalyzerSettings } from './analyze/index.js';
import { checkCountsFit } from './vectorize/df-counts.js';
import { VECTORIZE_KEYS } from './vectorize/options.js';
import { DEFAULT_VECTORIZE_OPTIONS, resolveVectorizeOptions, type VectorizeOptions } from './vectorize/index.js';
import { DEFAULT_KMEANS_OPTIONS, checkGroupCount, resolveKMeansOptions, type KMeansOptions } from './cluster/kmeans.js';
import { TREE_DEFAULTS, resolveTreeOptions, type TreeOptions } from './cluster/tree.js';
import { DEFAULT_LABEL_OPTIONS, resolveLabelOptions, type LabelOptions } from './label/index.js';
import { DEFAULT_CLEAN_OPTIONS } from './clean/options.js';
import { resolveCleanStage, type CleanSettings, type CleanStageOptions } from './clean/stage.js';
import { checkKeys, checkValues, type Constraint, type Constraints } from './util/constraints.js';
import { DEFAULT_CHOOSE_OPTIONS, METHOD_NAMES, findMethod, type ChooseOptions, type GroupMethod, type MethodSettings } from './methods/index.js';
import { stripUndefined } from './util/options.js';
import { DEFAULT_REFINE_OPTIONS, resolveRefineOptions, type RefineOptions } from './cluster/unsorted.js';
import { DEFAULT_REDUCE_OPTIONS, resolveReduceSetting, type ReduceOptions, type ReduceSetting } from './reduce/index.js';
import { UsageError, show } from './util/errors.js';

/** Options for {@link groupDocuments}, one object per stage. */
export interface GroupOptions {
  /** A number of groups, or `'auto'` to choose one at the knee of the objective over the tree's cuts. Not with `minSimilarity`. */
  readonly groups?: number | 'auto';
  /** Cut the tree where average similarity drops below this, instead of giving `groups`. */
  readonly minSimilarity?: number;
  /** A registered grouping method: `kmeans` (default; any size) or `agglomerative` (document-level average-link, within a memory limit). */
  readonly method?: GroupMethod;
  /** Seed of every random choice (k-means seeding, samples); the same seed and input give the same output. Default 1. */
  readonly seed?: number;
  readonly choose?: Partial<Omit<ChooseOptions, 'range'>> & { readonly range?: readonly [number, number] };
  /** Cleaning before analysis: `mode` `auto` (default: rows of exports), `tickets` (all) or `none`, and the rules. */
  readonly clean?: CleanStageOptions;
  readonly analyzer?: Partial<AnalyzerOptions>;
  readonly vectorize?: Partial<VectorizeOptions>;
  /** k-means settings; `groups` here is accepted as the number of groups too. The seed is the top-level `seed`. */
  readonly kmeans?: Partial<Omit<KMeansOptions, 'groups' | 'seed' | 'initialAssignments'>> & { readonly groups?: number | 'auto' };
  readonly tree?: Partial<TreeOptions>;
  readonly label?: Partial<LabelOptions>;
  /** Unsorted share, mixed groups and their splitting (cluster/unsorted.ts). */
  readonly refine?: Partial<RefineOptions>;
  /**
   * Group in reduced vectors (truncated SVD of the TF-IDF rows, rows re-normalised; names still from the terms):
   * `'auto'` (the default: 50 dims for piles of up to 100,000 documents with terms, fewer for tiny piles), `true` or
   * options (always), `false` (the TF-IDF rows themselves).
   */
  readonly reduce?: Partial<ReduceOptions> | boolean | 'auto';
}

/** Every stage's options after defaults were merged and values validated. */
export interface ResolvedGroupOptions extends MethodSettings {
  readonly method: GroupMethod;
  readonly clean: CleanSettings;
  readonly analyzer: AnalyzerSettings;
  readonly vectorize: VectorizeOptions;
  readonly label: LabelOptions;
  readonly refine: RefineOptions;
  /** Reduction before grouping (see {@link ReduceSetting.auto}), or null for none. */
  readonly reduce: ReduceSetting | null;
}

/** Top-level keys of {@link GroupOptions}. */
const GROUP_KEYS = ['groups', 'minSimilarity', 'method', 'seed', 'choose', 'clean', 'analyzer', 'vectorize', 'kmeans', 'tree', 'label', 'refine', 'reduce'] as const;

/** Keys of each stage's options object, for the unknown-key check at the boundary. */
const STAGE_KEYS: Readonly<Record<'choose' | 'clean' | 'analyzer' | 'vectorize' | 'kmeans' | 'tree' | 'label' | 'refine', readonly string[]>> = {
  choose: Object.keys(DEFAULT_CHOOSE_OPTIONS),
  clean: [...Object.keys(DEFAULT_CLEAN_OPTIONS), 'detect'],
  analyzer: Object.keys(DEFAULT_ANALYZER_OPTIONS),
  vectorize: VECTORIZE_KEYS,
  kmeans: ['groups', ...Object.keys(DEFAULT_KMEANS_OPTIONS).filter((k) => k !== 'seed')],
  tree: Object.keys(TREE_DEFAULTS),
  label: Object.keys(DEFAULT_LABEL_OPTIONS),
  refine: Object.keys(DEFAULT_REFINE_OPTIONS),
};

/** The top-level values that have a plain constraint. */
const GROUP_CONSTRAINTS = {
  seed: { kind: 'whole', min: 0, max: 4294967295 },
  minSimilarity: { kind: 'number', above: -1, below: 1 },
} as const satisfies Record<string, Constraint>;

/** The choose values that have a plain constraint. */
const CHOOSE_CONSTRAINTS: Constraints<ChooseOptions> = { sampleSize: { kind: 'whole', min: 2 } };

/** Options objects this module resolved (and froze): resolving one again returns it as it is. */
const RESOLVED = new WeakSet<object>();

/**
 * Validates every stage's options before any heavy work, once: unknown keys
 * anywhere are refused (`unknown option kmeans.restart; did you mean
 * restarts?`), every value is checked, defaults are merged. Passing the
 * result back returns it unchanged, so a caller that resolved at its boundary
 * (the CLI) and the pipeline never resolve twice. Bounds that depend on the
 * data (groups up to the number of non-empty documents) are checked by the
 * method once the vectors exist.
 */
export function resolveGroupOptions(options: GroupOptions | ResolvedGroupOptions): ResolvedGroupOptions {
  if (RESOLVED.has(options)) return options as ResolvedGroupOptions;
  const raw = options as GroupOptions;
  const kmRaw = (raw.kmeans ?? {}) as Record<string, unknown>;
  if (kmRaw !== null && typeof kmRaw === 'object' && kmRaw.seed !== undefined) {
    throw new UsageError('kmeans.seed has moved: give seed at the top level of the options (it seeds sampling too)', 'seed');
  }
  checkKeys(raw, GROUP_KEYS);
  for (const stage of Object.keys(STAGE_KEYS) as (keyof typeof STAGE_KEYS)[]) {
    if (raw[stage] !== undefined) checkKeys(raw[stage], STAGE_KEYS[stage], stage);
  }
  if (raw.reduce !== undefined && typeof raw.reduce === 'object' && raw.reduce !== null) checkKeys(raw.reduce, Object.keys(DEFAULT_REDUCE_OPTIONS), 'reduce');
  const clean = resolveCleanStage(raw.clean ?? {});
  const analyzer = resolveAnalyzerOptions(raw.analyzer ?? {});
  const vectorize = resolveVectorizeOptions(raw.vectorize ?? {});
  if (vectorize.idfCounts) checkCountsFit(vectorize.idfCounts, analyzer);
  const { groups: kmGroups, ...kmRest } = raw.kmeans ?? {};
  const groupsRaw = raw.groups ?? kmGroups;
  const minSimilarity = raw.minSimilarity ?? null;
  if (groupsRaw !== undefined && minSimilarity !== null) {
    throw new UsageError(`give either groups or minSimilarity, not both; got groups ${show(groupsRaw)} and minSimilarity ${minSimilarity}`, 'minSimilarity');
  }
  if (groupsRaw === undefined && minSimilarity === null) {
    throw new UsageError('groups is required: a whole number of at least 2, or auto (or give minSimilarity)', 'groups');
  }
  const seed = raw.seed ?? 1;
  checkValues({ seed }, { seed: GROUP_CONSTRAINTS.seed });
  if (minSimilarity !== null) checkValues({ minSimilarity }, { minSimilarity: GROUP_CONSTRAINTS.minSimilarity });
  if (groupsRaw !== undefined && groupsRaw !== 'auto') checkGroupCount(groupsRaw, Infinity);
  const { groups: _unused, ...kmeans } = resolveKMeansOptions({ ...kmRest, seed, groups: 2 }, Infinity);
  const method = raw.method ?? 'kmeans';
  if (findMethod(method) === undefined) {
    throw new UsageError(`method must be one of ${METHOD_NAMES.join(', ')}; got ${show(method)}`, 'method');
  }
  const c = { ...DEFAULT_CHOOSE_OPTIONS, ...stripUndefined(raw.choose ?? {}) };
  const [lo, hi] = Array.isArray(c.range) && c.range.length === 2 ? c.range : [NaN, NaN];
  if (!Number.isInteger(lo) || !Number.isInteger(hi) || lo < 2 || hi < lo) {
    throw new UsageError(`range must be two whole numbers from 2 up, the first not above the second (like 4..40); got ${show(c.range)}`, 'range');
  }
  checkValues(c, CHOOSE_CONSTRAINTS);
  if (c.overGroups !== null && (!Number.isInteger(c.overGroups) || c.overGroups < hi)) {
    throw new UsageError(`overGroups must be a whole number no smaller than the range end (${hi}); got ${show(c.overGroups)}`, 'overGroups');
  }
  const tree = resolveTreeOptions(raw.tree ?? {});
  const label = resolveLabelOptions(raw.label ?? {});
  const resolved: ResolvedGroupOptions = Object.freeze({
    groups: (groupsRaw ?? null) as number | 'auto' | null,
    minSimilarity,
    method,
    clean,
    seed,
    choose: { range: [lo, hi] as const, sampleSize: c.sampleSize, overGroups: c.overGroups },
    analyzer,
    vectorize,
    kmeans,
    tree,
    label,
    refine: resolveRefineOptions(raw.refine ?? {}),
    reduce: resolveReduceSetting(raw.reduce),
  });
  RESOLVED.add(resolved);
  return resolved;
}
