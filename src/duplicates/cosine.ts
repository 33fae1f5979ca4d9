/**
 * Exact all-pairs cosine similarity join over sparse non-negative rows.
 *
 * The method is the All-Pairs algorithm of Bayardo, Ma & Srikant, "Scaling up
 * all pairs similarity search" (WWW 2007), §4, in its second form
 * (All-Pairs-2): an inverted index built while the rows are scanned, holding
 * only the part of each row that could still reach the threshold, so that
 * pairs below the threshold are never scored. The details here:
 *
 * - Dimension order: decreasing document frequency (ties: lower column
 *   first). The frequent dimensions form the unindexed prefix of each row, so
 *   their long posting lists are mostly never built.
 * - Row order: decreasing largest value `maxweight(x)` (ties: lower row
 *   first), which allows the tighter index bound
 *   `b += min(maxweight_i(V), maxweight(x)) · x[i]`: row x's dimensions are
 *   indexed from the first one at which `b` reaches the threshold.
 * - Probing, dimensions taken from the rarest: a row not yet met is admitted as
 *   a candidate only while `remscore` (the bound on what the dimensions not
 *   yet taken can add, `Σ x[i] · maxweight_i(V)`) reaches the threshold.
 * - Size pruning, in place of the paper's bound on the number of entries |y|
 *   (which leans on unit length), a form that holds for any non-negative rows: x · y <= maxweight(x) · ‖y‖₁, so a
 *   row y with `maxweight(x) · ‖y‖₁ < t` can match neither x nor any later row
 *   (later rows have smaller maxweight) and is dropped from the front of the
 *   posting lists for good.
 * - Added to the paper's bounds, the prefix L2-norm bounds of Anastasiu &
 *   Karypis, "L2AP: Fast cosine similarity search with prefix L-2 norm
 *   bounds" (ICDE 2014), by Cauchy–Schwarz: the index bound and `remscore`
 *   are each also capped by `‖prefix‖₂ · max row norm`, and every posting
 *   entry carries the norm of its row before that dimension, so after the
 *   last match of y at x's dimension k the rest can add at most
 *   `‖x before k‖₂ · ‖y before k‖₂`.
 * - Scores accumulate in a preallocated Float64Array with a touched-list; a
 *   candidate goes on only if both `score + ‖x before k‖₂ · ‖y before k‖₂`
 *   and `score + min(|y'|, |x|) · maxweight(x) · maxweight(y')` (y' its
 *   unindexed prefix) reach the threshold, and then its exact dot product is
 *   computed from the full rows.
 *
 * Every bound is a true upper bound for non-negative rows whatever their norm
 * (unit length is needed only for the dot product to be the cosine), and the
 * pruning tests use the threshold lowered by 1e-7 to absorb float64 rounding
 * in the bounds, so no pair whose exact dot product reaches the threshold is
 * lost. The decision itself is `rowDot(x, y) >= t`, computed as described at
 * {@link rowDot}: a brute-force reference using the same arithmetic decides
 * ties at the threshold identically.
 *
 * Memory: O(nnz + rows + cols) working arrays plus the pairs found (growable
 * buffers that double); never an n × n matrix.
 *
 * @module
 */
import type { Csr } from '../types.js';
import { GrowableFloat32, GrowableInt32 } from './buffers.js';
import { checkCsr } from './csr.js';
import { checkThreshold } from './options.js';

/**
 * Pairs of rows found similar, `a[k] < b[k]`, sorted by `(a, b)`.
 * `similarity[k]` is the pair's exact similarity (computed in float64, stored as
 * float32).
 */
export interface SimilarPairs {
  readonly a: Int32Array;
  readonly b: Int32Array;
  readonly similarity: Float32Array;
  /** The threshold the pairs were joined at, when known. */
  readonly threshold?: number;
}

/** Slack subtracted from the threshold in pruning tests only (never in the final decision). */
const PRUNE_SLACK = 1e-7;

/**
 * Every pair of rows whose dot product (the cosine, for L2-normalised rows) is
 * at least `threshold`, and no other pair. Rows must be non-negative (TF-IDF
 * rows are); all-zero rows never pair. `threshold` must be in (0, 1] (a
 * {@link UsageError} otherwise); a malformed matrix or a negative value is a
 * RangeError.
 *
 * Note on t = 1: a float32 row normalised to unit length can have a
 * self-product just below 1, so two identical rows may fall short of t = 1;
 * use {@link exactCopies} for identical texts.
 */
export function allPairsCosine(matrix: Csr, threshold: number): SimilarPairs {
  const t = checkThreshold(threshold, 'threshold');
  checkCsr(matrix, 'allPairsCosine', true);
  const tb = t - PRUNE_SLACK;
  const { rows: n, cols: m, indptr, indices, values } = matrix;

  // Document frequency and largest value of every column (positive entries only).
  const df = new Int32Array(m);
  const mwCol = new Float64Array(m);
  const mwRow = new Float64Array(n);
  let maxDf = 0;
  let maxNorm2 = 0;
  for (let r = 0; r < n; r++) {
    let mw = 0;
    let norm2 = 0;
    for (let e = indptr[r]!; e < indptr[r + 1]!; e++) {
      const v = values[e]!;
      if (v > 0) {
        norm2 += v * v;
        const c = indices[e]!;
        const d = ++df[c]!;
        if (d > maxDf) maxDf = d;
        if (v > mwCol[c]!) mwCol[c] = v;
        if (v > mw) mw = v;
      }
    }
    mwRow[r] = mw;
    if (norm2 > maxNorm2) maxNorm2 = norm2;
  }
  const maxNorm = Math.sqrt(maxNorm2);

  // rank[c]: position of column c in decreasing-df order (counting sort, stable in c).
  const rank = rankColumns(df, maxDf, true);
  const mwRank = new Float64Array(m);
  for (let c = 0; c < m; c++) mwRank[rank[c]!] = mwCol[c]!;

  // Processing order: non-empty rows by decreasing maxweight, ties by row index.
  let live = 0;
  for (let r = 0; r < n; r++) if (mwRow[r]! > 0) live++;
  const order = new Int32Array(live);
  for (let r = 0, k = 0; r < n; r++) if (mwRow[r]! > 0) order[k++] = r;
  order.sort((x, y) => mwRow[y]! - mwRow[x]! || x - y);

  // Rows in processing order, entries as (rank, value) sorted by rank ascending.
  const { start: rowStart, rankOf, valueOf, maxLen } = permuteRows(matrix, order, rank, df);

  // Per row: unindexed prefix length, its largest value, l1 norm; posting list sizes.
  const prefixLen = new Int32Array(live);
  const mwPrefix = new Float64Array(live);
  const l1 = new Float64Array(live);
  const listSize = new Int32Array(m);
  for (let p = 0; p < live; p++) {
    const mwx = mwRow[order[p]!]!;
    const s = rowStart[p]!;
    const e = rowStart[p + 1]!;
    let b = 0;
    let norm2 = 0;
    let sum = 0;
    let k = s;
    let mwp = 0;
    for (; k < e; k++) {
      const v = valueOf[k]!;
      const r = rankOf[k]!;
      const w = mwRank[r]! < mwx ? mwRank[r]! : mwx;
      b += w * v;
      norm2 += v * v;
      if (b >= tb && maxNorm * Math.sqrt(norm2) >= tb) break;
      if (v > mwp) mwp = v;
      sum += v;
    }
    prefixLen[p] = k - s;
    mwPrefix[p] = mwp;
    for (let q = k; q < e; q++) {
      sum += valueOf[q]!;
      listSize[rankOf[q]!]!++;
    }
    l1[p] = sum;
  }
  const listStart = new Int32Array(m + 1);
  for (let r = 0; r < m; r++) listStart[r + 1] = listStart[r]! + listSize[r]!;
  const listFill = new Int32Array(m); // entries appended so far
  const listHead = new Int32Array(m); // entries dropped from the front so far
  const listRow = new Int32Array(listStart[m]!);
  const listVal = new Float32Array(listStart[m]!);
  const listNorm = new Float64Array(listStart[m]!); // norm of the row's entries before this one

  // Preallocated per-probe buffers.
  const acc = new Float64Array(live);
  const upper = new Float64Array(live); // acc + prefix-norm bound, as of the candidate's last match
  const touched = new Int32Array(live);
  const dense = new Float64Array(m);
  const rem = new Float64Array(maxLen);
  const before = new Float64Array(maxLen);

  const outA = new GrowableInt32();
  const outB = new GrowableInt32();
  const outS = new GrowableFloat32();

  for (let p = 0; p < live; p++) {
    const x = order[p]!;
    const mwx = mwRow[x]!;
    const s = rowStart[p]!;
    const e = rowStart[p + 1]!;
    const lenx = e - s;

    // rem[k]: bound on what x's dimensions 0..k can add to any dot product;
    // before[k]: the L2 norm of x's dimensions 0..k-1.
    let run = 0;
    let norm2 = 0;
    for (let k = 0; k < lenx; k++) {
      const v = valueOf[s + k]!;
      before[k] = Math.sqrt(norm2);
      norm2 += v * v;
      const ap = (run += v * mwRank[rankOf[s + k]!]!);
      const l2 = maxNorm * Math.sqrt(norm2);
      rem[k] = ap < l2 ? ap : l2;
    }

    let nt = 0;
    for (let k = lenx - 1; k >= 0; k--) {
      const remscore = rem[k]!;
      if (remscore < tb && nt === 0) break; // nothing can start, nothing started
      const r = rankOf[s + k]!;
      const xv = valueOf[s + k]!;
      const xb = before[k]!;
      const base = listStart[r]!;
      let h = base + listHead[r]!;
      const end = base + listFill[r]!;
      while (h < end && mwx * l1[listRow[h]!]! < tb) h++;
      listHead[r] = h - base;
      if (remscore >= tb) {
        for (let j = h; j < end; j++) {
          const y = listRow[j]!;
          if (acc[y] === 0) touched[nt++] = y;
          const a = (acc[y] += xv * listVal[j]!);
          upper[y] = a + xb * listNorm[j]!;
        }
      } else {
        for (let j = h; j < end; j++) {
          const y = listRow[j]!;
          if (acc[y] === 0) continue;
          const a = (acc[y] += xv * listVal[j]!);
          upper[y] = a + xb * listNorm[j]!;
        }
      }
    }

    if (nt > 0) {
      for (let q = indptr[x]!; q < indptr[x + 1]!; q++) dense[indices[q]!] = values[q]!;
      for (let k = 0; k < nt; k++) {
        const y = touched[k]!;
        const py = prefixLen[y]!;
        const bound = acc[y]! + (py < lenx ? py : lenx) * mwx * mwPrefix[y]!;
        acc[y] = 0;
        if (bound < tb || upper[y]! < tb) continue;
        // Exact dot product over the full original rows (same sum as rowDot).
        const yr = order[y]!;
        let dot = 0;
        for (let q = indptr[yr]!; q < indptr[yr + 1]!; q++) dot += dense[indices[q]!]! * values[q]!;
        if (dot >= t) {
          outA.push(yr < x ? yr : x);
          outB.push(yr < x ? x : yr);
          outS.push(dot);
        }
      }
      for (let q = indptr[x]!; q < indptr[x + 1]!; q++) dense[indices[q]!] = 0;
    }

    // Index x's suffix from its first indexed dimension (before[] still holds x's prefix norms).
    for (let k = prefixLen[p]!; k < lenx; k++) {
      const r = rankOf[s + k]!;
      const at = listStart[r]! + listFill[r]!++;
      listRow[at] = p;
      listVal[at] = valueOf[s + k]!;
      listNorm[at] = before[k]!;
    }
  }

  return { ...sortPairs(outA.toArray(), outB.toArray(), outS.toArray(), n), threshold: t };
}

/**
 * Ranks columns by their count, decreasing (`descending`) or increasing,
 * ties by lower column index: returns `rank[c]`. Counting sort, O(cols + maxCount).
 */
export function rankColumns(count: Int32Array, maxCount: number, descending: boolean): Int32Array {
  const m = count.length;
  const bucket = new Int32Array(maxCount + 2);
  for (let c = 0; c < m; c++) {
    const key = descending ? maxCount - count[c]! : count[c]!;
    bucket[key + 1]!++;
  }
  for (let k = 0; k <= maxCount; k++) bucket[k + 1] += bucket[k]!;
  const rank = new Int32Array(m);
  for (let c = 0; c < m; c++) {
    const key = descending ? maxCount - count[c]! : count[c]!;
    rank[c] = bucket[key]!++;
  }
  return rank;
}

/**
 * Rewrites the rows listed in `order` (processing position p holds row
 * `order[p]`) with their non-zero entries as (rank, value), sorted by rank
 * ascending, by a two-pass bucket by rank. `count[c]` is the number of
 * non-zero entries of column c over all rows.
 */
export function permuteRows(
  matrix: Csr,
  order: Int32Array,
  rank: Int32Array,
  count: Int32Array,
): { start: Int32Array; rankOf: Int32Array; valueOf: Float32Array; maxLen: number } {
  const { cols: m, indptr, indices, values } = matrix;
  const live = order.length;
  const colStart = new Int32Array(m + 1);
  for (let c = 0; c < m; c++) colStart[rank[c]! + 1] = count[c]!;
  for (let r = 0; r < m; r++) colStart[r + 1] += colStart[r]!;
  const nnz = colStart[m]!;
  const colFill = colStart.slice(0, m);
  const colRow = new Int32Array(nnz);
  const colVal = new Float32Array(nnz);
  const start = new Int32Array(live + 1);
  let maxLen = 0;
  for (let p = 0; p < live; p++) {
    const row = order[p]!;
    let len = 0;
    for (let e = indptr[row]!; e < indptr[row + 1]!; e++) {
      const v = values[e]!;
      if (v === 0) continue;
      const at = colFill[rank[indices[e]!]!]!++;
      colRow[at] = p;
      colVal[at] = v;
      len++;
    }
    start[p + 1] = start[p]! + len;
    if (len > maxLen) maxLen = len;
  }
  const fill = start.slice(0, live);
  const rankOf = new Int32Array(nnz);
  const valueOf = new Float32Array(nnz);
  for (let r = 0; r < m; r++) {
    for (let k = colStart[r]!; k < colStart[r + 1]!; k++) {
      const at = fill[colRow[k]!]!++;
      rankOf[at] = r;
      valueOf[at] = colVal[k]!;
    }
  }
  return { start, rankOf, valueOf, maxLen };
}

/**
 * Sorts pairs by (a, b) with two stable counting passes (by b, then by a),
 * O(pairs + n).
 */
export function sortPairs(
  a: Int32Array,
  b: Int32Array,
  s: Float32Array,
  n: number,
): { a: Int32Array; b: Int32Array; similarity: Float32Array } {
  const len = a.length;
  const byB = countingOrder(b, n, null);
  const byAB = countingOrder(a, n, byB);
  const outA = new Int32Array(len);
  const outB = new Int32Array(len);
  const outS = new Float32Array(len);
  for (let k = 0; k < len; k++) {
    const i = byAB[k]!;
    outA[k] = a[i]!;
    outB[k] = b[i]!;
    outS[k] = s[i]!;
  }
  return { a: outA, b: outB, similarity: outS };
}

/** Stable counting sort of positions (`within`, or 0..len-1) by `key`. */
function countingOrder(key: Int32Array, n: number, within: Int32Array | null): Int32Array {
  const len = key.length;
  const count = new Int32Array(n + 1);
  for (let k = 0; k < len; k++) count[key[k]! + 1]!++;
  for (let v = 0; v < n; v++) count[v + 1] += count[v]!;
  const out = new Int32Array(len);
  for (let k = 0; k < len; k++) {
    const i = within === null ? k : within[k]!;
    out[count[key[i]!]!++] = i;
  }
  return out;
}
