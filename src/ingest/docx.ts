/**
 * Word documents (Office Open XML, `.docx`) to text with mammoth's
 * `extractRawText` (paragraphs separated by a blank line), and the title
 * from the core properties (`docProps/core.xml`, `dc:title`) or else the
 * first paragraph.
 *
 * @module
 */
import { InputSkip } from './decode.js';
import { oneLine } from './io-errors.js';
import { capTitle, firstLine, normalizeNewlines } from './text.js';
import { looksLikeZip, zipEntries, zipRead, type ZipEntry } from './zip.js';

/** Largest `word/document.xml` unpacked, in bytes (its declared size is checked before mammoth unpacks it). */
export const DOCX_XML_MAX = 512 * 1024 * 1024;

/** The OLE compound document signature: old `.doc` files and password-protected Office files. */
const OLE = Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]);

/** True when `b` starts with the OLE compound document signature. */
export function looksLikeOle(b: Uint8Array): boolean {
  return b.length >= 8 && Buffer.from(b.buffer, b.byteOffset, 8).equals(OLE);
}

/** True when `b` is a ZIP archive naming `word/document.xml` (a Word document, by the name in its headers). */
export function looksLikeDocx(b: Uint8Array): boolean {
  if (!looksLikeZip(b)) return false;
  return Buffer.from(b.buffer, b.byteOffset, b.byteLength).includes('word/document.xml', 0, 'latin1');
}

const XML_ENTITIES: Readonly<Record<string, string>> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'" };

/** XML text with its five named entities and numeric character references decoded. */
export function decodeXmlText(s: string): string {
  return s.replace(/&(?:#x([0-9a-fA-F]+)|#([0-9]+)|([a-z]+));/g, (m, hex: string | undefined, dec: string | undefined, name: string | undefined) => {
    if (name !== undefined) return XML_ENTITIES[name] ?? m;
    const cp = hex !== undefined ? parseInt(hex, 16) : parseInt(dec as string, 10);
    return cp > 0 && cp <= 0x10ffff && !(cp >= 0xd800 && cp <= 0xdfff) ? String.fromCodePoint(cp) : m;
  });
}

/** `dc:title` of a core properties part, or `''`. */
export function coreTitle(xml: string): string {
  const m = /<dc:title(?:\s[^>]*)?>([\s\S]*?)<\/dc:title>/.exec(xml);
  return m ? capTitle(decodeXmlText((m[1] as string).replace(/<[^>]*>/g, ''))) : '';
}

type Mammoth = { extractRawText(input: { buffer: Buffer }): Promise<{ value: string }> };
let mammothModule: Promise<Mammoth> | null = null;

function loadMammoth(): Promise<Mammoth> {
  mammothModule ??= import('mammoth').then((m) => ((m as { default?: Mammoth }).default ?? (m as unknown as Mammoth)));
  return mammothModule;
}

/**
 * Reads a `.docx`. Text: mammoth's raw text, line endings normalised,
 * trailing spaces dropped, runs of blank lines collapsed to one, trimmed.
 * Never throws anything but {@link InputSkip}, whose reasons are:
 * `not a DOCX: not a zip archive`, `encrypted or old-format Word file (…)`,
 * `not a DOCX: …` for a damaged archive or one without `word/document.xml`,
 * `broken DOCX: …` when mammoth fails, `no text: …` for an empty document.
 */
export async function readDocx(buf: Buffer): Promise<{ text: string; title: string }> {
  if (looksLikeOle(buf)) {
    throw new InputSkip('encrypted or old-format Word file (an OLE compound document, not a zip): save it as .docx without a password');
  }
  if (!looksLikeZip(buf)) throw new InputSkip('not a DOCX: not a zip archive');
  let entries: ZipEntry[];
  try {
    entries = zipEntries(buf);
  } catch (err) {
    throw new InputSkip(`not a DOCX: damaged zip archive (${oneLine(err)})`);
  }
  const body = entries.find((e) => e.name === 'word/document.xml');
  if (!body) throw new InputSkip('not a DOCX: a zip archive without word/document.xml');
  if (body.encrypted) throw new InputSkip('encrypted DOCX (password needed)');
  if (body.size > DOCX_XML_MAX) throw new InputSkip(`DOCX too large: word/document.xml unpacks to ${body.size} bytes (limit ${DOCX_XML_MAX})`);
  let raw: string;
  try {
    raw = (await (await loadMammoth()).extractRawText({ buffer: buf })).value;
  } catch (err) {
    throw new InputSkip(`broken DOCX: ${oneLine(err)}`);
  }
  const text = normalizeNewlines(raw)
    .replace(/[ \t\u00a0]+$/gm, '')
    .replace(/\n{3,}/g, '\n\n')
    .trim();
  if (text === '') throw new InputSkip('no text: the Word document is empty');
  let title = '';
  const core = entries.find((e) => e.name === 'docProps/core.xml');
  if (core) {
    try {
      title = coreTitle(zipRead(buf, core, 1 << 20).toString('utf8'));
    } catch {
      title = '';
    }
  }
  return { text, title: title || firstLine(text) };
}
