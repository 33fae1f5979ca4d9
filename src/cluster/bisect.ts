/**
 * Splitting groups in two by bisecting spherical k-means (Steinbach, Karypis
 * & Kumar 2000, "A comparison of document clustering techniques", KDD
 * Workshop on Text Mining, §4): a group's member rows are clustered with
 * spherical k-means at k = 2 (several seeded restarts, the best objective
 * kept). We split each chosen group once; the paper repeats the bisection of
 * the largest group until k groups exist.
 *
 * @module
 */
import type { Csr } from '../types.js';
import { sphericalKMeans, type KMeansOptions } from './kmeans.js';
import { canonicalGroups } from './partition.js';
import { selectRows } from '../util/csr.js';

/**
 * Splits the given rows in two with spherical k-means (k = 2) on those rows
 * only; returns 0 or 1 per given row (in the order given), or null when the
 * rows cannot be split (fewer than two with terms).
 */
export function bisectRows(matrix: Csr, rows: Int32Array, options: Partial<Omit<KMeansOptions, 'groups' | 'initialAssignments'>> = {}): Int32Array | null {
  const sub = selectRows(matrix, rows);
  let nonEmpty = 0;
  for (let i = 0; i < sub.rows; i++) if (sub.indptr[i + 1] > sub.indptr[i]) nonEmpty++;
  if (nonEmpty < 2) return null;
  const { initialAssignments: _ignored, ...rest } = options as Partial<KMeansOptions>;
  const km = sphericalKMeans(sub, { ...rest, groups: 2 });
  return km.assignments;
}

/**
 * Splits each group in `split` in two by {@link bisectRows}; the other groups
 * stay as they are. Returns new assignments with groups renumbered canonically
 * (size descending, then first row) and the new number of groups. Rows with
 * -1 stay -1 (an empty row inside a split group stays in no group).
 */
export function splitGroups(
  matrix: Csr,
  assignments: Int32Array,
  groups: number,
  split: readonly number[],
  options: Partial<Omit<KMeansOptions, 'groups' | 'initialAssignments'>> = {},
): { assignments: Int32Array; groups: number } {
  const out = Int32Array.from(assignments);
  let next = groups;
  for (const g of split) {
    let n = 0;
    for (let r = 0; r < assignments.length; r++) if (assignments[r] === g) n++;
    const rows = new Int32Array(n);
    for (let r = 0, i = 0; r < assignments.length; r++) if (assignments[r] === g) rows[i++] = r;
    const halves = bisectRows(matrix, rows, options);
    if (halves === null) continue;
    let moved = false;
    for (let i = 0; i < rows.length; i++) {
      if (halves[i] === 1) {
        out[rows[i]] = next;
        moved = true;
      } else if (halves[i] < 0) out[rows[i]] = -1;
    }
    if (moved) next++;
  }
  return { assignments: canonicalGroups(out, next), groups: next };
}
