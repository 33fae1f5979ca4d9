/**
 * Vocabulary and TF-IDF matrix: fitting on a corpus and applying a fitted
 * vocabulary to new documents.
 *
 * Documents arrive as an iterable of term lists and may be a one-shot
 * generator: terms are interned into a `Map` as they stream past, each
 * document's distinct provisional term ids and their counts go into a
 * growing, packed Int32Array with row offsets (`collect.ts`; O(non-zeros),
 * never more than 4 bytes a token),
 * and only then is the vocabulary pruned, sorted and the CSR matrix built
 * ({@link fitCollected}, shared with the parallel fit). No array of arrays
 * is ever held.
 *
 * @module
 */

import type { Csr } from '../types.js';
import { UsageError } from '../util/errors.js';
import { Float32Buffer, IntBuffer } from './buffers.js';
import { TermCollector, type TermSegment } from './collect.js';
import { effectiveMinDf, isShare, resolveVectorizeOptions, type VectorizeOptions } from './options.js';
import { smoothIdf, weightInPlace } from './weight.js';
import { countsFor } from './counts-for.js';

/**
 * The fitted terms. `terms` are in code-unit (`<`) order, so column `j` of
 * the matrix is `terms[j]` whatever order the documents came in.
 */
export interface Vocabulary {
  /** Terms in code-unit order; the column of a term is its position. */
  readonly terms: readonly string[];
  /** Term -> column. A `Map`, so words such as `constructor` or `__proto__` are ordinary keys. */
  readonly index: ReadonlyMap<string, number>;
  /** Document frequency of each column in the fitting corpus. */
  readonly df: Int32Array;
  /** Smoothed idf of each column: `ln((1 + docCount) / (1 + df)) + 1`. */
  readonly idf: Float64Array;
  /** Number of documents the vocabulary was fitted on. */
  readonly docCount: number;
}

/** Result of {@link fitTfidf}. */
export interface TfidfFit {
  /** The pruned, sorted vocabulary with df and idf. */
  readonly vocabulary: Vocabulary;
  /** One L2-normalised row per input document (all-zero when none of its terms were kept). */
  readonly matrix: Csr;
}

/**
 * Builds a {@link Vocabulary} from its saved parts (a model file), checking
 * them and recomputing idf from `df` and `docCount`.
 *
 * @throws UsageError when the terms are not unique and sorted, `df` does not
 *   match them, or a count is out of range.
 */
export function createVocabulary(terms: readonly string[], df: ArrayLike<number>, docCount: number): Vocabulary {
  if (!Number.isInteger(docCount) || docCount < 1) {
    throw new UsageError(`vocabulary document count must be a whole number >= 1; got ${String(docCount)}`);
  }
  if (df.length !== terms.length) {
    throw new UsageError(`vocabulary has ${terms.length} terms but ${df.length} document frequencies`);
  }
  const index = new Map<string, number>();
  const dfs = new Int32Array(terms.length);
  const idf = new Float64Array(terms.length);
  for (let j = 0; j < terms.length; j++) {
    const t = terms[j];
    if (typeof t !== 'string') throw new UsageError(`vocabulary term ${j + 1} is not a string`);
    if (j > 0 && !(terms[j - 1]! < t)) {
      throw new UsageError(`vocabulary terms must be unique and in sorted order; ${JSON.stringify(t)} at position ${j + 1} follows ${JSON.stringify(terms[j - 1])}`);
    }
    const f = df[j]!;
    if (!Number.isInteger(f) || f < 1 || f > docCount) {
      throw new UsageError(`document frequency of ${JSON.stringify(t)} must be a whole number from 1 to ${docCount}; got ${String(f)}`);
    }
    index.set(t, j);
    dfs[j] = f;
    idf[j] = smoothIdf(f, docCount);
  }
  return Object.freeze({ terms: Object.freeze(terms.slice()), index, df: dfs, idf, docCount });
}

/**
 * Accumulates one document's counts over vocabulary columns and writes its
 * weighted, sorted row. All buffers are allocated once per matrix.
 */
class RowWriter {
  private readonly count: Float64Array;
  private cols: Int32Array;
  private w: Float64Array;
  private len = 0;
  constructor(
    vocabSize: number,
    private readonly idf: Float64Array,
  ) {
    this.count = new Float64Array(vocabSize);
    this.cols = new Int32Array(64);
    this.w = new Float64Array(64);
  }
  /** Counts `times` (default 1) occurrences of column `c`. */
  add(c: number, times = 1): void {
    const before = this.count[c]!;
    this.count[c] = before + times;
    if (before === 0) {
      if (this.len === this.cols.length) {
        const next = new Int32Array(this.cols.length * 2);
        next.set(this.cols);
        this.cols = next;
        this.w = new Float64Array(next.length);
      }
      this.cols[this.len++] = c;
    }
  }
  /** Distinct columns of the current row. */
  get size(): number {
    return this.len;
  }
  /** Writes the current row at `indices/values[at ..]`, resets, and returns the row's length. */
  flush(indices: Int32Array, values: Float32Array, at: number): number {
    const n = this.len;
    const cols = this.cols;
    const w = this.w;
    const count = this.count;
    if (n > 1) cols.subarray(0, n).sort();
    for (let k = 0; k < n; k++) {
      const c = cols[k]!;
      w[k] = count[c]!;
      count[c] = 0;
    }
    weightInPlace(w, n, cols, 0, this.idf, 1);
    for (let k = 0; k < n; k++) {
      indices[at + k] = cols[k]!;
      values[at + k] = w[k]!;
    }
    this.len = 0;
    return n;
  }
}

function describe(o: VectorizeOptions, minDf: number): string {
  return `minDf ${o.minDf === 'auto' ? `auto (${minDf})` : o.minDf}, maxDf ${o.maxDf}, maxTerms ${o.maxTerms === null ? 'none' : o.maxTerms}`;
}

/**
 * Fits a vocabulary on `termLists` (one term list per document, e.g. from
 * an analyzer) and returns it with the TF-IDF matrix of those documents.
 *
 * Terms are kept when their document frequency passes `minDf` and `maxDf`
 * (`minDf: 'auto'` is set from the number of documents, see
 * `adaptiveDocumentFrequency`);
 * then, if `maxTerms` is set, the `maxTerms` with the most occurrences
 * (ties by term order). Columns are in term order. Row weights: sublinear
 * tf `1 + ln(tf)` times smoothed idf, L2-normalised, computed in float64
 * and rounded once to float32.
 *
 * @param termLists documents' terms; may be a one-shot generator, read once
 * @throws UsageError when there are no documents, no terms at all, or no
 *   terms left after pruning (the message names the settings)
 */
export function fitTfidf(termLists: Iterable<readonly string[]>, options?: Partial<VectorizeOptions>): TfidfFit {
  const opts = resolveVectorizeOptions(options);
  const collector = new TermCollector();
  for (const terms of termLists) collector.add(terms);
  return fitCollected(collector.names, [collector.take(false)], opts);
}

/**
 * The back half of {@link fitTfidf}, shared with the parallel fit: from the
 * interned terms (`names[id]`) and the documents as segments of distinct
 * provisional ids with counts (in document order), counts document
 * frequencies and occurrences, prunes, sorts the vocabulary and builds the
 * matrix. The result does not depend on the order of the provisional ids.
 *
 * @param names     term of each provisional id
 * @param segments  all documents, in order (packed as `TermSegment` describes)
 * @param opts      resolved options (see `resolveVectorizeOptions`)
 * @throws UsageError as {@link fitTfidf} does
 */
export function fitCollected(names: readonly string[], segments: readonly TermSegment[], opts: VectorizeOptions): TfidfFit {
  // 1. Document frequency and total count of every provisional id.
  let n = 0;
  for (const seg of segments) n += seg.rows;
  if (n === 0) throw new UsageError('no documents to vectorize');
  if (names.length === 0) {
    throw new UsageError(`none of the ${n} documents has any terms after analysis; nothing to vectorize`);
  }
  const df = new Int32Array(names.length);
  const total = new Float64Array(names.length);
  for (const { entries, offsets, rows } of segments) {
    for (let p = 0, end = offsets[rows]!; p < end; p++) {
      const e = entries[p]!;
      const id = e >= 0 ? e : ~e;
      df[id]!++;
      total[id]! += e >= 0 ? 1 : entries[++p]!;
    }
  }

  // 2. Prune by document frequency, then by total count.
  const minDf = effectiveMinDf(opts, n);
  const maxDf = opts.maxDf;
  const minShare = isShare(minDf, 'minDf');
  const maxShare = isShare(maxDf, 'maxDf');
  let kept = new Int32Array(names.length);
  let keptCount = 0;
  for (let id = 0; id < names.length; id++) {
    const f = df[id]!;
    if (minShare ? f / n < minDf : f < minDf) continue;
    if (maxShare ? f / n > maxDf : f > maxDf) continue;
    kept[keptCount++] = id;
  }
  kept = kept.subarray(0, keptCount);
  if (opts.maxTerms !== null && kept.length > opts.maxTerms) {
    kept.sort((a, b) => total[b]! - total[a]! || compareStrings(names[a]!, names[b]!));
    kept = kept.subarray(0, opts.maxTerms);
  }
  if (kept.length === 0) {
    throw new UsageError(
      `no terms left after pruning (${describe(opts, minDf)}) over ${n} documents; lower minDf or raise maxDf`,
      'minDf',
    );
  }

  // 3. Sort the kept terms and remap provisional ids to columns.
  kept.sort((a, b) => compareStrings(names[a]!, names[b]!));
  const V = kept.length;
  // With a collection's counts, each kept term's df is its count there (at least its count here) over the collection's documents.
  const whole = opts.idfCounts;
  if (whole && whole.documents < n) throw new UsageError(`idfCounts cover ${whole.documents} documents, fewer than the ${n} being fitted`, 'idfCounts');
  const wholeDf = whole ? countsFor(whole, Array.from(kept, (id) => names[id]!)) : null;
  const docCount = whole ? whole.documents : n;
  const column = new Int32Array(names.length).fill(-1);
  const terms: string[] = new Array<string>(V);
  const index = new Map<string, number>();
  const vdf = new Int32Array(V);
  const idf = new Float64Array(V);
  for (let j = 0; j < V; j++) {
    const id = kept[j]!;
    column[id] = j;
    terms[j] = names[id]!;
    index.set(names[id]!, j);
    vdf[j] = wholeDf ? Math.max(df[id]!, wholeDf[j]!) : df[id]!;
    idf[j] = smoothIdf(vdf[j]!, docCount);
  }
  const vocabulary: Vocabulary = Object.freeze({ terms: Object.freeze(terms), index, df: vdf, idf, docCount });

  // 4. Row lengths (ids are distinct within a document), then the rows themselves.
  const indptr = new Int32Array(n + 1);
  let nnz = 0;
  let d = 0;
  for (const { entries, offsets, rows } of segments) {
    for (let r = 0; r < rows; r++) {
      for (let p = offsets[r]!, end = offsets[r + 1]!; p < end; p++) {
        const e = entries[p]!;
        if (e < 0) p++;
        if (column[e >= 0 ? e : ~e]! >= 0) nnz++;
      }
      indptr[++d] = nnz;
    }
  }
  const indices = new Int32Array(nnz);
  const values = new Float32Array(nnz);
  const row = new RowWriter(V, idf);
  d = 0;
  for (const { entries, offsets, rows } of segments) {
    for (let r = 0; r < rows; r++) {
      for (let p = offsets[r]!, end = offsets[r + 1]!; p < end; p++) {
        const e = entries[p]!;
        const c = column[e >= 0 ? e : ~e]!;
        const times = e >= 0 ? 1 : entries[++p]!;
        if (c >= 0) row.add(c, times);
      }
      row.flush(indices, values, indptr[d++]!);
    }
  }
  return Object.freeze({ vocabulary, matrix: Object.freeze({ rows: n, cols: V, indptr, indices, values }) });
}

/**
 * Applies a fitted vocabulary to new documents: terms not in the
 * vocabulary are ignored; the tf, idf (the vocabulary's, from the fitting
 * corpus) and L2 arithmetic are those of {@link fitTfidf}.
 *
 * @param termLists documents' terms; may be a one-shot generator, read once
 */
export function transformTfidf(termLists: Iterable<readonly string[]>, vocabulary: Vocabulary): Csr {
  const V = vocabulary.terms.length;
  const index = vocabulary.index;
  const row = new RowWriter(V, vocabulary.idf);
  const indptr = new IntBuffer(1024);
  indptr.push(0);
  const indices = new IntBuffer(1 << 14);
  const values = new Float32Buffer(1 << 14);
  let n = 0;
  for (const terms of termLists) {
    for (const t of terms) {
      const c = index.get(t);
      if (c !== undefined) row.add(c);
    }
    const size = row.size;
    indices.reserve(size);
    values.reserve(size);
    row.flush(indices.data, values.data, indices.length);
    indices.length += size;
    values.length += size;
    indptr.push(indices.length);
    n++;
  }
  return Object.freeze({
    rows: n,
    cols: V,
    indptr: indptr.toArray(),
    indices: indices.toArray(),
    values: values.toArray(),
  });
}

/** Code-unit order, the order of JavaScript's `<` on strings. */
function compareStrings(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}
