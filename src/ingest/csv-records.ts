/**
 * The records of a CSV/TSV export, from decoded text chunks: a hand-written
 * RFC 4180 scanner for well-formed input, handing over to csv-parse at the
 * first record it does not read the plain way.
 *
 * The scanner reads what RFC 4180 (§2) describes: fields split by one
 * delimiter character; a field that starts with a double quote runs to the
 * quote that is not doubled, may hold delimiters and line breaks, and must be
 * followed by a delimiter, a line break or the end; records end with CRLF, LF
 * or a lone CR. A UTF-8 byte order mark at the start is dropped. At the first
 * record it cannot read that way — a quote inside an unquoted field, text after
 * a closing quote, a quote never closed, a record longer than
 * {@link LONGEST_SCANNED_RECORD} — it hands everything from that record's first
 * character on to csv-parse (with the options {@link readCsv} always used), so
 * leniencies and error messages stay csv-parse's, and the line numbers carry on
 * from where the scanner stopped. Records are yielded in batches (one await per
 * chunk, not per record).
 *
 * Lines are counted as the reader always counted them: CRLF, LF and a lone CR
 * each end one line, inside quoted fields too.
 *
 * @module
 */
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { parse, type Options } from 'csv-parse';

/** One record as read. */
export interface CsvItem {
  /** The fields. */
  readonly record: string[];
  /** The line on which the record starts (1-based). */
  readonly startLine: number;
  /** The line on which the record ends. */
  readonly endLine: number;
  /** The record's text as in the file (with or without its line break: only its lines are looked at). */
  readonly raw: string;
  /** An empty (or white-space only) line, not a record. */
  readonly blank: boolean;
}

/** Where reading has got to: the line on which the last record read ends (for error messages). */
export interface CsvProgress {
  lastEnd: number;
}

/** Which parser reads the records: `fast` (the scanner, csv-parse from the first odd record) or `csv-parse` throughout. */
export type CsvEngine = 'fast' | 'csv-parse';

/** A record still unfinished after this many characters is handed to csv-parse (keeps rescanning linear). */
export const LONGEST_SCANNED_RECORD = 1 << 22;

/**
 * The records of `chunks` in batches. `progress.lastEnd` is kept current;
 * csv-parse's errors (`CSV_QUOTE_NOT_CLOSED`, …) are thrown as they are.
 */
export function csvItems(chunks: AsyncIterable<string>, delimiter: string, progress: CsvProgress, engine: CsvEngine = 'fast'): AsyncIterable<CsvItem[]> {
  const simple = delimiter.length === 1 && delimiter !== '"' && delimiter !== '\r' && delimiter !== '\n';
  return engine === 'fast' && simple ? fastItems(chunks, delimiter, progress) : parserItems(chunks, delimiter, progress, true);
}

function countCrlf(values: readonly string[]): number {
  let n = 0;
  for (const v of values) {
    for (let i = v.indexOf('\r\n'); i !== -1; i = v.indexOf('\r\n', i + 2)) n++;
  }
  return n;
}

/**
 * The CSV dialect sheaf reads (RFC 4180 quoting, any line ending, ragged rows
 * and stray quotes tolerated), shared by the whole-export reader and the
 * streamed rows of `assign --stream`; each adds its delimiter and its own
 * handling of empty lines, byte order marks and raw records.
 */
export const CSV_DIALECT = Object.freeze({
  quote: '"',
  escape: '"',
  record_delimiter: ['\r\n', '\n', '\r'],
  relax_column_count: true,
  relax_quotes: true,
  max_record_size: 0,
});

/** csv-parse over `chunks`, lines counted on from `progress.lastEnd`. */
async function* parserItems(chunks: AsyncIterable<string>, delimiter: string, progress: CsvProgress, bom: boolean): AsyncGenerator<CsvItem[]> {
  const base = progress.lastEnd;
  let crlf = 0;
  const csvOptions: Options<CsvItem, unknown> = {
    ...CSV_DIALECT,
    delimiter,
    skip_empty_lines: false,
    bom,
    raw: true,
    // Runs as each record is parsed, so the line count is current when a later record fails.
    // csv-parse counts the CR and the LF of a quoted CRLF as two lines; those CRLFs are in the values.
    // With `raw`, each record arrives as { record, raw }.
    on_record: (ext: unknown, context): CsvItem => {
      const { record, raw } = ext as { record: string[]; raw: string };
      crlf += countCrlf(record);
      const startLine = progress.lastEnd + 1;
      progress.lastEnd = base + context.lines - crlf;
      return { record, startLine, endLine: progress.lastEnd, raw, blank: record.length === 1 && raw.trim() === '' };
    },
  };
  const parser = parse(csvOptions as unknown as Options);
  const feeding = pipeline(Readable.from(chunks), parser);
  feeding.catch(() => undefined); // its errors reach the loop below through the parser
  for await (const item of parser as AsyncIterable<CsvItem>) yield [item];
  await feeding;
}

/** The rest of a source after `first`. */
async function* prepend(first: string, it: AsyncIterator<string>): AsyncGenerator<string> {
  if (first.length > 0) yield first;
  for (;;) {
    const r = await it.next();
    if (r.done) return;
    yield r.value;
  }
}

async function* fastItems(chunks: AsyncIterable<string>, delimiter: string, progress: CsvProgress): AsyncGenerator<CsvItem[]> {
  const it = chunks[Symbol.asyncIterator]();
  const scanner = new RecordScanner(delimiter.charCodeAt(0), progress);
  let buf = '';
  let atStart = true;
  for (;;) {
    const next = await it.next();
    const final = next.done === true;
    if (!final) buf = buf.length > 0 ? buf + next.value : next.value;
    if (atStart && buf.length > 0) {
      if (buf.charCodeAt(0) === 0xfeff) buf = buf.slice(1);
      atStart = false;
    }
    const out: CsvItem[] = [];
    const stop = scanner.scan(buf, final, out);
    if (out.length > 0) yield out;
    const handOver = stop.odd || (!final && buf.length - stop.end > LONGEST_SCANNED_RECORD);
    if (handOver) {
      yield* parserItems(prepend(buf.slice(stop.end), it), delimiter, progress, false);
      return;
    }
    if (final) return;
    buf = stop.end === buf.length ? '' : buf.slice(stop.end);
  }
}

const QUOTE = 34;
const CR = 13;
const LF = 10;

/** Reads whole records from a buffer; see the module comment. */
class RecordScanner {
  constructor(
    private readonly delim: number,
    private readonly progress: CsvProgress,
  ) {}

  /** The next LF and CR at or after the last position asked about (the buffer's length when none): each found once per buffer. */
  private nextLf = -1;
  private nextCr = -1;

  /** Line breaks in s[from, to): CRLF, LF and lone CR count one each. */
  private lineBreaks(s: string, from: number, to: number): number {
    const n = s.length;
    let count = 0;
    if (this.nextLf < from) {
      const f = s.indexOf('\n', from);
      this.nextLf = f === -1 ? n : f;
    }
    while (this.nextLf < to) {
      count++;
      const f = s.indexOf('\n', this.nextLf + 1);
      this.nextLf = f === -1 ? n : f;
    }
    if (this.nextCr < from) {
      const f = s.indexOf('\r', from);
      this.nextCr = f === -1 ? n : f;
    }
    while (this.nextCr < to) {
      if (this.nextCr + 1 >= to || s.charCodeAt(this.nextCr + 1) !== LF) count++;
      const f = s.indexOf('\r', this.nextCr + 1);
      this.nextCr = f === -1 ? n : f;
    }
    return count;
  }

  /**
   * Reads the complete records of `s` into `out`. Returns where the unread
   * text starts and whether reading stopped at a record to hand over (`odd`).
   * Without `final`, a record that may go on in the next chunk is left unread.
   */
  scan(s: string, final: boolean, out: CsvItem[]): { end: number; odd: boolean } {
    const n = s.length;
    const delim = this.delim;
    this.nextLf = -1;
    this.nextCr = -1;
    let i = 0;
    for (;;) {
      if (i >= n) return { end: i, odd: false };
      const start = i;
      const record: string[] = [];
      let breaks = 0;
      let quotedAny = false;
      let termAt = -1; // where the record's line break starts (n at the end of the input)
      fields: for (;;) {
        if (i >= n) {
          if (!final) return { end: start, odd: false };
          record.push('');
          termAt = n;
          break;
        }
        if (s.charCodeAt(i) === QUOTE) {
          quotedAny = true;
          let value = '';
          let j = i + 1;
          let k: number;
          for (;;) {
            k = s.indexOf('"', j);
            if (k === -1) return final ? { end: start, odd: true } : { end: start, odd: false };
            if (k + 1 >= n && !final) return { end: start, odd: false };
            if (k + 1 < n && s.charCodeAt(k + 1) === QUOTE) {
              value += s.slice(j, k + 1);
              j = k + 2;
              continue;
            }
            value += s.slice(j, k);
            break;
          }
          breaks += this.lineBreaks(s, i + 1, k);
          record.push(value);
          i = k + 1;
          if (i >= n) {
            termAt = n;
            break;
          }
          const c = s.charCodeAt(i);
          if (c === delim) {
            i++;
            continue;
          }
          if (c === CR || c === LF) {
            termAt = i;
            break;
          }
          return { end: start, odd: true };
        }
        let j = i;
        for (; j < n; j++) {
          const c = s.charCodeAt(j);
          if (c === delim) {
            record.push(s.slice(i, j));
            i = j + 1;
            continue fields;
          }
          if (c === CR || c === LF) break;
          if (c === QUOTE) return { end: start, odd: true };
        }
        if (j >= n && !final) return { end: start, odd: false };
        record.push(s.slice(i, j));
        termAt = j;
        break;
      }
      // The record's line break: CRLF, LF, CR, or none at the end of the input.
      let next = termAt;
      if (termAt < n) {
        if (s.charCodeAt(termAt) === CR) {
          if (termAt + 1 >= n && !final) return { end: start, odd: false };
          next = termAt + 1 < n && s.charCodeAt(termAt + 1) === LF ? termAt + 2 : termAt + 1;
        } else next = termAt + 1;
      }
      const raw = s.slice(start, next);
      const startLine = this.progress.lastEnd + 1;
      const endLine = startLine + breaks;
      this.progress.lastEnd = endLine;
      out.push({ record, startLine, endLine, raw, blank: record.length === 1 && !quotedAny && raw.trim() === '' });
      i = next;
    }
  }
}
