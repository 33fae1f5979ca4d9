/**
 * Rows of one CSV, TSV or JSON Lines export read one at a time, for the
 * streaming `sheaf assign`: memory stays bounded by the longest row, never by
 * the export. Columns are chosen as the whole-export readers choose them
 * (`chooseColumns`: named, else guessed), from the CSV header or, for JSON
 * Lines, from the first row's keys. Each row becomes a document with the same
 * id (the id column, else the row number) and text (the non-blank text
 * columns joined with a blank line, line endings normalised) as the
 * whole-export readers give. EDGE (reads a stream).
 *
 * @module
 */
import { Readable } from 'node:stream';
import { parse, type Options } from 'csv-parse';
import type { Doc } from '../types.js';
import { UsageError, show } from '../util/errors.js';
import { chooseColumns, tableHeader } from '../ingest/table.js';
import { sniffDelimiter } from '../ingest/csv.js';
import { CSV_DIALECT } from '../ingest/csv-records.js';
import { firstLine, normalizeNewlines } from '../ingest/text.js';
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

const EMPTY_FIELDS: ReadonlyMap<string, string> = new Map();

/** A document from one row: `id` from the id column (blank: the row number), no fields kept. */
function rowDoc(name: string, row: number, idValue: string | undefined, parts: readonly string[], title: string | undefined): Doc {
  const v = (idValue ?? '').trim();
  const id = v === '' ? String(row) : v;
  const text = normalizeNewlines(parts.filter((p) => p.trim() !== '').join('\n\n'));
  const fromText = !(title !== undefined && title.trim() !== '');
  return {
    id,
    source: `${name}#${row}`,
    title: fromText ? firstLine(text) || id : (title as string),
    text,
    fields: EMPTY_FIELDS,
    ...(fromText ? { titleFromText: true } : {}),
  };
}



/**
 * Documents of a CSV or TSV export, one row at a time (csv-parse's streaming
 * parser, pulled as an async iterator, so a slow consumer holds the reading
 * back). The delimiter is `options.delimiter`, else a tab for TSV, else
 * {@link sniffDelimiter}'s. The header is required; blank lines are no rows;
 * a quote never closed is a {@link UsageError}.
 */
export async function* csvRows(chunks: AsyncIterable<string>, name: string, kind: 'csv' | 'tsv', options: StreamRowOptions): AsyncGenerator<Doc> {
  let delimiter = options.delimiter ?? (kind === 'tsv' ? '\t' : null);
  if (delimiter === null) {
    const peeked = await peekText(chunks, hasFirstLine);
    chunks = peeked.all;
    delimiter = sniffDelimiter(peeked.head.replace(/^\s+/, ''));
  }
  const csvOptions: Options = { ...CSV_DIALECT, delimiter, skip_empty_lines: true, bom: true };
  const parser = Readable.from(chunks).pipe(parse(csvOptions));
  let textIdx: number[] | null = null;
  let idIdx = -1;
  let titleIdx = -1;
  let row = 0;
  try {
    for await (const record of parser as AsyncIterable<string[]>) {
      if (textIdx === null) {
        const names = tableHeader(record).names;
        const chosen = chooseColumns(name, { accepted: names, listed: names, top: names }, options);
        textIdx = chosen.text.map((c) => names.indexOf(c));
        idIdx = chosen.id === null ? -1 : names.indexOf(chosen.id);
        titleIdx = chosen.title === null ? -1 : names.indexOf(chosen.title);
        continue;
      }
      row++;
      yield rowDoc(
        name,
        row,
        idIdx === -1 ? undefined : record[idIdx],
        textIdx.map((c) => record[c] ?? ''),
        titleIdx === -1 ? undefined : record[titleIdx],
      );
    }
  } catch (err) {
    const code = (err as { code?: unknown }).code;
    if (typeof code === 'string' && /^(CSV_|INVALID_)/.test(code)) {
      throw new UsageError(`${name} cannot be read as CSV after row ${row}: ${(err as Error).message.split('\n')[0]}`);
    }
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

type JsonObject = Record<string, unknown>;

function isObject(v: unknown): v is JsonObject {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** Every dotted key path of an object (own keys, first level first). */
function keyPaths(obj: JsonObject, prefix = '', out: string[] = [], depth = 0): string[] {
  for (const k of Object.keys(obj)) {
    const p = prefix === '' ? k : `${prefix}.${k}`;
    out.push(p);
    const v = obj[k];
    if (isObject(v) && depth < 7) keyPaths(v, p, out, depth + 1);
  }
  return out;
}

/** The value at a dotted path: the key itself when the object has it, else nested keys, own properties only. */
function lookupPath(obj: JsonObject, p: string): unknown {
  if (Object.prototype.hasOwnProperty.call(obj, p)) return obj[p];
  const dot = p.indexOf('.');
  for (let i = dot; i !== -1; i = p.indexOf('.', i + 1)) {
    const head = p.slice(0, i);
    if (Object.prototype.hasOwnProperty.call(obj, head) && isObject(obj[head])) {
      const v = lookupPath(obj[head] as JsonObject, p.slice(i + 1));
      if (v !== undefined) return v;
    }
  }
  return undefined;
}

/** A JSON value as a cell: strings as they are, null/missing as `''`, anything else as JSON. */
function cell(v: unknown): string {
  if (v === undefined || v === null) return '';
  if (typeof v === 'string') return v;
  return JSON.stringify(v) ?? '';
}

/**
 * Documents of a JSON Lines export, one line at a time. Columns are chosen
 * from the first row's key paths. Blank lines are no rows; a line that is not
 * a JSON object is a {@link UsageError} naming its line (the output keeps one
 * row per input row, so no row is dropped quietly).
 */
export async function* jsonlRows(chunks: AsyncIterable<string>, name: string, options: StreamRowOptions): AsyncGenerator<Doc> {
  let chosen: { text: readonly string[]; id: string | null; title: string | null } | null = null;
  let line = 0;
  let row = 0;
  for await (const raw of textLines(chunks)) {
    line++;
    const text = line === 1 ? raw.replace(/^\uFEFF/, '') : raw;
    if (text.trim() === '') continue;
    let obj: unknown;
    try {
      obj = JSON.parse(text);
    } catch {
      throw new UsageError(`${name} line ${line} is not JSON`);
    }
    if (!isObject(obj)) throw new UsageError(`${name} line ${line} is not a JSON object; got ${show(Array.isArray(obj) ? 'an array' : obj)}`);
    row++;
    if (chosen === null) {
      const paths = keyPaths(obj);
      chosen = chooseColumns(name, { accepted: paths, listed: paths, top: Object.keys(obj) }, options);
    }
    const o = obj;
    yield rowDoc(
      name,
      row,
      chosen.id === null ? undefined : cell(lookupPath(o, chosen.id)),
      chosen.text.map((c) => cell(lookupPath(o, c))),
      chosen.title === null ? undefined : cell(lookupPath(o, chosen.title)),
    );
  }
}
