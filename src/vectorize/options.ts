/**
 * Vocabulary pruning options: defaults, and the one place they are merged
 * and validated.
 *
 * @module
 */

import { UsageError, show } from '../util/errors.js';
import type { TermCounts } from './df-counts.js';

/** Which terms make it into the vocabulary. */
export interface VectorizeOptions {
  /**
   * Fewest documents a term must occur in: a whole number >= 1 is a count
   * of documents, a fraction in (0, 1) a share of them (a term is kept when
   * `df / n >= minDf`, so 0.1 of 30 documents keeps terms in 3 or more).
   * `'auto'` adapts to the pile: see {@link adaptiveDocumentFrequency}.
   */
  minDf: number | 'auto';
  /**
   * Most documents a term may occur in: a fraction in (0, 1] is a share of
   * the documents (`df / n <= maxDf`; 1 keeps everything), a whole number
   * > 1 a count of documents.
   */
  maxDf: number;
  /**
   * Keep at most this many terms (after the document-frequency limits):
   * those with the most occurrences across the corpus, ties broken by
   * term order. `null` keeps all.
   */
  maxTerms: number | null;
  /**
   * Document frequencies of a whole collection (merged shard counts, see
   * `df-counts.ts`) to take the idf from instead of the documents fitted;
   * `null` (default): the fitted documents' own. Pruning still uses the
   * fitted documents' frequencies. Absent from the defaults and from resolved
   * options that were not given it.
   */
  idfCounts?: TermCounts;
}

/**
 * Defaults: a floor that adapts to the pile (`minDf` `'auto'`, see
 * {@link adaptiveDocumentFrequency}), no upper limit (`maxDf` 1.0; 0.5 was
 * measured with bench/quality and did not raise mean NMI over six labelled
 * corpora once the stop list was fuller), no `maxTerms` limit.
 */
export const DEFAULT_VECTORIZE_OPTIONS: VectorizeOptions = Object.freeze({
  minDf: 'auto',
  maxDf: 1,
  maxTerms: null,
});

/** Smallest pile (in documents) on which `minDf: 'auto'` leaves out terms found in one document only: 50. */
export const ADAPTIVE_DF_MIN_DOCS = 50;

/**
 * What `minDf: 'auto'` means for a pile of `docs` documents: 2 from
 * {@link ADAPTIVE_DF_MIN_DOCS} documents up (a term found in one document
 * links it to no other, so it cannot help group anything; the common
 * starting point, and it raised mean NMI from .444 to .486 over six labelled
 * corpora in bench/quality), 1 below (in a handful of documents a term's
 * second occurrence is a matter of chance, and dropping single-document
 * terms could empty whole documents).
 */
export function adaptiveDocumentFrequency(docs: number): number {
  return docs >= ADAPTIVE_DF_MIN_DOCS ? 2 : 1;
}

/** The `minDf` used on a pile of `docs` documents: `'auto'` replaced by {@link adaptiveDocumentFrequency}. */
export function effectiveMinDf(opts: VectorizeOptions, docs: number): number {
  return opts.minDf === 'auto' ? adaptiveDocumentFrequency(docs) : opts.minDf;
}

/** Every vectorize option's key (`idfCounts` has no default). */
export const VECTORIZE_KEYS: readonly string[] = Object.freeze([...Object.keys(DEFAULT_VECTORIZE_OPTIONS), 'idfCounts']);

const KEYS: ReadonlySet<string> = new Set(VECTORIZE_KEYS);

/** True when a `minDf`/`maxDf` value is a share of the documents rather than a count. */
export function isShare(value: number, option: 'minDf' | 'maxDf'): boolean {
  return option === 'minDf' ? value < 1 : value <= 1;
}

/**
 * Merges `partial` over {@link DEFAULT_VECTORIZE_OPTIONS} and validates
 * once. Keys whose value is `undefined` take the default.
 *
 * @throws UsageError naming the bad value and what is allowed, with `option` set.
 */
export function resolveVectorizeOptions(partial?: Partial<VectorizeOptions>): VectorizeOptions {
  if (partial === undefined) partial = {};
  if (partial === null || typeof partial !== 'object' || Array.isArray(partial)) {
    throw new UsageError(`vectorize options must be an object; got ${show(partial)}`);
  }
  for (const key of Object.keys(partial)) {
    if (!KEYS.has(key)) {
      throw new UsageError(`unknown vectorize option ${show(key)}; allowed: ${[...KEYS].join(', ')}`, key);
    }
  }
  const d = DEFAULT_VECTORIZE_OPTIONS;
  const minDf: unknown = partial.minDf === undefined ? d.minDf : partial.minDf;
  if (
    minDf !== 'auto' &&
    (typeof minDf !== 'number' ||
    !Number.isFinite(minDf) ||
    !((Number.isInteger(minDf) && minDf >= 1) || (minDf > 0 && minDf < 1)))
  ) {
    throw new UsageError(`minDf must be a whole number >= 1, a fraction in (0, 1) or auto; got ${show(minDf)}`, 'minDf');
  }
  const maxDf: unknown = partial.maxDf === undefined ? d.maxDf : partial.maxDf;
  if (
    typeof maxDf !== 'number' ||
    !Number.isFinite(maxDf) ||
    !((maxDf > 0 && maxDf <= 1) || (Number.isInteger(maxDf) && maxDf > 1))
  ) {
    throw new UsageError(`maxDf must be a fraction in (0, 1] or a whole number > 1; got ${show(maxDf)}`, 'maxDf');
  }
  const maxTerms: unknown = partial.maxTerms === undefined ? d.maxTerms : partial.maxTerms;
  if (maxTerms !== null && (typeof maxTerms !== 'number' || !Number.isInteger(maxTerms) || maxTerms < 1)) {
    throw new UsageError(`maxTerms must be a whole number >= 1, or null for no limit; got ${show(maxTerms)}`, 'maxTerms');
  }
  if (minDf !== 'auto' && isShare(minDf, 'minDf') === isShare(maxDf, 'maxDf') && maxDf < minDf) {
    throw new UsageError(`maxDf must not be below minDf; got maxDf ${maxDf} with minDf ${minDf}`, 'maxDf');
  }
  const idfCounts: unknown = partial.idfCounts;
  if (idfCounts !== undefined) {
    const c = idfCounts as Partial<TermCounts>;
    if (typeof c !== 'object' || !Array.isArray(c.terms) || !(c.df instanceof Float64Array) || c.df.length !== c.terms.length || !Number.isInteger(c.documents)) {
      throw new UsageError(`idfCounts must be term counts (documents, terms, df); got ${show(idfCounts)}`, 'idfCounts');
    }
  }
  return Object.freeze({ minDf, maxDf, maxTerms, ...(idfCounts === undefined ? {} : { idfCounts: idfCounts as TermCounts }) });
}
