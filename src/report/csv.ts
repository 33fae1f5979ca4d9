/**
 * CSV output per RFC 4180 (CRLF line ends, fields quoted when needed, quotes
 * doubled), written so a spreadsheet opens it cleanly:
 *
 * - A UTF-8 byte order mark (U+FEFF) before the header ({@link withCsvBom}),
 *   by default in every CSV file sheaf writes: without it, a spreadsheet
 *   opened by double-click reads the bytes in the machine's legacy code page
 *   and shows `Â·` for `·` (common practice; the mark is how those programs
 *   tell UTF-8). CSV readers that know the mark (csv-parse with `bom: true`,
 *   Python's `utf-8-sig`) skip it; `--no-bom` leaves it out for those that do not.
 * - A guard against formula injection, on the cells sheaf composes itself
 *   only ({@link guardCell}): a cell that starts with `=`, `+`, `-`, `@`, a
 *   tab or a carriage return is run as a formula by common spreadsheets (the
 *   list OWASP's "CSV Injection" page gives), so such a cell gets a leading
 *   single quote, which spreadsheets show as text. A plain number (`-5`,
 *   `-0.25`, `+3`, `1e-3`) is not a formula: it is left alone, so numeric
 *   columns stay numeric.
 *
 * Which cells are sheaf's: the columns it puts first (`documents.csv`: id,
 * group, label, fit, duplicate_set; `assigned.csv`: id, group, label, fit,
 * status) and every column of `duplicates.csv` and `near-copy-pairs.csv`.
 * Their values are made by sheaf from file names, ids, terms and numbers, and
 * a file name such as `=cmd.txt` or a term-made label must not run in a
 * reader's spreadsheet. The columns of the user's own export, joined back
 * after them (header names included), are the user's data: they are written
 * exactly as they were read (`-5 refund` stays `-5 refund`), so the file joins
 * back to the user's rows and reads back to the same values; a cell that was
 * a formula in the user's export is one in theirs already.
 *
 * @module
 */
import type { FileContent } from './folder.js';

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const RISKY_START = /^[=+\-@\t\r]/;

/** Makes a cell safe for spreadsheets (see the module note). */
export function guardCell(value: string): string {
  if (value.length === 0 || !RISKY_START.test(value) || NUMBER.test(value)) return value;
  return `'${value}`;
}

/** Quotes a cell per RFC 4180 §2 when it holds a comma, quote, CR or LF. */
export function quoteCell(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

/**
 * One CSV record (without the line end) from raw cell values: the first
 * `guarded` cells (sheaf's own; all by default) guarded, then every cell quoted.
 */
export function csvRecord(cells: readonly string[], guarded: number = cells.length): string {
  let line = '';
  for (let i = 0; i < cells.length; i++) {
    if (i > 0) line += ',';
    line += quoteCell(i < guarded ? guardCell(cells[i]) : cells[i]);
  }
  return line;
}

/** How a CSV text is laid out. */
export interface CsvLayout {
  /**
   * How many leading columns are sheaf's own and get the formula guard; the
   * columns after them are the user's, written as they were. Default: all.
   */
  readonly guarded?: number;
  /** Records per piece in {@link csvChunks} (default 10,000). */
  readonly rowsPerChunk?: number;
}

/** A whole CSV text: header then rows, CRLF after every record. */
export function csvText(header: readonly string[], rows: Iterable<readonly string[]>, layout: CsvLayout = {}): string {
  return [...csvChunks(header, rows, layout)].join('');
}

/**
 * The same CSV text as {@link csvText}, in pieces of about `rowsPerChunk`
 * records, for files too large to hold as one string (a JavaScript string
 * holds at most ~537M characters).
 */
export function* csvChunks(header: readonly string[], rows: Iterable<readonly string[]>, layout: CsvLayout | number = {}): Generator<string> {
  const { rowsPerChunk = 10_000, guarded = Infinity } = typeof layout === 'number' ? { rowsPerChunk: layout } : layout;
  let parts: string[] = [csvRecord(header, guarded)];
  for (const row of rows) {
    parts.push(csvRecord(row, guarded));
    if (parts.length >= rowsPerChunk) {
      yield parts.join('\r\n') + '\r\n';
      parts = [];
    }
  }
  if (parts.length > 0) yield parts.join('\r\n') + '\r\n';
}

/** The UTF-8 byte order mark as a string (U+FEFF; the bytes EF BB BF). */
export const UTF8_BOM = '\uFEFF';

/** `content` with {@link UTF8_BOM} in front (a string, pieces of text, or bytes). */
export function withBom(content: FileContent): FileContent {
  if (typeof content === 'string') return UTF8_BOM + content;
  if (content instanceof Uint8Array) {
    const out = new Uint8Array(content.length + 3);
    out.set([0xef, 0xbb, 0xbf]);
    out.set(content, 3);
    return out;
  }
  const pieces = content;
  return (function* () {
    yield UTF8_BOM;
    yield* pieces;
  })();
}

/**
 * The files of an output folder with {@link UTF8_BOM} before every `.csv`
 * file (see the module note); other files unchanged. Returns a new map.
 */
export function withCsvBom(files: ReadonlyMap<string, FileContent>): Map<string, FileContent> {
  const out = new Map<string, FileContent>();
  for (const [name, content] of files) out.set(name, name.toLowerCase().endsWith('.csv') ? withBom(content) : content);
  return out;
}

/** Formats a number for CSV/JSON output with a fixed number of decimals, without a trailing "-0". */
export function fixed(value: number, digits = 4): string {
  const s = value.toFixed(digits);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}
