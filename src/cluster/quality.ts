/**
 * Internal quality scores of a grouping: cohesion (mean cosine to the own
 * centroid), separation (closest other centroid) and the silhouette
 * (Rousseeuw 1987, "Silhouettes: a graphical aid to the interpretation and
 * validation of cluster analysis", J. Comput. Appl. Math. 20:53–65) on cosine
 * distance over a seeded sample.
 *
 * @module
 */

import type { Csr } from '../types.js';
import { UsageError, show } from '../util/errors.js';
import { createRng } from '../util/random.js';
import { cutToGroups, type Dendrogram } from './tree.js';

/** Options of the sampled silhouette. */
export interface SilhouetteOptions {
  /** At most this many non-empty, assigned rows are scored; all of them when there are no more. */
  readonly sampleSize: number;
  /** Seed of the sample (same seed and input give the same sample). */
  readonly seed: number;
}

/** Defaults of {@link SilhouetteOptions}. */
export const SILHOUETTE_DEFAULTS: Readonly<SilhouetteOptions> = Object.freeze({
  sampleSize: 2000,
  seed: 1,
});

/**
 * Merges `partial` over {@link SILHOUETTE_DEFAULTS} and validates once.
 *
 * @throws UsageError (option `sampleSize`) unless it is a whole number >= 2;
 *   (option `seed`) unless it is a whole number from 0 to 4294967295.
 */
export function resolveSilhouetteOptions(partial: Partial<SilhouetteOptions> = {}): SilhouetteOptions {
  const sampleSize = partial.sampleSize ?? SILHOUETTE_DEFAULTS.sampleSize;
  const seed = partial.seed ?? SILHOUETTE_DEFAULTS.seed;
  if (typeof sampleSize !== 'number' || !Number.isSafeInteger(sampleSize) || sampleSize < 2) {
    throw new UsageError(`sampleSize must be a whole number >= 2; got ${show(sampleSize)}`, 'sampleSize');
  }
  if (typeof seed !== 'number' || !Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) {
    throw new UsageError(`seed must be a whole number from 0 to 4294967295; got ${show(seed)}`, 'seed');
  }
  return { sampleSize, seed };
}

/** A silhouette over a sample. */
export interface SilhouetteResult {
  /** Mean silhouette over the sampled rows (NaN when fewer than two groups occur in the sample). */
  readonly mean: number;
  /** Mean silhouette of each group's sampled rows (NaN for a group with none in the sample). */
  readonly perGroup: Float64Array;
  /** Number of rows scored. */
  readonly sampled: number;
}

/**
 * Mean cosine between each group's rows and its centroid.
 *
 * `centroids` is dense term-major, `centroids[term * groups + g]`, length `cols * groups`;
 * centroids need not be unit length (cosine divides by both norms, computed in double
 * precision). An all-zero row or centroid has cosine 0. Rows with assignment -1 are
 * ignored; a group with no rows gets NaN.
 *
 * @throws Error on mismatched lengths or an assignment outside -1..groups-1.
 */
export function groupCohesion(matrix: Csr, assignments: Int32Array, groups: number, centroids: Float32Array): Float64Array {
  const { rows, cols, indptr, indices, values } = matrix;
  checkAssignments('groupCohesion', assignments, rows, groups);
  if (centroids.length !== cols * groups) {
    throw new Error(`groupCohesion: centroids have ${centroids.length} values; expected cols * groups = ${cols * groups}`);
  }
  const cnorm = centroidNorms(centroids, cols, groups);
  const sum = new Float64Array(groups);
  const count = new Float64Array(groups);
  for (let r = 0; r < rows; r++) {
    const g = assignments[r]!;
    if (g === -1) continue;
    count[g]!++;
    let dot = 0;
    let sq = 0;
    for (let p = indptr[r]!, end = indptr[r + 1]!; p < end; p++) {
      const v = values[p]!;
      dot += v * centroids[indices[p]! * groups + g]!;
      sq += v * v;
    }
    const denom = Math.sqrt(sq) * cnorm[g]!;
    if (denom > 0) sum[g]! += dot / denom;
  }
  const out = new Float64Array(groups);
  for (let g = 0; g < groups; g++) out[g] = count[g]! > 0 ? sum[g]! / count[g]! : NaN;
  return out;
}

/**
 * For each group, the largest cosine between its centroid and any other group's centroid
 * (high = poorly separated). `centroids[term * groups + g]`, length `terms * groups`.
 * An all-zero centroid has cosine 0 with every other; with a single group the value is NaN.
 * Cost O(Σ_t z_t²) for z_t groups with a non-zero weight on term t.
 *
 * @throws Error when `centroids.length !== terms * groups`.
 */
export function groupSeparation(centroids: Float32Array, terms: number, groups: number): Float64Array {
  if (centroids.length !== terms * groups) {
    throw new Error(`groupSeparation: centroids have ${centroids.length} values; expected terms * groups = ${terms * groups}`);
  }
  const k = groups;
  const gram = termMajorGram(centroids, terms, k);
  const out = new Float64Array(k);
  for (let g = 0; g < k; g++) {
    let best = -Infinity;
    for (let h = 0; h < k; h++) {
      if (h === g) continue;
      const lo = g < h ? g : h;
      const hi = g < h ? h : g;
      const denom = Math.sqrt(gram[g * k + g]! * gram[h * k + h]!);
      const cos = denom > 0 ? gram[lo * k + hi]! / denom : 0;
      if (cos > best) best = cos;
    }
    out[g] = k > 1 ? best : NaN;
  }
  return out;
}

/**
 * Silhouette (Rousseeuw 1987) on cosine distance `1 - cos` (clipped to [0, 2]) over a
 * seeded sample of at most `sampleSize` rows that are non-empty and assigned (assignment
 * -1 and all-zero rows are left out). As scikit-learn's `silhouette_score(sample_size=...)`,
 * the silhouette is computed within the sample: a(i) and b(i) average over sampled rows
 * only. A row alone in its group (within the sample) scores 0; a row with a(i) = b(i) = 0
 * scores 0. Without sampling (eligible rows <= sampleSize) it equals
 * `silhouette_score(X, labels, metric='cosine')` on those rows.
 *
 * The sample is a partial Fisher–Yates shuffle of the eligible row numbers driven by
 * `createRng(seed)`. Cost O(s² + Σ over sampled rows of their terms' sample frequencies),
 * memory O(s + nnz of the sample + groups).
 *
 * @throws UsageError for bad options (see {@link resolveSilhouetteOptions}).
 * @throws Error on mismatched lengths or an assignment outside -1..groups-1.
 */
export function sampledSilhouette(
  matrix: Csr,
  assignments: Int32Array,
  groups: number,
  options: Partial<SilhouetteOptions> = {},
): SilhouetteResult {
  const opts = resolveSilhouetteOptions(options);
  checkAssignments('sampledSilhouette', assignments, matrix.rows, groups);
  const sample = drawSample(matrix, assignments, opts);
  const s = sample.rows.length;
  const label = new Int32Array(s);
  const count = new Float64Array(groups);
  for (let i = 0; i < s; i++) {
    label[i] = assignments[sample.rows[i]!]!;
    count[label[i]!]!++;
  }
  let present = 0;
  for (let g = 0; g < groups; g++) if (count[g]! > 0) present++;
  const perGroup = new Float64Array(groups).fill(NaN);
  if (present < 2) return { mean: NaN, perGroup, sampled: s };
  const groupSum = new Float64Array(groups);
  const scoreSum = new Float64Array(groups);
  let total = 0;
  const dist = new Float64Array(s);
  for (let i = 0; i < s; i++) {
    sample.distancesFrom(i, dist);
    groupSum.fill(0);
    for (let j = 0; j < s; j++) if (j !== i) groupSum[label[j]!]! += dist[j]!;
    const score = silhouetteOf(label[i]!, groupSum, count, groups);
    scoreSum[label[i]!]! += score;
    total += score;
  }
  for (let g = 0; g < groups; g++) if (count[g]! > 0) perGroup[g] = scoreSum[g]! / count[g]!;
  return { mean: total / s, perGroup, sampled: s };
}

/** Silhouette of one cut of a tree, from {@link silhouetteForCuts}. */
export interface CutSilhouette extends SilhouetteResult {
  /** Number of clusters of the cut. */
  readonly groups: number;
  /** The cut itself: tree leaf → cluster (as {@link cutToGroups}). */
  readonly leafClusters: Int32Array;
}

/**
 * Scores several cuts of one tree on one sample, for choosing the number of groups.
 *
 * `leafAssignments` maps each row to a tree leaf (a group id for a tree over groups, the
 * row itself for a document-level tree; -1 leaves a row out). Each cut `c` in `cuts` is
 * {@link cutToGroups}(tree, c); a row's cluster is its leaf's cluster. The sample is drawn
 * exactly as {@link sampledSilhouette} draws it for the same eligible rows and options, so
 * each result equals `sampledSilhouette(matrix, cluster-of-row, c, options)` (up to
 * summation order). Distances from each sampled row are computed once and summed per leaf;
 * every cut then costs O(leaves in sample + c) per sampled row.
 *
 * @throws UsageError for bad options or a cut outside 1..leaves (option `groups`).
 * @throws Error on mismatched lengths or a leaf outside -1..leaves-1.
 */
export function silhouetteForCuts(
  matrix: Csr,
  leafAssignments: Int32Array,
  tree: Dendrogram,
  cuts: readonly number[],
  options: Partial<SilhouetteOptions> = {},
): { sampled: number; cuts: CutSilhouette[] } {
  const opts = resolveSilhouetteOptions(options);
  const leaves = tree.leaves;
  checkAssignments('silhouetteForCuts', leafAssignments, matrix.rows, leaves);
  const leafClusters = cuts.map((c) => cutToGroups(tree, c));
  const sample = drawSample(matrix, leafAssignments, opts);
  const s = sample.rows.length;
  // compact the leaves that occur in the sample
  const compactOf = new Int32Array(leaves).fill(-1);
  const leafOfCompact = new Int32Array(Math.min(s, leaves));
  const sampleLeaf = new Int32Array(s);
  let u = 0;
  for (let i = 0; i < s; i++) {
    const leaf = leafAssignments[sample.rows[i]!]!;
    if (compactOf[leaf] === -1) {
      compactOf[leaf] = u;
      leafOfCompact[u++] = leaf;
    }
    sampleLeaf[i] = compactOf[leaf]!;
  }
  const nc = cuts.length;
  const clusterOfCompact: Int32Array[] = [];
  const clusterCount: Float64Array[] = [];
  const scoreSum: Float64Array[] = [];
  const totals = new Float64Array(nc);
  const valid = new Uint8Array(nc);
  let maxGroups = 0;
  for (let c = 0; c < nc; c++) {
    const k = cuts[c]!;
    if (k > maxGroups) maxGroups = k;
    const map = new Int32Array(u);
    for (let x = 0; x < u; x++) map[x] = leafClusters[c]![leafOfCompact[x]!]!;
    const count = new Float64Array(k);
    for (let i = 0; i < s; i++) count[map[sampleLeaf[i]!]!]!++;
    let present = 0;
    for (let g = 0; g < k; g++) if (count[g]! > 0) present++;
    valid[c] = present >= 2 ? 1 : 0;
    clusterOfCompact.push(map);
    clusterCount.push(count);
    scoreSum.push(new Float64Array(k));
  }
  const dist = new Float64Array(s);
  const leafSum = new Float64Array(u);
  const clusterSum = new Float64Array(maxGroups);
  let anyValid = false;
  for (let c = 0; c < nc; c++) if (valid[c] === 1) anyValid = true;
  if (anyValid) {
    for (let i = 0; i < s; i++) {
      sample.distancesFrom(i, dist);
      leafSum.fill(0);
      for (let j = 0; j < s; j++) if (j !== i) leafSum[sampleLeaf[j]!]! += dist[j]!;
      for (let c = 0; c < nc; c++) {
        if (valid[c] === 0) continue;
        const k = cuts[c]!;
        const map = clusterOfCompact[c]!;
        clusterSum.fill(0, 0, k);
        for (let x = 0; x < u; x++) clusterSum[map[x]!]! += leafSum[x]!;
        const own = map[sampleLeaf[i]!]!;
        const score = silhouetteOf(own, clusterSum, clusterCount[c]!, k);
        scoreSum[c]![own]! += score;
        totals[c]! += score;
      }
    }
  }
  const results: CutSilhouette[] = [];
  for (let c = 0; c < nc; c++) {
    const k = cuts[c]!;
    const perGroup = new Float64Array(k).fill(NaN);
    if (valid[c] === 1) {
      const count = clusterCount[c]!;
      for (let g = 0; g < k; g++) if (count[g]! > 0) perGroup[g] = scoreSum[c]![g]! / count[g]!;
    }
    results.push({ groups: k, leafClusters: leafClusters[c]!, mean: valid[c] === 1 ? totals[c]! / s : NaN, perGroup, sampled: s });
  }
  return { sampled: s, cuts: results };
}

// ---------------------------------------------------------------------------
// internals

function checkAssignments(where: string, assignments: Int32Array, rows: number, groups: number): void {
  if (!Number.isInteger(groups) || groups < 0) throw new Error(`${where}: groups must be a whole number; got ${groups}`);
  if (assignments.length !== rows) throw new Error(`${where}: ${assignments.length} assignments for ${rows} rows`);
  for (let r = 0; r < rows; r++) {
    const g = assignments[r]!;
    if (g < -1 || g >= groups) throw new Error(`${where}: row ${r} has assignment ${g}, outside -1..${groups - 1}`);
  }
}

function centroidNorms(centroids: Float32Array, terms: number, groups: number): Float64Array {
  const sq = new Float64Array(groups);
  for (let t = 0; t < terms; t++) {
    const base = t * groups;
    for (let g = 0; g < groups; g++) {
      const v = centroids[base + g]!;
      sq[g]! += v * v;
    }
  }
  for (let g = 0; g < groups; g++) sq[g] = Math.sqrt(sq[g]!);
  return sq;
}

/** s(i) from the summed distances of row i to each group (own group excludes row i). */
function silhouetteOf(own: number, groupSum: Float64Array, count: Float64Array, groups: number): number {
  const ownCount = count[own]!;
  if (ownCount <= 1) return 0;
  const a = groupSum[own]! / (ownCount - 1);
  let b = Infinity;
  for (let g = 0; g < groups; g++) {
    if (g === own || count[g] === 0) continue;
    const mean = groupSum[g]! / count[g]!;
    if (mean < b) b = mean;
  }
  const denom = a > b ? a : b;
  return denom > 0 ? (b - a) / denom : 0;
}

interface Sample {
  /** Sampled row numbers, ascending. */
  readonly rows: Int32Array;
  /** Writes the cosine distance from sampled row i to every sampled row into `out` (length s). */
  distancesFrom(i: number, out: Float64Array): void;
}

/** Draws the sample and prepares unit-length copies of its rows with an inverted index. */
function drawSample(matrix: Csr, assignments: Int32Array, opts: SilhouetteOptions): Sample {
  const { rows, cols, indptr, indices, values } = matrix;
  const norms = new Float64Array(rows);
  let m = 0;
  for (let r = 0; r < rows; r++) {
    if (assignments[r] === -1) continue;
    let sq = 0;
    for (let p = indptr[r]!, end = indptr[r + 1]!; p < end; p++) sq += values[p]! * values[p]!;
    norms[r] = Math.sqrt(sq);
    if (sq > 0) m++;
  }
  const eligible = new Int32Array(m);
  for (let r = 0, at = 0; r < rows; r++) if (assignments[r] !== -1 && norms[r]! > 0) eligible[at++] = r;
  let chosen: Int32Array;
  if (m <= opts.sampleSize) chosen = eligible;
  else {
    const rng = createRng(opts.seed);
    const s = opts.sampleSize;
    for (let i = 0; i < s; i++) {
      const j = i + rng.int(m - i);
      const t = eligible[i]!;
      eligible[i] = eligible[j]!;
      eligible[j] = t;
    }
    chosen = eligible.slice(0, s).sort();
  }
  const s = chosen.length;
  // inverted index over the sample, values divided by the row norm (so dot = cosine)
  const colPtr = new Int32Array(cols + 1);
  for (let i = 0; i < s; i++) {
    const r = chosen[i]!;
    for (let p = indptr[r]!, end = indptr[r + 1]!; p < end; p++) colPtr[indices[p]! + 1]!++;
  }
  for (let c = 0; c < cols; c++) colPtr[c + 1]! += colPtr[c]!;
  const nnz = colPtr[cols]!;
  const fill = colPtr.slice(0, cols);
  const colRow = new Int32Array(nnz);
  const colVal = new Float64Array(nnz);
  for (let i = 0; i < s; i++) {
    const r = chosen[i]!;
    const norm = norms[r]!;
    for (let p = indptr[r]!, end = indptr[r + 1]!; p < end; p++) {
      const at = fill[indices[p]!]!++;
      colRow[at] = i;
      colVal[at] = values[p]! / norm;
    }
  }
  return {
    rows: chosen,
    distancesFrom(i: number, out: Float64Array): void {
      out.fill(0);
      const r = chosen[i]!;
      const norm = norms[r]!;
      for (let p = indptr[r]!, end = indptr[r + 1]!; p < end; p++) {
        const c = indices[p]!;
        const v = values[p]! / norm;
        for (let q = colPtr[c]!, stop = colPtr[c + 1]!; q < stop; q++) out[colRow[q]!]! += v * colVal[q]!;
      }
      for (let j = 0; j < s; j++) {
        let d = 1 - out[j]!;
        if (d < 0) d = 0;
        else if (d > 2) d = 2;
        out[j] = d;
      }
    },
  };
}

/**
 * The Gram matrix (k × k, row-major, symmetric) of k vectors stored
 * term-major (`x[term * k + g]`), skipping zeros: O(Σ_t z_t²) for z_t vectors
 * with a non-zero weight on term t. Shared by the groups' separation and the
 * objective of a tree's cuts.
 */
export function termMajorGram(x: ArrayLike<number>, terms: number, k: number): Float64Array {
  const gram = new Float64Array(k * k);
  const nz = new Int32Array(k);
  for (let t = 0; t < terms; t++) {
    const base = t * k;
    let z = 0;
    for (let g = 0; g < k; g++) if (x[base + g] !== 0) nz[z++] = g;
    for (let a = 0; a < z; a++) {
      const ga = nz[a]!;
      const va = x[base + ga]!;
      for (let b = a; b < z; b++) {
        const gb = nz[b]!;
        gram[ga * k + gb]! += va * x[base + gb]!;
      }
    }
  }
  for (let a = 0; a < k; a++) for (let b = a + 1; b < k; b++) gram[b * k + a] = gram[a * k + b]!;
  return gram;
}
