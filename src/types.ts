/**
 * Core data shapes shared by every stage. Plain data only: no methods that
 * touch the file system, the clock, the terminal or `process`.
 *
 * @module
 */

/** One input document, as produced by ingest and consumed by the core. */
export interface Doc {
  /** Stable identifier: an export's id column, the row number, or a file path relative to the folder given (forward slashes). */
  readonly id: string;
  /** Where it came from: file path (as given) and, for exports, `path#row`. */
  readonly source: string;
  /** Human title: a title column, document metadata, or the first non-empty line. */
  readonly title: string;
  /** The text that is analysed. */
  readonly text: string;
  /** An export's other columns, in their original order, so outputs join back to the user's rows. */
  readonly fields: ReadonlyMap<string, string>;
  /** True when `title` is the text's first line (no title column or metadata): cleaning then retakes it from the first line that survives. */
  readonly titleFromText?: boolean;
}

/**
 * Compressed sparse row matrix. Row `r` occupies `indices/values[indptr[r] .. indptr[r+1])`,
 * column indices strictly increasing within a row. Vectors produced by the
 * vectorizer are L2-normalised (or all-zero), so cosine similarity is a sparse dot product.
 */
export interface Csr {
  readonly rows: number;
  readonly cols: number;
  readonly indptr: Int32Array;
  readonly indices: Int32Array;
  readonly values: Float32Array;
}

/** Something sheaf could not use, and why (one line, no stack). */
export interface Skipped {
  readonly source: string;
  readonly reason: string;
}

/** Wall time of one stage. */
export interface StageTiming {
  readonly stage: string;
  readonly ms: number;
  /** How many documents the stage handled. */
  readonly items: number;
}
