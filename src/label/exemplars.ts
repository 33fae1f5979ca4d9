/**
 * Exemplars that are central and differ from each other: maximal marginal
 * relevance (Carbonell & Goldstein 1998, "The use of MMR, diversity-based
 * reranking for reordering documents and producing summaries", SIGIR, §2):
 * repeatedly take the member that maximises
 * `λ · cos(d, centre) − (1 − λ) · max_{s ∈ chosen} cos(d, s)`.
 * Relevance is the member's fit (cosine to its group's unit centre); the
 * redundancy is the highest cosine to an exemplar already chosen. A member
 * whose cosine to a chosen exemplar is at or above the near-copy threshold is
 * never taken (our rule), so no two exemplars of a group are near-copies; a
 * group may then have fewer exemplars than asked for. Candidates are the
 * group's central three quarters: members whose fit is at least the group's
 * lower quartile of fit, the value at sorted position ⌊(n − 1) / 4⌋ (our rule;
 * without it, MMR favours far-off members that barely belong).
 * Ties go to the lower row. λ = 0.7 by default is our choice.
 *
 * @module
 */
import type { Csr } from '../types.js';

/** Settings of {@link diverseExemplars}. */
export interface ExemplarSettings {
  /** Exemplars per group at most. */
  readonly count: number;
  /** λ of maximal marginal relevance: 1 = by fit only, 0 = by difference only. */
  readonly relevance: number;
  /** Two documents at or above this cosine are near-copies: never both exemplars. */
  readonly nearCopy: number;
}

/**
 * Exemplar rows of each group, in the order chosen (the first is the member
 * with the highest fit). Rows of `matrix` must be L2-normalised. Cost
 * O(count · nnz + cols) with one dense buffer reused across groups.
 */
export function diverseExemplars(matrix: Csr, assignments: Int32Array, fit: Float32Array, groups: number, s: ExemplarSettings): number[][] {
  const { rows, cols, indptr, indices, values } = matrix;
  // Members of each group, by a counting sort on the group (rows ascending inside a group).
  const start = new Int32Array(groups + 1);
  for (let r = 0; r < rows; r++) if (assignments[r] >= 0) start[assignments[r] + 1]++;
  for (let g = 0; g < groups; g++) start[g + 1] += start[g];
  const members = new Int32Array(start[groups]);
  const at = start.slice(0, groups);
  for (let r = 0; r < rows; r++) if (assignments[r] >= 0) members[at[assignments[r]]++] = r;

  const dense = new Float64Array(cols);
  const redundancy = new Float64Array(rows);
  const taken = new Uint8Array(rows);
  const out: number[][] = [];
  const fits = new Float64Array(members.length);
  for (let g = 0; g < groups; g++) {
    const chosen: number[] = [];
    const from = start[g];
    const to = start[g + 1];
    // The group's lower quartile of fit: members below it are not candidates.
    const f = fits.subarray(0, to - from);
    for (let i = from; i < to; i++) f[i - from] = fit[members[i]];
    f.sort();
    const floor = f.length === 0 ? 0 : f[(f.length - 1) >> 2];
    for (let i = from; i < to; i++) redundancy[members[i]] = fit[members[i]] >= floor ? -Infinity : Infinity;
    while (chosen.length < s.count) {
      let best = -1;
      let bestScore = -Infinity;
      for (let i = from; i < to; i++) {
        const r = members[i];
        if (taken[r] === 1 || redundancy[r] >= s.nearCopy) continue;
        const score = chosen.length === 0 ? fit[r] : s.relevance * fit[r] - (1 - s.relevance) * redundancy[r];
        if (score > bestScore) {
          bestScore = score;
          best = r;
        }
      }
      if (best < 0) break;
      chosen.push(best);
      taken[best] = 1;
      // Cosine of every member to the new exemplar: scatter it once, then one sparse pass per member.
      for (let p = indptr[best]; p < indptr[best + 1]; p++) dense[indices[p]] = values[p];
      for (let i = from; i < to; i++) {
        const r = members[i];
        if (taken[r] === 1) continue;
        let dot = 0;
        for (let p = indptr[r]; p < indptr[r + 1]; p++) dot += values[p] * dense[indices[p]];
        if (dot > redundancy[r]) redundancy[r] = dot;
      }
      for (let p = indptr[best]; p < indptr[best + 1]; p++) dense[indices[p]] = 0;
    }
    for (const r of chosen) taken[r] = 0;
    out.push(chosen);
  }
  return out;
}
