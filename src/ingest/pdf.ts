/**
 * PDF text with pdf.js (`pdfjs-dist`, legacy build for Node): the text
 * layer of every page, lines as pdf.js ends them, pages joined by line
 * breaks; the title from the document information `Title` (else the XMP
 * `dc:title`), else the first heading-like line of page 1.
 *
 * pdf.js runs in this thread (its "fake worker"), with `eval` off, no font
 * loading and messages silenced (verbosity 0); what it prints while loading
 * is dropped, never written to stdout. Character maps for
 * non-embedded CJK fonts are read from the package's `cmaps/` folder.
 *
 * @module
 */
import { createRequire } from 'node:module';
import path from 'node:path';
import { createInflate } from 'node:zlib';
import { InputSkip } from './decode.js';
import { oneLine } from './io-errors.js';
import { capTitle, firstLine } from './text.js';

/** The PDF signature, which must appear in the first {@link PDF_HEADER_WINDOW} bytes. */
export const PDF_SIGNATURE = '%PDF-';

/** How far into a file the PDF signature is looked for (readers accept leading junk; common practice). */
export const PDF_HEADER_WINDOW = 1024;

/** A line of page 1 is heading-like when its font is at least this many times the page's median line height. */
export const HEADING_RATIO = 1.15;

/**
 * Most bytes the Flate-compressed streams of a PDF (images aside) may
 * unpack to, in all; the same bound as a Word file's `word/document.xml`
 * (`DOCX_XML_MAX`). Checked before pdf.js reads the file, so a stream that
 * inflates to gigabytes is refused without holding it in memory.
 */
export const PDF_INFLATED_MAX = 512 * 1024 * 1024;

/** Most characters of text read from one PDF; past it the file is skipped (its text would be cut to `maxBytes` anyway). */
export const PDF_TEXT_MAX = 256 * 1024 * 1024;

/** Bytes `data` inflates to, counting chunk by chunk and stopping past `budget` (then returns `budget + 1`); damaged data counts what came out. */
function inflatedBytes(data: Buffer, budget: number): Promise<number> {
  return new Promise((resolve) => {
    const z = createInflate({ chunkSize: 1 << 16 });
    let n = 0;
    let done = false;
    const finish = (v: number): void => {
      if (done) return;
      done = true;
      z.destroy();
      resolve(v);
    };
    z.on('data', (c: Buffer) => {
      n += c.length;
      if (n > budget) finish(budget + 1);
    });
    z.on('end', () => finish(n));
    z.on('error', () => finish(n));
    z.end(data);
  });
}

/**
 * True when the Flate-compressed streams of `bytes` (those whose dictionary
 * does not say `/Image`) unpack to more than `limit` bytes in all. Streams
 * are found as `stream` … `endstream`, their dictionary in the 4 KiB before.
 */
async function pdfInflatesPast(bytes: Uint8Array, limit: number): Promise<boolean> {
  const buf = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let total = 0;
  let at = 0;
  for (;;) {
    const s = buf.indexOf('stream', at, 'latin1');
    if (s === -1) return false;
    at = s + 6;
    if (s >= 3 && buf.toString('latin1', s - 3, s) === 'end') continue;
    let start = s + 6;
    if (buf[start] === 0x0d) start++;
    if (buf[start] === 0x0a) start++;
    if (start === s + 6) continue; // `stream` must end its line
    let end = buf.indexOf('endstream', start, 'latin1');
    if (end === -1) end = buf.length;
    const before = buf.toString('latin1', Math.max(0, s - 4096), s);
    const dict = before.slice(Math.max(0, before.lastIndexOf(' obj') + 1));
    at = end;
    if (!/\/(FlateDecode|Fl)\b/.test(dict) || /\/Image\b/.test(dict)) continue;
    total += await inflatedBytes(buf.subarray(start, end), limit - total);
    if (total > limit) return true;
  }
}

/** True when `b` has `%PDF-` in its first {@link PDF_HEADER_WINDOW} bytes. */
export function looksLikePdf(b: Uint8Array): boolean {
  return Buffer.from(b.buffer, b.byteOffset, Math.min(b.byteLength, PDF_HEADER_WINDOW)).includes(PDF_SIGNATURE, 0, 'latin1');
}

/** What a PDF gave. */
export interface PdfText {
  readonly text: string;
  readonly title: string;
  /** Pages in the document. */
  readonly pages: number;
  /** Pages whose text could not be read, with the first reason (the others are still read). */
  readonly failedPages: number;
  readonly firstFailure: string;
}

interface TextItemLike {
  readonly str: string;
  readonly hasEOL: boolean;
  readonly height: number;
  readonly transform: readonly number[];
}

type PdfjsModule = typeof import('pdfjs-dist/legacy/build/pdf.mjs');
let pdfjsModule: Promise<PdfjsModule> | null = null;

/**
 * pdf.js, loaded once. What it writes with `console.log` while its module
 * loads — in Node, without the optional `@napi-rs/canvas` package, "Warning:
 * Cannot load …" and "Warning: Cannot polyfill `DOMMatrix` …" (rendering only;
 * text extraction does not need them) — comes before any `verbosity` option
 * can apply; stdout carries data only (`--json` must parse), so it is dropped.
 */
function loadPdfjs(): Promise<PdfjsModule> {
  pdfjsModule ??= (async () => {
    const log = console.log;
    console.log = (): void => {};
    try {
      // Later messages are off: every document is opened with `verbosity: 0`, which pdf.js also makes its global level.
      return await import('pdfjs-dist/legacy/build/pdf.mjs');
    } finally {
      console.log = log;
    }
  })();
  return pdfjsModule;
}

let assetRoot: string | null | undefined;

/** The installed pdfjs-dist folder (for `cmaps/` and `standard_fonts/`), or `null`. */
function pdfjsFolder(): string | null {
  if (assetRoot === undefined) {
    try {
      assetRoot = path.dirname(createRequire(import.meta.url).resolve('pdfjs-dist/package.json'));
    } catch {
      assetRoot = null;
    }
  }
  return assetRoot;
}

/** Titles that are no title: empty, placeholders, or a file name. */
function usableTitle(raw: unknown): string {
  if (typeof raw !== 'string') return '';
  const t = capTitle(raw.replace(/\0/g, ''));
  if (t === '' || /^(untitled|title|document|unknown|none)$/i.test(t)) return '';
  if (/\.(docx?|pdf|tex|dvi|ps|rtf|odt|indd|pptx?|xlsx?|txt|html?)$/i.test(t)) return '';
  return t;
}

interface Line {
  readonly text: string;
  readonly height: number;
}

/** Text items to lines: pieces joined, a line ended where pdf.js marks an end of line; white space collapsed. */
export function itemsToLines(items: readonly unknown[]): Line[] {
  const lines: Line[] = [];
  let cur = '';
  let height = 0;
  const flush = (): void => {
    const text = cur.replace(/[\s\u00a0]+/g, ' ').trim();
    if (text !== '') lines.push({ text, height });
    cur = '';
    height = 0;
  };
  for (const raw of items) {
    const it = raw as Partial<TextItemLike>;
    if (typeof it.str !== 'string') continue; // marked-content markers
    cur += it.str;
    if (it.str.trim() !== '') {
      const h = Math.abs(Number(it.transform?.[3] ?? 0)) || Number(it.height ?? 0) || 0;
      if (h > height) height = h;
    }
    if (it.hasEOL) flush();
  }
  flush();
  return lines;
}

/**
 * The first heading-like line of a page: among its first 20 lines, the
 * first with the largest font when that font is at least
 * {@link HEADING_RATIO} times the median line height, joined with up to two
 * following lines of the same size; else the first line.
 */
export function headingOf(lines: readonly Line[]): string {
  if (lines.length === 0) return '';
  const heights = lines.map((l) => l.height).sort((a, b) => a - b);
  const median = heights[(heights.length - 1) >> 1] as number; // the lower median: headings are the few tall lines
  const head = lines.slice(0, 20);
  let best = -1;
  for (let i = 0; i < head.length; i++) if (best === -1 || (head[i] as Line).height > (head[best] as Line).height + 1e-6) best = i;
  const top = head[best] as Line;
  if (median > 0 && top.height >= HEADING_RATIO * median) {
    const parts = [top.text];
    for (let j = best + 1; j < Math.min(head.length, best + 3); j++) {
      const l = head[j] as Line;
      if (Math.abs(l.height - top.height) > 0.01 * top.height) break;
      parts.push(l.text);
    }
    return capTitle(parts.join(' '));
  }
  return capTitle((lines[0] as Line).text);
}

/** Joins a word broken by a hyphen at a line end when both sides are lower-case letters (`exam-\nple` → `example`). */
export function joinHyphenated(text: string): string {
  return text.replace(/(\p{Ll})-\n(\p{Ll})/gu, '$1$2');
}

/**
 * Reads a PDF's text. Never throws anything but {@link InputSkip}, whose
 * reasons are `encrypted PDF (password needed)`, `broken PDF: …` (pdf.js's
 * message), `no text: …` (no pages, or no text layer: a scan without OCR),
 * `PDF too large: …` (compressed streams unpacking past `limits.inflatedMax`,
 * default {@link PDF_INFLATED_MAX}, checked before pdf.js reads anything; or
 * text past `limits.textMax`, default {@link PDF_TEXT_MAX}).
 */
export async function readPdf(bytes: Uint8Array, limits: { readonly inflatedMax?: number; readonly textMax?: number } = {}): Promise<PdfText> {
  const inflatedMax = limits.inflatedMax ?? PDF_INFLATED_MAX;
  const textMax = limits.textMax ?? PDF_TEXT_MAX;
  if (await pdfInflatesPast(bytes, inflatedMax)) {
    throw new InputSkip(`PDF too large: its compressed streams unpack to more than ${inflatedMax} bytes (limit ${inflatedMax})`);
  }
  const pdfjs = await loadPdfjs();
  const folder = pdfjsFolder();
  const params: Record<string, unknown> = {
    data: new Uint8Array(bytes), // a copy: pdf.js may take the buffer over
    verbosity: 0,
    isEvalSupported: false,
    disableFontFace: true,
    useSystemFonts: false,
    disableAutoFetch: true,
    disableStream: true,
    stopAtErrors: false,
  };
  if (folder !== null) {
    params['cMapUrl'] = path.join(folder, 'cmaps') + path.sep;
    params['cMapPacked'] = true;
    params['standardFontDataUrl'] = path.join(folder, 'standard_fonts') + path.sep;
  }
  const task = pdfjs.getDocument(params as Parameters<PdfjsModule['getDocument']>[0]);
  let doc: Awaited<typeof task.promise>;
  try {
    doc = await task.promise;
  } catch (err) {
    await task.destroy().catch(() => undefined);
    const name = (err as { name?: unknown } | null)?.name;
    if (name === 'PasswordException') throw new InputSkip('encrypted PDF (password needed)');
    throw new InputSkip(`broken PDF: ${oneLine(err)}`);
  }
  try {
    const pages = doc.numPages;
    if (pages === 0) throw new InputSkip('no text: the PDF has no pages');
    const pageTexts: string[] = [];
    let firstLines: Line[] = [];
    let failed = 0;
    let firstFailure = '';
    let chars = 0;
    for (let n = 1; n <= pages; n++) {
      try {
        const page = await doc.getPage(n);
        const content = await page.getTextContent();
        const lines = itemsToLines(content.items);
        if (n === 1) firstLines = lines;
        if (lines.length > 0) {
          const t = lines.map((l) => l.text).join('\n');
          pageTexts.push(t);
          chars += t.length;
        }
        page.cleanup();
        if (chars > textMax) throw new InputSkip(`PDF too large: its text passes ${textMax} characters by page ${n} (limit ${textMax})`);
      } catch (err) {
        if (err instanceof InputSkip) throw err;
        failed++;
        if (firstFailure === '') firstFailure = `page ${n}: ${oneLine(err)}`;
      }
    }
    if (failed === pages) throw new InputSkip(`broken PDF: no page could be read (${firstFailure})`);
    const text = joinHyphenated(pageTexts.join('\n')).trim();
    if (text === '') throw new InputSkip('no text: the PDF has no text layer (scanned pages need OCR first)');
    let title = '';
    try {
      const meta = await doc.getMetadata();
      title = usableTitle((meta.info as Record<string, unknown> | null)?.['Title']);
      if (title === '' && meta.metadata) title = usableTitle(meta.metadata.get('dc:title'));
    } catch {
      title = '';
    }
    if (title === '') title = firstLines.length > 0 ? headingOf(firstLines) : firstLine(text);
    return { text, title, pages, failedPages: failed, firstFailure };
  } catch (err) {
    if (err instanceof InputSkip) throw err;
    throw new InputSkip(`broken PDF: ${oneLine(err)}`);
  } finally {
    await doc.destroy().catch(() => undefined);
  }
}
