/**
 * Composes the core stages for the commands: analyze → vectorize → groups
 * (k-means or a cut of the average-link tree) → tree over the groups →
 * quality → label. Pure: the clock and progress reporting come in as hooks, so the same
 * function serves the CLI, the library API and the tests.
 *
 * @module
 */
import type { Csr, Doc, StageTiming } from './types.js';
import type { PipelineHooks } from './hooks.js';
import { createAnalyzer } from './analyze/index.js';
import type { TfidfFit, Vocabulary } from './vectorize/index.js';
import { fitHere, kmeansHere, reduceHere, type PipelineRunners, type PipelineStep, type StepReply } from './runners.js';
import { canonicalOrder } from './util/id-order.js';
import { rowsWithoutEntries } from './util/csr.js';
import { groupAverageLink, type Dendrogram } from './cluster/tree.js';
import { groupCohesion, groupSeparation, sampledSilhouette, type SilhouetteResult } from './cluster/quality.js';
import { editPartition, pinnedNames, type EditOutcome, type GroupEdit } from './edits/index.js';
import { checkGuideRun, guideExampleRows, guidedNames, guidedStart, numberGuided, type Guide, type GuidedStart } from './edits/guide.js';
import { denseRowsAsCsr, projectRows, type ReducedSpace } from './reduce/index.js';
import { UsageError } from './util/errors.js';
import { carryGroups, carriedNames } from './continuity/carry.js';
import type { Continuity } from './continuity/match.js';
import type { Partition } from './cluster/partition.js';
import { PLACEHOLDERS, type CleanReport } from './clean/index.js';
import { cleanStage, type DocumentInput } from './clean/stage.js';
import { labelGroups, surfaceForms, withDisplayForms, type GroupLabel, type LabelOptions } from './label/index.js';
import { findMethod, type GroupChoice, type GroupingMethod, type MethodOutcome } from './methods/index.js';
import { resolveGroupOptions, type GroupOptions, type ResolvedGroupOptions } from './group-options.js';
import { refineGroups } from './cluster/unsorted.js';
import { GUARD_SPARE_TERMS, groupNameStopwords, guardNames } from './label/names.js';
import { reductionFor, termSpacePartition, type ReducedGrouping } from './reduce/index.js';
import { nextGroupsOf, type NextGroups } from './cluster/second.js';

export type { KMeansRequest, KMeansRunner, PipelineRunners } from './runners.js';
export type { StageTiming } from './types.js';
export type { PipelineHooks } from './hooks.js';
export { canonicalOrder, compareIds } from './util/id-order.js';
export { selectRows } from './util/csr.js';
export { resolveGroupOptions, type GroupOptions, type ResolvedGroupOptions } from './group-options.js';
export { METHODS, METHOD_NAMES, type GroupMethod, type GroupChoice, type ChooseOptions, DEFAULT_CHOOSE_OPTIONS } from './methods/index.js';

/** Internal quality of the final grouping. */
export interface GroupQuality {
  /** Mean cosine of members to their centroid, per group. */
  readonly cohesion: Float64Array;
  /** Highest cosine between a group's centroid and another's, per group. */
  readonly separation: Float64Array;
  /** Mean silhouette (cosine) on a seeded sample, and per group. */
  readonly silhouette: SilhouetteResult;
}

/** What {@link groupDocuments} takes: documents, or documents with their export-row flags (an `IngestResult` is one). */
export type GroupInput = readonly Doc[] | DocumentInput;

/** Everything a grouping run produced, whatever the method. */
export interface GroupResultCommon {
  /** The documents in canonical order (by id, digits compared as numbers); row `r` of every array is `docs[r]`. */
  readonly docs: readonly Doc[];
  /** Row of each document in the order it was given: `docs[inputOrder[i]]` is the i-th input document. */
  readonly inputOrder: Int32Array;
  readonly options: ResolvedGroupOptions;
  /** What the cleaning stage did (the documents above are the cleaned ones). */
  readonly clean: CleanReport;
  readonly vocabulary: Vocabulary;
  readonly matrix: Csr;
  /** The final groups: assignments, unit centroids, fits. */
  readonly partition: Partition;
  /** Average-link tree over the final groups (leaf g = group g). */
  readonly tree: Dendrogram;
  readonly choice: GroupChoice | null;
  readonly quality: GroupQuality;
  readonly groups: readonly GroupLabel[];
  /** Rows (document indices) with no terms left after analysis and pruning; they are in no group. */
  readonly emptyRows: Int32Array;
  /** Rows set apart as unsorted (fit below the pile's threshold; assignment -1, fit kept), and that threshold (NaN when off). */
  readonly unsorted: { readonly rows: Int32Array; readonly threshold: number };
  /** Per group: 1 when flagged as mixed (cohesion low relative to the others). */
  readonly mixed: Uint8Array;
  /** Per row: the closest group other than its own and the margin (own cosine − its cosine), in the space the groups were formed in. */
  readonly next: NextGroups;
  readonly timings: readonly StageTiming[];
  /** With `reduce`: the decomposition, the reduced rows and the reduced centres the groups were formed on (partition.centroids are term-space). */
  readonly reduced: ReducedGrouping | null;
  /** With a previous run (`hooks.previous`): what became of each group since then; the group numbers are the carried ones. */
  readonly continuity?: Continuity;
  /** With a guide (`hooks.guide`): groups 0… are the guided ones; the cosine of each one's final centre with its guide's start centre. */
  readonly guide?: { readonly source: string; readonly similarity: Float64Array };
  /** With edits (`hooks.edits`): the edits applied, each earlier group's numbers after them, and the pins by final group. */
  readonly edits?: { readonly source: string; readonly applied: readonly GroupEdit[]; readonly numbers: readonly (readonly number[])[]; readonly pins: EditOutcome['pins'] };
}

/**
 * Everything a grouping run produced: the common fields and, tagged by
 * `method`, the method's own (`kmeans` for method kmeans; `documentTree` and
 * `treeRows` for method agglomerative).
 */
export type GroupResult = GroupResultCommon & MethodOutcome;

/**
 * Groups documents: analyze, vectorize (TF-IDF, L2 rows), form groups
 * (spherical k-means, or a cut of the document-level average-link tree),
 * build the tree over the groups, score quality, then name the groups and pick
 * exemplars. Throws {@link UsageError} for unusable settings or data (for
 * example more groups than non-empty documents).
 */
export function groupDocuments(input: GroupInput, options: GroupOptions | ResolvedGroupOptions, hooks: PipelineHooks = {}): GroupResult {
  const steps = groupSteps(input, options, hooks);
  let next = steps.next();
  while (!next.done) {
    const req = next.value;
    next = steps.next(req.kind === 'kmeans' ? kmeansHere(req) : req.kind === 'reduce' ? reduceHere(req) : fitHere(req));
  }
  return next.value;
}

/**
 * {@link groupDocuments} with k-means runs, the analyze+vectorize step and
 * the reduction handed to runners (for example the thread runners of `src/parallel`), which
 * return the very same results as the single-thread code, so the output is
 * identical.
 */
export async function groupDocumentsAsync(
  input: GroupInput,
  options: GroupOptions | ResolvedGroupOptions,
  runners: PipelineRunners,
  hooks: PipelineHooks = {},
): Promise<GroupResult> {
  const steps = groupSteps(input, options, hooks);
  let next = steps.next();
  while (!next.done) {
    const req = next.value;
    if (req.kind === 'kmeans') next = steps.next(await (runners.kmeans ? runners.kmeans(req) : kmeansHere(req)));
    else if (req.kind === 'reduce') next = steps.next(await (runners.reduce ? runners.reduce(req) : reduceHere(req)));
    else next = steps.next(await (runners.vectorize ? runners.vectorize(req) : fitHere(req)));
  }
  return next.value;
}

/**
 * The pipeline as steps: it yields each k-means run and the analyze+vectorize
 * step it needs and receives the results, so one body serves the sync and the
 * async drivers.
 */
function* groupSteps(input: GroupInput, options: GroupOptions | ResolvedGroupOptions, hooks: PipelineHooks): Generator<PipelineStep, GroupResult, StepReply> {
  const resolved = resolveGroupOptions(options);
  // A guide the run cannot take is refused before any work.
  if (hooks.guide) checkGuideRun(hooks.guide, resolved, Boolean(hooks.previous));
  const now = hooks.now ?? (() => 0);
  const timings: StageTiming[] = [];
  const time = <T>(stage: string, items: number, fn: () => T): T => {
    const t0 = now();
    const value = fn();
    timings.push({ stage, ms: now() - t0, items });
    return value;
  };
  const given: DocumentInput = isDocList(input) ? { docs: input } : input;
  const cleaned = time('clean', given.docs.length, () => cleanStage(given, resolved.clean));
  const { docs, inputOrder } = canonicalOrder(cleaned.docs);
  const n = docs.length;
  const guideExamples = hooks.guide ? guideExampleRows(hooks.guide, docs.map((d) => d.id)) : null;

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

  const empty = rowsWithoutEntries(matrix);
  const nonEmpty = n - empty.length;
  const method = findMethod(resolved.method) as GroupingMethod<string, object>;
  method.checkData?.(resolved, nonEmpty);

  // Reduced vectors: groups are formed (and refined) on the reduced rows, then named and treed from TF-IDF centroids.
  const reduce = reductionFor(resolved.reduce, nonEmpty, matrix.cols);
  const tReduce = reduce ? now() : 0;
  const space = reduce ? ((yield { kind: 'reduce', matrix, options: reduce, seed: resolved.seed, nonEmptyRows: nonEmpty }) as ReducedSpace) : null;
  if (space) timings.push({ stage: 'reduce', ms: now() - tReduce, items: nonEmpty });
  const grouping = space?.matrix ?? matrix;
  const tForm = now();
  // Guided groups: k-means starts from the guide's centres (and seeded ones for the rest); guided groups are numbered first.
  const guided = hooks.guide && guideExamples ? guidedStartFor(hooks.guide, resolved, { matrix, grouping, vocabulary, examples: guideExamples, analyzer, space }) : null;
  const formedFree = yield* method.form({ matrix: grouping, nonEmpty, settings: guided ? ({ ...resolved, kmeans: { ...resolved.kmeans, initialAssignments: guided.initialAssignments } } as typeof resolved) : resolved, hooks });
  const found = guided ? numberGuided(guided, formedFree.partition) : null;
  const formed = found ? { ...formedFree, partition: found.partition } : formedFree;
  timings.push({ stage: method.stage, ms: now() - tForm, items: nonEmpty });
  const refinedAsFormed = refineGroups(grouping, formed.partition, resolved.refine, resolved.kmeans);
  const partitionAsFormed = space ? termSpacePartition(matrix, refinedAsFormed.partition) : refinedAsFormed.partition;
  // With a previous run: groups matched to its groups, renumbered so continued groups keep their numbers.
  const carried = hooks.previous ? carryGroups(hooks.previous, partitionAsFormed, refinedAsFormed, vocabulary.terms) : null;
  const refinedCarried = carried?.refined ?? refinedAsFormed;
  const partitionCarried = carried?.partition ?? partitionAsFormed;
  // A person's edits (merge, split, rename, pin), on the numbers this run shows (the carried ones with a previous run).
  const edited = hooks.edits
    ? editPartition(hooks.edits, grouping, matrix, refinedCarried.partition, refinedCarried.mixed, space ? (p) => termSpacePartition(matrix, p) : null, { ...resolved.kmeans, seed: resolved.seed })
    : null;
  const refined = edited ? { ...refinedCarried, partition: edited.formed, mixed: edited.mixed } : refinedCarried;
  const partition = edited?.partition ?? partitionCarried;
  const k = partition.groups;

  const tree = time('tree', nonEmpty, () => groupAverageLink(matrix, partition.assignments, k));
  const quality = time('quality', nonEmpty, () => ({
    cohesion: groupCohesion(matrix, partition.assignments, k, partition.centroids),
    separation: groupSeparation(partition.centroids, matrix.cols, k),
    silhouette: sampledSilhouette(matrix, partition.assignments, k, { sampleSize: resolved.choose.sampleSize, seed: resolved.seed }),
    next: nextGroupsOf(grouping, refined.partition.centroids, k, partition.assignments),
  }));

  const groups = time('label', nonEmpty, () => {
    const stemmed = labelGroups(
      { matrix, assignments: partition.assignments, fit: partition.fit, groups: k, centroids: partition.centroids, terms: vocabulary.terms },
      // Spare terms, so the name guard below still has terms to take once it drops a foreign language's stop words.
      { ...resolved.label, terms: resolved.label.terms + GUARD_SPARE_TERMS },
    );
    const stop = groupNameStopwords(resolved.analyzer, docs.map((d) => d.text), partition.assignments, k);
    const named = guardNames(readableLabels(stemmed, docs, analyzer, resolved.label), stop, resolved.label);
    const kept = hooks.guide ? guidedNames(named, hooks.guide) : carried ? carriedNames(named, carried.continuity) : named;
    return edited ? pinnedNames(kept, edited.outcome.names, edited.outcome.pins, resolved.label.nameTerms) : kept;
  });

  return {
    ...formed.outcome,
    method: resolved.method,
    docs,
    inputOrder,
    options: resolved,
    clean: cleaned.report,
    vocabulary,
    matrix,
    partition,
    tree,
    choice: formed.choice,
    quality: { cohesion: quality.cohesion, separation: quality.separation, silhouette: quality.silhouette },
    next: quality.next,
    groups,
    emptyRows: empty,
    unsorted: { rows: refined.unsorted, threshold: refined.threshold },
    mixed: refined.mixed,
    timings,
    reduced: space ? { ...space, centroids: refined.partition.centroids } : null,
    ...(carried ? { continuity: carried.continuity } : {}),
    ...(found && hooks.guide ? { guide: { source: hooks.guide.source, similarity: found.similarity } } : {}),
    ...(edited && hooks.edits ? { edits: { source: hooks.edits.source, applied: hooks.edits.edits, numbers: edited.outcome.numbers, pins: edited.outcome.pins } } : {}),
  } as unknown as GroupResult;
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


function isDocList(input: GroupInput): input is readonly Doc[] {
  return Array.isArray(input);
}

/** The guided start of k-means (the run was checked to take the guide by {@link checkGuideRun}: a number of groups). */
function guidedStartFor(
  guide: Guide,
  resolved: ResolvedGroupOptions,
  x: { matrix: Csr; grouping: Csr; vocabulary: Vocabulary; examples: readonly Int32Array[]; analyzer: ReturnType<typeof createAnalyzer>; space: ReducedSpace | null },
): GuidedStart {
  const svd = x.space?.svd;
  return guidedStart(
    guide,
    {
      matrix: x.matrix,
      grouping: x.grouping,
      vocabulary: x.vocabulary,
      examples: x.examples,
      analyze: (t) => x.analyzer.analyze(t),
      project: svd ? (rows) => denseRowsAsCsr(projectRows(rows, svd.components, svd.dims), rows.rows, svd.dims) : null,
      groups: resolved.groups as number,
    },
    { ...resolved.kmeans, seed: resolved.seed },
  );
}
