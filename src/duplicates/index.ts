/**
 * Near-duplicates: exact all-pairs similarity joins (cosine over TF-IDF rows,
 * Jaccard resemblance over word shingles), union-find sets with a
 * representative and a chaining warning, an exact-copy fast path, and word
 * diffs against the representative. Pure: no file system, clock, terminal or
 * `process`.
 *
 * @module
 */
import type { Csr } from '../types.js';
import { allPairsCosine, type SimilarPairs } from './cosine.js';
import { resolveDuplicatesOptions, type DuplicatesOptions } from './options.js';
import { duplicateSets, type DuplicateSets } from './sets.js';

export { allPairsCosine, MAX_PAIR_TAIL, type JoinCounts, type SimilarPairs } from './cosine.js';
export { rowPairDot as rowDot } from '../util/csr.js';
export { duplicateSets, exactCopies, type DuplicateSet, type DuplicateSetOptions, type DuplicateSets } from './sets.js';
export { wordShingles, shingleMatrix, allPairsResemblance, resemblance, containment } from './shingles.js';
export { wordDiff, ELLIPSIS, type DiffPiece, type WordDiffOptions } from './diff.js';
export { DEFAULT_DUPLICATES_OPTIONS, resolveDuplicatesOptions, type DuplicatesOptions } from './options.js';

/** The similar pairs of a matrix and the sets they form. */
export interface NearDuplicates extends DuplicateSets {
  readonly pairs: SimilarPairs;
  readonly options: DuplicatesOptions;
}

/**
 * The stage in one call: resolves `options` (defaults merged once, every value
 * validated), joins the L2-normalised rows at `options.threshold` with
 * {@link allPairsCosine} and groups the pairs with {@link duplicateSets}.
 */
export function findNearDuplicates(matrix: Csr, options: Partial<DuplicatesOptions> = {}): NearDuplicates {
  const o = resolveDuplicatesOptions(options);
  const pairs = allPairsCosine(matrix, o.threshold);
  const sets = duplicateSets(matrix, pairs, { threshold: o.threshold, chainWarningMargin: o.chainWarningMargin });
  return { ...sets, pairs, options: o };
}
