/**
 * CSV output per RFC 4180 (CRLF line ends, fields quoted when needed, quotes
 * doubled), with a guard against spreadsheet formula injection: a cell that
 * starts with `=`, `+`, `-`, `@`, a tab or a carriage return is prefixed with
 * a single quote, as OWASP's "CSV Injection" guidance recommends. Cells that
 * are plain numbers (for example `-0.25`) are left alone so numeric columns
 * stay numeric.
 *
 * @module
 */

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

/** One CSV record (without the line end) from raw cell values: guarded, then quoted. */
export function csvRecord(cells: readonly string[]): string {
  let line = '';
  for (let i = 0; i < cells.length; i++) {
    if (i > 0) line += ',';
    line += quoteCell(guardCell(cells[i]));
  }
  return line;
}

/** A whole CSV text: header then rows, CRLF after every record. */
export function csvText(header: readonly string[], rows: Iterable<readonly string[]>): string {
  return [...csvChunks(header, rows)].join('');
}

/**
 * The same CSV text as {@link csvText}, in pieces of about `rowsPerChunk`
 * records, for files too large to hold as one string (a JavaScript string
 * holds at most ~537M characters).
 */
export function* csvChunks(header: readonly string[], rows: Iterable<readonly string[]>, rowsPerChunk = 10_000): Generator<string> {
  let parts: string[] = [csvRecord(header)];
  for (const row of rows) {
    parts.push(csvRecord(row));
    if (parts.length >= rowsPerChunk) {
      yield parts.join('\r\n') + '\r\n';
      parts = [];
    }
  }
  if (parts.length > 0) yield parts.join('\r\n') + '\r\n';
}

/** Formats a number for CSV/JSON output with a fixed number of decimals, without a trailing "-0". */
export function fixed(value: number, digits = 4): string {
  const s = value.toFixed(digits);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}
