/**
 * Exact all-pairs cosine similarity join over sparse non-negative rows.
 *
 * Prefix filtering in the manner of Bayardo, Ma & Srikant, "Scaling up all
 * pairs similarity search" (WWW 2007), with the prefix L2-norm and positional
 * bounds of Anastasiu & Karypis, "L2AP: Fast cosine similarity search with
 * prefix L-2 norm bounds" (ICDE 2014), and the idea of AdaptJoin (Wang, Li &
 * Feng, "Can we beat the prefix filtering? An adaptive framework for
 * similarity join and search", SIGMOD 2012) of asking for two shared entries
 * in a slightly longer prefix rather than one in the shortest (all three from
 * memory; the two-shared bound below is derived here for cosine). In detail:
 *
 * - Dimension order: decreasing document frequency (ties: lower column
 *   first). A row's *tail* is its entries of highest rank (its rarest
 *   dimensions); `y < s` is the rest.
 * - Two-shared tails. A row's tail is the shortest one with
 *   `maxNorm · sqrt(‖y < s‖₂² + max(tail)²) < t` (maxNorm: the largest row
 *   norm), found by taking entries by decreasing rank (only the tail is ever
 *   ordered). If two rows x, y with such tails shared at most one dimension d
 *   lying in both tails, say y's tail starts at the higher rank s, then
 *   `x · y <= x[d] y[d] + ‖x < s‖₂ ‖y < s‖₂ <= ‖x‖₂ · sqrt(y[d]² + ‖y < s‖₂²) < t`
 *   (Cauchy–Schwarz twice). So a pair reaching t shares at least two tail
 *   dimensions, and random pairs that share one rare word are never looked at.
 * - These pairs are found per rank d: the rows whose tail holds d are read
 *   in turn, and each is put on a chain for every tail rank r below d; a row
 *   meeting an earlier one on a chain shares d and r with it. A pair is taken
 *   only where d is its rarest shared tail rank and r the next rarest, hence
 *   once. There, first the positional bound
 *   `x · y <= x[d] y[d] + x[r] y[r] + ‖x < r‖₂ ‖y < r‖₂` (from values and
 *   norms carried by the chain entries), then a walk of both tails that
 *   checks (d, r) is the pair's place and bounds
 *   `x · y <= (shared part at ranks >= f) + ‖x < f‖₂ ‖y < f‖₂` (f: the higher
 *   of the two tail starts), then the exact dot product.
 * - One-shared rows: a row whose largest value alone could reach t has no
 *   such tail (nor, by choice, a row whose tail would exceed
 *   {@link MAX_PAIR_TAIL} entries). It keeps the All-Pairs tails: indexed from
 *   the first dimension at which both `Σ min(maxweight_i, maxweight(y)) · y[i]`
 *   and `maxNorm · ‖y ≤ i‖₂` reach t (these rows processed by decreasing
 *   maxweight), probed from the first at which both `Σ maxweight_i · x[i]` and
 *   `maxNorm · ‖x ≤ i‖₂` do. The same two-case argument shows that a pair with
 *   at least one such row, if it reaches t, shares a dimension lying in both
 *   rows' tails. These pairs are found by probing each one-shared row's tail
 *   against an inverted index of the one-shared rows before it and against one
 *   of all two-shared tails, with L2AP's positional bound at the first
 *   meeting (`x · y <= x[d] y[d] + ‖x < d‖₂ ‖y < d‖₂`, no rarer dimension
 *   being shared) and Bayardo's size filter (`x · y <= maxweight(x) · ‖y‖₁`,
 *   pruning posting lists from the front).
 *
 * Every bound is a true upper bound for non-negative rows whatever their norm
 * (unit length is needed only for the dot product to be the cosine), and the
 * pruning tests use the threshold lowered by 1e-7 to absorb float64 rounding
 * in the bounds, so no pair whose exact dot product reaches the threshold is
 * lost. The decision itself is `rowDot(x, y) >= t`, computed as described at
 * {@link rowDot}: a brute-force reference using the same arithmetic decides
 * ties at the threshold identically.
 *
 * Memory: O(nnz + rows + cols) working arrays — the tails, their inverted
 * index, and for each tail entry a copy of the tail ranks below it (at most
 * (MAX_PAIR_TAIL - 1) / 2 per entry on average, about 3 on text) — plus the
 * pairs found (growable buffers that double); never an n × n matrix, and no
 * list of candidates.
 *
 * @module
 */
import type { Csr } from '../types.js';
import { GrowableFloat32, GrowableInt32 } from './buffers.js';
import { checkCsr, rowPairDotArrays as exactDot } from '../util/csr.js';
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
 * Longest two-shared tail kept; a row whose tail would be longer is treated
 * as a one-shared row (its tail pairs cost up to MAX_PAIR_TAIL² / 2 steps). A
 * speed setting only: the result is the same either way.
 */
export const MAX_PAIR_TAIL = 64;

/** Highest ranks of a row kept on the first pass when looking for its tail. */
const TOP_FIRST = 12;

/** Work counters of one join, for tests and benchmarks (not part of the result). */
export interface JoinCounts {
  /** Rows with a two-shared tail. */
  twoSharedRows: number;
  /** Rows of the one-shared kind. */
  oneSharedRows: number;
  /** Steps of the two-shared phase: (row, tail dimension, lower tail dimension) triples visited. */
  tailSteps: number;
  /** Posting entries read by one-shared rows. */
  postingsScanned: number;
  /** Pairs whose exact dot product was computed. */
  verified: number;
}

/**
 * Every pair of rows whose dot product (the cosine, for L2-normalised rows) is
 * at least `threshold`, and no other pair. Rows must be non-negative (TF-IDF
 * rows are); all-zero rows never pair. `threshold` must be in (0, 1] (a
 * {@link UsageError} otherwise); a malformed matrix or a negative value is a
 * RangeError. When `counts` is given, the work done is added to it.
 *
 * Note on t = 1: a float32 row normalised to unit length can have a
 * self-product just below 1, so two identical rows may fall short of t = 1;
 * use {@link exactCopies} for identical texts.
 */
export function allPairsCosine(matrix: Csr, threshold: number, counts?: JoinCounts): SimilarPairs {
  const t = checkThreshold(threshold, 'threshold');
  checkCsr(matrix, 'allPairsCosine', true);
  const tb = t - PRUNE_SLACK;
  const { rows: n, cols: m, indptr, values } = matrix;
  const indices = matrix.indices;

  // Document frequency and largest value of every column, largest value and
  // norm of every row (positive entries only).
  const df = new Int32Array(m);
  const mwCol = new Float64Array(m);
  const mwRow = new Float64Array(n);
  let maxDf = 0;
  let maxNorm2 = 0;
  let maxLen = 0;
  for (let r = 0; r < n; r++) {
    let mw = 0;
    let norm2 = 0;
    let len = 0;
    for (let e = indptr[r]!; e < indptr[r + 1]!; e++) {
      const v = values[e]!;
      if (v > 0) {
        norm2 += v * v;
        len++;
        const c = indices[e]!;
        const d = ++df[c]!;
        if (d > maxDf) maxDf = d;
        if (v > mwCol[c]!) mwCol[c] = v;
        if (v > mw) mw = v;
      }
    }
    mwRow[r] = mw;
    if (norm2 > maxNorm2) maxNorm2 = norm2;
    if (len > maxLen) maxLen = len;
  }
  const maxNorm = Math.sqrt(maxNorm2);

  // rank[c]: position of column c in decreasing-df order (counting sort, stable in c).
  const rank = rankColumns(df, maxDf, true);

  const tails = twoSharedTails(matrix, rank, maxNorm, maxLen, tb);
  const out: PairSink = { a: new GrowableInt32(), b: new GrowableInt32(), s: new GrowableFloat32() };
  const work: JoinCounts = { twoSharedRows: 0, oneSharedRows: tails.singles.length, tailSteps: 0, postingsScanned: 0, verified: 0 };
  for (let r = 0; r < n; r++) if (mwRow[r]! > 0) work.twoSharedRows++;
  work.twoSharedRows -= tails.singles.length;
  const pairIndex = twoSharedPairs(matrix, m, tails, tb, t, tails.singles.length > 0, out, work);
  if (tails.singles.length > 0) {
    const mwRank = new Float64Array(m);
    for (let c = 0; c < m; c++) mwRank[rank[c]!] = mwCol[c]!;
    oneSharedPairs(matrix, m, rank, mwRank, mwRow, maxNorm, tails, pairIndex, tb, t, out, work);
  }
  if (counts !== undefined) {
    counts.twoSharedRows += work.twoSharedRows;
    counts.oneSharedRows += work.oneSharedRows;
    counts.tailSteps += work.tailSteps;
    counts.postingsScanned += work.postingsScanned;
    counts.verified += work.verified;
  }
  return { ...sortPairs(out.a.toArray(), out.b.toArray(), out.s.toArray(), n), threshold: t };
}

/**
 * The rows with a positive weight, by decreasing weight, ties by lower row:
 * a stable two-pass radix sort on the float32 bit patterns (the weights are
 * float32 values, and for positive floats the bit patterns sort like the
 * values).
 */
function byDecreasingWeight(weight: Float64Array): Int32Array {
  const n = weight.length;
  let live = 0;
  for (let r = 0; r < n; r++) if (weight[r]! > 0) live++;
  const rowsIn = new Int32Array(live);
  const keyIn = new Uint32Array(live);
  const f32 = new Float32Array(1);
  const u32 = new Uint32Array(f32.buffer);
  for (let r = 0, k = 0; r < n; r++) {
    if (weight[r]! > 0) {
      f32[0] = weight[r]!;
      keyIn[k] = ~u32[0]! >>> 0; // larger weight, smaller key
      rowsIn[k++] = r;
    }
  }
  const rowsOut = new Int32Array(live);
  const keyOut = new Uint32Array(live);
  const count = new Int32Array(65537);
  for (let shift = 0; shift < 32; shift += 16) {
    count.fill(0);
    for (let k = 0; k < live; k++) count[((keyIn[k]! >>> shift) & 0xffff) + 1]!++;
    for (let b = 0; b < 65536; b++) count[b + 1] += count[b]!;
    for (let k = 0; k < live; k++) {
      const at = count[(keyIn[k]! >>> shift) & 0xffff]!++;
      rowsOut[at] = rowsIn[k]!;
      keyOut[at] = keyIn[k]!;
    }
    rowsIn.set(rowsOut);
    keyIn.set(keyOut);
  }
  return rowsIn;
}

/** Where found pairs go: row numbers a < b and the similarity. */
interface PairSink {
  readonly a: GrowableInt32;
  readonly b: GrowableInt32;
  readonly s: GrowableFloat32;
}

/** Two-shared tails of every row (by row number), and the rows of the one-shared kind. */
interface Tails {
  /** Where the row's tail starts in tailRank/tailValue, and its length. */
  readonly tailStart: Int32Array;
  readonly tailLen: Uint8Array;
  /** Tails, each sorted by rank ascending. */
  readonly tailRank: Int32Array;
  readonly tailValue: Float32Array;
  /** ‖row before its tail‖₂². */
  readonly prefix2: Float64Array;
  /** One-shared rows (no two-shared tail), by row number. */
  readonly singles: Int32Array;
}

/**
 * Every row's two-shared tail: its entries are taken by decreasing rank until
 * `maxNorm · sqrt(‖y < s‖₂² + max(y[s..])²) < t`, first from the row's
 * TOP_FIRST highest ranks (kept on the pass that reads the row), then, for a
 * longer tail, by selection over the whole row; only the tail is ever
 * ordered. Rows for which that needs more than {@link MAX_PAIR_TAIL} entries,
 * or cannot hold, are one-shared. All-zero rows get an empty tail.
 */
function twoSharedTails(matrix: Csr, rank: Int32Array, maxNorm: number, maxLen: number, tb: number): Tails {
  const { rows: n, indptr, indices, values } = matrix;
  const tailStart = new Int32Array(n);
  const tailLen = new Uint8Array(n);
  const prefix2 = new Float64Array(n);
  const tailRank = new GrowableInt32();
  const tailValue = new GrowableFloat32();
  const singles = new GrowableInt32();
  const sr = new Int32Array(maxLen);
  const sv = new Float32Array(maxLen);
  const topRank = new Int32Array(TOP_FIRST);
  const topValue = new Float32Array(TOP_FIRST);
  for (let r = 0; r < n; r++) {
    tailStart[r] = tailRank.length;
    // Copy the row as (rank, value) and keep its TOP_FIRST highest ranks,
    // ascending, in topRank/topValue (most entries fail the first test).
    let len = 0;
    let norm2 = 0;
    let kept = 0;
    for (let e = indptr[r]!; e < indptr[r + 1]!; e++) {
      const v = values[e]!;
      if (v === 0) continue;
      const rk = rank[indices[e]!]!;
      sr[len] = rk;
      sv[len++] = v;
      norm2 += v * v;
      if (kept < TOP_FIRST) {
        let j = kept++;
        while (j > 0 && topRank[j - 1]! > rk) {
          topRank[j] = topRank[j - 1]!;
          topValue[j] = topValue[j - 1]!;
          j--;
        }
        topRank[j] = rk;
        topValue[j] = v;
      } else if (rk > topRank[0]!) {
        let j = 1;
        while (j < TOP_FIRST && topRank[j]! < rk) {
          topRank[j - 1] = topRank[j]!;
          topValue[j - 1] = topValue[j]!;
          j++;
        }
        topRank[j - 1] = rk;
        topValue[j - 1] = v;
      }
    }
    if (len === 0) continue;
    // The tail of i entries qualifies when maxNorm · sqrt(‖rest‖₂² + max²) < t.
    let tail2 = 0;
    let big = 0;
    let i = 0;
    let found = false;
    for (;;) {
      const rest = norm2 - tail2 > 0 ? norm2 - tail2 : 0;
      if (maxNorm * Math.sqrt(rest + big * big) < tb) {
        found = true;
        break;
      }
      if (i === kept || i === MAX_PAIR_TAIL) break;
      const vk = topValue[kept - 1 - i]!;
      tail2 += vk * vk;
      if (vk > big) big = vk;
      i++;
    }
    if (found) {
      prefix2[r] = norm2 - tail2 > 0 ? norm2 - tail2 : 0;
      tailLen[r] = i;
      for (let k = kept - i; k < kept; k++) {
        tailRank.push(topRank[k]!);
        tailValue.push(topValue[k]!);
      }
      continue;
    }
    if (kept === len || i === MAX_PAIR_TAIL) {
      singles.push(r);
      continue;
    }
    // A longer tail: go on by selection over the whole row; after i steps
    // sr/sv[len - i .. len) hold the i highest ranks, ascending.
    tail2 = 0;
    big = 0;
    i = 0;
    for (;;) {
      const rest = norm2 - tail2 > 0 ? norm2 - tail2 : 0;
      if (maxNorm * Math.sqrt(rest + big * big) < tb) {
        found = true;
        break;
      }
      if (i === len || i === MAX_PAIR_TAIL) break;
      const last = len - 1 - i;
      let at = last;
      for (let k = last - 1; k >= 0; k--) if (sr[k]! > sr[at]!) at = k;
      const rk = sr[at]!;
      const vk = sv[at]!;
      sr[at] = sr[last]!;
      sv[at] = sv[last]!;
      sr[last] = rk;
      sv[last] = vk;
      tail2 += vk * vk;
      if (vk > big) big = vk;
      i++;
    }
    if (!found) {
      singles.push(r);
      continue;
    }
    prefix2[r] = norm2 - tail2 > 0 ? norm2 - tail2 : 0;
    tailLen[r] = i;
    for (let k = len - i; k < len; k++) {
      tailRank.push(sr[k]!);
      tailValue.push(sv[k]!);
    }
  }
  return {
    tailStart,
    tailLen,
    tailRank: tailRank.toArray(),
    tailValue: tailValue.toArray(),
    prefix2,
    singles: singles.toArray(),
  };
}

/** Inverted index of the two-shared tails: per rank, the rows holding it in their tail. */
interface TailIndex {
  readonly start: Int32Array;
  readonly row: Int32Array;
  /** The entry's value. */
  readonly value: Float32Array;
  /** ‖row before the entry‖₂ per entry, when asked for. */
  readonly norm: Float64Array | null;
}

/**
 * Pairs of two-shared rows: every pair sharing at least two tail dimensions
 * is taken once, at its rarest shared tail dimension d (the list read) and
 * the next rarest r (the chain), bounded and verified. Returns the tail
 * index, which the one-shared rows probe.
 */
function twoSharedPairs(
  matrix: Csr,
  m: number,
  tails: Tails,
  tb: number,
  t: number,
  withNorms: boolean,
  out: PairSink,
  work: JoinCounts,
): TailIndex {
  const { rows: n, indptr, indices, values } = matrix;
  const { tailStart, tailLen, tailRank, tailValue, prefix2 } = tails;

  // Posting lists by rank. Each entry holds the row, the entry's place k in
  // the row's tail, its value and ‖row before its tail‖₂²; the ranks and
  // values of the k tail dimensions below (the entry's partners) are copied
  // into two more arrays in the same order, so that a list is read
  // sequentially.
  const listStart = new Int32Array(m + 1);
  const partStart = new Float64Array(m + 1);
  for (let y = 0; y < n; y++) {
    const from = tailStart[y]!;
    const len = tailLen[y]!;
    for (let k = 0; k < len; k++) {
      const r = tailRank[from + k]!;
      listStart[r + 1]!++;
      partStart[r + 1] += k;
    }
  }
  let chainCap = 0; // the most partners of one list
  for (let r = 0; r < m; r++) {
    if (partStart[r + 1]! > chainCap) chainCap = partStart[r + 1]!;
    listStart[r + 1] += listStart[r]!;
    partStart[r + 1] += partStart[r]!;
  }
  const size = listStart[m]!;
  const listFill = listStart.slice(0, m);
  const partFill = partStart.slice(0, m);
  const listRow = new Int32Array(size);
  const listK = new Uint8Array(size);
  const listValue = new Float32Array(size);
  const listPre = new Float64Array(size);
  const listNorm = withNorms ? new Float64Array(size) : null;
  const partRank = new Int32Array(partStart[m]!);
  const partValue = new Float32Array(partStart[m]!);
  for (let y = 0; y < n; y++) {
    const from = tailStart[y]!;
    const len = tailLen[y]!;
    let norm2 = prefix2[y]!;
    for (let k = 0; k < len; k++) {
      const r = tailRank[from + k]!;
      const at = listFill[r]!++;
      const v = tailValue[from + k]!;
      listRow[at] = y;
      listK[at] = k;
      listValue[at] = v;
      listPre[at] = prefix2[y]!;
      let o = partFill[r]!;
      for (let i = 0; i < k; i++) {
        partRank[o] = tailRank[from + i]!;
        partValue[o++] = tailValue[from + i]!;
      }
      partFill[r] = o;
      if (listNorm !== null) {
        listNorm[at] = Math.sqrt(norm2);
        norm2 += v * v;
      }
    }
  }

  // While the list of rank d is read: chainHead[r] is the last chain entry of
  // partner rank r (rows of this list whose tail also holds r), -1 if none;
  // mark[k] === y and yValue[k] describe the tail of the row y being read
  // (filled once y passes the positional bound with some z).
  const chainHead = new Int32Array(m).fill(-1);
  const chainRow = new Int32Array(chainCap);
  const chainAtD = new Float32Array(chainCap); // the row's value at d
  const chainAtR = new Float32Array(chainCap); // its value at r
  const chainBelow = new Float64Array(chainCap); // ‖row < r‖₂
  const chainNext = new Int32Array(chainCap);
  const below = new Float64Array(MAX_PAIR_TAIL);
  const used = new Int32Array(Math.min(chainCap, m));
  const mark = new Int32Array(m).fill(-1);
  const yValue = new Float64Array(m);
  let tailSteps = 0;
  let verified = 0;
  for (let d = 0; d < m; d++) {
    const ls = listStart[d]!;
    const le = listStart[d + 1]!;
    if (le - ls < 2) continue;
    let nc = 0;
    let nu = 0;
    let o = partStart[d]!;
    for (let j = ls; j < le; j++) {
      const k = listK[j]!;
      const po = o;
      o += k;
      if (k === 0) continue; // d is the row's lowest tail rank: nothing below to share
      const y = listRow[j]!;
      const yAtD = listValue[j]!;
      let from = -1; // y's tail, read once y gets past the first bound with some z
      let end = -1;
      tailSteps += k;
      let norm2 = listPre[j]!;
      for (let i = 0; i < k; i++) {
        below[i] = Math.sqrt(norm2);
        const v = partValue[po + i]!;
        norm2 += v * v;
      }
      for (let i = k - 1; i >= 0; i--) {
        const r = partRank[po + i]!;
        const yAtR = partValue[po + i]!;
        const yBelowR = below[i]!;
        for (let c = chainHead[r]!; c >= 0; c = chainNext[c]!) {
          // Every row z on r's chain shares d and r with y. The pair is taken
          // only where d is its rarest shared tail rank and r the next rarest;
          // then everything else shared lies below r, and
          // x . y <= z[d] y[d] + z[r] y[r] + ‖z < r‖₂ ‖y < r‖₂.
          if (chainAtD[c]! * yAtD + chainAtR[c]! * yAtR + chainBelow[c]! * yBelowR < tb) continue;
          // Walk z's tail: check that (d, r) is the pair's place (no other
          // shared rank above r) and, on the way, sum the shared part at
          // ranks >= f (where the later tail starts) and z's mass below f.
          if (from < 0) {
            from = tailStart[y]!;
            end = from + tailLen[y]!;
            for (let q = from; q < end; q++) {
              const rq = tailRank[q]!;
              mark[rq] = y;
              yValue[rq] = tailValue[q]!;
            }
          }
          const z = chainRow[c]!;
          const zFrom = tailStart[z]!;
          const zEnd = zFrom + tailLen[z]!;
          const fz = tailRank[zFrom]!;
          const fy = tailRank[from]!;
          const f = fz > fy ? fz : fy;
          let shared = 0;
          let zBelow = 0;
          let first = true;
          for (let w = zEnd - 1; w >= zFrom; w--) {
            const rw = tailRank[w]!;
            const zv = tailValue[w]!;
            if (mark[rw] === y) {
              if (rw > r && rw !== d) {
                first = false;
                break;
              }
              if (rw >= f) shared += zv * yValue[rw]!;
            }
            if (rw < f) zBelow += zv * zv;
          }
          if (!first) continue;
          let yBelow = 0;
          for (let w = from; w < end && tailRank[w]! < f; w++) yBelow += tailValue[w]! * tailValue[w]!;
          // x . y <= (shared part at ranks >= f) + ‖z < f‖₂ ‖y < f‖₂.
          if (shared + Math.sqrt((prefix2[z]! + zBelow) * (prefix2[y]! + yBelow)) < tb) continue;
          verified++;
          const dot = exactDot(indptr, indices, values, z, y);
          if (dot >= t) {
            out.a.push(z < y ? z : y);
            out.b.push(z < y ? y : z);
            out.s.push(dot);
          }
        }
        if (chainHead[r]! < 0) used[nu++] = r;
        chainRow[nc] = y;
        chainAtD[nc] = yAtD;
        chainAtR[nc] = yAtR;
        chainBelow[nc] = yBelowR;
        chainNext[nc] = chainHead[r]!;
        chainHead[r] = nc++;
      }
    }
    for (let k = 0; k < nu; k++) chainHead[used[k]!] = -1;
  }
  work.tailSteps += tailSteps;
  work.verified += verified;
  return { start: listStart, row: listRow, value: listValue, norm: listNorm };
}

/**
 * Pairs with at least one one-shared row: each one-shared row x, taken by
 * decreasing maxweight, probes its tail against the one-shared rows before it
 * (an index built as they are processed) and against all two-shared tails.
 * Rows met for the first time in x's probed tail become candidates (when the
 * positional bound allows); x's lower dimensions then only add to their
 * scores, down to the lowest rank any candidate has indexed. A candidate's
 * score is then its exact product with x over the candidate's indexed part,
 * the rest lies in its unindexed prefix y', and
 * `x · y <= score + ‖x below y's first indexed rank‖₂ ‖y'‖₂` decides whether
 * the exact dot product is computed.
 */
function oneSharedPairs(
  matrix: Csr,
  m: number,
  rank: Int32Array,
  mwRank: Float64Array,
  mwRow: Float64Array,
  maxNorm: number,
  tails: Tails,
  pairIndex: TailIndex,
  tb: number,
  t: number,
  out: PairSink,
  work: JoinCounts,
): void {
  const { rows: n, indptr, indices, values } = matrix;
  const weight = new Float64Array(n);
  for (const r of tails.singles) weight[r] = mwRow[r]!;
  const order = byDecreasingWeight(weight);
  const live = order.length;
  const { start, rankOf, valueOf, maxLen } = permuteRows(matrix, order, rank);

  // Per row number: the rank of its first indexed dimension and the squared
  // norm of what comes before (two-shared rows: their tail).
  const firstRank = new Int32Array(n).fill(m);
  const unindexed2 = new Float64Array(n);
  for (let y = 0; y < n; y++) {
    if (tails.tailLen[y]! > 0) {
      firstRank[y] = tails.tailRank[tails.tailStart[y]!]!;
      unindexed2[y] = tails.prefix2[y]!;
    }
  }

  // One-shared rows. Indexed tail: from the first dimension at which both
  // Σ min(maxweight_i, maxweight(y)) · y[i] and maxNorm · ‖y ≤ i‖₂ reach t;
  // probed tail: from the first at which both Σ maxweight_i · x[i] and
  // maxNorm · ‖x ≤ i‖₂ do (never later).
  const indexFrom = new Int32Array(live);
  const probeFrom = new Int32Array(live);
  const l1 = new Float64Array(live);
  const listStart = new Int32Array(m + 1);
  for (let p = 0; p < live; p++) {
    const y = order[p]!;
    const mwy = weight[y]!;
    const s = start[p]!;
    const len = start[p + 1]! - s;
    let norm2 = 0;
    let sum = 0;
    let bIndex = 0;
    let bProbe = 0;
    let i1 = len;
    let p1 = len;
    let pre2 = 0;
    for (let k = 0; k < len; k++) {
      const v = valueOf[s + k]!;
      sum += v;
      if (i1 < len) continue;
      pre2 = norm2;
      norm2 += v * v;
      const w = mwRank[rankOf[s + k]!]!;
      bIndex += (w < mwy ? w : mwy) * v;
      bProbe += w * v;
      if (maxNorm * Math.sqrt(norm2) >= tb) {
        if (p1 === len && bProbe >= tb) p1 = k;
        if (bIndex >= tb) i1 = k;
      }
    }
    l1[p] = sum;
    indexFrom[p] = i1;
    probeFrom[p] = p1;
    if (i1 < len) {
      firstRank[y] = rankOf[s + i1]!;
      unindexed2[y] = pre2;
    }
    for (let k = i1; k < len; k++) listStart[rankOf[s + k]! + 1]!++;
  }
  for (let r = 0; r < m; r++) listStart[r + 1] += listStart[r]!;

  // Inverted index of the one-shared rows' indexed tails, filled as they are processed.
  const listFill = new Int32Array(m);
  const listHead = new Int32Array(m);
  const headL1 = new Float64Array(m);
  const listRow = new Int32Array(listStart[m]!);
  const listVal = new Float32Array(listStart[m]!);
  const listNorm = new Float64Array(listStart[m]!);

  const score = new Float64Array(n);
  const isCandidate = new Uint8Array(n);
  const touched = new Int32Array(n);
  const dense = new Float64Array(m);
  const before = new Float64Array(maxLen + 1);
  const pairNorm = pairIndex.norm!;
  let scanned = 0;
  let verified = 0;

  for (let p = 0; p < live; p++) {
    const x = order[p]!;
    const mwx = weight[x]!;
    const s = start[p]!;
    const lenx = start[p + 1]! - s;
    let norm2 = 0;
    for (let k = 0; k <= lenx; k++) {
      before[k] = Math.sqrt(norm2);
      if (k < lenx) norm2 += valueOf[s + k]! * valueOf[s + k]!;
    }

    let nt = 0;
    let lowest = m; // the lowest first indexed rank among the candidates
    for (let k = lenx - 1; k >= 0; k--) {
      const r = rankOf[s + k]!;
      const admit = k >= probeFrom[p]!;
      if (!admit && r < lowest) break;
      const xv = valueOf[s + k]!;
      const xb = before[k]!;
      const base = listStart[r]!;
      let h = base + listHead[r]!;
      const end = base + listFill[r]!;
      if (h < end && mwx * headL1[r]! < tb) {
        // Size filter: x . y <= maxweight(x) · ‖y‖₁, and later rows have a smaller maxweight.
        h++;
        while (h < end && mwx * l1[listRow[h]!]! < tb) h++;
        listHead[r] = h - base;
        headL1[r] = h < end ? l1[listRow[h]!]! : 0;
      }
      const ps = pairIndex.start[r]!;
      const pe = pairIndex.start[r + 1]!;
      scanned += end - h + pe - ps;
      if (admit) {
        // A row met for the first time is kept if the positional bound
        // allows (no rarer dimension is shared, so the rest lies below this
        // rank in both rows).
        for (let j = h; j < end; j++) {
          const y = order[listRow[j]!]!;
          const prod = xv * listVal[j]!;
          if (isCandidate[y] === 1) score[y] += prod;
          else if (prod + xb * listNorm[j]! >= tb) {
            isCandidate[y] = 1;
            score[y] = prod;
            touched[nt++] = y;
            if (firstRank[y]! < lowest) lowest = firstRank[y]!;
          }
        }
        for (let j = ps; j < pe; j++) {
          const y = pairIndex.row[j]!;
          const prod = xv * pairIndex.value[j]!;
          if (isCandidate[y] === 1) score[y] += prod;
          else if (prod + xb * pairNorm[j]! >= tb) {
            isCandidate[y] = 1;
            score[y] = prod;
            touched[nt++] = y;
            if (firstRank[y]! < lowest) lowest = firstRank[y]!;
          }
        }
      } else {
        for (let j = h; j < end; j++) {
          const y = order[listRow[j]!]!;
          if (isCandidate[y] === 1) score[y] += xv * listVal[j]!;
        }
        for (let j = ps; j < pe; j++) {
          const y = pairIndex.row[j]!;
          if (isCandidate[y] === 1) score[y] += xv * pairIndex.value[j]!;
        }
      }
    }

    let filled = false;
    for (let k = 0; k < nt; k++) {
      const y = touched[k]!;
      isCandidate[y] = 0;
      // c: how many of x's dimensions rank below y's first indexed one.
      const first = firstRank[y]!;
      let c = 0;
      let hi = lenx;
      while (c < hi) {
        const mid = (c + hi) >>> 1;
        if (rankOf[s + mid]! < first) c = mid + 1;
        else hi = mid;
      }
      if (score[y]! + before[c]! * Math.sqrt(unindexed2[y]!) < tb) continue;
      if (!filled) {
        for (let q = indptr[x]!; q < indptr[x + 1]!; q++) dense[indices[q]!] = values[q]!;
        filled = true;
      }
      // Exact dot product over the full rows (same sum as rowDot).
      verified++;
      let dot = 0;
      for (let q = indptr[y]!; q < indptr[y + 1]!; q++) dot += dense[indices[q]!]! * values[q]!;
      if (dot >= t) {
        out.a.push(y < x ? y : x);
        out.b.push(y < x ? x : y);
        out.s.push(dot);
      }
    }
    if (filled) for (let q = indptr[x]!; q < indptr[x + 1]!; q++) dense[indices[q]!] = 0;

    // Index x's tail (before[] holds x's prefix norms).
    for (let k = indexFrom[p]!; k < lenx; k++) {
      const r = rankOf[s + k]!;
      if (listHead[r] === listFill[r]) headL1[r] = l1[p]!;
      const at = listStart[r]! + listFill[r]!++;
      listRow[at] = p;
      listVal[at] = valueOf[s + k]!;
      listNorm[at] = before[k]!;
    }
  }
  work.postingsScanned += scanned;
  work.verified += verified;
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
 * ascending (ranks are distinct within a row, as columns are). Each row is
 * sorted on its own (insertion sort for short rows, a bottom-up merge sort
 * otherwise), so the work stays within the row's cache lines.
 */
export function permuteRows(
  matrix: Csr,
  order: Int32Array,
  rank: Int32Array,
): { start: Int32Array; rankOf: Int32Array; valueOf: Float32Array; maxLen: number } {
  const { rows: n, indptr, indices, values } = matrix;
  const live = order.length;
  // The source rows are read in their own order (sequentially), each written to its position.
  const posOf = new Int32Array(n).fill(-1);
  for (let p = 0; p < live; p++) posOf[order[p]!] = p;
  const start = new Int32Array(live + 1);
  let maxLen = 0;
  for (let r = 0; r < n; r++) {
    const p = posOf[r]!;
    if (p < 0) continue;
    let len = 0;
    for (let e = indptr[r]!; e < indptr[r + 1]!; e++) if (values[e] !== 0) len++;
    start[p + 1] = len;
    if (len > maxLen) maxLen = len;
  }
  for (let p = 0; p < live; p++) start[p + 1] += start[p]!;
  const nnz = start[live]!;
  const rankOf = new Int32Array(nnz);
  const valueOf = new Float32Array(nnz);
  const scratchRank = new Int32Array(maxLen);
  const scratchValue = new Float32Array(maxLen);
  for (let r = 0; r < n; r++) {
    const p = posOf[r]!;
    if (p < 0) continue;
    let at = start[p]!;
    for (let e = indptr[r]!; e < indptr[r + 1]!; e++) {
      const v = values[e]!;
      if (v === 0) continue;
      rankOf[at] = rank[indices[e]!]!;
      valueOf[at++] = v;
    }
    sortByRank(rankOf, valueOf, start[p]!, at, scratchRank, scratchValue);
  }
  return { start, rankOf, valueOf, maxLen };
}

/** Runs this long or shorter are sorted by insertion. */
const INSERTION_RUN = 32;

/** Sorts `rankOf/valueOf[from..to)` by rank (distinct keys), using the scratch arrays (length >= to - from). */
function sortByRank(rankOf: Int32Array, valueOf: Float32Array, from: number, to: number, scratchRank: Int32Array, scratchValue: Float32Array): void {
  for (let lo = from; lo < to; lo += INSERTION_RUN) {
    const hi = lo + INSERTION_RUN < to ? lo + INSERTION_RUN : to;
    for (let i = lo + 1; i < hi; i++) {
      const r = rankOf[i]!;
      const v = valueOf[i]!;
      let j = i - 1;
      while (j >= lo && rankOf[j]! > r) {
        rankOf[j + 1] = rankOf[j]!;
        valueOf[j + 1] = valueOf[j]!;
        j--;
      }
      rankOf[j + 1] = r;
      valueOf[j + 1] = v;
    }
  }
  // Bottom-up merges of the sorted runs, through the scratch arrays and back.
  for (let width = INSERTION_RUN; width < to - from; width *= 2) {
    for (let lo = from; lo < to; lo += 2 * width) {
      const mid = lo + width < to ? lo + width : to;
      const hi = lo + 2 * width < to ? lo + 2 * width : to;
      let i = lo;
      let j = mid;
      let k = 0;
      while (i < mid && j < hi) {
        if (rankOf[i]! < rankOf[j]!) {
          scratchRank[k] = rankOf[i]!;
          scratchValue[k++] = valueOf[i++]!;
        } else {
          scratchRank[k] = rankOf[j]!;
          scratchValue[k++] = valueOf[j++]!;
        }
      }
      while (i < mid) {
        scratchRank[k] = rankOf[i]!;
        scratchValue[k++] = valueOf[i++]!;
      }
      while (j < hi) {
        scratchRank[k] = rankOf[j]!;
        scratchValue[k++] = valueOf[j++]!;
      }
      for (let q = 0; q < k; q++) {
        rankOf[lo + q] = scratchRank[q]!;
        valueOf[lo + q] = scratchValue[q]!;
      }
    }
  }
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
