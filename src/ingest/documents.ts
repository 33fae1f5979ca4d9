/**
 * One file's bytes to one document, with the reader chosen by content as
 * well as by extension:
 *
 * - `%PDF-` in the first KiB: PDF ({@link readPdf}), whatever the extension;
 *   a `.pdf` without it is skipped (`not a PDF: …`);
 * - a ZIP archive naming `word/document.xml`: Word ({@link readDocx}),
 *   whatever the extension; a `.docx` that is not one is skipped
 *   (`not a DOCX: …`, or the OLE message for encrypted and old Word files);
 * - `.eml`, or a file with another extension (or none) that starts with an
 *   e-mail header block: e-mail ({@link readMail});
 * - `.html`/`.htm`/`.xhtml`, or an unknown extension starting with
 *   `<!doctype html` or `<html`: HTML ({@link htmlToText}), its
 *   `<meta charset>` honoured;
 * - `.md` and the other Markdown extensions: Markdown; anything else: plain text.
 *
 * Text formats are decoded with {@link decodeBuffer} (encoding detection,
 * binary detection). Every failure is an {@link InputSkip} with a one-line
 * reason; nothing else is thrown for bad content.
 *
 * @module
 */
import { declaredHtmlCharset, type EncodingBasis } from './charset.js';
import { decodeBuffer, InputSkip, type DecodeStats } from './decode.js';
import { looksLikeDocx, looksLikeOle, readDocx } from './docx.js';
import { htmlToText } from './html.js';
import { looksLikeMail, readMail } from './mail.js';
import { looksLikePdf, readPdf } from './pdf.js';
import { firstLine, readMarkdown, readPlainText } from './text.js';
import { looksLikeZip } from './zip.js';
import { looksLikeXlsx } from './xlsx.js';

/** The readers a document file can go through. */
export type DocumentKind = 'pdf' | 'docx' | 'eml' | 'html' | 'markdown' | 'text';

/** How one file's text was decoded, when that was anything but clean UTF-8. */
export interface DecodingNote {
  /** The file (as sources name it). */
  readonly source: string;
  /** The encoding used (lower case); for an e-mail, those of its text parts joined with `, `. */
  readonly encoding: string;
  /** Why that encoding ({@link EncodingBasis}), or `mime` for an e-mail's declared part charsets. */
  readonly basis: EncodingBasis | 'mime';
  /** Characters replaced by U+FFFD (invalid sequences, undefined bytes). */
  readonly replaced: number;
  /** A declared encoding not used because the bytes are valid UTF-8. */
  readonly ignoredDeclaration?: string;
}

/** What reading one document file gave. */
export interface DocumentRead {
  readonly kind: DocumentKind;
  readonly text: string;
  /** `''` when the document has none; the caller then uses the id. */
  readonly title: string;
  /** Set for text formats and e-mail when the decoding is worth reporting (see {@link DecodingNote}). */
  readonly decoding: Omit<DecodingNote, 'source'> | null;
  /** One-line remarks, without the file name. */
  readonly warnings: string[];
  /** E-mail parts not read. */
  readonly attachments: string[];
  /** PDF pages. */
  readonly pages: number;
}

const HTML_EXT = new Set(['.html', '.htm', '.xhtml']);
const MARKDOWN_EXT = new Set(['.md', '.markdown', '.mdown', '.mkd']);
const TEXT_EXT = new Set(['.txt', '.text']);

/** Extensions read as one document each, by their own reader. */
export const DOCUMENT_EXTENSIONS: ReadonlySet<string> = new Set([...HTML_EXT, ...MARKDOWN_EXT, ...TEXT_EXT, '.pdf', '.docx', '.eml']);

/** The decoding worth reporting: another encoding than UTF-8, replacements, or an overridden declaration. */
export function noteOf(stats: DecodeStats): Omit<DecodingNote, 'source'> | null {
  if (stats.encoding === 'utf-8' && stats.invalid === 0 && stats.ignoredDeclaration === undefined) return null;
  const n: { encoding: string; basis: EncodingBasis; replaced: number; ignoredDeclaration?: string } = {
    encoding: stats.encoding,
    basis: stats.basis,
    replaced: stats.invalid,
  };
  if (stats.ignoredDeclaration !== undefined) n.ignoredDeclaration = stats.ignoredDeclaration;
  return n;
}

/** True when the bytes (after a byte order mark and white space) start an HTML document. */
function looksLikeHtml(b: Uint8Array): boolean {
  const head = Buffer.from(b.buffer, b.byteOffset, Math.min(b.byteLength, 512))
    .toString('latin1')
    .replace(/^\xef\xbb\xbf/, '')
    .trimStart()
    .toLowerCase();
  return head.startsWith('<!doctype html') || head.startsWith('<html');
}

/** Which reader a file goes to, from its first bytes and its extension; throws {@link InputSkip} when they disagree fatally. */
export function chooseReader(buf: Uint8Array, ext: string, complete: boolean): DocumentKind {
  if (looksLikePdf(buf)) return 'pdf';
  if (ext === '.pdf') throw new InputSkip('not a PDF: no %PDF- header in the first 1 KiB');
  if (looksLikeDocx(buf)) return 'docx';
  if (ext === '.docx') return 'docx'; // readDocx names what it is instead
  if (looksLikeXlsx(buf)) throw new InputSkip('a spreadsheet workbook: name the file itself as an input to read its rows');
  if (looksLikeZip(buf)) throw new InputSkip('binary: a zip archive (not a Word document)');
  if (looksLikeOle(buf)) throw new InputSkip('binary: an OLE compound document (an old-format Office file?)');
  if (ext === '.eml') return 'eml';
  if (HTML_EXT.has(ext)) return 'html';
  if (MARKDOWN_EXT.has(ext)) return 'markdown';
  if (TEXT_EXT.has(ext)) return 'text';
  if (looksLikeMail(buf, complete)) return 'eml';
  if (looksLikeHtml(buf)) return 'html';
  return 'text';
}

/**
 * Reads one document file from its bytes. `ext` is its extension (lower
 * case, with the dot); `encoding` is the forced encoding (canonical) or
 * `null`. Throws only {@link InputSkip}.
 */
export async function readDocumentBytes(buf: Buffer, ext: string, encoding: string | null): Promise<DocumentRead> {
  if (buf.length === 0) throw new InputSkip('empty (0 bytes)');
  const kind = chooseReader(buf, ext, true);
  const base = { decoding: null, warnings: [] as string[], attachments: [] as string[], pages: 0 };
  switch (kind) {
    case 'pdf': {
      const r = await readPdf(buf);
      const warnings = r.failedPages > 0 ? [`${r.failedPages} of ${r.pages} PDF page(s) could not be read (${r.firstFailure})`] : [];
      return { ...base, kind, text: r.text, title: r.title, pages: r.pages, warnings };
    }
    case 'docx': {
      const r = await readDocx(buf);
      return { ...base, kind, text: r.text, title: r.title };
    }
    case 'eml': {
      let m;
      try {
        m = readMail(buf, { forced: encoding });
      } catch (err) {
        if (err instanceof InputSkip) throw err;
        throw new InputSkip(`broken e-mail: ${err instanceof Error ? err.message.split('\n')[0] : String(err)}`);
      }
      const warnings = [...m.warnings];
      if (m.headerFields === 0) warnings.push('no e-mail header block; read as the body of a message');
      if (m.attachments.length > 0) warnings.push(`${m.attachments.length} attachment(s) not read: ${m.attachments.join(', ')}`);
      if (m.text === '') {
        throw new InputSkip(m.attachments.length > 0 ? `no text: the e-mail has only attachments (${m.attachments.length})` : 'no text: the e-mail has an empty body');
      }
      const plainUtf8 = m.encodings.every((e) => e === 'utf-8') && m.replaced === 0;
      const decoding = plainUtf8 ? null : { encoding: m.encodings.join(', ') || 'utf-8', basis: 'mime' as const, replaced: m.replaced };
      return { kind, text: m.text, title: m.subject || firstLine(m.text), decoding, warnings, attachments: m.attachments, pages: 0 };
    }
    default: {
      const declared = kind === 'html' ? declaredHtmlCharset : null;
      const { text: raw, stats } = decodeBuffer(buf, { hash: false, forced: encoding, declared });
      const r = kind === 'html' ? htmlToText(raw) : kind === 'markdown' ? readMarkdown(raw) : readPlainText(raw);
      if (r.text === '') throw new InputSkip('no text: only markup or white space');
      return { ...base, kind, text: r.text, title: r.title, decoding: noteOf(stats) };
    }
  }
}
