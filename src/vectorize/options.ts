/**
 * Vocabulary pruning options: defaults, and the one place they are merged
 * and validated.
 *
 * @module
 */

import { UsageError, show } from '../util/errors.js';

/** Which terms make it into the vocabulary. */
export interface VectorizeOptions {
  /**
   * Fewest documents a term must occur in: a whole number >= 1 is a count
   * of documents, a fraction in (0, 1) a share of them (a term is kept when
   * `df / n >= minDf`, so 0.1 of 30 documents keeps terms in 3 or more).
   */
  minDf: number;
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
}

/** Defaults: every term that occurs at all (`minDf` 1, `maxDf` 1.0, no `maxTerms` limit). */
export const DEFAULT_VECTORIZE_OPTIONS: VectorizeOptions = Object.freeze({
  minDf: 1,
  maxDf: 1,
  maxTerms: null,
});

const KEYS: ReadonlySet<string> = new Set(Object.keys(DEFAULT_VECTORIZE_OPTIONS));

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
    typeof minDf !== 'number' ||
    !Number.isFinite(minDf) ||
    !((Number.isInteger(minDf) && minDf >= 1) || (minDf > 0 && minDf < 1))
  ) {
    throw new UsageError(`minDf must be a whole number >= 1 or a fraction in (0, 1); got ${show(minDf)}`, 'minDf');
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
  if (isShare(minDf, 'minDf') === isShare(maxDf, 'maxDf') && maxDf < minDf) {
    throw new UsageError(`maxDf must not be below minDf; got maxDf ${maxDf} with minDf ${minDf}`, 'maxDf');
  }
  return Object.freeze({ minDf, maxDf, maxTerms });
}
