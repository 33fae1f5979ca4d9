/**
 * Options of the reduction stage (truncated SVD of the TF-IDF rows, latent
 * semantic analysis): how many dimensions are kept, and how hard the
 * randomized range finder works.
 *
 * @module
 */
import { UsageError, show } from '../util/errors.js';
import { stripUndefined } from '../util/options.js';

/** Settings of {@link truncatedSvd}. */
export interface ReduceOptions {
  /** Dimensions kept (singular vectors), d. A whole number from 1 to the smaller of the rows and the terms. */
  readonly dims: number;
  /** Extra random directions sampled beyond `dims` (p in Halko et al. 2011, §4.2); the block is d + p wide. Whole number >= 0. */
  readonly oversampling: number;
  /** Power (subspace) iterations, q in Halko et al. 2011 Algorithm 4.4. Whole number >= 0. */
  readonly powerIterations: number;
}

/**
 * Defaults: 50 dimensions (measured strong on three corpora in
 * /work/shared/QUALITY.md, and the order commonly used for latent semantic
 * analysis of document collections: common practice is 50–300), oversampling
 * 10 (Halko et al. 2011, §4.2 suggest p = 5 or 10), 5 power iterations
 * (the setting of scikit-learn's TruncatedSVD, n_iter=5; TF-IDF spectra decay
 * slowly, which §4.5 says needs q >= 1).
 */
export const DEFAULT_REDUCE_OPTIONS: Readonly<ReduceOptions> = Object.freeze({
  dims: 50,
  oversampling: 10,
  powerIterations: 5,
});

function isWhole(value: unknown): value is number {
  return typeof value === 'number' && Number.isInteger(value);
}

/**
 * Merges `partial` over {@link DEFAULT_REDUCE_OPTIONS} once and validates
 * every value. `maxDims` bounds `dims` by the data (the smaller of the
 * non-empty rows and the terms); pass `Infinity` when the data is not known
 * yet. Throws {@link UsageError} naming the option.
 */
export function resolveReduceOptions(partial: Partial<ReduceOptions>, maxDims = Infinity): ReduceOptions {
  const merged = { ...DEFAULT_REDUCE_OPTIONS, ...stripUndefined(partial) };
  const { dims, oversampling, powerIterations } = merged;
  const bounded = Number.isFinite(maxDims);
  if (!isWhole(dims) || dims < 1 || (bounded && dims > maxDims)) {
    const allowed = bounded
      ? `a whole number from 1 to ${maxDims} (the smaller of the non-empty documents and the terms)`
      : 'a whole number >= 1';
    throw new UsageError(`dims must be ${allowed}; got ${show(dims)}`, 'dims');
  }
  if (!isWhole(oversampling) || oversampling < 0) {
    throw new UsageError(`oversampling must be a whole number >= 0; got ${show(oversampling)}`, 'oversampling');
  }
  if (!isWhole(powerIterations) || powerIterations < 0) {
    throw new UsageError(`powerIterations must be a whole number >= 0; got ${show(powerIterations)}`, 'powerIterations');
  }
  return { dims, oversampling, powerIterations };
}

/**
 * Largest pile (documents with terms) that the default setting (`'auto'`)
 * reduces; larger piles are grouped on their TF-IDF rows, where sparse
 * k-means costs less than the decomposition and dense rows. Our rule: on six
 * open labelled corpora of 70–3,000 documents reduced vectors (50 dims) raised
 * mean NMI from .502 to .526 (bench/results.md), and at 100k short documents
 * the decomposition still takes seconds, not minutes.
 */
export const AUTO_REDUCE_MAX_DOCUMENTS = 100_000;

/** The pipeline's resolved `reduce` setting: the decomposition's options, and whether they came from the default (`auto`). */
export interface ReduceSetting extends ReduceOptions {
  /** True for the default: applied to piles of at most {@link AUTO_REDUCE_MAX_DOCUMENTS}, `dims` lowered to fit a small pile. */
  readonly auto: boolean;
}

/**
 * The pipeline's `reduce` setting: `'auto'`/absent (the default: see
 * {@link ReduceSetting.auto}), `false` (none), `true` (always, the default
 * options) or partial options (always, with those). Returns the resolved
 * setting or null.
 */
export function resolveReduceSetting(setting: Partial<ReduceOptions> | boolean | 'auto' | undefined): ReduceSetting | null {
  if (setting === undefined || setting === 'auto') return { ...resolveReduceOptions({}), auto: true };
  if (setting === false) return null;
  if (setting === true) return { ...resolveReduceOptions({}), auto: false };
  if (setting === null || typeof setting !== 'object' || Array.isArray(setting)) {
    throw new UsageError(`reduce must be auto, false, true or an object like { dims: 50 }; got ${show(setting)}`, 'reduce');
  }
  return { ...resolveReduceOptions(setting), auto: false };
}

/**
 * The decomposition a pile gets under `setting`: none when off; the options as
 * given when asked for explicitly (their `dims` is checked against the pile
 * later, with a message); under `auto`, none above
 * {@link AUTO_REDUCE_MAX_DOCUMENTS} documents with terms, else `dims` lowered
 * to one less than the smaller of those documents and the terms (none below 2).
 */
export function reductionFor(setting: ReduceSetting | null, nonEmptyRows: number, terms: number): ReduceOptions | null {
  if (setting === null) return null;
  const { dims, oversampling, powerIterations } = setting;
  if (!setting.auto) return { dims, oversampling, powerIterations };
  if (nonEmptyRows > AUTO_REDUCE_MAX_DOCUMENTS) return null;
  const fitted = Math.min(dims, Math.min(nonEmptyRows, terms) - 1);
  return fitted >= 2 ? { dims: fitted, oversampling, powerIterations } : null;
}
