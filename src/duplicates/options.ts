/**
 * Options of the near-duplicates stage: one object, its defaults, and one
 * function that merges and validates them. The single functions of this
 * module validate their own arguments with the same checks, so a direct call
 * gets the same one-line messages.
 *
 * @module
 */
import { UsageError, show } from '../util/errors.js';
import { stripUndefined } from '../util/options.js';

/** Options for the near-duplicates stage. */
export interface DuplicatesOptions {
  /** Cosine similarity at or above which two TF-IDF rows are near-copies, in (0, 1]. */
  threshold: number;
  /**
   * A set "chains" (its members are linked through intermediaries rather than
   * all being close to one text) when some member's cosine to the
   * representative is below `threshold - chainWarningMargin`. In [0, 1).
   */
  chainWarningMargin: number;
  /** Words per shingle for word-order-aware resemblance, 1 to 100. */
  shingleWidth: number;
  /** Jaccard resemblance of shingle sets at or above which two texts are near-copies, in (0, 1]. */
  resemblanceThreshold: number;
  /** Unchanged words kept on each side of a change in a word diff, 0 to 1000. */
  diffContext: number;
  /** Most pieces a word diff returns, 1 to 1000000. */
  diffMaxPieces: number;
}

/**
 * Defaults for {@link DuplicatesOptions}. The values are our choices
 * (common practice for short-text near-copy detection, not taken from a
 * source): cosine 0.9, chain margin 0.1, 4-word shingles with resemblance
 * 0.8, six words of diff context, at most 400 diff pieces.
 */
export const DEFAULT_DUPLICATES_OPTIONS: Readonly<DuplicatesOptions> = Object.freeze({
  threshold: 0.9,
  chainWarningMargin: 0.1,
  shingleWidth: 4,
  resemblanceThreshold: 0.8,
  diffContext: 6,
  diffMaxPieces: 400,
});

/** Merges defaults once and validates every value; throws {@link UsageError} naming the option. */
export function resolveDuplicatesOptions(partial: Partial<DuplicatesOptions> = {}): DuplicatesOptions {
  const o: DuplicatesOptions = { ...DEFAULT_DUPLICATES_OPTIONS, ...stripUndefined(partial) };
  checkThreshold(o.threshold, 'threshold');
  checkMargin(o.chainWarningMargin, 'chainWarningMargin');
  checkWholeNumber(o.shingleWidth, 'shingleWidth', 1, 100);
  checkThreshold(o.resemblanceThreshold, 'resemblanceThreshold');
  checkWholeNumber(o.diffContext, 'diffContext', 0, 1000);
  checkWholeNumber(o.diffMaxPieces, 'diffMaxPieces', 1, 1_000_000);
  return o;
}

/** Throws unless `value` is a number in (0, 1]; returns it. */
export function checkThreshold(value: unknown, name: string): number {
  if (typeof value !== 'number' || !(value > 0 && value <= 1)) {
    throw new UsageError(`${name} must be a number in (0, 1]; got ${show(value)}`, name);
  }
  return value;
}

/** Throws unless `value` is a number in [0, 1); returns it. */
export function checkMargin(value: unknown, name: string): number {
  if (typeof value !== 'number' || !(value >= 0 && value < 1)) {
    throw new UsageError(`${name} must be a number in [0, 1); got ${show(value)}`, name);
  }
  return value;
}

/** Throws unless `value` is a whole number from `min` to `max`; returns it. */
export function checkWholeNumber(value: unknown, name: string, min: number, max: number): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < min || value > max) {
    throw new UsageError(
      `${name} must be a whole number from ${min} to ${max}; got ${show(value)}`,
      name,
    );
  }
  return value;
}
