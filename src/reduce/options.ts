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
 * The pipeline's `reduce` setting: `false`/absent (no reduction), `true`
 * (the defaults) or partial options. Returns the resolved options or null.
 */
export function resolveReduceSetting(setting: Partial<ReduceOptions> | boolean | undefined): ReduceOptions | null {
  if (setting === undefined || setting === false) return null;
  if (setting === true) return resolveReduceOptions({});
  if (setting === null || typeof setting !== 'object' || Array.isArray(setting)) {
    throw new UsageError(`reduce must be false, true or an object like { dims: 50 }; got ${show(setting)}`, 'reduce');
  }
  return resolveReduceOptions(setting);
}
