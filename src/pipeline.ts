/**
 * Composes the core stages for the commands: analyze → vectorize → groups
 * (k-means or a cut of the average-link tree) → tree over the groups →
 * quality → label. Pure: the clock and progress reporting come in as hooks, so the same
 * function serves the CLI, the library API and the tests.
 *
 * @module
 */
import type { Csr, Doc } from './types.js';
import { createAnalyzer, resolveAnalyzerOptions, type AnalyzerOptions, type AnalyzerSettings } from './analyze/index.js';
import type { VectorizeRequest, VectorizeRunner } from './parallel/analyze-runner.js';
import {
  fitTfidf,
  type TfidfFit,
  resolveVectorizeOptions,
  type VectorizeOptions,
  type Vocabulary,
} from './vectorize/index.js';
import { resolveKMeansOptions, sphericalKMeans, type KMeansOptions, type KMeansResult } from './cluster/kmeans.js';
import {
  cutAtSimilarity,
  cutToGroups,
  documentAverageLink,
  groupAverageLink,
  resolveTreeOptions,
  type Dendrogram,
  type TreeOptions,
} from './cluster/tree.js';
import { groupCohesion, groupSeparation, sampledSilhouette, silhouetteForCuts, type SilhouetteResult } from './cluster/quality.js';
import { canonicalGroups, partitionFromAssignments, type Partition } from './cluster/partition.js';
import { stripUndefined } from './util/options.js';
import { PLACEHOLDERS } from './clean/index.js';
import {
  labelGroups,
  resolveLabelOptions,
  surfaceForms,
  withDisplayForms,
  type GroupLabel,
  type LabelOptions,
} from './label/index.js';
import { UsageError, show } from './util/errors.js';
import { reduceForGrouping, resolveReduceSetting, termSpacePartition, type ReduceOptions, type ReducedGrouping } from './reduce/index.js';

/** How groups are formed. */
export type GroupMethod = 'kmeans' | 'agglomerative';

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

/** Options for {@link groupDocuments}, one object per stage. */
export interface GroupOptions {
  /** A number of groups, or `'auto'` to choose one by silhouette. Not with `minSimilarity`. */
  readonly groups?: number | 'auto';
  /** Cut the tree where average similarity drops below this, instead of giving `groups`. */
  readonly minSimilarity?: number;
  /** `kmeans` (default; any size) or `agglomerative` (document-level average-link, within a memory limit). */
  readonly method?: GroupMethod;
  readonly choose?: Partial<Omit<ChooseOptions, 'range'>> & { readonly range?: readonly [number, number] };
  readonly analyzer?: Partial<AnalyzerOptions>;
  readonly vectorize?: Partial<VectorizeOptions>;
  /** k-means settings; `groups` here is accepted as the number of groups too. */
  readonly kmeans?: Partial<Omit<KMeansOptions, 'groups'>> & { readonly groups?: number | 'auto' };
  readonly tree?: Partial<TreeOptions>;
  readonly label?: Partial<LabelOptions>;
  /** Group in reduced vectors (truncated SVD of the TF-IDF rows): `true` or options; absent or `false` = TF-IDF rows (the default). */
  readonly reduce?: Partial<ReduceOptions> | boolean;
}

/** Every stage's options after defaults were merged and values validated. */
export interface ResolvedGroupOptions {
  readonly groups: number | 'auto' | null;
  readonly minSimilarity: number | null;
  readonly method: GroupMethod;
  readonly choose: ChooseOptions;
  readonly analyzer: AnalyzerSettings;
  readonly vectorize: VectorizeOptions;
  readonly kmeans: Omit<KMeansOptions, 'groups'>;
  readonly tree: TreeOptions;
  readonly label: LabelOptions;
  /** Reduction before grouping, or null for none. */
  readonly reduce: ReduceOptions | null;
}

/** Hooks the edges pass in; all optional. */
export interface PipelineHooks {
  /** Milliseconds from some fixed point (for stage timings). Without it, timings are 0. */
  readonly now?: () => number;
  /** Called as a stage makes progress. */
  readonly progress?: (stage: string, done: number, total: number) => void;
}

/** Wall time of one stage. */
export interface StageTiming {
  readonly stage: string;
  readonly ms: number;
  /** How many documents the stage handled. */
  readonly items: number;
}

/** How the number of groups was chosen, when it was. */
export interface GroupChoice {
  /** `silhouette` for `groups: 'auto'`, `similarity` for `minSimilarity`. */
  readonly by: 'silhouette' | 'similarity';
  readonly chosen: number;
  /** Leaves of the tree that was cut (over-clustering groups, or documents). */
  readonly treeLeaves: number;
  /** Mean silhouette of each cut tried (by silhouette only). */
  readonly tried: readonly { readonly groups: number; readonly silhouette: number }[];
  /** Rows in the silhouette sample. */
  readonly sampled: number;
}

/** Internal quality of the final grouping. */
export interface GroupQuality {
  /** Mean cosine of members to their centroid, per group. */
  readonly cohesion: Float64Array;
  /** Highest cosine between a group's centroid and another's, per group. */
  readonly separation: Float64Array;
  /** Mean silhouette (cosine) on a seeded sample, and per group. */
  readonly silhouette: SilhouetteResult;
}

/** Everything a grouping run produced. */
export interface GroupResult {
  /** The documents in canonical order (by id, digits compared as numbers); row `r` of every array is `docs[r]`. */
  readonly docs: readonly Doc[];
  /** Row of each document in the order it was given: `docs[inputOrder[i]]` is the i-th input document. */
  readonly inputOrder: Int32Array;
  readonly options: ResolvedGroupOptions;
  readonly vocabulary: Vocabulary;
  readonly matrix: Csr;
  /** The final groups: assignments, unit centroids, fits. */
  readonly partition: Partition;
  /** The final k-means run (method kmeans), or null. */
  readonly kmeans: KMeansResult | null;
  /** Average-link tree over the final groups (leaf g = group g). */
  readonly tree: Dendrogram;
  /** Method agglomerative: the document-level tree; leaf i is row `treeRows[i]`. */
  readonly documentTree: Dendrogram | null;
  readonly treeRows: Int32Array | null;
  readonly choice: GroupChoice | null;
  readonly quality: GroupQuality;
  readonly groups: readonly GroupLabel[];
  /** Rows (document indices) with no terms left after analysis and pruning; they are in no group. */
  readonly emptyRows: Int32Array;
  readonly timings: readonly StageTiming[];
  /** With `reduce`: the decomposition, the reduced rows and the reduced centres the groups were formed on (partition.centroids are term-space). */
  readonly reduced: ReducedGrouping | null;
}

const METHODS: readonly GroupMethod[] = ['kmeans', 'agglomerative'];

/**
 * Validates every stage's options before any heavy work. Bounds that depend
 * on the data (groups up to the number of non-empty documents) are checked
 * once the vectors exist.
 */
export function resolveGroupOptions(options: GroupOptions): ResolvedGroupOptions {
  const analyzer = resolveAnalyzerOptions(options.analyzer ?? {});
  const vectorize = resolveVectorizeOptions(options.vectorize ?? {});
  const { groups: kmGroups, ...kmRest } = options.kmeans ?? {};
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
    resolveKMeansOptions({ ...kmRest, groups: groupsRaw as number }, Infinity);
  }
  const kmeansFull = resolveKMeansOptions({ ...kmRest, groups: 2 }, Infinity);
  const { groups: _unused, ...kmeans } = kmeansFull;
  const method = options.method ?? 'kmeans';
  if (!METHODS.includes(method)) {
    throw new UsageError(`method must be one of ${METHODS.join(', ')}; got ${show(method)}`, 'method');
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
    choose: { range: [lo, hi], sampleSize: c.sampleSize, overGroups: c.overGroups },
    analyzer,
    vectorize,
    kmeans,
    tree,
    label,
    reduce: resolveReduceSetting(options.reduce),
  };
}

/**
 * Groups documents: analyze, vectorize (TF-IDF, L2 rows), form groups
 * (spherical k-means, or a cut of the document-level average-link tree),
 * build the tree over the groups, score quality, then name the groups and pick
 * exemplars. Throws {@link UsageError} for unusable settings or data (for
 * example more groups than non-empty documents).
 */
export function groupDocuments(input: readonly Doc[], options: GroupOptions, hooks: PipelineHooks = {}): GroupResult {
  const steps = groupSteps(input, options, hooks);
  let next = steps.next();
  while (!next.done) {
    const req = next.value;
    next = steps.next(req.kind === 'kmeans' ? sphericalKMeans(req.matrix, req.options) : fitOnThisThread(req));
  }
  return next.value;
}

/** Analysis streamed into the TF-IDF fit on the calling thread (no list of term lists is ever held). */
function fitOnThisThread(req: VectorizeStep): TfidfFit {
  const analyzer = createAnalyzer(req.analyzer);
  const n = req.texts.length;
  const step = Math.max(1, Math.floor(n / 100));
  function* termLists(): Generator<string[]> {
    for (let i = 0; i < n; i++) {
      if (req.onProgress && i % step === 0) req.onProgress(i, n);
      yield analyzer.analyze(req.texts[i]);
    }
    req.onProgress?.(n, n);
  }
  return fitTfidf(termLists(), req.vectorize);
}

/** A k-means run the pipeline needs; the driver decides on how many threads it runs. */
export interface KMeansRequest {
  readonly matrix: Csr;
  readonly options: Partial<KMeansOptions> & { readonly groups: number };
}

/** Runs a k-means request, on the calling thread or on several (same result either way). */
export type KMeansRunner = (request: KMeansRequest) => Promise<KMeansResult>;

/** The work the pipeline hands to its driver: k-means runs and the analyze+vectorize step. */
type Step = ({ readonly kind: 'kmeans' } & KMeansRequest) | ({ readonly kind: 'vectorize' } & VectorizeStep);
type VectorizeStep = VectorizeRequest & { readonly analyzer: AnalyzerSettings };

/** The runners of {@link groupDocumentsAsync}; a missing one runs on the calling thread. */
export interface PipelineRunners {
  readonly kmeans?: KMeansRunner;
  readonly vectorize?: VectorizeRunner;
}

/**
 * {@link groupDocuments} with k-means runs and the analyze+vectorize step
 * handed to runners (for example the thread runners of `src/parallel`), which
 * return the very same results as the single-thread code, so the output is
 * identical.
 */
export async function groupDocumentsAsync(
  input: readonly Doc[],
  options: GroupOptions,
  runners: PipelineRunners,
  hooks: PipelineHooks = {},
): Promise<GroupResult> {
  const steps = groupSteps(input, options, hooks);
  let next = steps.next();
  while (!next.done) {
    const req = next.value;
    if (req.kind === 'kmeans') next = steps.next(await (runners.kmeans ? runners.kmeans(req) : sphericalKMeans(req.matrix, req.options)));
    else next = steps.next(await (runners.vectorize ? runners.vectorize(req) : fitOnThisThread(req)));
  }
  return next.value;
}

/**
 * The pipeline as steps: it yields each k-means run and the analyze+vectorize
 * step it needs and receives the results, so one body serves the sync and the
 * async drivers.
 */
function* groupSteps(input: readonly Doc[], options: GroupOptions, hooks: PipelineHooks): Generator<Step, GroupResult, KMeansResult | TfidfFit> {
  const resolved = resolveGroupOptions(options);
  const { docs, inputOrder } = canonicalOrder(input);
  const now = hooks.now ?? (() => 0);
  const timings: StageTiming[] = [];
  const n = docs.length;
  const time = <T>(stage: string, items: number, fn: () => T): T => {
    const t0 = now();
    const value = fn();
    timings.push({ stage, ms: now() - t0, items });
    return value;
  };

  const analyzer = createAnalyzer(resolved.analyzer);
  const tFit = now();
  const fitted = (yield {
    kind: 'vectorize',
    texts: docs.map((d) => d.text),
    analyzer: resolved.analyzer,
    vectorize: resolved.vectorize,
    onProgress: hooks.progress ? (done: number, total: number) => hooks.progress?.('analyze', done, total) : undefined,
  }) as TfidfFit;
  const { vocabulary, matrix } = fitted;
  timings.push({ stage: 'analyze+vectorize', ms: now() - tFit, items: n });

  const empty: number[] = [];
  for (let r = 0; r < matrix.rows; r++) if (matrix.indptr[r + 1] === matrix.indptr[r]) empty.push(r);
  const nonEmpty = n - empty.length;
  if (typeof resolved.groups === 'number') resolveKMeansOptions({ ...resolved.kmeans, groups: resolved.groups }, nonEmpty);
  else resolveKMeansOptions({ ...resolved.kmeans, groups: 2 }, nonEmpty);

  // Reduced vectors: groups are formed on the reduced rows, then named (and treed) from TF-IDF centroids.
  const reduce = resolved.reduce;
  const space = reduce ? time('reduce', nonEmpty, () => reduceForGrouping(matrix, reduce, resolved.kmeans.seed, nonEmpty)) : null;
  const tForm = now();
  const formed =
    resolved.method === 'kmeans'
      ? yield* formByKMeans(space?.matrix ?? matrix, nonEmpty, resolved, hooks)
      : formByDocumentTree(space?.matrix ?? matrix, nonEmpty, resolved);
  timings.push({ stage: resolved.method === 'kmeans' ? 'k-means' : 'agglomerative', ms: now() - tForm, items: nonEmpty });
  const partition = space ? termSpacePartition(matrix, formed.partition) : formed.partition;
  const k = partition.groups;

  const tree = time('tree', nonEmpty, () => groupAverageLink(matrix, partition.assignments, k));
  const quality = time('quality', nonEmpty, () => ({
    cohesion: groupCohesion(matrix, partition.assignments, k, partition.centroids),
    separation: groupSeparation(partition.centroids, matrix.cols, k),
    silhouette: sampledSilhouette(matrix, partition.assignments, k, { sampleSize: resolved.choose.sampleSize, seed: resolved.kmeans.seed }),
  }));

  const groups = time('label', nonEmpty, () => {
    const stemmed = labelGroups(
      { matrix, assignments: partition.assignments, fit: partition.fit, groups: k, centroids: partition.centroids, terms: vocabulary.terms },
      resolved.label,
    );
    return readableLabels(stemmed, docs, analyzer, resolved.label);
  });

  return {
    docs,
    inputOrder,
    options: resolved,
    vocabulary,
    matrix,
    partition,
    kmeans: formed.kmeans,
    tree,
    documentTree: formed.documentTree,
    treeRows: formed.treeRows,
    choice: formed.choice,
    quality,
    groups,
    emptyRows: Int32Array.from(empty),
    timings,
    reduced: space ? { ...space, centroids: formed.partition.centroids } : null,
  };
}

interface Formed {
  partition: Partition;
  kmeans: KMeansResult | null;
  documentTree: Dendrogram | null;
  treeRows: Int32Array | null;
  choice: GroupChoice | null;
}

function kmeansPartition(km: KMeansResult): Partition {
  return { groups: km.groups, assignments: km.assignments, centroids: km.centroids, fit: km.fit, objective: km.objective };
}

/** Picks the cut with the best mean silhouette; ties go to fewer groups. */
function bestCut(cuts: readonly { groups: number; mean: number }[]): number {
  let best = -1;
  let bestScore = -Infinity;
  for (const c of cuts) {
    if (Number.isFinite(c.mean) && c.mean > bestScore) {
      bestScore = c.mean;
      best = c.groups;
    }
  }
  return best;
}

function cutRange(resolved: ResolvedGroupOptions, leaves: number): number[] {
  const [lo, hi] = resolved.choose.range;
  const top = Math.min(hi, leaves);
  if (top < lo) {
    throw new UsageError(`range starts at ${lo} groups but there are only ${leaves} to split into; lower the range`, 'range');
  }
  const cuts: number[] = [];
  for (let c = lo; c <= top; c++) cuts.push(c);
  return cuts;
}

function* formByKMeans(
  matrix: Csr,
  nonEmpty: number,
  resolved: ResolvedGroupOptions,
  hooks: PipelineHooks,
): Generator<Step, Formed, KMeansResult | TfidfFit> {
  function* run(groups: number, initialAssignments?: Int32Array): Generator<Step, KMeansResult, KMeansResult | TfidfFit> {
    hooks.progress?.('group', 0, 1);
    const km = (yield { kind: 'kmeans', matrix, options: { ...resolved.kmeans, groups, ...(initialAssignments ? { initialAssignments } : {}) } }) as KMeansResult;
    hooks.progress?.('group', 1, 1);
    return km;
  }
  if (typeof resolved.groups === 'number') {
    const km = yield* run(resolved.groups);
    return { partition: kmeansPartition(km), kmeans: km, documentTree: null, treeRows: null, choice: null };
  }
  // Over-cluster, build the tree over those groups, cut it, then refine the cut with k-means.
  const [, hi] = resolved.choose.range;
  const over = Math.min(nonEmpty, resolved.choose.overGroups ?? Math.max(2 * hi, 40));
  const first = yield* run(over);
  const overTree = groupAverageLink(matrix, first.assignments, over);
  let chosen: number;
  let choice: GroupChoice;
  let leafClusters: Int32Array;
  if (resolved.minSimilarity !== null) {
    leafClusters = cutAtSimilarity(overTree, resolved.minSimilarity);
    chosen = countGroups(leafClusters);
    choice = { by: 'similarity', chosen, treeLeaves: over, tried: [], sampled: 0 };
  } else {
    const cuts = cutRange(resolved, over);
    const scored = silhouetteForCuts(matrix, first.assignments, overTree, cuts, {
      sampleSize: resolved.choose.sampleSize,
      seed: resolved.kmeans.seed,
    });
    chosen = bestCut(scored.cuts);
    leafClusters = scored.cuts.find((c) => c.groups === chosen)?.leafClusters ?? cutToGroups(overTree, chosen);
    choice = {
      by: 'silhouette',
      chosen,
      treeLeaves: over,
      tried: scored.cuts.map((c) => ({ groups: c.groups, silhouette: c.mean })),
      sampled: scored.sampled,
    };
  }
  if (chosen < 2) {
    throw new UsageError(`minSimilarity ${resolved.minSimilarity} leaves a single group; raise it`, 'minSimilarity');
  }
  // Refine the chosen cut: k-means started from the partition the cut gives (each row in its over-group's cluster).
  const initial = first.assignments.map((g) => (g < 0 ? -1 : leafClusters[g]));
  const km = yield* run(chosen, initial);
  return { partition: kmeansPartition(km), kmeans: km, documentTree: null, treeRows: null, choice };
}

function countGroups(leafClusters: Int32Array): number {
  let max = -1;
  for (let i = 0; i < leafClusters.length; i++) if (leafClusters[i] > max) max = leafClusters[i];
  return max + 1;
}

function formByDocumentTree(matrix: Csr, nonEmpty: number, resolved: ResolvedGroupOptions): Formed {
  const rows = new Int32Array(nonEmpty);
  for (let r = 0, a = 0; r < matrix.rows; r++) if (matrix.indptr[r + 1] > matrix.indptr[r]) rows[a++] = r;
  const sub = selectRows(matrix, rows);
  const docTree = documentAverageLink(sub, resolved.tree);
  let leafClusters: Int32Array;
  let choice: GroupChoice | null = null;
  if (typeof resolved.groups === 'number') {
    leafClusters = cutToGroups(docTree, resolved.groups);
  } else if (resolved.minSimilarity !== null) {
    leafClusters = cutAtSimilarity(docTree, resolved.minSimilarity);
    const chosen = countGroups(leafClusters);
    if (chosen < 2) throw new UsageError(`minSimilarity ${resolved.minSimilarity} leaves a single group; raise it`, 'minSimilarity');
    choice = { by: 'similarity', chosen, treeLeaves: nonEmpty, tried: [], sampled: 0 };
  } else {
    const cuts = cutRange(resolved, nonEmpty);
    const identity = Int32Array.from({ length: nonEmpty }, (_, i) => i);
    const scored = silhouetteForCuts(sub, identity, docTree, cuts, { sampleSize: resolved.choose.sampleSize, seed: resolved.kmeans.seed });
    const chosen = bestCut(scored.cuts);
    leafClusters = cutToGroups(docTree, chosen);
    choice = {
      by: 'silhouette',
      chosen,
      treeLeaves: nonEmpty,
      tried: scored.cuts.map((c) => ({ groups: c.groups, silhouette: c.mean })),
      sampled: scored.sampled,
    };
  }
  const k = countGroups(leafClusters);
  const raw = new Int32Array(matrix.rows).fill(-1);
  for (let i = 0; i < nonEmpty; i++) raw[rows[i]] = leafClusters[i];
  const partition = partitionFromAssignments(matrix, canonicalGroups(raw, k), k);
  return { partition, kmeans: null, documentTree: docTree, treeRows: rows, choice };
}

/** The given rows of a CSR matrix, as a new CSR matrix (values shared by copy). */
export function selectRows(matrix: Csr, rows: Int32Array): Csr {
  const indptr = new Int32Array(rows.length + 1);
  for (let i = 0; i < rows.length; i++) indptr[i + 1] = indptr[i] + matrix.indptr[rows[i] + 1] - matrix.indptr[rows[i]];
  const nnz = indptr[rows.length];
  const indices = new Int32Array(nnz);
  const values = new Float32Array(nnz);
  for (let i = 0; i < rows.length; i++) {
    const from = matrix.indptr[rows[i]];
    const to = matrix.indptr[rows[i] + 1];
    indices.set(matrix.indices.subarray(from, to), indptr[i]);
    values.set(matrix.values.subarray(from, to), indptr[i]);
  }
  return { rows: rows.length, cols: matrix.cols, indptr, indices, values };
}

/** Most documents re-read to find the surface words behind stemmed label terms. */
export const SURFACE_SAMPLE = 20_000;

/**
 * Replaces stems in labels with the most common word behind them, read from an
 * evenly spaced sample of at most {@link SURFACE_SAMPLE} documents.
 */
function readableLabels(
  labels: GroupLabel[],
  docs: readonly Doc[],
  analyzer: ReturnType<typeof createAnalyzer>,
  options: LabelOptions,
): GroupLabel[] {
  // Placeholder words stand for links, addresses and numbers: they may link documents, but they name nothing.
  const hidden = new Set<string>(Object.values(PLACEHOLDERS));
  labels = labels.map((g) => ({ ...g, terms: g.terms.filter((t) => !hidden.has(t.term)) }));
  if (!analyzer.settings.stem) return withDisplayForms(labels, new Map(), options);
  const wanted = new Set<string>();
  for (const g of labels) for (const t of g.terms) wanted.add(t.term);
  const stride = Math.max(1, Math.ceil(docs.length / SURFACE_SAMPLE));
  function* texts(): Generator<string> {
    for (let i = 0; i < docs.length; i += stride) yield docs[i].text;
  }
  const display = surfaceForms(texts(), (t) => analyzer.analyzeWithSurfaces(t), wanted);
  return withDisplayForms(labels, display, options);
}

/**
 * Compares ids with runs of digits taken as numbers ("row 2" before "row 10"),
 * then by code units, so the order is total and locale-free.
 */
export function compareIds(a: string, b: string): number {
  const ra = a.match(/\d+|\D+/g) ?? [];
  const rb = b.match(/\d+|\D+/g) ?? [];
  const n = Math.min(ra.length, rb.length);
  for (let i = 0; i < n; i++) {
    const x = ra[i];
    const y = rb[i];
    if (x === y) continue;
    const dx = x.charCodeAt(0) >= 48 && x.charCodeAt(0) <= 57;
    const dy = y.charCodeAt(0) >= 48 && y.charCodeAt(0) <= 57;
    if (dx && dy) {
      const nx = x.replace(/^0+/, '');
      const ny = y.replace(/^0+/, '');
      if (nx.length !== ny.length) return nx.length - ny.length;
      if (nx !== ny) return nx < ny ? -1 : 1;
      continue;
    }
    return x < y ? -1 : 1;
  }
  if (ra.length !== rb.length) return ra.length - rb.length;
  return a < b ? -1 : a > b ? 1 : 0;
}

/**
 * Puts documents in id order so the result does not depend on the order the
 * inputs were given in (ids are unique after ingest; equal ids keep their order).
 */
export function canonicalOrder(input: readonly Doc[]): { docs: Doc[]; inputOrder: Int32Array } {
  const order = Array.from(input.keys()).sort((i, j) => compareIds(input[i].id, input[j].id) || i - j);
  const inputOrder = new Int32Array(input.length);
  order.forEach((original, row) => {
    inputOrder[original] = row;
  });
  return { docs: order.map((i) => input[i]), inputOrder };
}
