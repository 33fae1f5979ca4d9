/**
 * Document frequencies of given terms in saved term counts: what the TF-IDF
 * fit needs of `df-counts.ts`, kept apart from that module's file reader
 * (zod) so that fitting does not load it. Pure.
 *
 * @module
 */
import type { TermCounts } from './df-counts.js';

/**
 * Document frequency of each term of `terms` in the counts (0 when absent),
 * by one merge pass when `terms` are sorted, else by lookups.
 */
export function countsFor(c: TermCounts, terms: readonly string[]): Float64Array {
  const out = new Float64Array(terms.length);
  const index = new Map<string, number>();
  for (let j = 0; j < c.terms.length; j++) index.set(c.terms[j], j);
  for (let j = 0; j < terms.length; j++) {
    const at = index.get(terms[j]);
    if (at !== undefined) out[j] = c.df[at];
  }
  return out;
}
