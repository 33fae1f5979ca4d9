/**
 * Duplicate sets: the connected components of the similar-pairs graph, each
 * with a representative, and a warning for sets that only hang together
 * through chains of intermediaries.
 *
 * @module
 */
import type { Csr } from '../types.js';
import type { SimilarPairs } from './cosine.js';
import { checkCsr } from '../util/csr.js';
import { UnionFind } from '../util/union-find.js';
import { checkMargin, checkThreshold, DEFAULT_DUPLICATES_OPTIONS } from './options.js';

/** One set of near-copies (a connected component of size >= 2). */
export interface DuplicateSet {
  /** Canonical id: position in the strongest-first order, from 0. */
  readonly id: number;
  /** Row index of the member with the highest mean similarity to the other members. */
  readonly representative: number;
  /** Row indices of the members, ascending (the representative among them). */
  readonly members: Int32Array;
  /** Cosine of each member (aligned with `members`) to the representative; 1 for the representative itself. */
  readonly similarityToRepresentative: Float32Array;
  /** Smallest similarity to the representative among the other members. */
  readonly weakest: number;
  /** Number of the given pairs that lie inside the set (its edges). */
  readonly pairs: number;
  /** Mean cosine over all member pairs (not only the edges). */
  readonly meanSimilarity: number;
  /** True when `weakest` is below `threshold - chainWarningMargin` (see {@link duplicateSets}). */
  readonly chained: boolean;
}

/** Options for {@link duplicateSets}. */
export interface DuplicateSetOptions {
  /**
   * The join threshold the chain warning is measured from. Defaults to
   * `pairs.threshold`, else to the smallest similarity among the pairs.
   */
  readonly threshold?: number;
  /** Default 0.1 ({@link DEFAULT_DUPLICATES_OPTIONS}); in [0, 1). */
  readonly chainWarningMargin?: number;
}

/** What {@link duplicateSets} returns. */
export interface DuplicateSets {
  /** Sets, strongest first; `sets[k].id === k`. */
  readonly sets: DuplicateSet[];
  /** Set id per row, -1 for rows in no set. */
  readonly setOf: Int32Array;
  /** Ids of the sets that chain, ascending. */
  readonly chained: Int32Array;
  /** `threshold - chainWarningMargin`: a member below this similarity to its representative makes its set chain. */
  readonly chainFloor: number;
}

/**
 * Means within this of the best count as tied when choosing a representative:
 * rows are stored as float32 (about 7 significant digits), so means that are
 * equal by construction can differ by some 1e-8.
 */
const TIE_TOLERANCE = 1e-6;
/** Resolution at which mean similarities are compared when ordering sets. */
const ORDER_RESOLUTION = 1e6;

/**
 * Groups rows into sets of near-copies.
 *
 * - Components: union-find over the pairs (path compression, union by size);
 *   components of two or more rows become sets.
 * - Representative: the member with the highest mean cosine to the other
 *   members. The means come from the sum vector S of the members, exactly as
 *   Σ_{j≠i} x_i·x_j = x_i·S − x_i·x_i (O(members · nnz), so large sets stay
 *   cheap). Means within 1e-6 of the best count as tied (the rows are float32,
 *   so means equal by construction can differ by some 1e-8), and ties go to
 *   the lowest row index.
 * - Each member's cosine to the representative is computed exactly from the
 *   vectors ({@link rowDot} arithmetic).
 * - Chaining: a set chains when its weakest member's similarity to the
 *   representative is below `threshold - chainWarningMargin` (margin 0.1 by
 *   default): the members are then linked through intermediaries rather than
 *   all being close to one text.
 * - Order: mean pair similarity descending (compared at a resolution of 1e-6,
 *   so float noise between sets of exact copies does not decide), then size
 *   descending, then lowest member row ascending; ids 0, 1, … in that order.
 */
export function duplicateSets(matrix: Csr, pairs: SimilarPairs, options: DuplicateSetOptions = {}): DuplicateSets {
  checkCsr(matrix, 'duplicateSets', false);
  const n = matrix.rows;
  const { a, b, similarity } = pairs;
  if (a.length !== b.length || a.length !== similarity.length) {
    throw new RangeError(`duplicateSets: pair arrays differ in length: ${a.length}, ${b.length}, ${similarity.length}`);
  }
  const margin = checkMargin(options.chainWarningMargin ?? DEFAULT_DUPLICATES_OPTIONS.chainWarningMargin, 'chainWarningMargin');
  let threshold = options.threshold ?? pairs.threshold;
  if (threshold === undefined) {
    threshold = 1;
    for (let k = 0; k < similarity.length; k++) if (similarity[k]! < threshold) threshold = similarity[k]!;
  }
  checkThreshold(threshold, 'threshold');
  const chainFloor = threshold - margin;

  // Union-find.
  const forest = new UnionFind(n);
  const size = new Int32Array(n).fill(1);
  const find = (v: number): number => forest.find(v);
  for (let k = 0; k < a.length; k++) {
    const i = a[k]!;
    const j = b[k]!;
    if (!(i >= 0 && i < n && j >= 0 && j < n) || i === j) {
      throw new RangeError(`duplicateSets: pair ${k} (${i}, ${j}) is not two distinct rows of ${n}`);
    }
    let ri = find(i);
    let rj = find(j);
    if (ri === rj) continue;
    if (size[ri]! < size[rj]! || (size[ri] === size[rj] && rj < ri)) {
      const tmp = ri;
      ri = rj;
      rj = tmp;
    }
    forest.attach(rj, ri);
    size[ri] += size[rj]!;
  }

  // Components of size >= 2, numbered by their lowest row; members ascending.
  const compOfRoot = new Int32Array(n).fill(-1);
  const comp = new Int32Array(n).fill(-1);
  let components = 0;
  for (let i = 0; i < n; i++) {
    const r = find(i);
    if (size[r]! < 2) continue;
    if (compOfRoot[r] === -1) compOfRoot[r] = components++;
    comp[i] = compOfRoot[r]!;
  }
  const compStart = new Int32Array(components + 1);
  for (let i = 0; i < n; i++) if (comp[i]! >= 0) compStart[comp[i]! + 1]!++;
  for (let c = 0; c < components; c++) compStart[c + 1] += compStart[c]!;
  const memberRows = new Int32Array(compStart[components]!);
  const fill = compStart.slice(0, components);
  for (let i = 0; i < n; i++) if (comp[i]! >= 0) memberRows[fill[comp[i]!]!++] = i;
  const edges = new Int32Array(components);
  for (let k = 0; k < a.length; k++) edges[comp[a[k]!]!]!++;

  // Per component: sum vector, member means, representative, similarities.
  const { indptr, indices, values } = matrix;
  const dense = new Float64Array(matrix.cols);
  const draft: Omit<DuplicateSet, 'id'>[] = [];
  for (let c = 0; c < components; c++) {
    const from = compStart[c]!;
    const to = compStart[c + 1]!;
    const s = to - from;
    for (let k = from; k < to; k++) {
      const row = memberRows[k]!;
      for (let e = indptr[row]!; e < indptr[row + 1]!; e++) dense[indices[e]!] += values[e]!;
    }
    let best = -Infinity;
    let total = 0;
    const means = new Float64Array(s);
    for (let k = from; k < to; k++) {
      const row = memberRows[k]!;
      let withSum = 0;
      let self = 0;
      for (let e = indptr[row]!; e < indptr[row + 1]!; e++) {
        const v = values[e]!;
        withSum += v * dense[indices[e]!]!;
        self += v * v;
      }
      const others = withSum - self;
      total += others;
      const mean = others / (s - 1);
      means[k - from] = mean;
      if (mean > best) best = mean;
    }
    let repAt = 0;
    while (means[repAt]! < best - TIE_TOLERANCE) repAt++;
    const representative = memberRows[from + repAt]!;
    for (let k = from; k < to; k++) {
      const row = memberRows[k]!;
      for (let e = indptr[row]!; e < indptr[row + 1]!; e++) dense[indices[e]!] = 0;
    }
    // Exact cosine of each member to the representative: scatter it, sum in column order.
    for (let e = indptr[representative]!; e < indptr[representative + 1]!; e++) dense[indices[e]!] = values[e]!;
    const sims = new Float32Array(s);
    let weakest = Infinity;
    for (let k = from; k < to; k++) {
      const row = memberRows[k]!;
      if (row === representative) {
        sims[k - from] = 1;
        continue;
      }
      let dot = 0;
      for (let e = indptr[row]!; e < indptr[row + 1]!; e++) dot += dense[indices[e]!]! * values[e]!;
      sims[k - from] = dot;
      if (dot < weakest) weakest = dot;
    }
    for (let e = indptr[representative]!; e < indptr[representative + 1]!; e++) dense[indices[e]!] = 0;
    const weakest32 = Math.fround(weakest);
    draft.push({
      representative,
      members: memberRows.slice(from, to),
      similarityToRepresentative: sims,
      weakest: weakest32,
      pairs: edges[c]!,
      meanSimilarity: total / (s * (s - 1)),
      chained: weakest32 < chainFloor,
    });
  }

  const key = draft.map((d) => Math.round(d.meanSimilarity * ORDER_RESOLUTION));
  const orderIdx = draft.map((_, i) => i);
  orderIdx.sort(
    (x, y) =>
      key[y]! - key[x]! ||
      draft[y]!.members.length - draft[x]!.members.length ||
      draft[x]!.members[0]! - draft[y]!.members[0]!,
  );
  const sets: DuplicateSet[] = [];
  const setOf = new Int32Array(n).fill(-1);
  const chainedIds: number[] = [];
  for (let id = 0; id < orderIdx.length; id++) {
    const d = draft[orderIdx[id]!]!;
    sets.push({ id, ...d });
    for (let k = 0; k < d.members.length; k++) setOf[d.members[k]!] = id;
    if (d.chained) chainedIds.push(id);
  }
  return { sets, setOf, chained: Int32Array.from(chainedIds), chainFloor };
}

/**
 * Fast path for identical texts: `keys[i]` is document i's normalised text
 * (or any exact key the caller chooses). Returns a group id per document:
 * documents whose key occurs two or more times share an id, numbered 0, 1, …
 * in order of each key's first occurrence; documents with a unique key, and
 * documents whose key is the empty string (no text is nobody's copy), get -1.
 */
export function exactCopies(keys: readonly string[]): Int32Array {
  const n = keys.length;
  const first = new Map<string, number>();
  const count = new Int32Array(n);
  const firstOf = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    const key = keys[i]!;
    if (key === '') {
      firstOf[i] = -1;
      continue;
    }
    let f = first.get(key);
    if (f === undefined) {
      f = i;
      first.set(key, i);
    }
    firstOf[i] = f;
    count[f]!++;
  }
  const groupOfFirst = new Int32Array(n).fill(-1);
  const out = new Int32Array(n).fill(-1);
  let groups = 0;
  for (let i = 0; i < n; i++) {
    const f = firstOf[i]!;
    if (f < 0 || count[f]! < 2) continue;
    if (groupOfFirst[f] === -1) groupOfFirst[f] = groups++;
    out[i] = groupOfFirst[f]!;
  }
  return out;
}
