/**
 * CSV and TSV exports, streamed: well-formed records through our own scanner,
 * anything odd through csv-parse (see `csv-records.ts`).
 *
 * RFC 4180 (§2): records end with CRLF (LF and lone CR are accepted too, also
 * mixed); fields may be enclosed in double quotes; a quoted field may hold
 * delimiters, line breaks and quotes written twice (`""`); the first record
 * is the header (required here). Leniencies beyond the RFC: a quote inside an
 * unquoted field is kept as a character; rows with fewer fields than the
 * header read the missing ones as empty and rows with more drop the extra
 * ones (both reported with their line numbers); blank lines are ignored; a
 * UTF-8 byte order mark is dropped. A quoted field that is never closed
 * makes the whole file a skip ({@link InputSkip}) naming the line where its
 * record starts: the quote swallowed everything after it.
 *
 * @module
 */
import { show } from '../util/errors.js';
import { InputSkip } from './decode.js';
import { hasFirstLine, peekText } from './peek.js';
import { csvItems, type CsvEngine, type CsvProgress } from './csv-records.js';
import { chooseColumns, listNumbers, RowCollector, tableHeader, type DraftDoc } from './table.js';

/** The options the CSV reader uses. */
export interface CsvReadOptions {
  readonly text: readonly string[] | null;
  readonly id: string | null;
  readonly title: string | null;
  readonly delimiter: string | null;
}

/** Documents and warnings from one export. */
export interface ExportRead {
  readonly docs: DraftDoc[];
  readonly warnings: string[];
  /** The column the titles came from when it was guessed (no `title` option), else absent. */
  readonly titleColumn?: string;
  /**
   * Rows seen: records read, plus the lines that look like rows of their own
   * inside records that swallowed them (see {@link swallowedRows}). Against
   * `docs.length` it says "60 rows read as 40 documents".
   */
  readonly rowsSeen?: number;
  /** Records that swallowed lines shaped like rows (a stray or missing quote), by line range. */
  readonly merged?: readonly MergedRecord[];
}

/** A record read from several lines, many of which look like records of their own. */
export interface MergedRecord {
  /** The line the record starts on (1-based). */
  readonly firstLine: number;
  /** The line it ends on. */
  readonly lastLine: number;
  /** Lines after the first that have exactly the header's number of fields by themselves. */
  readonly rowLike: number;
}

/** Fields in one line read by itself: delimiters outside double quotes, plus one. */
function fieldsInLine(line: string, delimiter: string): number {
  let n = 1;
  let quoted = false;
  for (const ch of line) {
    if (ch === '"') quoted = !quoted;
    else if (ch === delimiter && !quoted) n++;
  }
  return n;
}

/**
 * How many lines after the first of a multi-line record (its raw text) are
 * shaped like records of their own (exactly `width` fields), or 0 when that
 * is not most of the lines between the first and the last, or fewer than 2:
 * a quoted ticket body with a few line breaks has lines of prose, not of
 * rows. The last line (its quotes not counted) is added to a flagged record.
 */
export function swallowedRows(raw: string, delimiter: string, width: number): number {
  if (width < 2) return 0;
  const lines = raw.split(/\r\n|\n|\r/).slice(1).filter((l) => l.trim() !== '');
  // The last line holds the closing quote and the record's other fields, so it is shaped like a row
  // in a sound record too: only the lines between decide; the last counts once a record is flagged.
  const middle = lines.slice(0, -1);
  let rowLike = 0;
  for (const l of middle) if (fieldsInLine(l, delimiter) === width) rowLike++;
  if (rowLike < 2 || rowLike * 2 < middle.length) return 0;
  const last = lines[lines.length - 1] as string;
  return rowLike + (last.split(delimiter).length === width ? 1 : 0);
}

const SNIFFED = [';', '\t', '|'];

/**
 * The delimiter of a CSV whose delimiter is not given: a comma when the header
 * line has one (outside double quotes), else the one of `;`, tab, `|` it has
 * most of, else a comma.
 */
export function sniffDelimiter(head: string): string {
  const nl = head.search(/[\r\n]/);
  const line = nl === -1 ? head : head.slice(0, nl);
  const counts = new Map<string, number>();
  let quoted = false;
  for (const ch of line) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted) counts.set(ch, (counts.get(ch) ?? 0) + 1);
  }
  if ((counts.get(',') ?? 0) > 0) return ',';
  let best = ',';
  let bestCount = 0;
  for (const d of SNIFFED) {
    const c = counts.get(d) ?? 0;
    if (c > bestCount) {
      best = d;
      bestCount = c;
    }
  }
  return best;
}

function delimiterName(d: string): string {
  return d === '\t' ? 'tab' : show(d);
}


/** An export's header and the columns chosen from it, as {@link csvColumns} gives them. */
export interface CsvColumns {
  /** The header's names made usable ({@link tableHeader}). */
  readonly names: readonly string[];
  /** How names were changed, one line each. */
  readonly renamed: readonly string[];
  /** Where the text columns are, in the order given. */
  readonly textIdx: readonly number[];
  /** Where the id column is (-1: none, ids are row numbers). */
  readonly idIdx: number;
  /** Where the title column is (-1: none, titles come from the text). */
  readonly titleIdx: number;
  /** The title column when it was guessed. */
  readonly titleColumn?: string;
}

/**
 * The columns of a CSV export from its header record: names made usable and
 * the text, id and title columns chosen ({@link chooseColumns}; throws its
 * `UsageError` for a named column the header lacks). Shared by
 * {@link readCsv} and the streamed rows of `assign --stream`.
 */
export function csvColumns(name: string, header: readonly string[], options: CsvReadOptions): CsvColumns {
  const { names, renamed } = tableHeader(header);
  const chosen = chooseColumns(name, { accepted: names, listed: names, top: names }, options);
  const titleColumn = chosen.titleGuessed && chosen.title !== null ? chosen.title : undefined;
  return {
    names,
    renamed,
    textIdx: chosen.text.map((c) => names.indexOf(c)),
    idIdx: chosen.id === null ? -1 : names.indexOf(chosen.id),
    titleIdx: chosen.title === null ? -1 : names.indexOf(chosen.title),
    ...(titleColumn === undefined ? {} : { titleColumn }),
  };
}

/**
 * Adds one data record (row `row`, 1-based, blank lines not counted) to
 * `collector`: id, text parts and title from the chosen columns, every column
 * but the id in `fields` (missing cells empty, cells past the header
 * dropped). The per-row step of {@link readCsv} and of `assign --stream`.
 */
export function addCsvRow(collector: RowCollector, cols: CsvColumns, row: number, record: readonly string[]): void {
  const { names, idIdx, titleIdx } = cols;
  const fields = new Map<string, string>();
  for (let c = 0; c < names.length; c++) if (c !== idIdx) fields.set(names[c] as string, record[c] ?? '');
  collector.add(
    row,
    idIdx === -1 ? undefined : record[idIdx],
    cols.textIdx.map((c) => record[c] ?? ''),
    titleIdx === -1 ? undefined : record[titleIdx],
    fields,
  );
}

/**
 * The {@link InputSkip} a record parser's error stands for (a quote never
 * closed, another CSV error; the line from `progress`), or `null` for an
 * error that is not the input's fault.
 */
export function csvReadError(err: unknown, progress: CsvProgress): InputSkip | null {
  const code = (err as { code?: unknown }).code;
  if (code === 'CSV_QUOTE_NOT_CLOSED') {
    return new InputSkip(`the record starting on line ${progress.lastEnd + 1} has a quote that is never closed`);
  }
  if (typeof code === 'string' && /^(CSV_|INVALID_)/.test(code)) {
    return new InputSkip(`cannot be read as CSV near line ${progress.lastEnd + 1}: ${(err as Error).message.split('\n')[0]}`);
  }
  return null;
}

/**
 * Reads a CSV (or, with `kind` `tsv`, a TSV) export from decoded text
 * chunks. `name` is how messages and sources name the input. The delimiter
 * is `options.delimiter`, else a tab for TSV, else a comma — or, when the
 * header has no comma, the one of `;`, tab, `|` it has most of (with a warning).
 * Throws {@link InputSkip} for a quote never closed or another parse error,
 * a `UsageError` for a named column the header lacks.
 */
export async function readCsv(chunks: AsyncIterable<string>, name: string, kind: 'csv' | 'tsv', options: CsvReadOptions): Promise<ExportRead> {
  return readCsvWith(chunks, name, kind, options, 'fast');
}

/**
 * {@link readCsv} with the record parser chosen: `fast` (the default: a
 * scanner for well-formed records, csv-parse from the first record it does not
 * read plainly; see `csv-records.ts`) or `csv-parse` throughout. Both give the
 * same result; the choice is there for tests and benchmarks.
 */
export async function readCsvWith(chunks: AsyncIterable<string>, name: string, kind: 'csv' | 'tsv', options: CsvReadOptions, engine: CsvEngine): Promise<ExportRead> {
  const warnings: string[] = [];
  const peeked = await peekText(chunks, hasFirstLine);
  let delimiter = options.delimiter ?? (kind === 'tsv' ? '\t' : null);
  if (delimiter === null) {
    delimiter = sniffDelimiter(peeked.head.replace(/^\s+/, ''));
    if (delimiter !== ',') warnings.push(`${name}: read with ${delimiterName(delimiter)} as the delimiter (the header has no commas)`);
  }
  const progress: CsvProgress = { lastEnd: 0 }; // the line on which the last record read ends

  let header: CsvColumns | null = null;
  let width = 0;
  let collector: RowCollector | null = null;
  let titleColumn: string | undefined;
  const short: number[] = [];
  const long: number[] = [];
  let row = 0;
  const merged: MergedRecord[] = [];
  let rowsSeen = 0;

  try {
    for await (const batch of csvItems(peeked.all, delimiter, progress, engine)) for (const item of batch) {
      const { record, startLine, endLine, raw, blank } = item;
      if (blank) continue;
      if (header === null) {
        header = csvColumns(name, record, options);
        width = header.names.length;
        for (const r of header.renamed) warnings.push(`${name}: ${r}`);
        titleColumn = header.titleColumn;
        collector = new RowCollector(name, header.idIdx === -1);
        continue;
      }
      row++;
      rowsSeen++;
      if (endLine > startLine + 1) {
        const rowLike = swallowedRows(raw, delimiter, width);
        if (rowLike > 0) {
          merged.push({ firstLine: startLine, lastLine: endLine, rowLike });
          rowsSeen += rowLike;
        }
      }
      if (record.length < width) short.push(startLine);
      else if (record.length > width) long.push(startLine);
      addCsvRow(collector as RowCollector, header, row, record);
    }
  } catch (err) {
    throw csvReadError(err, progress) ?? err;
  }

  if (header === null) {
    warnings.push(`${name} has no header and no rows`);
    return { docs: [], warnings };
  }
  if (row === 0) warnings.push(`${name} has a header but no rows`);
  if (short.length > 0) {
    warnings.push(
      `${name}: ${short.length} row(s) have fewer fields than the header's ${width}; the missing ones are empty (lines ${listNumbers(short)})`,
    );
  }
  if (long.length > 0) {
    warnings.push(
      `${name}: ${long.length} row(s) have more fields than the header's ${width}; the extra ones are dropped (lines ${listNumbers(long)})`,
    );
  }
  for (const m of merged) {
    warnings.push(
      `${name}: lines ${m.firstLine}–${m.lastLine} were read as one record: a quoted field runs over ${m.rowLike} lines shaped like rows of their own (a stray or missing quote?)`,
    );
  }
  if (merged.length > 0) warnings.push(`${name}: ${rowsSeen} rows read as ${row} documents`);
  const c = collector as RowCollector;
  warnings.push(...c.warnings());
  return { docs: c.docs, warnings, rowsSeen, merged, ...(titleColumn === undefined ? {} : { titleColumn }) };
}
