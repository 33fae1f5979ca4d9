/**
 * The front half of fitting: terms streaming past are interned into a `Map`
 * (provisional ids in first-seen order), and each document is kept as its
 * distinct provisional ids with their counts, so what is held grows with the
 * non-zeros of the matrix, not with the raw text.
 *
 * Documents are collected into segments: a segment is a run of consecutive
 * documents, three typed arrays and no per-document object. Fitting on one
 * thread makes one segment; the parallel fit makes one per chunk of
 * documents, possibly on another thread with its own collector, and maps the
 * other collector's ids onto its own before fitting ({@link fitCollected} in
 * `tfidf.ts` takes the segments in document order).
 *
 * @module
 */

import { IntBuffer } from './buffers.js';

/**
 * Consecutive documents as their distinct term ids with counts, packed:
 * document `d` of the segment is `entries[offsets[d] .. offsets[d + 1])`,
 * each of its terms once, in the order the term first occurs in it. An entry
 * `id >= 0` is a term occurring once; a term occurring `count >= 2` times is
 * the pair `~id` (negative), `count`. So a segment takes at most 8 bytes per
 * non-zero and never more than 4 bytes per token: short texts (most terms
 * once) cost what a plain id list would, long ones far less.
 */
export interface TermSegment {
  /** Number of documents. */
  readonly rows: number;
  /** `rows + 1` entry offsets, from 0 to `entries.length`. */
  readonly offsets: Int32Array;
  /** Packed provisional term ids (and counts above 1), as described above. */
  readonly entries: Int32Array;
}

/**
 * Interns terms and collects documents as {@link TermSegment}s. Buffers
 * grow by doubling and are reused from one segment to the next.
 */
export class TermCollector {
  /** Interned terms; a term's provisional id is its position. */
  readonly names: string[] = [];
  private readonly index = new Map<string, number>();
  /** Per id: the last document (counted over the collector's life) it was seen in. */
  private lastDoc: Int32Array = new Int32Array(1024);
  /** Per id: its place among the current document's distinct terms. */
  private slot: Int32Array = new Int32Array(1024);
  /** The current document's distinct ids and their counts (scratch, as long as the longest document needs). */
  private docIds: Int32Array = new Int32Array(256);
  private docCounts: Int32Array = new Int32Array(256);
  private readonly entries = new IntBuffer(1 << 14);
  private readonly offsets = new IntBuffer(1024);
  private doc = 0;

  constructor() {
    this.offsets.push(0);
  }

  /** The provisional id of `term`, interning it (next id) when it is new. */
  intern(term: string): number {
    let id = this.index.get(term);
    if (id === undefined) {
      id = this.names.length;
      if (id === this.lastDoc.length) {
        this.lastDoc = grow(this.lastDoc);
        this.slot = grow(this.slot);
      }
      this.index.set(term, id);
      this.names.push(term);
      this.lastDoc[id] = -1;
    }
    return id;
  }

  /** Adds one document (its terms in text order) to the current segment. */
  add(terms: Iterable<string>): void {
    const d = this.doc++;
    let m = 0;
    for (const t of terms) {
      const id = this.intern(t);
      if (this.lastDoc[id] !== d) {
        if (m === this.docIds.length) {
          this.docIds = grow(this.docIds);
          this.docCounts = grow(this.docCounts);
        }
        this.lastDoc[id] = d;
        this.slot[id] = m;
        this.docIds[m] = id;
        this.docCounts[m++] = 1;
      } else {
        this.docCounts[this.slot[id]!]!++;
      }
    }
    const entries = this.entries;
    entries.reserve(2 * m);
    const out = entries.data;
    let at = entries.length;
    for (let k = 0; k < m; k++) {
      const c = this.docCounts[k]!;
      if (c === 1) out[at++] = this.docIds[k]!;
      else {
        out[at++] = ~this.docIds[k]!;
        out[at++] = c;
      }
    }
    entries.length = at;
    this.offsets.push(at);
  }

  /** Documents in the current segment. */
  get rows(): number {
    return this.offsets.length - 1;
  }

  /**
   * Ends the current segment and returns it; the next document starts a new
   * one. With `exact`, the arrays are exact-length copies and the buffers
   * are kept for the next segment; without, the segment views the buffers
   * themselves (no copy) and fresh buffers are started.
   */
  take(exact: boolean): TermSegment {
    const rows = this.rows;
    const seg: TermSegment = exact
      ? { rows, offsets: this.offsets.toArray(), entries: this.entries.toArray() }
      : {
          rows,
          offsets: this.offsets.data.subarray(0, rows + 1),
          entries: this.entries.data.subarray(0, this.entries.length),
        };
    if (!exact) {
      this.offsets.data = new Int32Array(1024);
      this.entries.data = new Int32Array(1 << 14);
    }
    this.offsets.length = 0;
    this.entries.length = 0;
    this.offsets.push(0);
    return seg;
  }
}

function grow(a: Int32Array): Int32Array {
  const next = new Int32Array(a.length * 2);
  next.set(a);
  return next;
}
