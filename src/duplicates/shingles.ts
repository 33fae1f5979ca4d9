/**
 * Word shingles and the resemblance and containment of shingle sets, after
 * Broder, "On the resemblance and containment of documents" (Compression and
 * Complexity of Sequences, 1997): a document is reduced to the set S(D, w) of
 * its contiguous w-word sequences ("option B" in the paper: the set, not the
 * labelled bag), and
 *
 *   r(A, B) = |S(A) ∩ S(B)| / |S(A) ∪ S(B)|,   c(A, B) = |S(A) ∩ S(B)| / |S(A)|.
 *
 * Unlike TF-IDF cosine, these see word order. The all-pairs join below is
 * exact: prefix filtering for set similarity (a global token order by
 * increasing frequency; two sets with Jaccard >= t share a token within their
 * first |x| - ceil(t|x|) + 1 tokens) plus the size filter |y| >= t|x|, and
 * every candidate verified by intersecting the full sets.
 *
 * @module
 */
import type { Csr } from '../types.js';
import { GrowableFloat32, GrowableInt32 } from './buffers.js';
import { permuteRows, rankColumns, sortPairs, type SimilarPairs } from './cosine.js';
import { checkCsr } from '../util/csr.js';
import { checkThreshold, checkWholeNumber } from './options.js';

/**
 * The contiguous `width`-word shingles of `tokens`, in text order and with
 * repeats (the paper's "w-shingling", a bag), each as its tokens joined by one
 * space. Take a `Set` of the result for S(D, w). Our rule for short texts
 * (not the paper's, which gives them no shingles): a text with at least one
 * but fewer than `width` tokens yields one shingle of all its tokens, so short
 * texts can still match; no tokens yield none. `width` is a whole number from
 * 1 to 100. Tokens containing spaces make the printed shingles ambiguous;
 * {@link shingleMatrix} does not depend on this text form.
 */
export function wordShingles(tokens: readonly string[], width: number): string[] {
  checkWholeNumber(width, 'width', 1, 100);
  const len = tokens.length;
  if (len === 0) return [];
  if (len < width) return [tokens.join(' ')];
  const out: string[] = new Array<string>(len - width + 1);
  for (let i = 0; i + width <= len; i++) out[i] = tokens.slice(i, i + width).join(' ');
  return out;
}

/**
 * One row per token list: the set of its `width`-word shingles (same rule for
 * short lists as {@link wordShingles}). Shingles are interned exactly, with
 * no collisions: tokens to ids through a `Map`, then each l-word sequence to
 * an id by its pair (id of its first l - 1 words, id of its last word),
 * l = 2 .. width, in a table that compares whole keys, and each shingle to a
 * column; columns are numbered in order of first appearance. Stored values are all 1 (a binary matrix, not
 * normalised); column indices ascending, each shingle once per row.
 */
export function shingleMatrix(tokenLists: Iterable<readonly string[]>, width: number): Csr {
  checkWholeNumber(width, 'width', 1, 100);
  const tokenId = new Map<string, number>();
  // Level l interns (id of a sequence of l - 1 tokens, next token id) -> id of the l-token sequence.
  const level: PairInterner[] = [];
  for (let l = 0; l <= width; l++) level.push(new PairInterner());
  const column = new PairInterner(); // (sequence id, its length) -> column
  const indptr = new GrowableInt32();
  const indices = new GrowableInt32();
  indptr.push(0);
  let ids = new Int32Array(64);
  let seq = new Int32Array(64);
  let rowCols = new Int32Array(64);
  for (const tokens of tokenLists) {
    const len = tokens.length;
    if (ids.length < len) {
      ids = new Int32Array(len * 2);
      seq = new Int32Array(len * 2);
      rowCols = new Int32Array(len * 2);
    }
    for (let i = 0; i < len; i++) {
      const tok = tokens[i]!;
      let id = tokenId.get(tok);
      if (id === undefined) {
        id = tokenId.size;
        tokenId.set(tok, id);
      }
      ids[i] = id;
      seq[i] = id;
    }
    const w = len < width ? len : width;
    const count = len === 0 ? 0 : len - w + 1;
    // seq[i] becomes the id of tokens i .. i + l - 1, level by level.
    for (let l = 2; l <= w; l++) {
      const interner = level[l]!;
      for (let i = 0; i + l <= len; i++) seq[i] = interner.intern(seq[i]!, ids[i + l - 1]!);
    }
    for (let i = 0; i < count; i++) rowCols[i] = column.intern(seq[i]!, w);
    const sorted = rowCols.subarray(0, count).sort();
    let previous = -1;
    for (let i = 0; i < count; i++) {
      const c = sorted[i]!;
      if (c !== previous) indices.push(c);
      previous = c;
    }
    indptr.push(indices.length);
  }
  const idx = indices.toArray();
  const values = new Float32Array(idx.length).fill(1);
  const ptr = indptr.toArray();
  return { rows: ptr.length - 1, cols: column.size, indptr: ptr, indices: idx, values };
}

/**
 * Exact interning of pairs of non-negative int32s to dense ids 0, 1, … in
 * order of first sight: an open-addressing table on typed arrays (linear
 * probing, doubling at half full). The hash only picks the slot; both halves
 * of the key are compared, so distinct pairs never share an id.
 */
class PairInterner {
  private keyA = new Int32Array(1024).fill(-1);
  private keyB = new Int32Array(1024);
  private value = new Int32Array(1024);
  private mask = 1023;
  size = 0;

  intern(a: number, b: number): number {
    let slot = hashPair(a, b) & this.mask;
    for (;;) {
      const ka = this.keyA[slot]!;
      if (ka === -1) break;
      if (ka === a && this.keyB[slot] === b) return this.value[slot]!;
      slot = (slot + 1) & this.mask;
    }
    const id = this.size++;
    this.keyA[slot] = a;
    this.keyB[slot] = b;
    this.value[slot] = id;
    if (this.size * 2 > this.mask) this.grow();
    return id;
  }

  private grow(): void {
    const { keyA, keyB, value } = this;
    const capacity = keyA.length * 2;
    this.keyA = new Int32Array(capacity).fill(-1);
    this.keyB = new Int32Array(capacity);
    this.value = new Int32Array(capacity);
    this.mask = capacity - 1;
    for (let k = 0; k < keyA.length; k++) {
      const a = keyA[k]!;
      if (a === -1) continue;
      let slot = hashPair(a, keyB[k]!) & this.mask;
      while (this.keyA[slot] !== -1) slot = (slot + 1) & this.mask;
      this.keyA[slot] = a;
      this.keyB[slot] = keyB[k]!;
      this.value[slot] = value[k]!;
    }
  }
}

/** A 32-bit mix of two int32s (multiply-xorshift, constants common practice). */
function hashPair(a: number, b: number): number {
  let h = Math.imul(a, 0x9e3779b1) ^ Math.imul(b + 0x7f4a7c15, 0x85ebca77);
  h = Math.imul(h ^ (h >>> 15), 0x2c1b3c6d);
  return (h ^ (h >>> 13)) >>> 0;
}

/** Size of the intersection of two strictly increasing id lists. */
function intersectionSize(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let i = 0;
  let j = 0;
  let both = 0;
  while (i < a.length && j < b.length) {
    const x = a[i]!;
    const y = b[j]!;
    if (x === y) {
      both++;
      i++;
      j++;
    } else if (x < y) i++;
    else j++;
  }
  return both;
}

function checkSortedSet(s: ArrayLike<number>, what: string): void {
  for (let i = 1; i < s.length; i++) {
    if (!(s[i]! > s[i - 1]!)) throw new RangeError(`${what} must be strictly increasing ids; position ${i} holds ${s[i]} after ${s[i - 1]}`);
  }
}

/**
 * Broder's resemblance r(A, B) = |A ∩ B| / |A ∪ B| (the Jaccard coefficient)
 * of two sets given as strictly increasing ids (a RangeError otherwise),
 * computed in float64 as one division of two integers. Two empty sets have
 * resemblance 0 here (nothing to compare), matching the join, where empty
 * rows never pair.
 */
export function resemblance(a: ArrayLike<number>, b: ArrayLike<number>): number {
  checkSortedSet(a, 'resemblance: first set');
  checkSortedSet(b, 'resemblance: second set');
  const both = intersectionSize(a, b);
  const union = a.length + b.length - both;
  return union === 0 ? 0 : both / union;
}

/**
 * Broder's containment of A in B, c(A, B) = |A ∩ B| / |A|, of two sets given
 * as strictly increasing ids (a RangeError otherwise). 0 when A is empty.
 * Not symmetric: a passage quoted whole inside a longer text has c = 1.
 */
export function containment(a: ArrayLike<number>, b: ArrayLike<number>): number {
  checkSortedSet(a, 'containment: first set');
  checkSortedSet(b, 'containment: second set');
  return a.length === 0 ? 0 : intersectionSize(a, b) / a.length;
}

/** Relative slack on the bounds of the prefix and size filters (never on the final decision). */
const FILTER_SLACK = 1e-9;

/**
 * Every pair of rows whose sets (the columns with non-zero values in each
 * row, e.g. from {@link shingleMatrix}) have Jaccard resemblance at least
 * `threshold`, in (0, 1], and no other pair. The reported similarity is the
 * exact resemblance `|x ∩ y| / (|x| + |y| - |x ∩ y|)` (one float64 division,
 * stored as float32); the decision is that float64 value `>= threshold`.
 * Empty rows never pair.
 *
 * Method: rows in increasing set size (ties: lower row), columns ranked by
 * increasing frequency; each row indexes its first
 * `|x| - ceil(t|x|) + 1` ranked tokens and probes the same prefix against the
 * index; posting entries whose set is smaller than `t|x|` are dropped from
 * the front (sizes only grow); candidates are verified by a full merge.
 * Minimum overlap and size bounds are lowered by a relative 1e-9 so that
 * rounding of `t·|x|` cannot drop a pair.
 */
export function allPairsResemblance(shingles: Csr, threshold: number): SimilarPairs {
  const t = checkThreshold(threshold, 'threshold');
  checkCsr(shingles, 'allPairsResemblance', false);
  const { rows: n, cols: m, indptr, values } = shingles;
  const tLow = t * (1 - FILTER_SLACK);

  const freq = new Int32Array(m);
  const setSize = new Int32Array(n);
  let maxFreq = 0;
  for (let r = 0; r < n; r++) {
    for (let e = indptr[r]!; e < indptr[r + 1]!; e++) {
      if (values[e] === 0) continue;
      const c = shingles.indices[e]!;
      const f = ++freq[c]!;
      if (f > maxFreq) maxFreq = f;
      setSize[r]!++;
    }
  }
  const rank = rankColumns(freq, maxFreq, false);
  let live = 0;
  for (let r = 0; r < n; r++) if (setSize[r]! > 0) live++;
  const order = new Int32Array(live);
  for (let r = 0, k = 0; r < n; r++) if (setSize[r]! > 0) order[k++] = r;
  order.sort((x, y) => setSize[x]! - setSize[y]! || x - y);
  const { start, rankOf } = permuteRows(shingles, order, rank);

  // Prefix length per row; posting lists sized exactly.
  const prefix = new Int32Array(live);
  const listSize = new Int32Array(m);
  for (let p = 0; p < live; p++) {
    const len = start[p + 1]! - start[p]!;
    const minOverlap = Math.max(1, Math.ceil(tLow * len));
    const pl = len - minOverlap + 1;
    prefix[p] = pl;
    for (let k = start[p]!; k < start[p]! + pl; k++) listSize[rankOf[k]!]!++;
  }
  const listStart = new Int32Array(m + 1);
  for (let r = 0; r < m; r++) listStart[r + 1] = listStart[r]! + listSize[r]!;
  const listFill = new Int32Array(m);
  const listHead = new Int32Array(m);
  const listRow = new Int32Array(listStart[m]!);

  const seen = new Int32Array(live).fill(-1);
  const touched = new Int32Array(live);
  const outA = new GrowableInt32();
  const outB = new GrowableInt32();
  const outS = new GrowableFloat32();

  for (let p = 0; p < live; p++) {
    const s = start[p]!;
    const lenx = start[p + 1]! - s;
    const minSize = tLow * lenx;
    let nt = 0;
    for (let k = s; k < s + prefix[p]!; k++) {
      const r = rankOf[k]!;
      const base = listStart[r]!;
      let h = base + listHead[r]!;
      const end = base + listFill[r]!;
      while (h < end && start[listRow[h]! + 1]! - start[listRow[h]!]! < minSize) h++;
      listHead[r] = h - base;
      for (let j = h; j < end; j++) {
        const y = listRow[j]!;
        if (seen[y] !== p) {
          seen[y] = p;
          touched[nt++] = y;
        }
      }
    }
    const x = order[p]!;
    for (let k = 0; k < nt; k++) {
      const y = touched[k]!;
      const ys = start[y]!;
      const leny = start[y + 1]! - ys;
      let i = s;
      let j = ys;
      let both = 0;
      while (i < s + lenx && j < ys + leny) {
        const u = rankOf[i]!;
        const v = rankOf[j]!;
        if (u === v) {
          both++;
          i++;
          j++;
        } else if (u < v) i++;
        else j++;
      }
      const jac = both / (lenx + leny - both);
      if (jac >= t) {
        const yr = order[y]!;
        outA.push(yr < x ? yr : x);
        outB.push(yr < x ? x : yr);
        outS.push(jac);
      }
    }
    for (let k = s; k < s + prefix[p]!; k++) {
      const r = rankOf[k]!;
      listRow[listStart[r]! + listFill[r]!++] = p;
    }
  }
  return { ...sortPairs(outA.toArray(), outB.toArray(), outS.toArray(), n), threshold: t };
}
