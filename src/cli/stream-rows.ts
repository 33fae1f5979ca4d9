/**
 * Rows of one CSV, TSV or JSON Lines export read a batch at a time, for the
 * streaming `sheaf assign` and `sheaf count`: memory stays bounded by a batch
 * of rows, never by the export. Each row goes through the per-row code of
 * the whole-export readers (`src/ingest`): CSV records from `csvItems`
 * (lines holding only white space are no rows), columns from `csvColumns` /
 * `jsonColumns`, each row made a document by `addCsvRow` / `addJsonRow` and
 * `RowCollector` (ids from the id column, else the row number; titles capped;
 * texts joined from the text columns and `[]` paths; every other column in
 * `fields`). So a row gets the id, title, text and fields `sheaf group` gives
 * it, with two differences a stream cannot avoid: a repeated id is kept as
 * the row gives it (the whole-export reader makes it unique by looking at
 * every row), and JSON columns are chosen from the key paths of the first
 * {@link JSON_INDEX_ROWS} rows (the whole-export reader looks at every row).
 * A row that cannot be read stops the stream with a {@link UsageError}: the
 * output keeps one row per input row, so no row is dropped quietly.
 * EDGE (reads a stream).
 *
 * @module
 */
import { UsageError, show } from '../util/errors.js';
import { RowCollector, type DraftDoc } from '../ingest/table.js';
import { addCsvRow, csvColumns, csvReadError, sniffDelimiter, type CsvColumns } from '../ingest/csv.js';
import { csvItems, type CsvProgress } from '../ingest/csv-records.js';
import { addJsonRow, isObject, jsonColumns, nestedDeeper, PathIndex, TOO_DEEP, type JsonColumns, type JsonObject } from '../ingest/json.js';
import { hasFirstLine, peekText } from '../ingest/peek.js';

/** What a streamed export is read as. */
export type StreamKind = 'csv' | 'tsv' | 'jsonl';

/** Column options (as the `--text`, `--id`, `--title`, `--delimiter` flags give them). */
export interface StreamRowOptions {
  readonly text: readonly string[] | null;
  readonly id: string | null;
  readonly title: string | null;
  readonly delimiter: string | null;
}

/** JSON Lines rows whose key paths the columns are chosen from (held in memory until then). */
export const JSON_INDEX_ROWS = 1000;

/** Documents handed on at a time by the JSON Lines reader. */
const JSON_BATCH = 256;

/**
 * Documents of a CSV or TSV export, in batches (one per chunk of records the
 * record reader gives). The delimiter is `options.delimiter`, else a tab for
 * TSV, else {@link sniffDelimiter}'s. The header is required; blank lines and
 * lines of white space are no rows; a quote never closed is a
 * {@link UsageError} naming the line its record starts on.
 */
export async function* csvRows(chunks: AsyncIterable<string>, name: string, kind: 'csv' | 'tsv', options: StreamRowOptions): AsyncGenerator<DraftDoc[]> {
  let delimiter = options.delimiter ?? (kind === 'tsv' ? '\t' : null);
  const peeked = await peekText(chunks, hasFirstLine);
  if (delimiter === null) delimiter = sniffDelimiter(peeked.head.replace(/^\s+/, ''));
  const progress: CsvProgress = { lastEnd: 0 };
  let cols: CsvColumns | null = null;
  let row = 0;
  try {
    for await (const items of csvItems(peeked.all, delimiter, progress)) {
      // A collector per batch: its documents are handed on, its warnings (a stream shows none) dropped.
      let collector: RowCollector | null = cols === null ? null : new RowCollector(name, cols.idIdx === -1);
      for (const item of items) {
        if (item.blank) continue;
        if (cols === null) {
          cols = csvColumns(name, item.record, options);
          collector = new RowCollector(name, cols.idIdx === -1);
          continue;
        }
        addCsvRow(collector as RowCollector, cols, ++row, item.record);
      }
      if (collector !== null && collector.docs.length > 0) yield collector.docs;
    }
  } catch (err) {
    const skip = csvReadError(err, progress);
    if (skip !== null) throw new UsageError(`${name}: ${skip.reason}`);
    throw err;
  }
}

/** Lines of a text stream (LF or CRLF), without their line ends; a last line without one counts. */
export async function* textLines(chunks: AsyncIterable<string>): AsyncGenerator<string> {
  let rest = '';
  for await (const chunk of chunks) {
    rest += chunk;
    let start = 0;
    for (let nl = rest.indexOf('\n'); nl !== -1; nl = rest.indexOf('\n', start)) {
      yield rest.slice(start, nl > start && rest.charCodeAt(nl - 1) === 13 ? nl - 1 : nl);
      start = nl + 1;
    }
    rest = rest.slice(start);
  }
  if (rest !== '') yield rest.endsWith('\r') ? rest.slice(0, -1) : rest;
}

/**
 * Documents of a JSON Lines export, in batches. Blank lines and lines of
 * white space are no rows (as for the whole-export reader); columns are
 * chosen from the key paths of the first {@link JSON_INDEX_ROWS} rows. A line
 * that is not a JSON object, or nests deeper than the readers take, is a
 * {@link UsageError} naming its line.
 */
export async function* jsonlRows(chunks: AsyncIterable<string>, name: string, options: StreamRowOptions): AsyncGenerator<DraftDoc[]> {
  /** The columns once chosen, and the batch being filled. */
  let open: { readonly cols: JsonColumns; collector: RowCollector } | null = null;
  const held: JsonObject[] = [];
  let line = 0;
  let row = 0;
  const choose = (): { readonly cols: JsonColumns; collector: RowCollector } => {
    const index = new PathIndex();
    for (const o of held) index.add(o);
    const cols = jsonColumns(index, name, options);
    const collector = new RowCollector(name, cols.idKeys === null);
    for (const o of held) addJsonRow(collector, cols, o, ++row);
    held.length = 0;
    return { cols, collector };
  };
  for await (const text of textLines(chunks)) {
    line++;
    if (text.trim() === '') continue;
    let obj: unknown;
    try {
      obj = JSON.parse(text);
    } catch {
      throw new UsageError(`${name} line ${line} is not JSON`);
    }
    if (!isObject(obj)) throw new UsageError(`${name} line ${line} is not a JSON object; got ${show(Array.isArray(obj) ? 'an array' : obj)}`);
    if (nestedDeeper(obj)) throw new UsageError(`${name} line ${line} is ${TOO_DEEP}`);
    if (open === null) {
      held.push(obj);
      if (held.length < JSON_INDEX_ROWS) continue;
      open = choose();
    } else {
      addJsonRow(open.collector, open.cols, obj, ++row);
    }
    if (open.collector.docs.length >= JSON_BATCH) {
      yield open.collector.docs;
      open.collector = new RowCollector(name, open.cols.idKeys === null);
    }
  }
  if (open === null && held.length > 0) open = choose();
  if (open !== null && open.collector.docs.length > 0) yield open.collector.docs;
}
