/**
 * The ingest edge: files, folders, exports and standard input to
 * {@link Doc}s. It reads the file system but never prints: what it could not
 * use is returned in `skipped`, what it changed or guessed in `warnings`.
 * Inputs are never modified. The same inputs give the same result, whatever
 * order the file system lists them in.
 *
 * - A folder: every file matching `include` and not `exclude`, one document
 *   per file, id = path relative to the folder (forward slashes), documents
 *   sorted by id. Each file goes to a reader chosen by its content and its
 *   extension (see `documents.ts`): PDF, Word (`.docx`), e-mail (`.eml`),
 *   HTML (reduced to text), Markdown (minus front matter and link targets),
 *   else plain text.
 * - A file: `.csv`, `.tsv`/`.tab`, `.jsonl`/`.ndjson`, `.json` are exports
 *   (one document per row; a `.json` CSL item list one per reference),
 *   `.xlsx` workbooks too (`xlsx.ts`: the first sheet or `sheet`), `.bib`
 *   and `.ris` reference lists (`references.ts`); `.mbox` mailboxes give
 *   one e-mail document per message (`mbox.ts`, ids `file.mbox#N`); `.txt`, `.md`, `.html`, `.pdf`, `.docx`,
 *   `.eml`… one document, id = the path as given (forward slashes). Another
 *   extension: a PDF, Word file, e-mail or HTML page is recognised by its
 *   content; a file starting with `[` is read as a JSON array, with `{` as
 *   JSON Lines; anything else as one text document (with a warning).
 * - `-`: an export on standard input: `[` JSON array, `{` JSON Lines,
 *   otherwise CSV (or as `format` says; `text` makes one document, id `stdin`).
 *
 * Ids are made unique across all inputs in the order given (`id~2`,
 * `id~3`…, never a name another input already uses), with a warning.
 *
 * Text encodings are detected per file (see `charset.ts`) or forced with
 * the `encoding` option; what was not clean UTF-8 is listed in
 * `decoding`. A text longer than `maxBytes` is cut and listed in
 * `truncated`. Broken files (a damaged or encrypted PDF, a `.docx` that is
 * not a zip, a CSV with an unclosed quote, a JSON file that does not parse…)
 * are skipped with a one-line reason, and the run goes on.
 *
 * @module
 */
import { createReadStream } from 'node:fs';
import { readFile, stat } from 'node:fs/promises';
import { byteMeter, metered, type ByteMeter, type ReadProgress } from './progress.js';
import { createHash } from 'node:crypto';
import path from 'node:path';
import type { Doc, Skipped } from '../types.js';
import { UsageError, show } from '../util/errors.js';
import { decodeBuffer, decodeStream, InputSkip, type DecodeStats } from './decode.js';
import { readCsv, type MergedRecord } from './csv.js';
import { readJsonArray, readJsonLines } from './json.js';
import { htmlToText } from './html.js';
import { readMarkdown, readPlainText } from './text.js';
import { listFolder, NOT_A_FORMAT_REASON, rawNamePath, type ReaddirFailure } from './folder.js';
import { firstSignificant, peekBytes, peekText } from './peek.js';
import { isFsError, unreadableReason } from './io-errors.js';
import { listNames, type DraftDoc } from './table.js';
import { DEFAULT_INCLUDE, resolveIngestOptions, type IngestFormat, type IngestOptions } from './options.js';
import { DOCUMENT_EXTENSIONS, noteOf, readDocumentBytes, type DecodingNote, type DocumentKind } from './documents.js';
import { looksLikePdf } from './pdf.js';
import { looksLikeZip } from './zip.js';
import { looksLikeOle } from './docx.js';
import { looksLikeXlsx, OLD_SHEET_EXTENSIONS, OLD_WORKBOOK, readXlsx, SHEET_EXTENSIONS } from './xlsx.js';
import { looksLikeMbox, splitMbox } from './mbox.js';
import { parseBibtex, parseRis, referenceRows } from './references.js';

export { DEFAULT_INCLUDE, DEFAULT_INGEST_OPTIONS, DEFAULT_MAX_BYTES, DEFAULT_MAX_STREAM_BYTES, INGEST_FORMATS, resolveIngestOptions } from './options.js';
export type { IngestFormat, IngestOptions } from './options.js';
export { DOCUMENT_EXTENSIONS, readDocumentBytes, chooseReader, type DecodingNote, type DocumentKind, type DocumentRead } from './documents.js';
export { canonicalEncoding, chooseEncoding, type EncodingBasis, type EncodingChoice } from './charset.js';
export { decodeBuffer, InputSkip, type DecodeStats } from './decode.js';
export { readMail, decodeEncodedWords, type MailText } from './mail.js';
export { readPdf, type PdfText } from './pdf.js';
export { readDocx } from './docx.js';
export { htmlToText, type HtmlText } from './html.js';
export { readMarkdown, readPlainText, capTitle, firstLine, TITLE_MAX } from './text.js';
export { TEXT_COLUMN_GUESSES } from './table.js';
export { readXlsx, SHEET_EXTENSIONS, OLD_SHEET_EXTENSIONS, type SheetReadOptions } from './xlsx.js';
export { splitMbox, looksLikeMbox, type MboxMessage } from './mbox.js';
export { parseBibtex, parseRis, cslReferences, looksLikeCslJson, REFERENCE_COLUMNS, REFERENCE_TEXT, type Reference } from './references.js';
export { readRowTable, type RowTableOptions } from './rows.js';

/** What one input was, for `run.json`: its size and SHA-256. */
export interface InputDigest {
  /** The path as given (`-` for standard input). */
  path: string;
  kind: 'folder' | 'file' | 'stdin';
  /** Bytes read (a folder: all files read). */
  bytes: number;
  /**
   * Lower-case hex SHA-256 of the bytes; for a folder, of the lines
   * `<sha256>  <id>\n` of its files read, sorted by id.
   */
  sha256: string;
  /** A folder: how many files were read (and hashed). */
  files?: number;
}

/** A document whose text was cut to `maxBytes`. */
export interface TruncatedDoc {
  /** Its id (after ids were made unique). */
  readonly id: string;
  readonly source: string;
  /** UTF-8 bytes of the full text. */
  readonly bytes: number;
  /** UTF-8 bytes kept (at most `maxBytes`, cut at a character boundary). */
  readonly keptBytes: number;
}

/** An e-mail's parts that were not read. */
export interface AttachmentNote {
  readonly source: string;
  /** File names, or `(unnamed type/subtype)`, `(attached message: subject)`. */
  readonly names: string[];
}

/** Everything ingest produced. */
export interface IngestResult {
  docs: Doc[];
  /** Inputs, files and rows not used, each with a one-line reason. */
  skipped: Skipped[];
  inputs: InputDigest[];
  /** One-line remarks for the terminal (each names its input). */
  warnings: string[];
  /**
   * Files (and streamed exports) whose text was not clean UTF-8: another
   * encoding (detected, declared, forced, or by byte order mark), or
   * replaced characters — one entry per file, in reading order.
   */
  decoding: DecodingNote[];
  /** Documents cut to `maxBytes`, in document order. */
  truncated: TruncatedDoc[];
  /** E-mails with attachments that were not read. */
  attachments: AttachmentNote[];
  /** Files not read because `maxFiles` was reached (0 without a cap). */
  filesNotRead: number;
  /**
   * One entry per document, in `docs` order: 1 when it is a row of an
   * export (CSV, TSV, JSON Lines, JSON, or such on standard input), 0 when
   * it is a document file (text, Markdown, HTML, PDF, Word, e-mail).
   */
  exportRows: Uint8Array;
  /**
   * Exports whose titles came from a title-like column that was guessed (no
   * `title` option): `subject`, `title`, `headline`, `topic` or `summary`
   * (see `TITLE_COLUMN_GUESSES`), one entry per export, in reading order.
   */
  titleColumns: { readonly source: string; readonly column: string }[];
  /**
   * Per export, in reading order: rows seen against documents made ("60
   * rows read as 40 documents"). Rows seen counts records (JSON: rows, also
   * those skipped) plus, in a CSV, lines shaped like rows that a record with
   * a stray or missing quote swallowed.
   */
  exportCounts: { readonly source: string; readonly rows: number; readonly documents: number }[];
  /** CSV records that swallowed lines shaped like rows, by line range (each also a warning). */
  mergedRecords: { readonly source: string; readonly firstLine: number; readonly lastLine: number; readonly rowLike: number }[];
  /** Lower-case hex SHA-256 of each document file's bytes as read, by the document's `source` (no entry for exports, mailboxes, stdin). */
  fileDigests: ReadonlyMap<string, string>;
}

/** Where ingest reads from. */
export interface IngestIo {
  /** Relative paths are resolved against this folder. */
  readonly cwd: string;
  /** Standard input, read when a path is `-`. */
  readonly stdin?: NodeJS.ReadableStream;
  /**
   * Opens a file (absolute path) for reading; the default reads the file
   * system. A seam for tests (unreadable files when running as root) and
   * for virtual file systems; folder listing still uses the file system.
   */
  readonly open?: (absolutePath: string) => AsyncIterable<Uint8Array>;
  /**
   * A seam for tests (unreadable folders when running as root): the error
   * listing an absolute folder fails with, or `null` to list it normally.
   */
  readonly readdirFailure?: ReaddirFailure;
  /** Reading progress in bytes (see `./progress.ts`); files are sized first, only when given. */
  readonly progress?: ReadProgress;
}

type ReadAs = 'csv' | 'tsv' | 'jsonl' | 'json' | 'document';

/** The extensions read as exports (one document per row), and how (also the kinds `assign --stream` reads). */
export const EXPORT_EXTENSIONS: ReadonlyMap<string, ReadAs> = new Map<string, ReadAs>([
  ['.csv', 'csv'],
  ['.tsv', 'tsv'],
  ['.tab', 'tsv'],
  ['.jsonl', 'jsonl'],
  ['.ndjson', 'jsonl'],
  ['.json', 'json'],
]);

/** Folders read at most this many files at once. */
const READ_CONCURRENCY = 16;

/** Bytes looked at before deciding how a file with an unknown extension is read. */
const SNIFF_HEAD = 65536;

/** Reads one document's text by its extension: HTML reduced, Markdown cleaned, anything else plain. */
function readDocument(text: string, ext: string): { text: string; title: string } {
  if (ext === '.html' || ext === '.htm' || ext === '.xhtml') return htmlToText(text);
  if (ext === '.md' || ext === '.markdown' || ext === '.mdown' || ext === '.mkd') return readMarkdown(text);
  return readPlainText(text);
}

/** The absolute paths of the plain files and folder files a plan reads (for the reading progress). */
function plannedFiles(planned: readonly Planned[]): string[] {
  return planned.flatMap((p) => (p.kind === 'file' && !p.pipe ? [p.abs] : p.kind === 'folder' ? p.listing.files.map((rel) => path.join(p.abs, rel)) : []));
}

function posixPath(p: string): string {
  const n = path.posix.normalize(p.replace(/\\/g, '/'));
  return n.startsWith('./') ? n.slice(2) : n;
}

/** A warning when NUL characters were removed from an export's text. */
function nulWarning(source: string, stats: DecodeStats | null): string[] {
  const n = stats?.nul ?? 0;
  return n > 0 ? [`${source}: ${n} NUL character(s) removed from the text (a NUL ends text in many programs)`] : [];
}

function replacedWarning(source: string, stats: { encoding: string; replaced: number }): string[] {
  if (stats.replaced === 0) return [];
  if (stats.encoding === 'utf-8') return [`${source}: ${stats.replaced} invalid UTF-8 sequence(s) replaced with U+FFFD`];
  return [`${source}: ${stats.replaced} character(s) not decodable as ${stats.encoding} replaced with U+FFFD`];
}

const NO_TEXT = 'no text: only markup or white space';
const EMPTY_FIELDS: ReadonlyMap<string, string> = new Map();

/** What reading one input gave. */
interface InputRead {
  readonly label: string;
  docs: DraftDoc[];
  readonly skipped: Skipped[];
  readonly warnings: string[];
  readonly digest: InputDigest | null;
  readonly isExport: boolean;
  readonly decoding: DecodingNote[];
  readonly attachments: AttachmentNote[];
  /** An export's guessed title column. */
  readonly titleColumn?: string;
  /** An export's rows seen (see `IngestResult.exportCounts`). */
  readonly rowsSeen?: number;
  /** A CSV's records that swallowed rows. */
  readonly merged?: readonly MergedRecord[];
  /** A workbook was read (so the `sheet` option applied). */
  readonly workbook?: boolean;
  /** Document files read: source → SHA-256 of the bytes (see `IngestResult.fileDigests`). */
  readonly fileDigests?: ReadonlyMap<string, string>;
}

type Listing = Awaited<ReturnType<typeof listFolder>>;

type Planned =
  | { readonly kind: 'stdin' }
  | { readonly kind: 'file'; readonly given: string; readonly abs: string; readonly pipe: boolean }
  | { readonly kind: 'folder'; readonly given: string; readonly abs: string; readonly listing: Listing }
  | { readonly kind: 'unreadable'; readonly given: string; readonly reason: string };

async function* streamOf(source: NodeJS.ReadableStream | AsyncIterable<Uint8Array>): AsyncGenerator<Uint8Array | string, void, undefined> {
  for await (const chunk of source as AsyncIterable<Uint8Array | string>) yield chunk;
}

/** Passes a stream through, giving it up (InputSkip) past `limit` bytes. */
async function* capStream(source: AsyncIterable<Uint8Array | string>, limit: number): AsyncGenerator<Uint8Array | string, void, undefined> {
  let n = 0;
  for await (const c of source) {
    n += typeof c === 'string' ? Buffer.byteLength(c, 'utf8') : c.byteLength;
    if (n > limit) {
      throw new InputSkip(
        `stopped after ${limit} bytes: a stream (standard input or a pipe) is read up to maxStreamBytes (${limit} bytes); save it to a file to read it whole`,
      );
    }
    yield c;
  }
}

/**
 * Throws {@link UsageError} (`not a regular file, folder or pipe: x`) for a
 * path that names a device, socket or the like (`/dev/zero` never ends).
 * Returns whether it is a pipe, to be read under `maxStreamBytes`.
 */
export async function checkInputKind(absolutePath: string, given: string): Promise<{ pipe: boolean; folder: boolean }> {
  const st = await stat(absolutePath);
  if (st.isDirectory()) return { pipe: false, folder: true };
  if (st.isFile()) return { pipe: false, folder: false };
  if (st.isFIFO()) return { pipe: true, folder: false };
  throw new UsageError(`not a regular file, folder or pipe: ${given}`);
}

async function collect(chunks: AsyncIterable<string>): Promise<string> {
  let s = '';
  for await (const c of chunks) s += c;
  return s;
}

async function collectBytes(chunks: AsyncIterable<Uint8Array | string>): Promise<Buffer> {
  const parts: Buffer[] = [];
  for await (const c of chunks) parts.push(typeof c === 'string' ? Buffer.from(c, 'utf8') : Buffer.from(c.buffer, c.byteOffset, c.byteLength));
  return Buffer.concat(parts);
}

/** What {@link readStreamInput} gives. */
interface StreamRead {
  docs: DraftDoc[];
  skipped: Skipped[];
  warnings: string[];
  isExport: boolean;
  titleColumn?: string;
  rowsSeen?: number;
  merged?: readonly MergedRecord[];
}

/**
 * Reads an export (or, for standard input with `format: text`, one
 * document) from a decoded stream. `name` names it in messages and
 * sources; `id` is the document id when it is one document.
 */
async function readStreamInput(
  chunks: AsyncIterable<string>,
  name: string,
  id: string,
  readAs: ReadAs | null,
  opts: IngestOptions,
): Promise<StreamRead> {
  let as = readAs;
  let all = chunks;
  if (as === null) {
    const peeked = await peekText(chunks, (h) => firstSignificant(h) !== '');
    all = peeked.all;
    const c = firstSignificant(peeked.head);
    as = c === '[' ? 'json' : c === '{' ? 'jsonl' : 'csv';
  }
  switch (as) {
    case 'csv':
    case 'tsv': {
      const r = await readCsv(all, name, as, opts);
      return { skipped: [], isExport: true, ...r };
    }
    case 'jsonl':
    case 'json': {
      const r = await (as === 'jsonl' ? readJsonLines : readJsonArray)(all, name, opts);
      return { isExport: true, ...r };
    }
    case 'document': {
      const { text, title } = readDocument(await collect(all), '');
      if (text === '') return { docs: [], skipped: [{ source: name, reason: NO_TEXT }], warnings: [], isExport: false };
      return { docs: [{ id, source: name, title: title || id, text, fields: EMPTY_FIELDS }], skipped: [], warnings: [], isExport: false };
    }
  }
}

function readAsFor(format: IngestFormat, ext: string): ReadAs | null {
  if (format === 'text') return 'document';
  if (format !== 'auto') return format;
  const e = EXPORT_EXTENSIONS.get(ext);
  if (e !== undefined) return e;
  if (DOCUMENT_EXTENSIONS.has(ext)) return 'document';
  return null;
}

const KIND_NAMES: Readonly<Record<DocumentKind, string>> = {
  pdf: 'a PDF',
  docx: 'a Word document',
  eml: 'an e-mail',
  html: 'HTML',
  markdown: 'Markdown',
  text: 'plain text',
};

/** The reader an extension stands for, or `null` for an extension of no document format. */
function kindOfExtension(ext: string): DocumentKind | null {
  if (ext === '.pdf') return 'pdf';
  if (ext === '.docx') return 'docx';
  if (ext === '.eml') return 'eml';
  if (ext === '.html' || ext === '.htm' || ext === '.xhtml') return 'html';
  if (ext === '.md' || ext === '.markdown' || ext === '.mdown' || ext === '.mkd') return 'markdown';
  if (ext === '.txt' || ext === '.text') return 'text';
  return null;
}

/** One document file, read from its bytes: a document or a skip, and what to note about it. */
interface OneFile {
  readonly doc: DraftDoc | null;
  readonly skip: Skipped | null;
  readonly warnings: string[];
  readonly decoding: DecodingNote | null;
  readonly attachments: AttachmentNote | null;
}

/**
 * Reads one document file's bytes (see `documents.ts`). `forText`: the
 * extension is not one sheaf knows, and plain text was the last resort.
 */
async function readOneFile(buf: Buffer, source: string, id: string, ext: string, opts: IngestOptions): Promise<OneFile> {
  try {
    const r = await readDocumentBytes(buf, ext, opts.encoding);
    const warnings: string[] = [];
    const natural = kindOfExtension(ext);
    if (natural === null && !EXPORT_EXTENSIONS.has(ext)) {
      warnings.push(
        r.kind === 'text'
          ? `${source}: extension ${show(ext || '(none)')} is not one sheaf knows; read as one text document (set format to read it as an export)`
          : `${source}: extension ${show(ext || '(none)')} is not one sheaf knows; read as ${KIND_NAMES[r.kind]} by its content`,
      );
    } else if (natural !== r.kind && !(natural === 'text' && (r.kind === 'markdown' || r.kind === 'html'))) {
      warnings.push(`${source}: read as ${KIND_NAMES[r.kind]} by its content, not as its extension ${show(ext)} suggests`);
    }
    const decoding = r.decoding ? { source, ...r.decoding } : null;
    if (decoding) warnings.push(...replacedWarning(source, decoding));
    warnings.push(...r.warnings.map((w) => `${source}: ${w}`));
    return {
      doc: { id, source, title: r.title || id, text: r.text, fields: EMPTY_FIELDS },
      skip: null,
      warnings,
      decoding,
      attachments: r.attachments.length > 0 ? { source, names: r.attachments } : null,
    };
  } catch (err) {
    if (err instanceof InputSkip) return { doc: null, skip: { source, reason: err.reason }, warnings: [], decoding: null, attachments: null };
    throw err;
  }
}

function fileRead(label: string, one: OneFile, digest: InputDigest | null): InputRead {
  return {
    label,
    docs: one.doc ? [one.doc] : [],
    skipped: one.skip ? [one.skip] : [],
    warnings: one.warnings,
    digest,
    isExport: false,
    decoding: one.decoding ? [one.decoding] : [],
    attachments: one.attachments ? [one.attachments] : [],
    ...(one.doc && digest ? { fileDigests: new Map([[one.doc.source, digest.sha256]]) } : {}),
  };
}

/** True when the first bytes look like the start of a JSON export (`[` or `{` after white space), read in their own encoding. */
function startsLikeJson(head: Buffer, opts: IngestOptions): 'json' | 'jsonl' | null {
  if (looksLikePdf(head) || looksLikeZip(head) || looksLikeOle(head)) return null;
  let text: string;
  try {
    text = decodeBuffer(head.subarray(0, 4096), { hash: false, forced: opts.encoding }).text;
  } catch {
    return null;
  }
  const c = firstSignificant(text);
  return c === '[' ? 'json' : c === '{' ? 'jsonl' : null;
}

async function readStreamedExport(
  given: string,
  bytes: AsyncIterable<Uint8Array | string>,
  readAs: Exclude<ReadAs, 'document'>,
  opts: IngestOptions,
): Promise<InputRead> {
  let stats: DecodeStats | null = null;
  const chunks = decodeStream(bytes, (s) => (stats = s), { forced: opts.encoding, nul: 'clean' });
  const r = await readStreamInput(chunks, given, posixPath(given), readAs, opts);
  const s = stats as DecodeStats | null;
  const note = s ? noteOf(s) : null;
  const decoding = note ? [{ source: given, ...note }] : [];
  return {
    label: given,
    ...r,
    warnings: [...(note ? replacedWarning(given, note) : []), ...nulWarning(given, s), ...r.warnings],
    digest: s ? { path: given, kind: 'file', bytes: s.bytes, sha256: s.sha256 } : null,
    decoding,
    attachments: [],
  };
}

/** Files read whole by a reader of their own: workbooks, mailboxes, reference lists (BibTeX, RIS). */
type WholeKind = 'sheet' | 'mbox' | 'bib' | 'ris';

/** The whole-file reader for an extension (only when `format` is `auto`), or `null`. */
function wholeReaderFor(format: IngestFormat, ext: string): WholeKind | null {
  if (format !== 'auto') return null;
  if (SHEET_EXTENSIONS.has(ext) || OLD_SHEET_EXTENSIONS.has(ext)) return 'sheet';
  if (ext === '.mbox') return 'mbox';
  if (ext === '.bib' || ext === '.bibtex') return 'bib';
  if (ext === '.ris') return 'ris';
  return null;
}

/** Reads a file whose bytes are all in `buf` with its own reader: a workbook as an export, a mailbox as e-mails. */
async function readWholeFile(given: string, buf: Buffer, kind: WholeKind, ext: string, opts: IngestOptions, idBase: string = posixPath(given), sha256?: string): Promise<InputRead> {
  const digest: InputDigest = { path: given, kind: 'file', bytes: buf.length, sha256: sha256 ?? createHash('sha256').update(buf).digest('hex') };
  if (kind === 'sheet') {
    if (OLD_SHEET_EXTENSIONS.has(ext) && !looksLikeXlsx(buf)) throw new InputSkip(OLD_WORKBOOK);
    const r = readXlsx(buf, given, opts);
    return { label: given, ...r, skipped: [], digest, isExport: true, decoding: [], attachments: [], workbook: true };
  }
  if (kind === 'bib' || kind === 'ris') {
    const { text, stats } = decodeBuffer(buf, { hash: false, forced: opts.encoding });
    const parsed = kind === 'bib' ? parseBibtex(text) : parseRis(text);
    const r = referenceRows(given, parsed.refs, parsed.problems, opts);
    const note = noteOf(stats);
    return {
      label: given,
      ...r,
      warnings: [...(note ? replacedWarning(given, note) : []), ...r.warnings],
      skipped: [],
      digest,
      isExport: true,
      decoding: note ? [{ source: given, ...note }] : [],
      attachments: [],
    };
  }
  const messages = splitMbox(buf);
  if (messages === null) throw new InputSkip('not a mailbox: it does not start with a From_ line (RFC 4155)');
  const id = idBase;
  const read: InputRead = { label: given, docs: [], skipped: [], warnings: [], digest, isExport: false, decoding: [], attachments: [] };
  for (const m of messages) {
    const one = await readOneFile(m.bytes, `${given}#${m.index}`, `${id}#${m.index}`, '.eml', opts);
    if (one.doc) read.docs.push(one.doc);
    if (one.skip) read.skipped.push(one.skip);
    read.warnings.push(...one.warnings);
    if (one.decoding) read.decoding.push(one.decoding);
    if (one.attachments) read.attachments.push(one.attachments);
  }
  return read;
}

async function readFileInput(given: string, abs: string, pipe: boolean, opts: IngestOptions, io: IngestIo, meter: ByteMeter | null = null): Promise<InputRead> {
  const ext = path.extname(abs).toLowerCase();
  const readAs = readAsFor(opts.format, ext);
  const whole = wholeReaderFor(opts.format, ext);
  const opened = metered(streamOf(io.open ? io.open(abs) : createReadStream(abs, { highWaterMark: 1 << 20 })), meter);
  const source = pipe ? capStream(opened, opts.maxStreamBytes) : opened;
  try {
    if (whole !== null) return await readWholeFile(given, await collectBytes(source), whole, ext, opts);
    if (readAs !== null && readAs !== 'document') return await readStreamedExport(given, source, readAs, opts);
    let all: AsyncIterable<Uint8Array | string> = source;
    if (readAs === null) {
      const peeked = await peekBytes(source, SNIFF_HEAD);
      const json = startsLikeJson(peeked.head, opts);
      if (json !== null) return await readStreamedExport(given, peeked.all, json, opts);
      all = peeked.all;
    }
    const buf = await collectBytes(all);
    if (readAs === null && looksLikeXlsx(buf)) return await readWholeFile(given, buf, 'sheet', ext, opts);
    if (readAs === null && looksLikeMbox(buf)) return await readWholeFile(given, buf, 'mbox', ext, opts);
    const digest: InputDigest = { path: given, kind: 'file', bytes: buf.length, sha256: createHash('sha256').update(buf).digest('hex') };
    const one = await readOneFile(buf, given, posixPath(given), ext, opts);
    return fileRead(given, one, digest);
  } catch (err) {
    if (err instanceof InputSkip) return skippedInput(given, err.reason);
    if (isFsError(err)) return skippedInput(given, unreadableReason(err));
    throw err;
  }
}

function skippedInput(source: string, reason: string): InputRead {
  return { label: source, docs: [], skipped: [{ source, reason }], warnings: [], digest: null, isExport: false, decoding: [], attachments: [] };
}

async function readStdinInput(opts: IngestOptions, stdin: NodeJS.ReadableStream): Promise<InputRead> {
  let stats: DecodeStats | null = null;
  const chunks = decodeStream(capStream(streamOf(stdin), opts.maxStreamBytes), (s) => (stats = s), { forced: opts.encoding, nul: 'clean' });
  const readAs: ReadAs | null = opts.format === 'auto' ? null : opts.format === 'text' ? 'document' : opts.format;
  try {
    const r = await readStreamInput(chunks, 'stdin', 'stdin', readAs, opts);
    const s = stats as DecodeStats | null;
    const note = s ? noteOf(s) : null;
    return {
      label: 'stdin',
      ...r,
      warnings: [...(note ? replacedWarning('stdin', note) : []), ...nulWarning('stdin', s), ...r.warnings],
      digest: s ? { path: '-', kind: 'stdin', bytes: s.bytes, sha256: s.sha256 } : null,
      decoding: note ? [{ source: 'stdin', ...note }] : [],
      attachments: [],
    };
  } catch (err) {
    if (err instanceof InputSkip) return skippedInput('stdin', err.reason);
    throw err;
  }
}

async function readAllBytes(abs: string, io: IngestIo): Promise<Buffer> {
  if (!io.open) return readFile(abs);
  return collectBytes(io.open(abs));
}

async function mapPool<T, R>(items: readonly T[], limit: number, fn: (item: T) => Promise<R>): Promise<R[]> {
  const out = new Array<R>(items.length);
  let next = 0;
  const worker = async (): Promise<void> => {
    while (next < items.length) {
      const i = next++;
      out[i] = await fn(items[i] as T);
    }
  };
  await Promise.all(Array.from({ length: Math.min(limit, items.length) }, worker));
  return out;
}

async function readFolderInput(given: string, abs: string, listing: Listing, opts: IngestOptions, io: IngestIo, meter: ByteMeter | null = null): Promise<InputRead> {
  const shown = (rel: string): string => path.posix.join(given.replace(/\\/g, '/'), rel);
  type One = OneFile & { sha: string | null; bytes: number; mailbox?: InputRead };
  const results = await mapPool(listing.files, READ_CONCURRENCY, async (rel): Promise<One> => {
    const source = shown(rel);
    let buf: Buffer | null = null;
    let reason = '';
    try {
      buf = await readAllBytes(path.join(abs, rel), io);
    } catch (err) {
      if (!isFsError(err)) throw err;
      reason = unreadableReason(err);
      if ((err as { code?: unknown }).code === 'ENOENT' && rel.includes('\uFFFD') && !io.open) {
        // A name that is not valid UTF-8: listed with U+FFFD, so read it by its raw bytes.
        const raw = await rawNamePath(abs, rel);
        if (raw !== null) {
          try {
            buf = await readFile(raw);
          } catch (e2) {
            if (!isFsError(e2)) throw e2;
            reason = unreadableReason(e2);
          }
        } else reason = 'unreadable: its name is not valid UTF-8 and could not be matched to one file (rename it)';
      }
    }
    if (buf === null) return { doc: null, skip: { source, reason }, warnings: [], decoding: null, attachments: null, sha: null, bytes: 0 };
    meter?.add(buf.length);
    const sha = createHash('sha256').update(buf).digest('hex');
    const ext = path.extname(rel).toLowerCase();
    if (ext === '.mbox') {
      // A mailbox in a folder: one e-mail document per message, ids `rel#N`.
      const none = { doc: null, skip: null, warnings: [], decoding: null, attachments: null, sha, bytes: buf.length };
      try {
        return { ...none, mailbox: await readWholeFile(source, buf, 'mbox', ext, opts, rel, sha) };
      } catch (err) {
        if (err instanceof InputSkip) return { ...none, skip: { source, reason: err.reason } };
        throw err;
      }
    }
    const one = await readOneFile(buf, source, rel, ext, opts);
    return { ...one, sha, bytes: buf.length };
  });
  const docs: DraftDoc[] = [];
  const skipped: Skipped[] = [...listing.skipped, ...listing.notIncluded.map((rel) => ({ source: shown(rel), reason: NOT_A_FORMAT_REASON }))];
  const warnings: string[] = listing.linkedFolders.map((f) => `${f}: a link to a folder; not followed`);
  const decoding: DecodingNote[] = [];
  const attachments: AttachmentNote[] = [];
  const digestLines: string[] = [];
  const fileDigests = new Map<string, string>();
  let bytes = 0;
  listing.files.forEach((rel, i) => {
    const r = results[i] as One;
    if (r.mailbox) {
      docs.push(...r.mailbox.docs);
      skipped.push(...r.mailbox.skipped);
      warnings.push(...r.mailbox.warnings);
      decoding.push(...r.mailbox.decoding);
      attachments.push(...r.mailbox.attachments);
    }
    if (r.doc) docs.push(r.doc);
    if (r.doc && r.sha !== null) fileDigests.set(r.doc.source, r.sha);
    if (r.skip) skipped.push(r.skip);
    warnings.push(...r.warnings);
    if (r.decoding) decoding.push(r.decoding);
    if (r.attachments) attachments.push(r.attachments);
    if (r.sha !== null) {
      digestLines.push(`${r.sha}  ${rel}\n`);
      bytes += r.bytes;
    }
  });
  skipped.sort((a, b) => (a.source < b.source ? -1 : a.source > b.source ? 1 : 0));
  const sha256 = createHash('sha256').update(digestLines.join('')).digest('hex');
  return {
    label: `folder ${given}`,
    docs,
    skipped,
    warnings,
    digest: { path: given, kind: 'folder', bytes, sha256, files: digestLines.length },
    isExport: false,
    decoding,
    attachments,
    fileDigests,
  };
}

/** `text` cut to at most `maxBytes` UTF-8 bytes at a character boundary, or `null` when it fits. */
export function truncateUtf8(text: string, maxBytes: number): { text: string; bytes: number; keptBytes: number } | null {
  if (text.length * 3 <= maxBytes) return null; // a UTF-16 code unit is at most 3 UTF-8 bytes
  const bytes = Buffer.byteLength(text, 'utf8');
  if (bytes <= maxBytes) return null;
  const b = Buffer.from(text, 'utf8');
  let end = maxBytes;
  while (end > 0 && ((b[end] as number) & 0xc0) === 0x80) end--; // do not split a character
  return { text: b.toString('utf8', 0, end), bytes, keptBytes: end };
}

/** Cuts texts longer than `maxBytes`; one warning per input that had any. */
function truncateLong(reads: readonly InputRead[], maxBytes: number): { truncated: TruncatedDoc[]; warnings: string[] } {
  const truncated: TruncatedDoc[] = [];
  const warnings: string[] = [];
  for (const r of reads) {
    const named: string[] = [];
    let count = 0;
    r.docs = r.docs.map((d) => {
      const t = truncateUtf8(d.text, maxBytes);
      if (t === null) return d;
      count++;
      if (named.length < 5) named.push(`${d.source} (${t.bytes} bytes)`);
      truncated.push({ id: d.id, source: d.source, bytes: t.bytes, keptBytes: t.keptBytes });
      return { ...d, text: t.text };
    });
    if (count > 0) {
      const more = count > named.length ? `, … (${count} in all)` : '';
      warnings.push(`${r.label}: ${count} text(s) longer than maxBytes (${maxBytes} bytes) cut to that length: ${named.join(', ')}${more}`);
    }
  }
  return { truncated, warnings };
}

/** Applies `maxFiles` to the plan: files past the cap are dropped (folders keep their first files in id order). */
function capFiles(planned: Planned[], maxFiles: number | null): { planned: Planned[]; notRead: number } {
  if (maxFiles === null) return { planned, notRead: 0 };
  let budget = maxFiles;
  let notRead = 0;
  const out: Planned[] = [];
  for (const p of planned) {
    if (p.kind === 'file') {
      if (budget > 0) {
        budget--;
        out.push(p);
      } else notRead++;
    } else if (p.kind === 'folder') {
      const keep = Math.min(budget, p.listing.files.length);
      notRead += p.listing.files.length - keep;
      budget -= keep;
      out.push(keep === p.listing.files.length ? p : { ...p, listing: { ...p.listing, files: p.listing.files.slice(0, keep) } });
    } else out.push(p);
  }
  return { planned: out, notRead };
}

/**
 * Makes ids unique in order: the first document with an id keeps it, later
 * ones become `id~2`, `id~3`… skipping any name that some document has as
 * its own id. Returns one warning per input whose documents were renamed.
 */
function uniqueIds(reads: readonly InputRead[]): string[] {
  const taken = new Set<string>();
  let count = 0;
  for (const r of reads) {
    for (const d of r.docs) taken.add(d.id);
    count += r.docs.length;
  }
  if (taken.size === count) return []; // every id differs already: nothing to rename
  const used = new Set<string>();
  const nextSuffix = new Map<string, number>();
  const warnings: string[] = [];
  for (const r of reads) {
    const renamed: string[] = [];
    let count = 0;
    for (const d of r.docs) {
      if (!used.has(d.id)) {
        used.add(d.id);
        continue;
      }
      let k = nextSuffix.get(d.id) ?? 2;
      while (taken.has(`${d.id}~${k}`) || used.has(`${d.id}~${k}`)) k++;
      nextSuffix.set(d.id, k + 1);
      const fresh = `${d.id}~${k}`;
      count++;
      if (renamed.length < 5) renamed.push(`${show(d.id)} → ${show(fresh)} (${d.source})`);
      used.add(fresh);
      d.id = fresh;
    }
    if (count > 0) {
      const more = count > renamed.length ? `, … (${count} in all)` : '';
      warnings.push(`${r.label}: ${count} duplicate id(s) made unique: ${renamed.join(', ')}${more}`);
    }
  }
  return warnings;
}

function describeLooked(opts: IngestOptions): string {
  const looked = `looked for ${opts.include.join(', ')}`;
  return opts.exclude.length > 0 ? `${looked}; excluding ${opts.exclude.join(', ')}` : looked;
}

/**
 * Reads `paths` (files, folders, or `-` for standard input; relative to
 * `io.cwd`) into documents. Options are validated first
 * ({@link resolveIngestOptions}); every path is checked and every folder
 * listed before any file is read.
 *
 * Throws {@link UsageError} (one line) when there is no input, a path does
 * not exist (`no such file or folder: x`), a folder has no matching file
 * (`no documents in folder x (looked for …)`), an export lacks a named or
 * guessable column, or nothing readable was found at all (the message then
 * names the first skips). Binary, empty, unreadable, broken and encrypted
 * files, CSVs with an unclosed quote and JSON that does not parse are listed
 * in `skipped` and the run goes on. Any other error is a bug.
 */
export async function ingest(paths: readonly string[], options: Partial<IngestOptions>, io: IngestIo): Promise<IngestResult> {
  const opts = resolveIngestOptions(options);
  if (paths.length === 0) throw new UsageError('no inputs given; name files, folders, or - for standard input');
  const warnings: string[] = [];

  // 1. Check every path and list every folder before reading anything.
  const planned: Planned[] = [];
  const seen = new Set<string>();
  for (const given of paths) {
    if (given.trim() === '') throw new UsageError('an input path is empty; name a file, a folder, or - for standard input');
    const key = given === '-' ? '-' : path.resolve(io.cwd, given);
    if (seen.has(key)) {
      warnings.push(`${given === '-' ? 'standard input' : given} given more than once; read once`);
      continue;
    }
    seen.add(key);
    if (given === '-') {
      if (!io.stdin) throw new UsageError('cannot read "-": no standard input was given');
      planned.push({ kind: 'stdin' });
      continue;
    }
    let st;
    try {
      st = await checkInputKind(key, given);
    } catch (err) {
      if (err instanceof UsageError) throw err;
      const code = (err as { code?: unknown }).code;
      if (code === 'ENOENT' || code === 'ENOTDIR') throw new UsageError(`no such file or folder: ${given}`);
      planned.push({ kind: 'unreadable', given, reason: unreadableReason(err) });
      continue;
    }
    if (st.folder) {
      const listing = await listFolder(key, given, opts.include, opts.exclude, io.readdirFailure ?? null, opts.include.length === 1 && opts.include[0] === DEFAULT_INCLUDE);
      if (listing.files.length === 0 && listing.skipped.length === 0) {
        const others = listing.notIncluded.length === 0 ? '' : `; ${listing.notIncluded.length} file(s) of other formats not read, such as ${listing.notIncluded[0]}: add --include '**/*' to read them as text`;
        throw new UsageError(`no documents in folder ${given} (${describeLooked(opts)})${others}`);
      }
      planned.push({ kind: 'folder', given, abs: key, listing });
    } else {
      planned.push({ kind: 'file', given, abs: key, pipe: st.pipe });
    }
  }

  const capped = capFiles(planned, opts.maxFiles);
  if (capped.notRead > 0) warnings.push(`maxFiles ${opts.maxFiles}: ${capped.notRead} more file(s) were not read`);

  // 2. Read, in the order given.
  const reads: InputRead[] = [];
  const meter = io.progress ? await byteMeter(plannedFiles(capped.planned), io.progress) : null;
  for (const p of capped.planned) {
    if (p.kind === 'stdin') reads.push(await readStdinInput(opts, io.stdin as NodeJS.ReadableStream));
    else if (p.kind === 'file') reads.push(await readFileInput(p.given, p.abs, p.pipe, opts, io, meter));
    else if (p.kind === 'folder') reads.push(await readFolderInput(p.given, p.abs, p.listing, opts, io, meter));
    else reads.push(skippedInput(p.given, p.reason));
  }

  if ((opts.text !== null || opts.id !== null || opts.title !== null) && !reads.some((r) => r.isExport)) {
    warnings.push('the text, id and title options apply only to exports (CSV, TSV, JSON Lines, JSON); none was read');
  }
  if (opts.sheet !== null && !reads.some((r) => r.workbook === true)) {
    warnings.push('the sheet option applies only to workbooks (.xlsx); none was read');
  }
  for (const r of reads) warnings.push(...r.warnings);
  warnings.push(...uniqueIds(reads));
  const cut = truncateLong(reads, opts.maxBytes);
  warnings.push(...cut.warnings);

  const skipped = reads.flatMap((r) => r.skipped);
  const docs: Doc[] = reads.flatMap((r) => r.docs.map((d) => ({ id: d.id, source: d.source, title: d.title, text: d.text, fields: d.fields, ...(d.titleFromText ? { titleFromText: true } : {}) })));
  if (docs.length === 0) {
    const where = listNames(paths.length <= 3 ? [...paths] : [...paths.slice(0, 3), `${paths.length - 3} more`]);
    let why = '';
    if (skipped.length > 0) {
      why = '; skipped ' + skipped.slice(0, 3).map((s) => `${s.source}: ${s.reason}`).join('; ');
      if (skipped.length > 3) why += `; and ${skipped.length - 3} more`;
    } else if (warnings.length > 0) {
      why = '; ' + (warnings[0] as string);
    }
    throw new UsageError(`no readable documents in ${where}${why}`);
  }
  const inputs = reads.flatMap((r) => (r.digest ? [r.digest] : []));
  const exportRows = new Uint8Array(docs.length);
  let at = 0;
  for (const r of reads) {
    if (r.isExport) exportRows.fill(1, at, at + r.docs.length);
    at += r.docs.length;
  }
  return {
    docs,
    skipped,
    inputs,
    warnings,
    decoding: reads.flatMap((r) => r.decoding),
    truncated: cut.truncated,
    attachments: reads.flatMap((r) => r.attachments),
    filesNotRead: capped.notRead,
    exportRows,
    exportCounts: reads.flatMap((r) => (r.isExport && r.rowsSeen !== undefined ? [{ source: r.label, rows: r.rowsSeen, documents: r.docs.length }] : [])),
    mergedRecords: reads.flatMap((r) => (r.merged ?? []).map((m) => ({ source: r.label, ...m }))),
    titleColumns: reads.flatMap((r) => (r.titleColumn !== undefined ? [{ source: r.label, column: r.titleColumn }] : [])),
    fileDigests: new Map(reads.flatMap((r) => [...(r.fileDigests ?? [])])),
  };
}

