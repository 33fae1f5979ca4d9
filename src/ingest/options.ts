/**
 * Options of the ingest stage: which columns make the text, the id and the
 * title of an export's rows, which files of a folder are read, how
 * standard input or a file with an unusual extension is read, which
 * character encoding is forced, and the size limits.
 *
 * @module
 */
import { UsageError, show } from '../util/errors.js';
import { canonicalEncoding } from './charset.js';

/** How an input is read when its extension does not say (standard input, `.log`...). */
export type IngestFormat = 'auto' | 'csv' | 'tsv' | 'jsonl' | 'json' | 'text';

/** The formats accepted by {@link IngestOptions.format}, in the order the error message lists them. */
export const INGEST_FORMATS: readonly IngestFormat[] = Object.freeze(['auto', 'csv', 'tsv', 'jsonl', 'json', 'text']);

/** Options of {@link ingest}; see {@link resolveIngestOptions} for what each value may be. */
export interface IngestOptions {
  /**
   * Export columns (JSON: dotted paths such as `ticket.body`) whose values,
   * joined with a blank line, form each row's text. `null` guesses: the first
   * of text, body, content, description, message, comment, summary, abstract
   * (in that order of preference, names matched case-insensitively).
   */
  readonly text: readonly string[] | null;
  /** Export column holding each row's id; `null` uses the row number (1-based). */
  readonly id: string | null;
  /** Export column holding each row's title; `null` uses the first non-empty line of the text. */
  readonly title: string | null;
  /** Glob patterns (fast-glob syntax), relative to each folder given, naming the files read. */
  readonly include: readonly string[];
  /** Glob patterns, relative to each folder given, naming files not read (dotfiles and node_modules never are). */
  readonly exclude: readonly string[];
  /**
   * How standard input (`-`) and files named one by one are read. `auto`:
   * by extension, and for standard input by its first character (`[` JSON
   * array, `{` JSON Lines, otherwise CSV). Any other value applies to every
   * file named one by one and to standard input (never to folder contents).
   */
  readonly format: IngestFormat;
  /** CSV field delimiter; `null`: comma for CSV (or the header's only delimiter), tab for TSV. */
  readonly delimiter: string | null;
  /**
   * A character encoding every text input is read in (any name iconv-lite
   * knows: `windows-1252`, `iso-8859-2`, `utf-16le`, `shift_jis`…), stored
   * in canonical lower case; `null` detects it per file. A byte order mark
   * still wins. E-mail parts use it only when they declare no charset;
   * PDF and Word files carry their own.
   */
  readonly encoding: string | null;
  /**
   * Longest text kept per document, in UTF-8 bytes; longer texts are cut
   * (at a character boundary) and listed in `IngestResult.truncated`.
   */
  readonly maxBytes: number;
  /**
   * Most files read in all (files named one by one and folder contents, in
   * the order given, each folder's files in id order); `null` reads every
   * file. Files past the cap are counted in `IngestResult.filesNotRead`.
   */
  readonly maxFiles: number | null;
  /**
   * Most bytes read from one stream (standard input, a named pipe) before it
   * is given up and listed in `skipped`: a stream has no size to check
   * first, and one such as `yes` never ends. Files and folders are not capped.
   */
  readonly maxStreamBytes: number;
  /** The sheet of a workbook (`.xlsx`) read, by name (exact, else case-insensitive); `null`: the first sheet. */
  readonly sheet: string | null;
}

/** Default folder pattern: the document extensions read one file per document (matched case-insensitively). */
export const DEFAULT_INCLUDE = '**/*.{txt,md,markdown,html,htm,pdf,docx,eml,mbox}';

/** Default {@link IngestOptions.maxBytes}: 5 MiB of text per document (a long book is about 1–2 MiB). */
export const DEFAULT_MAX_BYTES = 5 * 1024 * 1024;

/** Default {@link IngestOptions.maxStreamBytes}: 4 GiB, past any export that fits in memory once read. */
export const DEFAULT_MAX_STREAM_BYTES = 4 * 1024 * 1024 * 1024;

/** Defaults of {@link IngestOptions}: guess the text column, number the rows, read the usual document files. */
export const DEFAULT_INGEST_OPTIONS: IngestOptions = Object.freeze({
  text: null,
  id: null,
  title: null,
  include: Object.freeze([DEFAULT_INCLUDE]),
  exclude: Object.freeze([]),
  format: 'auto',
  delimiter: null,
  encoding: null,
  maxBytes: DEFAULT_MAX_BYTES,
  maxFiles: null,
  maxStreamBytes: DEFAULT_MAX_STREAM_BYTES,
  sheet: null,
});

function columnName(value: unknown, option: 'id' | 'title'): string | null {
  if (value === null) return null;
  if (typeof value !== 'string' || value.trim() === '') {
    throw new UsageError(`${option} must be a column name or null; got ${show(value)}`, option);
  }
  return value.trim();
}

function sheetName(value: unknown): string | null {
  if (value === null) return null;
  if (typeof value !== 'string' || value.trim() === '') {
    throw new UsageError(`sheet must be a sheet name or null (the first sheet); got ${show(value)}`, 'sheet');
  }
  return value.trim();
}

function patterns(value: unknown, option: 'include' | 'exclude'): readonly string[] {
  if (!Array.isArray(value) || value.some((p) => typeof p !== 'string' || p.trim() === '')) {
    throw new UsageError(`${option} must be a list of glob patterns (non-empty strings); got ${show(value)}`, option);
  }
  if (option === 'include' && value.length === 0) {
    throw new UsageError(`include must list at least one glob pattern; got []`, option);
  }
  const out: string[] = [];
  for (const raw of value as string[]) {
    const p = raw.trim().replace(/\\/g, '/');
    if (p.startsWith('/') || /^[A-Za-z]:\//.test(p) || p.split('/').includes('..')) {
      throw new UsageError(`${option} patterns are relative to each folder and stay inside it; got ${show(raw)}`, option);
    }
    out.push(p.startsWith('./') ? p.slice(2) : p);
  }
  return Object.freeze(out);
}

/**
 * Merges `partial` over {@link DEFAULT_INGEST_OPTIONS} (an `undefined` value
 * means "default") and validates once. Throws {@link UsageError} naming the
 * option, the bad value and what is allowed.
 *
 * - `text`: `null`, or a non-empty list of non-empty column names (trimmed).
 * - `id`, `title`: `null` or a non-empty column name (trimmed).
 * - `include`: a non-empty list of relative glob patterns; `exclude`: a list of them.
 *   Patterns may not be absolute or climb out with `..`.
 * - `format`: one of {@link INGEST_FORMATS}.
 * - `delimiter`: `null`, or one character that is not a quote or a line break;
 *   the two characters `\t` and the word `tab` mean a tab.
 * - `encoding`: `null`, or an encoding name iconv-lite knows (case and
 *   surrounding spaces ignored); ISO-8859-1/Latin-1/ASCII are read as
 *   Windows-1252 (WHATWG Encoding Standard).
 * - `maxBytes`: a whole number >= 1024.
 * - `maxFiles`: `null`, or a whole number >= 1.
 * - `maxStreamBytes`: a whole number >= 1024.
 * - `sheet`: `null`, or a non-empty sheet name (trimmed).
 */
export function resolveIngestOptions(partial: Partial<IngestOptions> = {}): IngestOptions {
  const d = DEFAULT_INGEST_OPTIONS;
  const pick = <K extends keyof IngestOptions>(k: K): unknown => (partial[k] === undefined ? d[k] : partial[k]);

  const textRaw = pick('text');
  let text: readonly string[] | null = null;
  if (textRaw !== null) {
    if (!Array.isArray(textRaw)) {
      throw new UsageError(`text must be a list of column names or null (to guess); got ${show(textRaw)}`, 'text');
    }
    if (textRaw.length === 0) {
      throw new UsageError(`text must name at least one column (or be null to guess); got []`, 'text');
    }
    if (textRaw.some((c) => typeof c !== 'string' || c.trim() === '')) {
      throw new UsageError(`text must name columns with non-empty strings; got ${show(textRaw)}`, 'text');
    }
    text = Object.freeze((textRaw as string[]).map((c) => c.trim()));
  }

  const format = pick('format');
  if (typeof format !== 'string' || !(INGEST_FORMATS as readonly string[]).includes(format)) {
    throw new UsageError(`format must be one of ${INGEST_FORMATS.join(', ')}; got ${show(format)}`, 'format');
  }

  const delimRaw = pick('delimiter');
  let delimiter: string | null = null;
  if (delimRaw !== null) {
    const v = delimRaw === '\\t' || delimRaw === 'tab' ? '\t' : delimRaw;
    if (typeof v !== 'string' || [...v].length !== 1 || v === '"' || v === '\r' || v === '\n') {
      throw new UsageError(
        `delimiter must be one character other than a quote or a line break (or "\\t" for tab); got ${show(delimRaw)}`,
        'delimiter',
      );
    }
    delimiter = v;
  }

  const encRaw = pick('encoding');
  let encoding: string | null = null;
  if (encRaw !== null) {
    encoding = typeof encRaw === 'string' ? canonicalEncoding(encRaw) : null;
    if (encoding === null) {
      throw new UsageError(
        `encoding must be a character encoding iconv-lite knows (such as utf-8, windows-1252, iso-8859-2, utf-16le) or null to detect it; got ${show(encRaw)}`,
        'encoding',
      );
    }
  }

  const maxBytes = pick('maxBytes');
  if (typeof maxBytes !== 'number' || !Number.isSafeInteger(maxBytes) || maxBytes < 1024) {
    throw new UsageError(`maxBytes must be a whole number of bytes >= 1024; got ${show(maxBytes)}`, 'maxBytes');
  }
  const maxFiles = pick('maxFiles');
  if (maxFiles !== null && (typeof maxFiles !== 'number' || !Number.isSafeInteger(maxFiles) || maxFiles < 1)) {
    throw new UsageError(`maxFiles must be a whole number >= 1, or null for no cap; got ${show(maxFiles)}`, 'maxFiles');
  }

  const maxStreamBytes = pick('maxStreamBytes');
  if (typeof maxStreamBytes !== 'number' || !Number.isSafeInteger(maxStreamBytes) || maxStreamBytes < 1024) {
    throw new UsageError(`maxStreamBytes must be a whole number of bytes >= 1024; got ${show(maxStreamBytes)}`, 'maxStreamBytes');
  }

  return Object.freeze({
    text,
    id: columnName(pick('id'), 'id'),
    title: columnName(pick('title'), 'title'),
    include: patterns(pick('include'), 'include'),
    exclude: patterns(pick('exclude'), 'exclude'),
    format: format as IngestFormat,
    delimiter,
    encoding,
    maxBytes,
    maxFiles: maxFiles as number | null,
    maxStreamBytes,
    sheet: sheetName(pick('sheet')),
  });
}
