/**
 * Composes the near-duplicate search for the commands: analyze → vectors
 * (TF-IDF rows, or binary word-shingle rows when word order matters) → exact
 * copies first (by normalised text) → exact all-pairs join → sets → word
 * diffs for the strongest sets. Pure: no file system, clock or terminal.
 *
 * @module
 */
import type { Csr, Doc } from './types.js';
import { createAnalyzer, normalizeText, resolveAnalyzerOptions, type AnalyzerOptions, type AnalyzerSettings } from './analyze/index.js';
import { fitTfidf, resolveVectorizeOptions, type VectorizeOptions } from './vectorize/index.js';
import {
  allPairsCosine,
  allPairsResemblance,
  duplicateSets,
  exactCopies,
  resemblance,
  resolveDuplicatesOptions,
  shingleMatrix,
  wordDiff,
  type DiffPiece,
  type DuplicateSet,
  type DuplicatesOptions,
  type SimilarPairs,
} from './duplicates/index.js';
import type { StageTiming } from './types.js';
import type { PipelineHooks } from './hooks.js';
import type { VectorizeRunner } from './runners.js';
import { canonicalOrder } from './util/id-order.js';
import { selectRows } from './util/csr.js';
import { rowsThatMayRepeat } from './duplicates/repeated-rows.js';
import { UsageError, show } from './util/errors.js';

/** What two documents are compared by. */
export type CompareBy = 'tfidf' | 'shingles';

/** Options for {@link findDuplicates}. */
export interface FindDuplicatesOptions {
  /** `tfidf` (cosine of TF-IDF rows; word order ignored) or `shingles` (resemblance of word w-shingle sets). */
  readonly by?: CompareBy;
  /** Similarity at or above which two documents are near-copies (cosine, or resemblance with shingles). */
  readonly threshold?: number;
  /** Words per shingle (with `by: 'shingles'`). */
  readonly shingle?: number;
  /** Diffs are computed for this many of the strongest sets. */
  readonly show?: number;
  readonly analyzer?: Partial<AnalyzerOptions>;
  readonly vectorize?: Partial<VectorizeOptions>;
  readonly duplicates?: Partial<DuplicatesOptions>;
}

/** Resolved options of {@link findDuplicates}. */
export interface ResolvedFindDuplicates {
  readonly by: CompareBy;
  readonly threshold: number;
  readonly shingle: number;
  readonly show: number;
  readonly analyzer: AnalyzerSettings;
  readonly vectorize: VectorizeOptions;
  readonly duplicates: DuplicatesOptions;
}

/** One member's difference from its set's representative. */
export interface MemberDiff {
  readonly row: number;
  readonly pieces: readonly DiffPiece[];
}

/** Everything a near-duplicate search produced. */
export interface DuplicateRun {
  /** Documents in canonical (id) order; rows of every array follow it. */
  readonly docs: readonly Doc[];
  readonly inputOrder: Int32Array;
  readonly options: ResolvedFindDuplicates;
  /** The vectors compared (TF-IDF rows, or binary shingle rows). */
  readonly matrix: Csr;
  /** The matrix's columns: the terms with `by: 'tfidf'`; null for shingles (their columns are ids of word runs). */
  readonly columns: readonly string[] | null;
  /** Every pair at or above the threshold, a < b. */
  readonly pairs: SimilarPairs;
  readonly sets: readonly DuplicateSet[];
  /** Set per row, -1 for none. */
  readonly setOf: Int32Array;
  /** Documents whose normalised text equals an earlier document's. */
  readonly exactCopies: number;
  /** Word diffs against the representative for the first `show` sets (by set id). */
  readonly diffs: ReadonlyMap<number, readonly MemberDiff[]>;
  readonly timings: readonly StageTiming[];
}

const BY: readonly CompareBy[] = ['tfidf', 'shingles'];

/** Merges defaults once and validates every value. */
export function resolveFindDuplicatesOptions(options: FindDuplicatesOptions = {}): ResolvedFindDuplicates {
  const by = options.by ?? 'tfidf';
  if (!BY.includes(by)) throw new UsageError(`by must be one of ${BY.join(', ')}; got ${show(by)}`, 'by');
  let duplicates: DuplicatesOptions;
  try {
    duplicates = resolveDuplicatesOptions({
      ...options.duplicates,
      ...(options.threshold !== undefined ? (by === 'tfidf' ? { threshold: options.threshold } : { resemblanceThreshold: options.threshold }) : {}),
      ...(options.shingle !== undefined ? { shingleWidth: options.shingle } : {}),
    });
  } catch (err) {
    // This stage's own names for the two options it passes on.
    const rename: Record<string, string> = { shingleWidth: 'shingle', resemblanceThreshold: 'threshold' };
    if (err instanceof UsageError && err.option && rename[err.option]) {
      throw new UsageError(err.message.replace(err.option, rename[err.option]), rename[err.option]);
    }
    throw err;
  }
  const showSets = options.show ?? 10;
  if (!Number.isInteger(showSets) || showSets < 0) throw new UsageError(`show must be a whole number >= 0; got ${show(showSets)}`, 'show');
  return {
    by,
    threshold: by === 'tfidf' ? duplicates.threshold : duplicates.resemblanceThreshold,
    shingle: duplicates.shingleWidth,
    show: showSets,
    analyzer: resolveAnalyzerOptions(options.analyzer ?? {}),
    vectorize: resolveVectorizeOptions(options.vectorize ?? {}),
    duplicates,
  };
}

/** A reporter that passes `done` on about every 1% of `total` (and at the end). */
function everyPercent(total: number, report: (done: number) => void): (done: number) => void {
  const step = Math.max(1, Math.floor(total / 100));
  return (done) => {
    if (done % step === 0 || done >= total) report(done);
  };
}

/** Text key for the exact-copy fast path: NFKC, case folded, whitespace collapsed. */
export function copyKey(text: string): string {
  return normalizeText(text).replace(/\s+/g, ' ').trim();
}

/** Words for shingling: letter/digit runs of the normalised text, in order (no stop words dropped, no stemming). */
function shingleWords(text: string): string[] {
  return normalizeText(text).match(/[\p{L}\p{M}\p{N}]+(?:['’][\p{L}\p{M}\p{N}]+)*/gu) ?? [];
}

/**
 * Finds the near-duplicate sets of `input`: every pair at or above the
 * threshold (exact; no sampling), their connected components, a
 * representative per set, and word diffs for the strongest sets.
 */
export function findDuplicates(input: readonly Doc[], options: FindDuplicatesOptions = {}, hooks: PipelineHooks = {}): DuplicateRun {
  const o = resolveFindDuplicatesOptions(options);
  const { docs, inputOrder } = canonicalOrder(input);
  const now = hooks.now ?? (() => 0);
  const n = docs.length;
  const t0 = now();
  let matrix: Csr;
  let columns: readonly string[] | null = null;
  const stage = o.by === 'tfidf' ? 'analyze' : 'shingles';
  const rowsDone = hooks.progress ? everyPercent(n, (done) => hooks.progress?.(stage, done, n)) : null;
  if (o.by === 'tfidf') {
    const analyzer = createAnalyzer(o.analyzer);
    const fit = fitTfidf(
      (function* () {
        for (let i = 0; i < n; i++) {
          rowsDone?.(i);
          yield analyzer.analyze(docs[i].text);
        }
      })(),
      o.vectorize,
    );
    matrix = fit.matrix;
    columns = fit.vocabulary.terms;
  } else {
    matrix = shingleMatrix(
      (function* () {
        for (let i = 0; i < n; i++) {
          rowsDone?.(i);
          yield shingleWords(docs[i].text);
        }
      })(),
      o.shingle,
    );
  }
  rowsDone?.(n);
  return joinVectors(docs, inputOrder, o, matrix, columns, now() - t0, hooks);
}

/**
 * {@link findDuplicates} with the analyze+vectorize step handed to `runners.vectorize`
 * (e.g. `vectorizeRunner(threads)` of src/parallel, which analyzes large inputs on
 * several threads): the same run, bit for bit. Shingles, or no runner, run as
 * {@link findDuplicates} does.
 */
export async function findDuplicatesAsync(
  input: readonly Doc[],
  options: FindDuplicatesOptions = {},
  runners: { readonly vectorize?: VectorizeRunner } = {},
  hooks: PipelineHooks = {},
): Promise<DuplicateRun> {
  const o = resolveFindDuplicatesOptions(options);
  const runner = runners.vectorize;
  if (o.by !== 'tfidf' || runner === undefined) return findDuplicates(input, options, hooks);
  const { docs, inputOrder } = canonicalOrder(input);
  const now = hooks.now ?? (() => 0);
  const t0 = now();
  const progress = hooks.progress;
  const fit = await runner({
    texts: docs.map((d) => d.text),
    analyzer: o.analyzer,
    vectorize: o.vectorize,
    onProgress: progress ? (done, total) => progress('analyze', done, total) : undefined,
  });
  return joinVectors(docs, inputOrder, o, fit.matrix, fit.vocabulary.terms, now() - t0, hooks);
}

/** The second half of a search: the join, the sets and the diffs over the vectors made, with the timings. */
function joinVectors(
  docs: readonly Doc[],
  inputOrder: Int32Array,
  o: ResolvedFindDuplicates,
  matrix: Csr,
  columns: readonly string[] | null,
  vectorMs: number,
  hooks: PipelineHooks,
): DuplicateRun {
  const now = hooks.now ?? (() => 0);
  const n = docs.length;
  const timings: StageTiming[] = [{ stage: o.by === 'tfidf' ? 'analyze+vectorize' : 'shingles', ms: vectorMs, items: n }];
  const t0 = now();
  const found = nearCopiesOfVectors(docs, matrix, o, hooks.progress ? (done, total) => hooks.progress?.('near-copies', done, total) : undefined);
  timings.push({ stage: 'join+sets', ms: now() - t0, items: n });
  return { docs, inputOrder, options: o, matrix, columns, ...found, timings };
}

/**
 * The join, the sets and the diffs over vectors already made (TF-IDF rows,
 * or binary shingle rows with `by: 'shingles'`); rows follow `docs`. Used by
 * {@link findDuplicates} and by a grouping run that also looks for near-copies
 * in its own vectors.
 */
export function nearCopiesOfVectors(
  docs: readonly Doc[],
  matrix: Csr,
  o: ResolvedFindDuplicates,
  progress?: (rowsDone: number, rows: number) => void,
): Pick<DuplicateRun, 'pairs' | 'sets' | 'setOf' | 'exactCopies' | 'diffs'> {
  // Progress by rows: the copy keys row by row, then the join's rows once it is done (it reports no steps of its own).
  const n = docs.length;
  const rowsDone = progress ? everyPercent(2 * n, (done) => progress(done, 2 * n)) : null;
  // Equal copy keys mean equal vectors: keys only for rows another row may equal ('' = never a copy, as a key of its own would be).
  const mayRepeat = rowsThatMayRepeat(matrix);
  const copyGroup = exactCopies(
    docs.map((d, i) => {
      rowsDone?.(i);
      return mayRepeat[i] ? copyKey(d.text) : '';
    }),
  );
  rowsDone?.(n);
  const { pairs, copies } = joinWithCopies(matrix, copyGroup, o);
  rowsDone?.(2 * n);
  const setMatrix = o.by === 'tfidf' ? matrix : l2Rows(matrix);
  const found = duplicateSets(setMatrix, pairs, { threshold: o.threshold, chainWarningMargin: o.duplicates.chainWarningMargin });
  let sets = found.sets;
  let setOf = found.setOf;
  if (o.by === 'shingles') {
    // Report resemblance throughout (not the cosine of the binary rows used to pick representatives), and order by it.
    sets = sets
      .map((s) => withResemblance(s, matrix, o.threshold - o.duplicates.chainWarningMargin))
      .sort((x, y) => y.meanSimilarity - x.meanSimilarity || y.members.length - x.members.length || x.members[0] - y.members[0])
      .map((s, id) => ({ ...s, id }));
    setOf = new Int32Array(matrix.rows).fill(-1);
    for (const s of sets) for (const r of s.members) setOf[r] = s.id;
  }
  const diffs = new Map<number, MemberDiff[]>();
  for (const s of sets.slice(0, o.show)) {
    const rep = docs[s.representative].text;
    diffs.set(
      s.id,
      Array.from(s.members)
        .filter((r) => r !== s.representative)
        .map((r) => ({ row: r, pieces: wordDiff(rep, docs[r].text, { context: o.duplicates.diffContext, maxPieces: o.duplicates.diffMaxPieces }) })),
    );
  }
  return { pairs, sets, setOf, exactCopies: copies, diffs };
}

/**
 * Joins only one row per group of exact copies, then gives every copy the
 * pairs of its group's first row (identical text, identical vector) and pairs
 * the copies with each other at similarity 1.
 */
function joinWithCopies(matrix: Csr, copyGroup: Int32Array, o: ResolvedFindDuplicates): { pairs: SimilarPairs; copies: number } {
  const n = matrix.rows;
  const firstOfGroup = new Map<number, number>();
  const members = new Map<number, number[]>();
  const keep: number[] = [];
  let copies = 0;
  for (let r = 0; r < n; r++) {
    const g = copyGroup[r];
    if (g < 0) {
      keep.push(r);
      continue;
    }
    const list = members.get(g);
    if (list === undefined) {
      members.set(g, [r]);
      firstOfGroup.set(g, r);
      keep.push(r);
    } else {
      list.push(r);
      copies++;
    }
  }
  const rows = Int32Array.from(keep);
  const sub = copies > 0 ? selectRows(matrix, rows) : matrix;
  const joined = o.by === 'tfidf' ? allPairsCosine(sub, o.threshold) : allPairsResemblance(sub, o.threshold);
  if (copies === 0) return { pairs: joined, copies };
  const out: [number, number, number][] = [];
  const copiesOf = (row: number): number[] => (copyGroup[row] >= 0 ? members.get(copyGroup[row]) ?? [row] : [row]);
  for (let p = 0; p < joined.a.length; p++) {
    const ra = rows[joined.a[p]];
    const rb = rows[joined.b[p]];
    for (const x of copiesOf(ra)) for (const y of copiesOf(rb)) out.push(x < y ? [x, y, joined.similarity[p]] : [y, x, joined.similarity[p]]);
  }
  for (const list of members.values()) {
    // Empty texts are never copies (exactCopies gives them -1); an all-zero row is nobody's copy either.
    if (matrix.indptr[list[0] + 1] === matrix.indptr[list[0]]) continue;
    for (let i = 0; i < list.length; i++) for (let j = i + 1; j < list.length; j++) out.push([list[i], list[j], 1]);
  }
  out.sort((x, y) => x[0] - y[0] || x[1] - y[1]);
  return {
    pairs: {
      a: Int32Array.from(out, (t) => t[0]),
      b: Int32Array.from(out, (t) => t[1]),
      similarity: Float32Array.from(out, (t) => t[2]),
      threshold: o.threshold,
    },
    copies,
  };
}

/** Binary rows scaled to unit length (so a dot product is the cosine of two sets). */
function l2Rows(m: Csr): Csr {
  const values = new Float32Array(m.values.length);
  for (let r = 0; r < m.rows; r++) {
    const len = m.indptr[r + 1] - m.indptr[r];
    const v = len > 0 ? 1 / Math.sqrt(len) : 0;
    values.fill(v, m.indptr[r], m.indptr[r + 1]);
  }
  return { ...m, values };
}

/**
 * Recomputes a set's figures with exact resemblance of shingle sets: the
 * representative is the member with the highest mean resemblance to the
 * others (ties: lowest row), then each member's resemblance to it and the mean
 * over all member pairs. O(members² · shingles per row).
 */
function withResemblance(s: DuplicateSet, shingles: Csr, floor: number): DuplicateSet {
  const rowSet = (r: number): Int32Array => shingles.indices.subarray(shingles.indptr[r], shingles.indptr[r + 1]);
  const m = s.members.length;
  const sim = new Float64Array(m * m);
  let total = 0;
  for (let i = 0; i < m; i++) {
    sim[i * m + i] = 1;
    for (let j = i + 1; j < m; j++) {
      const v = resemblance(rowSet(s.members[i]), rowSet(s.members[j]));
      sim[i * m + j] = v;
      sim[j * m + i] = v;
      total += v;
    }
  }
  let rep = 0;
  let best = -1;
  for (let i = 0; i < m; i++) {
    let sum = 0;
    for (let j = 0; j < m; j++) if (j !== i) sum += sim[i * m + j];
    if (sum > best + 1e-12) {
      best = sum;
      rep = i;
    }
  }
  const sims = Float32Array.from({ length: m }, (_, j) => sim[rep * m + j]);
  let weakest = 1;
  for (let j = 0; j < m; j++) if (j !== rep && sims[j] < weakest) weakest = sims[j];
  return {
    ...s,
    representative: s.members[rep],
    similarityToRepresentative: sims,
    weakest,
    meanSimilarity: m > 1 ? total / ((m * (m - 1)) / 2) : 1,
    chained: weakest < floor,
  };
}
