/**
 * Composes the core stages for the commands: analyze → vectorize → k-means →
 * label. Pure: the clock and progress reporting come in as hooks, so the same
 * function serves the CLI, the library API and the tests.
 *
 * @module
 */
import type { Csr, Doc } from './types.js';
import { createAnalyzer, resolveAnalyzerOptions, type AnalyzerOptions, type AnalyzerSettings } from './analyze/index.js';
import {
  fitTfidf,
  resolveVectorizeOptions,
  type VectorizeOptions,
  type Vocabulary,
} from './vectorize/index.js';
import {
  DEFAULT_KMEANS_OPTIONS,
  resolveKMeansOptions,
  sphericalKMeans,
  type KMeansOptions,
  type KMeansResult,
} from './cluster/kmeans.js';
import {
  labelGroups,
  resolveLabelOptions,
  surfaceForms,
  withDisplayForms,
  type GroupLabel,
  type LabelOptions,
} from './label/index.js';
import { UsageError, show } from './util/errors.js';

/** Options for {@link groupDocuments}, one object per stage. */
export interface GroupOptions {
  readonly analyzer?: Partial<AnalyzerOptions>;
  readonly vectorize?: Partial<VectorizeOptions>;
  readonly kmeans: Partial<KMeansOptions> & { readonly groups: number };
  readonly label?: Partial<LabelOptions>;
}

/** Every stage's options after defaults were merged and values validated. */
export interface ResolvedGroupOptions {
  readonly analyzer: AnalyzerSettings;
  readonly vectorize: VectorizeOptions;
  readonly kmeans: Omit<KMeansOptions, 'groups'> & { readonly groups: number };
  readonly label: LabelOptions;
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

/** Everything a grouping run produced. */
export interface GroupResult {
  /** The documents in canonical order (by id, digits compared as numbers); row `r` of every array is `docs[r]`. */
  readonly docs: readonly Doc[];
  /** Row of each document in the order it was given: `docs[inputOrder[i]]` is the i-th input document. */
  readonly inputOrder: Int32Array;
  readonly options: ResolvedGroupOptions;
  readonly vocabulary: Vocabulary;
  readonly matrix: Csr;
  readonly kmeans: KMeansResult;
  readonly groups: readonly GroupLabel[];
  /** Rows (document indices) with no terms left after analysis and pruning; they are in no group. */
  readonly emptyRows: Int32Array;
  readonly timings: readonly StageTiming[];
}

/**
 * Validates every stage's options before any heavy work. The upper bound on
 * `groups` depends on the data and is checked once the vectors exist.
 */
export function resolveGroupOptions(options: GroupOptions): ResolvedGroupOptions {
  const analyzer = resolveAnalyzerOptions(options.analyzer ?? {});
  const vectorize = resolveVectorizeOptions(options.vectorize ?? {});
  // Everything but the data-dependent upper bound on groups (checked once the vectors exist).
  const kmeans = resolveKMeansOptions({ ...DEFAULT_KMEANS_OPTIONS, ...options.kmeans }, Infinity);
  const label = resolveLabelOptions(options.label ?? {});
  return { analyzer, vectorize, kmeans, label };
}

/**
 * Groups documents: analyze, vectorize (TF-IDF, L2 rows), spherical k-means,
 * then names and exemplars. Throws {@link UsageError} for unusable settings or
 * data (for example more groups than non-empty documents).
 */
export function groupDocuments(input: readonly Doc[], options: GroupOptions, hooks: PipelineHooks = {}): GroupResult {
  const resolved = resolveGroupOptions(options);
  const { docs, inputOrder } = canonicalOrder(input);
  const now = hooks.now ?? (() => 0);
  const timings: StageTiming[] = [];
  const n = docs.length;

  let t0 = now();
  const analyzer = createAnalyzer(resolved.analyzer);
  const step = Math.max(1, Math.floor(n / 100));
  function* termLists(): Generator<string[]> {
    for (let i = 0; i < n; i++) {
      if (hooks.progress && i % step === 0) hooks.progress('analyze', i, n);
      yield analyzer.analyze(docs[i].text);
    }
    hooks.progress?.('analyze', n, n);
  }
  const { vocabulary, matrix } = fitTfidf(termLists(), resolved.vectorize);
  let t1 = now();
  timings.push({ stage: 'analyze+vectorize', ms: t1 - t0, items: n });

  const empty: number[] = [];
  for (let r = 0; r < matrix.rows; r++) if (matrix.indptr[r + 1] === matrix.indptr[r]) empty.push(r);
  const nonEmpty = n - empty.length;
  const kmeansOptions = resolveKMeansOptions(resolved.kmeans, nonEmpty);

  t0 = now();
  hooks.progress?.('group', 0, 1);
  const km = sphericalKMeans(matrix, kmeansOptions);
  hooks.progress?.('group', 1, 1);
  t1 = now();
  timings.push({ stage: 'k-means', ms: t1 - t0, items: nonEmpty });

  t0 = now();
  const stemmed = labelGroups(
    {
      matrix,
      assignments: km.assignments,
      fit: km.fit,
      groups: km.groups,
      centroids: km.centroids,
      terms: vocabulary.terms,
    },
    resolved.label,
  );
  const groups = readableLabels(stemmed, docs, analyzer, resolved.label);
  t1 = now();
  timings.push({ stage: 'label', ms: t1 - t0, items: nonEmpty });

  return {
    docs,
    inputOrder,
    options: { ...resolved, kmeans: kmeansOptions },
    vocabulary,
    matrix,
    kmeans: km,
    groups,
    emptyRows: Int32Array.from(empty),
    timings,
  };
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
  if (!analyzer.settings.stem) return labels;
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
