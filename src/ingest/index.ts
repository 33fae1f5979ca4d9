/**
 * The ingest edge: files, folders, exports and standard input to
 * {@link Doc}s. It reads the file system but never prints: what it could not
 * use is returned in `skipped`, what it changed or guessed in `warnings`.
 * Inputs are never modified. The same inputs give the same result, whatever
 * order the file system lists them in.
 *
 * - A folder: every file matching `include` and not `exclude`, one document
 *   per file, id = path relative to the folder (forward slashes), documents
 *   sorted by id. HTML is reduced to text, Markdown keeps its text minus
 *   front matter and link targets, anything else is plain text.
 * - A file: `.csv`, `.tsv`/`.tab`, `.jsonl`/`.ndjson`, `.json` are exports
 *   (one document per row); `.txt`, `.md`, `.html`... one document, id =
 *   the path as given (forward slashes). Another extension: a file starting
 *   with `[` is read as a JSON array, with `{` as JSON Lines, anything else
 *   as one text document (with a warning).
 * - `-`: an export on standard input: `[` JSON array, `{` JSON Lines,
 *   otherwise CSV (or as `format` says; `text` makes one document, id `stdin`).
 *
 * Ids are made unique across all inputs in the order given (`id~2`,
 * `id~3`…, never a name another input already uses), with a warning.
 *
 * @module
 */
import { createReadStream } from 'node:fs';
import { readFile, stat } from 'node:fs/promises';
import { createHash } from 'node:crypto';
import path from 'node:path';
import type { Doc, Skipped } from '../types.js';
import { UsageError, show } from '../util/errors.js';
import { decodeBuffer, decodeStream, InputSkip, type DecodeStats } from './decode.js';
import { readCsv } from './csv.js';
import { readJsonArray, readJsonLines } from './json.js';
import { htmlToText } from './html.js';
import { readMarkdown, readPlainText } from './text.js';
import { listFolder } from './folder.js';
import { firstSignificant, peekText } from './peek.js';
import { isFsError, unreadableReason } from './io-errors.js';
import { listNames, type DraftDoc } from './table.js';
import { resolveIngestOptions, type IngestFormat, type IngestOptions } from './options.js';

export { DEFAULT_INCLUDE, DEFAULT_INGEST_OPTIONS, INGEST_FORMATS, resolveIngestOptions } from './options.js';
export type { IngestFormat, IngestOptions } from './options.js';
export { htmlToText, type HtmlText } from './html.js';
export { readMarkdown, readPlainText, capTitle, firstLine, TITLE_MAX } from './text.js';
export { TEXT_COLUMN_GUESSES } from './table.js';

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

/** Everything ingest produced. */
export interface IngestResult {
  docs: Doc[];
  skipped: Skipped[];
  inputs: InputDigest[];
  warnings: string[];
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
}

type ReadAs = 'csv' | 'tsv' | 'jsonl' | 'json' | 'document';

const EXPORT_EXTENSIONS: ReadonlyMap<string, ReadAs> = new Map<string, ReadAs>([
  ['.csv', 'csv'],
  ['.tsv', 'tsv'],
  ['.tab', 'tsv'],
  ['.jsonl', 'jsonl'],
  ['.ndjson', 'jsonl'],
  ['.json', 'json'],
]);

const DOCUMENT_EXTENSIONS = new Set(['.txt', '.text', '.md', '.markdown', '.mdown', '.mkd', '.html', '.htm', '.xhtml']);

/** Folders read at most this many files at once. */
const READ_CONCURRENCY = 16;

/** Reads one document's text by its extension: HTML reduced, Markdown cleaned, anything else plain. */
function readDocument(text: string, ext: string): { text: string; title: string } {
  if (ext === '.html' || ext === '.htm' || ext === '.xhtml') return htmlToText(text);
  if (ext === '.md' || ext === '.markdown' || ext === '.mdown' || ext === '.mkd') return readMarkdown(text);
  return readPlainText(text);
}

function posixPath(p: string): string {
  const n = path.posix.normalize(p.replace(/\\/g, '/'));
  return n.startsWith('./') ? n.slice(2) : n;
}

function invalidWarning(source: string, stats: DecodeStats): string[] {
  return stats.invalid > 0 ? [`${source}: ${stats.invalid} invalid UTF-8 sequence(s) replaced with U+FFFD`] : [];
}

const NO_TEXT = 'no text: only markup or white space';
const EMPTY_FIELDS: ReadonlyMap<string, string> = new Map();

/** What reading one input gave. */
interface InputRead {
  readonly label: string;
  readonly docs: DraftDoc[];
  readonly skipped: Skipped[];
  readonly warnings: string[];
  readonly digest: InputDigest | null;
  readonly isExport: boolean;
}

type Planned =
  | { readonly kind: 'stdin' }
  | { readonly kind: 'file'; readonly given: string; readonly abs: string }
  | { readonly kind: 'folder'; readonly given: string; readonly abs: string; readonly listing: Awaited<ReturnType<typeof listFolder>> }
  | { readonly kind: 'unreadable'; readonly given: string; readonly reason: string };

async function* streamOf(source: NodeJS.ReadableStream | AsyncIterable<Uint8Array>): AsyncGenerator<Uint8Array | string, void, undefined> {
  for await (const chunk of source as AsyncIterable<Uint8Array | string>) yield chunk;
}

async function collect(chunks: AsyncIterable<string>): Promise<string> {
  let s = '';
  for await (const c of chunks) s += c;
  return s;
}

/**
 * Reads an export or document from a decoded stream. `name` names it in
 * messages and sources; `id` is the document id when it is one document.
 */
async function readStreamInput(
  chunks: AsyncIterable<string>,
  name: string,
  id: string,
  readAs: ReadAs | null,
  ext: string,
  opts: IngestOptions,
  sniffDefault: 'csv' | 'document',
): Promise<{ docs: DraftDoc[]; skipped: Skipped[]; warnings: string[]; isExport: boolean }> {
  let as = readAs;
  let all = chunks;
  const warnings: string[] = [];
  if (as === null) {
    const peeked = await peekText(chunks, (h) => firstSignificant(h) !== '');
    all = peeked.all;
    const c = firstSignificant(peeked.head);
    as = c === '[' ? 'json' : c === '{' ? 'jsonl' : sniffDefault;
    if (as === 'document' && sniffDefault === 'document') {
      warnings.push(`${name}: extension ${show(ext || '(none)')} is not one sheaf knows; read as one text document (set format to read it as an export)`);
    }
  }
  switch (as) {
    case 'csv':
    case 'tsv': {
      const r = await readCsv(all, name, as, opts);
      return { docs: r.docs, skipped: [], warnings: [...warnings, ...r.warnings], isExport: true };
    }
    case 'jsonl':
    case 'json': {
      const r = await (as === 'jsonl' ? readJsonLines : readJsonArray)(all, name, opts);
      return { docs: r.docs, skipped: r.skipped, warnings: [...warnings, ...r.warnings], isExport: true };
    }
    case 'document': {
      const { text, title } = readDocument(await collect(all), ext);
      if (text === '') return { docs: [], skipped: [{ source: name, reason: NO_TEXT }], warnings, isExport: false };
      return { docs: [{ id, source: name, title: title || id, text, fields: EMPTY_FIELDS }], skipped: [], warnings, isExport: false };
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

async function readFileInput(given: string, abs: string, opts: IngestOptions, io: IngestIo): Promise<InputRead> {
  const ext = path.extname(abs).toLowerCase();
  let stats: DecodeStats | null = null;
  const bytes = io.open ? io.open(abs) : createReadStream(abs, { highWaterMark: 1 << 20 });
  const chunks = decodeStream(streamOf(bytes), (s) => (stats = s));
  try {
    const r = await readStreamInput(chunks, given, posixPath(given), readAsFor(opts.format, ext), ext, opts, 'document');
    const s = stats as DecodeStats | null;
    return {
      label: given,
      ...r,
      warnings: [...(s ? invalidWarning(given, s) : []), ...r.warnings],
      digest: s ? { path: given, kind: 'file', bytes: s.bytes, sha256: s.sha256 } : null,
    };
  } catch (err) {
    if (err instanceof InputSkip) return skippedInput(given, err.reason);
    if (isFsError(err)) return skippedInput(given, unreadableReason(err));
    throw err;
  }
}

function skippedInput(source: string, reason: string): InputRead {
  return { label: source, docs: [], skipped: [{ source, reason }], warnings: [], digest: null, isExport: false };
}

async function readStdinInput(opts: IngestOptions, stdin: NodeJS.ReadableStream): Promise<InputRead> {
  let stats: DecodeStats | null = null;
  const chunks = decodeStream(streamOf(stdin), (s) => (stats = s));
  const readAs: ReadAs | null = opts.format === 'auto' ? null : opts.format === 'text' ? 'document' : opts.format;
  try {
    const r = await readStreamInput(chunks, 'stdin', 'stdin', readAs, '', opts, 'csv');
    const s = stats as DecodeStats | null;
    return {
      label: 'stdin',
      ...r,
      warnings: [...(s ? invalidWarning('stdin', s) : []), ...r.warnings],
      digest: s ? { path: '-', kind: 'stdin', bytes: s.bytes, sha256: s.sha256 } : null,
    };
  } catch (err) {
    if (err instanceof InputSkip) return skippedInput('stdin', err.reason);
    throw err;
  }
}

async function readAllBytes(abs: string, io: IngestIo): Promise<Buffer> {
  if (!io.open) return readFile(abs);
  const parts: Buffer[] = [];
  for await (const c of io.open(abs)) parts.push(Buffer.from(c));
  return Buffer.concat(parts);
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

async function readFolderInput(
  given: string,
  abs: string,
  listing: Awaited<ReturnType<typeof listFolder>>,
  io: IngestIo,
): Promise<InputRead> {
  const shown = (rel: string): string => path.posix.join(given.replace(/\\/g, '/'), rel);
  type One = { doc: DraftDoc | null; skip: Skipped | null; warn: string[]; sha: string | null; bytes: number };
  const results = await mapPool(listing.files, READ_CONCURRENCY, async (rel): Promise<One> => {
    const source = shown(rel);
    let buf: Buffer;
    try {
      buf = await readAllBytes(path.join(abs, rel), io);
    } catch (err) {
      if (!isFsError(err)) throw err;
      return { doc: null, skip: { source, reason: unreadableReason(err) }, warn: [], sha: null, bytes: 0 };
    }
    const sha = createHash('sha256').update(buf).digest('hex');
    try {
      const { text: raw, stats } = decodeBuffer(buf, { hash: false });
      const { text, title } = readDocument(raw, path.extname(rel).toLowerCase());
      const warn = invalidWarning(source, stats);
      if (text === '') return { doc: null, skip: { source, reason: NO_TEXT }, warn, sha, bytes: buf.length };
      return { doc: { id: rel, source, title: title || rel, text, fields: EMPTY_FIELDS }, skip: null, warn, sha, bytes: buf.length };
    } catch (err) {
      if (err instanceof InputSkip) return { doc: null, skip: { source, reason: err.reason }, warn: [], sha, bytes: buf.length };
      throw err;
    }
  });
  const docs: DraftDoc[] = [];
  const skipped: Skipped[] = [...listing.skipped];
  const warnings: string[] = listing.linkedFolders.map((f) => `${f}: a link to a folder; not followed`);
  const digestLines: string[] = [];
  let bytes = 0;
  listing.files.forEach((rel, i) => {
    const r = results[i] as One;
    if (r.doc) docs.push(r.doc);
    if (r.skip) skipped.push(r.skip);
    warnings.push(...r.warn);
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
  };
}

/**
 * Makes ids unique in order: the first document with an id keeps it, later
 * ones become `id~2`, `id~3`… skipping any name that some document has as
 * its own id. Returns one warning per input whose documents were renamed.
 */
function uniqueIds(reads: readonly InputRead[]): string[] {
  const taken = new Set<string>();
  for (const r of reads) for (const d of r.docs) taken.add(d.id);
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
 * guessable column, a CSV has an unclosed quote, a JSON file is not a JSON
 * array, or nothing readable was found at all. Binary, empty and
 * unreadable files are listed in `skipped` and the run goes on.
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
      st = await stat(key);
    } catch (err) {
      const code = (err as { code?: unknown }).code;
      if (code === 'ENOENT' || code === 'ENOTDIR') throw new UsageError(`no such file or folder: ${given}`);
      planned.push({ kind: 'unreadable', given, reason: unreadableReason(err) });
      continue;
    }
    if (st.isDirectory()) {
      const listing = await listFolder(key, given, opts.include, opts.exclude);
      if (listing.files.length === 0 && listing.skipped.length === 0) {
        throw new UsageError(`no documents in folder ${given} (${describeLooked(opts)})`);
      }
      planned.push({ kind: 'folder', given, abs: key, listing });
    } else {
      planned.push({ kind: 'file', given, abs: key });
    }
  }

  // 2. Read, in the order given.
  const reads: InputRead[] = [];
  for (const p of planned) {
    if (p.kind === 'stdin') reads.push(await readStdinInput(opts, io.stdin as NodeJS.ReadableStream));
    else if (p.kind === 'file') reads.push(await readFileInput(p.given, p.abs, opts, io));
    else if (p.kind === 'folder') reads.push(await readFolderInput(p.given, p.abs, p.listing, io));
    else reads.push(skippedInput(p.given, p.reason));
  }

  if ((opts.text !== null || opts.id !== null || opts.title !== null) && !reads.some((r) => r.isExport)) {
    warnings.push('the text, id and title options apply only to exports (CSV, TSV, JSON Lines, JSON); none was read');
  }
  for (const r of reads) warnings.push(...r.warnings);
  warnings.push(...uniqueIds(reads));

  const skipped = reads.flatMap((r) => r.skipped);
  const docs: Doc[] = reads.flatMap((r) => r.docs.map((d) => ({ id: d.id, source: d.source, title: d.title, text: d.text, fields: d.fields })));
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
  return { docs, skipped, inputs, warnings };
}

