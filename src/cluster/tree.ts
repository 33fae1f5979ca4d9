/**
 * The topic tree: average-link (UPGMA) agglomeration on cosine similarity.
 *
 * Two entry points share one agglomeration core (the nearest-neighbour chain,
 * Müllner 2011, "Modern hierarchical, agglomerative clustering algorithms",
 * arXiv:1109.2378, §3.2 / Figure 4):
 *
 * - {@link groupAverageLink}: leaves are the groups of a partition (e.g. the
 *   k-means groups). For unit vectors the mean pairwise cosine between groups A
 *   and B is `(ΣA · ΣB) / (|A|·|B|)`, so the k×k table of sum-vector dot products
 *   gives exact average-link given that partition, at any number of documents.
 * - {@link documentAverageLink}: exact document-level average-link on a
 *   condensed matrix of cosine distances, within a stated memory limit.
 *
 * Trees are returned in a linkage-like layout of typed arrays ({@link Dendrogram}):
 * merges sorted by height (stable, as scipy does) and relabelled so that node
 * `n + i` is the node made by merge `i`.
 *
 * @module
 */

import type { Csr } from '../types.js';
import { UsageError, show } from '../util/errors.js';
import { UnionFind } from '../util/union-find.js';

/**
 * A binary merge tree over `leaves` leaves, in the layout of a linkage matrix.
 * Node ids `0..leaves-1` are leaves; node `leaves + i` is the node made by merge `i`.
 * Merges are ordered by non-increasing similarity (non-decreasing distance).
 */
export interface Dendrogram {
  /** Number of leaves `n`. */
  readonly leaves: number;
  /** First child of each merge (the smaller node id), length `n - 1`. */
  readonly left: Int32Array;
  /** Second child of each merge (the larger node id), length `n - 1`. */
  readonly right: Int32Array;
  /** Average cosine similarity between the two children at the merge (`1 - distance`); non-increasing. */
  readonly similarity: Float64Array;
  /** Number of leaves under the new node. */
  readonly size: Int32Array;
}

/** Options of the document-level tree. */
export interface TreeOptions {
  /**
   * Upper bound, in bytes, on the condensed distance matrix (`n(n-1)/2` Float64 values)
   * that {@link documentAverageLink} may allocate. Default 2 GiB.
   */
  readonly memoryLimitBytes: number;
}

/** Defaults of {@link TreeOptions}. */
export const TREE_DEFAULTS: Readonly<TreeOptions> = Object.freeze({
  memoryLimitBytes: 2 * 1024 ** 3,
});

/**
 * Merges `partial` over {@link TREE_DEFAULTS} and validates once.
 *
 * @throws UsageError (option `memoryLimitBytes`) unless the limit is a whole number of bytes >= 1.
 */
export function resolveTreeOptions(partial: Partial<TreeOptions> = {}): TreeOptions {
  const memoryLimitBytes = partial.memoryLimitBytes ?? TREE_DEFAULTS.memoryLimitBytes;
  if (typeof memoryLimitBytes !== 'number' || !Number.isSafeInteger(memoryLimitBytes) || memoryLimitBytes < 1) {
    throw new UsageError(
      `memoryLimitBytes must be a whole number of bytes >= 1; got ${show(memoryLimitBytes)}`,
      'memoryLimitBytes',
    );
  }
  return { memoryLimitBytes };
}

/** Upper bound on the dense group-sum block of {@link groupAverageLink}. */
const GROUP_SUM_BLOCK_BYTES = 64 * 1024 * 1024;

/** Bytes per stored distance: Float64, so merge heights match double-precision references to ~1e-15. */
const BYTES_PER_DISTANCE = 8;

/**
 * Bytes of the condensed distance matrix for `n` documents: `n(n-1)/2 * 8`.
 * (The other working buffers are O(n) and not counted.)
 */
export function distanceMatrixBytes(n: number): number {
  return ((n * (n - 1)) / 2) * BYTES_PER_DISTANCE;
}

/**
 * The largest number of documents whose condensed Float64 distance matrix fits in
 * `memoryLimitBytes` (at least 1: a single document needs no matrix).
 */
export function maxDocumentsForMemory(memoryLimitBytes: number): number {
  const limit = resolveTreeOptions({ memoryLimitBytes }).memoryLimitBytes;
  // n(n-1)/2 * 8 <= L  <=>  n^2 - n - L/4 <= 0  <=>  n <= (1 + sqrt(1 + L)) / 2
  let n = Math.floor((1 + Math.sqrt(1 + limit)) / 2);
  while (n > 1 && distanceMatrixBytes(n) > limit) n--;
  while (distanceMatrixBytes(n + 1) <= limit) n++;
  return Math.max(1, n);
}

/**
 * Exact average-link (UPGMA) over the groups of a partition.
 *
 * Leaf `g` is group `g` (`0..groups-1`). The similarity of two clusters is the mean
 * pairwise dot product between their documents, `(ΣA · ΣB) / (|A|·|B|)`, which is the
 * mean pairwise cosine for unit rows (an all-zero row counts in its group's size and is
 * 0-similar to everything). The k×k table of `ΣA · ΣB` comes from dense term-major group
 * sums (`sums[term * groups + g]`, Float64), multiplied term by term over the groups that use
 * each term: O(nnz + Σ_t z_t²) for z_t groups using term t, which is at most O(nnz·k) (the
 * cost of scoring every row against every group sum) and usually far less. Sums are taken
 * `blockTerms` terms at a time (default: as many as fit in 64 MiB, i.e. all of them unless
 * `cols * groups` exceeds 8M), so memory stays bounded for wide vocabularies. Then UPGMA
 * with Lance–Williams size-weighted updates, sizes counted in documents.
 * `Dendrogram.size` counts leaves (groups).
 *
 * Rows with assignment -1 are ignored.
 *
 * @param options.blockTerms - terms per block of dense sums (a memory/speed knob; the result
 *   is the same up to rounding).
 * @throws Error when an assignment is out of range or a group has no documents.
 */
export function groupAverageLink(
  matrix: Csr,
  assignments: Int32Array,
  groups: number,
  options: { readonly blockTerms?: number } = {},
): Dendrogram {
  const { rows, cols, indptr, indices, values } = matrix;
  if (assignments.length !== rows) {
    throw new Error(`groupAverageLink: ${assignments.length} assignments for ${rows} rows`);
  }
  if (!Number.isInteger(groups) || groups < 0) throw new Error(`groupAverageLink: groups must be a whole number; got ${groups}`);
  const k = groups;
  const counts = new Float64Array(k);
  for (let r = 0; r < rows; r++) {
    const g = assignments[r]!;
    if (g === -1) continue;
    if (g < 0 || g >= k || !Number.isInteger(g)) {
      throw new Error(`groupAverageLink: row ${r} has assignment ${g}, outside -1..${k - 1}`);
    }
    counts[g]!++;
  }
  for (let g = 0; g < k; g++) {
    if (counts[g] === 0) throw new Error(`groupAverageLink: group ${g} has no documents; every leaf of the tree needs at least one`);
  }
  const blockTerms = options.blockTerms ?? Math.max(1, Math.floor(GROUP_SUM_BLOCK_BYTES / 8 / Math.max(1, k)));
  if (!Number.isInteger(blockTerms) || blockTerms < 1) {
    throw new Error(`groupAverageLink: blockTerms must be a whole number >= 1; got ${blockTerms}`);
  }
  // gram[a * k + b] = ΣA · ΣB = Σ_t S[t,a] S[t,b], summed term by term over the groups with a
  // non-zero sum on t (z_t of them): O(nnz + Σ_t z_t²), and z_t <= df_t gives Σ_t z_t² <= k·nnz,
  // so this is never slower than scoring every row against every group sum (O(nnz·k)).
  // Terms are taken in blocks so the dense sums S hold at most blockTerms * k values at a time;
  // row cursors remember where each row's entries for the next block start.
  const gram = new Float64Array(k * k);
  const span = Math.min(cols, blockTerms);
  const sums = new Float64Array(span * k);
  const cursor = indptr.slice(0, rows);
  const nz = new Int32Array(k);
  for (let t0 = 0; t0 < cols; t0 += span) {
    const t1 = Math.min(cols, t0 + span);
    sums.fill(0);
    for (let r = 0; r < rows; r++) {
      const g = assignments[r]!;
      let p = cursor[r]!;
      const end = indptr[r + 1]!;
      for (; p < end && indices[p]! < t1; p++) {
        if (g !== -1) sums[(indices[p]! - t0) * k + g]! += values[p]!;
      }
      cursor[r] = p;
    }
    for (let t = 0; t < t1 - t0; t++) {
      const base = t * k;
      let z = 0;
      for (let g = 0; g < k; g++) if (sums[base + g] !== 0) nz[z++] = g;
      for (let x = 0; x < z; x++) {
        const a = nz[x]!;
        const va = sums[base + a]!;
        const row = a * k;
        for (let y = x; y < z; y++) {
          const b = nz[y]!;
          gram[row + b]! += va * sums[base + b]!;
        }
      }
    }
  }
  const dist = new Float64Array(condensedLength(k));
  for (let a = 0; a < k; a++) {
    for (let b = a + 1; b < k; b++) {
      const dot = gram[a * k + b]!; // upper triangle (a < b) only
      dist[condensedIndex(k, a, b)] = 1 - dot / (counts[a]! * counts[b]!);
    }
  }
  return averageLinkCondensed(dist, k, counts);
}

/**
 * Exact document-level average-link (UPGMA) on cosine distance `1 - cos`.
 *
 * Builds a condensed Float64 matrix of distances (Float64 rather than Float32 so merge
 * heights agree with double-precision references to ~1e-15; Float32 would allow about
 * 1.4x more documents in the same memory but shift heights by ~1e-7). Cosines are
 * computed as `u·v / (‖u‖‖v‖)` in double precision from the stored Float32 values, and
 * clipped to [-1, 1], so Float32 rounding of unit-length rows does not move distances.
 * Pair dot products come from an inverted index (cost Σ df² plus n² writes).
 * Agglomeration is the nearest-neighbour chain; merges are then sorted stably by height
 * and relabelled with union-find.
 *
 * The caller must not pass all-zero rows (they have no cosine); leave them out first.
 *
 * @throws UsageError (option `method`) when the matrix would exceed `memoryLimitBytes`.
 * @throws Error when a row is all-zero.
 */
export function documentAverageLink(matrix: Csr, options: Partial<TreeOptions> = {}): Dendrogram {
  const { memoryLimitBytes } = resolveTreeOptions(options);
  const { rows: n, cols, indptr, indices, values } = matrix;
  const bytes = distanceMatrixBytes(n);
  if (bytes > memoryLimitBytes) {
    throw new UsageError(
      `a document-level tree over ${n} documents needs ${bytesText(bytes)} for its distance matrix, ` +
        `more than the limit of ${bytesText(memoryLimitBytes)}; use method kmeans for a tree over groups`,
      'method',
    );
  }
  const norms = new Float64Array(n);
  for (let r = 0; r < n; r++) {
    let s = 0;
    for (let p = indptr[r]!, end = indptr[r + 1]!; p < end; p++) s += values[p]! * values[p]!;
    if (!(s > 0)) {
      throw new Error(`documentAverageLink: row ${r} is all-zero; leave all-zero rows out before building the tree`);
    }
    norms[r] = Math.sqrt(s);
  }
  // inverted index (column-major copy) so each row meets only the rows it shares terms with
  const colPtr = new Int32Array(cols + 1);
  for (let p = 0, nnz = indptr[n]!; p < nnz; p++) colPtr[indices[p]! + 1]!++;
  for (let c = 0; c < cols; c++) colPtr[c + 1]! += colPtr[c]!;
  const fill = colPtr.slice(0, cols);
  const colRow = new Int32Array(indptr[n]!);
  const colVal = new Float64Array(indptr[n]!);
  for (let r = 0; r < n; r++) {
    for (let p = indptr[r]!, end = indptr[r + 1]!; p < end; p++) {
      const at = fill[indices[p]!]!++;
      colRow[at] = r;
      colVal[at] = values[p]!;
    }
  }
  let dist: Float64Array;
  try {
    dist = new Float64Array(condensedLength(n));
  } catch (error) {
    if (error instanceof RangeError) {
      throw new UsageError(
        `a document-level tree over ${n} documents needs ${bytesText(bytes)} for its distance matrix, ` +
          `more than this process can allocate; use method kmeans for a tree over groups`,
        'method',
      );
    }
    throw error;
  }
  const acc = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    // rows are visited in increasing order within each column, so only rows j > i are scanned
    for (let p = indptr[i]!, end = indptr[i + 1]!; p < end; p++) {
      const c = indices[p]!;
      const v = values[p]!;
      for (let q = colPtr[c + 1]! - 1, stop = colPtr[c]!; q >= stop; q--) {
        const j = colRow[q]!;
        if (j <= i) break;
        acc[j]! += v * colVal[q]!;
      }
    }
    const ni = norms[i]!;
    const base = condensedIndex(n, i, i + 1);
    for (let j = i + 1; j < n; j++) {
      let cos = acc[j]! / (ni * norms[j]!);
      if (cos > 1) cos = 1;
      else if (cos < -1) cos = -1;
      dist[base + (j - i - 1)] = 1 - cos;
      acc[j] = 0;
    }
  }
  return averageLinkCondensed(dist, n, null);
}

/**
 * Cuts the tree into exactly `groups` clusters by applying its first `n - groups` merges.
 * Returns leaf → cluster `0..groups-1`, numbered canonically in order of each cluster's
 * smallest leaf. (With tied heights this may differ from a threshold cut, which keeps or
 * drops all tied merges together.)
 *
 * @throws UsageError (option `groups`) unless `groups` is a whole number from 1 to the number of leaves.
 */
export function cutToGroups(tree: Dendrogram, groups: number): Int32Array {
  const n = tree.leaves;
  if (n === 0) return new Int32Array(0);
  if (!Number.isInteger(groups) || groups < 1 || groups > n) {
    throw new UsageError(`groups must be a whole number from 1 to ${n}; got ${show(groups)}`, 'groups');
  }
  const apply = new Uint8Array(Math.max(0, n - 1));
  apply.fill(1, 0, n - groups);
  return labelLeaves(tree, apply);
}

/**
 * Cuts the tree at a similarity threshold: two leaves share a cluster when they are joined
 * by merges whose average similarity is all >= `minSimilarity` (the threshold cut on
 * distance `1 - minSimilarity`, as scipy's `fcluster(criterion='distance')`). Returns
 * leaf → cluster, numbered canonically in order of each cluster's smallest leaf.
 *
 * @throws UsageError (option `minSimilarity`) unless the threshold is a number from -1 to 1.
 */
export function cutAtSimilarity(tree: Dendrogram, minSimilarity: number): Int32Array {
  if (typeof minSimilarity !== 'number' || !(minSimilarity >= -1 && minSimilarity <= 1)) {
    throw new UsageError(`minSimilarity must be a number from -1 to 1; got ${show(minSimilarity)}`, 'minSimilarity');
  }
  const n = tree.leaves;
  const merges = Math.max(0, n - 1);
  // a node joins its leaves only if every merge below it passes too (min over the subtree)
  const lowest = new Float64Array(merges);
  const apply = new Uint8Array(merges);
  for (let m = 0; m < merges; m++) {
    let s = tree.similarity[m]!;
    const l = tree.left[m]!;
    const r = tree.right[m]!;
    if (l >= n && lowest[l - n]! < s) s = lowest[l - n]!;
    if (r >= n && lowest[r - n]! < s) s = lowest[r - n]!;
    lowest[m] = s;
    apply[m] = s >= minSimilarity ? 1 : 0;
  }
  return labelLeaves(tree, apply);
}

/** One node of a tree in JSON-friendly form. */
export interface TreeNodeSummary {
  /** Node id: `0..leaves-1` for leaves, `leaves + i` for merge `i`. */
  readonly id: number;
  /** The two child ids (smaller first), or null for a leaf. */
  readonly children: [number, number] | null;
  /** Average cosine similarity at the merge, or null for a leaf. */
  readonly similarity: number | null;
  /** Number of leaves under the node (1 for a leaf). */
  readonly size: number;
  /** Number of documents under the node, when leaf weights were given. */
  readonly documents?: number;
}

/** A whole tree in JSON-friendly form: nodes in id order (leaves first, then merges in merge order). */
export interface TreeJson {
  /** Number of leaves. */
  readonly leaves: number;
  /** Id of the root node, or null for an empty tree. */
  readonly root: number | null;
  /** Every node, `nodes[id].id === id`. */
  readonly nodes: TreeNodeSummary[];
}

/**
 * Converts a tree to plain JSON data (for `groups.json`): merge order, children,
 * similarity and sizes. With `leafDocuments` (documents per leaf, e.g. group sizes)
 * every node also carries its document count.
 */
export function treeToJson(tree: Dendrogram, options: { leafDocuments?: ArrayLike<number> } = {}): TreeJson {
  const n = tree.leaves;
  const docs = options.leafDocuments;
  if (docs !== undefined && docs.length !== n) {
    throw new Error(`treeToJson: ${docs.length} leaf document counts for ${n} leaves`);
  }
  const total = new Float64Array(docs === undefined ? 0 : Math.max(0, 2 * n - 1));
  const nodes: TreeNodeSummary[] = [];
  for (let i = 0; i < n; i++) {
    if (docs === undefined) nodes.push({ id: i, children: null, similarity: null, size: 1 });
    else {
      total[i] = docs[i]!;
      nodes.push({ id: i, children: null, similarity: null, size: 1, documents: docs[i]! });
    }
  }
  for (let m = 0; m < n - 1; m++) {
    const l = tree.left[m]!;
    const r = tree.right[m]!;
    const base = { id: n + m, children: [l, r] as [number, number], similarity: tree.similarity[m]!, size: tree.size[m]! };
    if (docs === undefined) nodes.push(base);
    else {
      total[n + m] = total[l]! + total[r]!;
      nodes.push({ ...base, documents: total[n + m]! });
    }
  }
  return { leaves: n, root: n === 0 ? null : 2 * n - 2, nodes };
}

// ---------------------------------------------------------------------------
// internals

function condensedLength(n: number): number {
  return (n * (n - 1)) / 2;
}

/** Index of pair (i, j), i < j, in a row-major condensed upper triangle (scipy's layout). */
function condensedIndex(n: number, i: number, j: number): number {
  return n * i - (i * (i + 1)) / 2 + (j - i - 1);
}

/** `360 bytes`, or `3599880000 bytes (3.4 GiB)` from 1 KiB up. */
function bytesText(bytes: number): string {
  if (bytes < 1024) return `${bytes} bytes`;
  const units = ['KiB', 'MiB', 'GiB', 'TiB', 'PiB'];
  let v = bytes / 1024;
  let u = 0;
  while (v >= 1024 && u < units.length - 1) {
    v /= 1024;
    u++;
  }
  return `${bytes} bytes (${v.toFixed(1)} ${units[u]})`;
}

/**
 * UPGMA on a condensed distance matrix by the nearest-neighbour chain (Müllner 2011,
 * Figure 4; the same procedure as scipy's `nn_chain`). `dist` is overwritten. `weights`
 * are the initial cluster sizes for the Lance–Williams update (null: 1 each).
 *
 * Lance–Williams for average link: d(A∪B, C) = (|A| d(A,C) + |B| d(B,C)) / (|A| + |B|).
 * That value is never below d(A,B) in exact arithmetic (A,B were reciprocal nearest
 * neighbours); it is clamped to d(A,B) so rounding can never create an inversion that
 * would make the height sort put a parent before its child.
 */
function averageLinkCondensed(dist: Float64Array, n: number, weights: Float64Array | null): Dendrogram {
  const merges = Math.max(0, n - 1);
  const mergeA = new Int32Array(merges);
  const mergeB = new Int32Array(merges);
  const height = new Float64Array(merges);
  const weight = new Float64Array(n);
  const active = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    weight[i] = weights === null ? 1 : weights[i]!;
    active[i] = 1;
  }
  const chain = new Int32Array(n);
  let chainLength = 0;
  for (let m = 0; m < merges; m++) {
    if (chainLength === 0) {
      let first = 0;
      while (active[first] === 0) first++;
      chain[0] = first;
      chainLength = 1;
    }
    let x = 0;
    let y = 0;
    let best = 0;
    for (;;) {
      x = chain[chainLength - 1]!;
      if (chainLength > 1) {
        y = chain[chainLength - 2]!;
        best = dist[x < y ? condensedIndex(n, x, y) : condensedIndex(n, y, x)]!;
      } else {
        y = -1;
        best = Infinity;
      }
      // strict '<' keeps the previous chain element on ties, so the chain cannot cycle
      for (let i = 0; i < x; i++) {
        if (active[i] === 0) continue;
        const d = dist[condensedIndex(n, i, x)]!;
        if (d < best) {
          best = d;
          y = i;
        }
      }
      const rowBase = condensedIndex(n, x, x + 1) - (x + 1);
      for (let i = x + 1; i < n; i++) {
        if (active[i] === 0) continue;
        const d = dist[rowBase + i]!;
        if (d < best) {
          best = d;
          y = i;
        }
      }
      if (chainLength > 1 && y === chain[chainLength - 2]) break;
      chain[chainLength++] = y;
    }
    chainLength -= 2;
    if (x > y) {
      const t = x;
      x = y;
      y = t;
    }
    // the merged cluster lives on at index y
    const wx = weight[x]!;
    const wy = weight[y]!;
    const w = wx + wy;
    mergeA[m] = x;
    mergeB[m] = y;
    height[m] = best;
    active[x] = 0;
    weight[y] = w;
    for (let i = 0; i < n; i++) {
      if (active[i] === 0 || i === y) continue;
      const ix = i < x ? condensedIndex(n, i, x) : condensedIndex(n, x, i);
      const iy = i < y ? condensedIndex(n, i, y) : condensedIndex(n, y, i);
      let d = (wx * dist[ix]! + wy * dist[iy]!) / w;
      if (d < best) d = best;
      dist[iy] = d;
    }
  }
  return relabel(n, mergeA, mergeB, height);
}

/**
 * Sorts merges stably by height and turns representative indices into node ids with
 * union-find (as scipy's `label`), so node `n + i` is made by merge `i`.
 */
function relabel(n: number, mergeA: Int32Array, mergeB: Int32Array, height: Float64Array): Dendrogram {
  const merges = mergeA.length;
  const order = new Int32Array(merges);
  for (let i = 0; i < merges; i++) order[i] = i;
  order.sort((p, q) => height[p]! - height[q]! || p - q);
  const sets = new UnionFind(2 * n);
  const find = (x: number): number => sets.find(x);
  const left = new Int32Array(merges);
  const right = new Int32Array(merges);
  const similarity = new Float64Array(merges);
  const size = new Int32Array(merges);
  const leafCount = (id: number): number => (id < n ? 1 : size[id - n]!);
  for (let m = 0; m < merges; m++) {
    const k = order[m]!;
    const a = find(mergeA[k]!);
    const b = find(mergeB[k]!);
    const id = n + m;
    left[m] = a < b ? a : b;
    right[m] = a < b ? b : a;
    similarity[m] = 1 - height[k]!;
    size[m] = leafCount(a) + leafCount(b);
    sets.attach(a, id);
    sets.attach(b, id);
  }
  return { leaves: n, left, right, similarity, size };
}

/** Applies the flagged merges with union-find; labels clusters in order of their smallest leaf. */
function labelLeaves(tree: Dendrogram, apply: Uint8Array): Int32Array {
  const n = tree.leaves;
  const sets = new UnionFind(2 * n);
  const find = (x: number): number => sets.find(x);
  for (let m = 0; m < n - 1; m++) {
    if (apply[m] === 0) continue;
    sets.attach(find(tree.left[m]!), n + m);
    sets.attach(find(tree.right[m]!), n + m);
  }
  const labelOfRoot = new Int32Array(2 * n).fill(-1);
  const out = new Int32Array(n);
  let next = 0;
  for (let i = 0; i < n; i++) {
    const root = find(i);
    if (labelOfRoot[root] === -1) labelOfRoot[root] = next++;
    out[i] = labelOfRoot[root]!;
  }
  return out;
}
