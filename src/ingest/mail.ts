/**
 * E-mail messages (`.eml`): the header block of RFC 5322, MIME bodies of
 * RFC 2045–2046 (multipart boundaries, quoted-printable, base64, `charset`
 * parameters), encoded words in headers (RFC 2047), parameter value
 * continuations and charsets (RFC 2231), and `format=flowed` (RFC 3676).
 *
 * A message becomes one document: its subject is the title and its text is
 * the `text/plain` part — or the HTML part reduced to text when there is no
 * plain part. Every other part (files, images, calendars, attached
 * messages) is an attachment: not read, but named in the result.
 *
 * The parser works on the bytes as Latin-1 (one character per byte), so no
 * byte is lost before each part is decoded with its own charset.
 *
 * @module
 */
import iconv from 'iconv-lite';
import { canonicalEncoding, decodeWith } from './charset.js';
import { decodeBuffer, InputSkip } from './decode.js';
import { htmlToText } from './html.js';
import { capTitle, normalizeNewlines } from './text.js';

/** Deepest nesting of multiparts read; deeper parts are ignored. */
export const MAIL_MAX_DEPTH = 24;

/** What a message gave. */
export interface MailText {
  /** The decoded `Subject`, white space collapsed; `''` when there is none. */
  readonly subject: string;
  /** The body text (line endings normalised, trimmed). */
  readonly text: string;
  /** Where the text came from. */
  readonly source: 'plain' | 'html' | 'none';
  /** Names of the parts not read (a file name, or `(unnamed type/subtype)`), in message order. */
  readonly attachments: string[];
  /** The encodings the text parts were decoded with, in order, without repeats. */
  readonly encodings: string[];
  /** Characters replaced by U+FFFD while decoding the text parts. */
  readonly replaced: number;
  /** Problems met (an unknown charset, a multipart without boundary…), one line each. */
  readonly warnings: string[];
  /** Header fields of the message (0: no header block, all body). */
  readonly headerFields: number;
}

/** A header field: its name as written and its raw (unfolded) value. */
export interface HeaderField {
  readonly name: string;
  readonly value: string;
}

const FIELD = /^([\x21-\x39\x3b-\x7e]+)[ \t]*:(.*)$/;

/** Names that mark a header block as an e-mail's (lower case). */
const MAIL_FIELDS = new Set([
  'from', 'to', 'cc', 'subject', 'date', 'message-id', 'received', 'return-path', 'mime-version', 'delivered-to',
  'reply-to', 'sender', 'in-reply-to', 'references', 'x-mailer', 'user-agent', 'content-type',
]);

/**
 * Splits a message (as a Latin-1 string) into its header fields and where
 * the body starts. Lines end with CRLF or LF; a line starting with a space
 * or tab continues the field before it (unfolding: the line break is
 * removed, the white space kept — RFC 5322 §2.2.3). A leading mbox
 * `From ` line is skipped. The header block ends at the first empty line,
 * or at the first line that is neither a field nor a continuation
 * (`end` says which, or `eof` when the input ended first).
 */
export function splitHeader(raw: string): { fields: HeaderField[]; bodyStart: number; end: 'blank' | 'other' | 'eof' } {
  const fields: { name: string; value: string }[] = [];
  let pos = 0;
  let first = true;
  while (pos < raw.length) {
    let nl = raw.indexOf('\n', pos);
    if (nl === -1) nl = raw.length;
    const line = raw.slice(pos, nl > pos && raw[nl - 1] === '\r' ? nl - 1 : nl);
    if (line === '') return { fields, bodyStart: Math.min(raw.length, nl + 1), end: 'blank' };
    if ((line[0] === ' ' || line[0] === '\t') && fields.length > 0) {
      (fields[fields.length - 1] as { value: string }).value += line;
    } else {
      const m = FIELD.exec(line);
      if (m) fields.push({ name: m[1] as string, value: m[2] as string });
      else if (!(first && line.startsWith('From '))) return { fields, bodyStart: pos, end: 'other' };
    }
    first = false;
    pos = nl + 1;
  }
  return { fields, bodyStart: raw.length, end: 'eof' };
}

/**
 * True when `head` (the first bytes of a file) starts with an e-mail header
 * block: at least two fields, one of them a usual mail field (`From`,
 * `Subject`, `Received`…), ended by an empty line — or by the end of `head`
 * when `complete`.
 */
export function looksLikeMail(head: Uint8Array, complete: boolean): boolean {
  const raw = Buffer.from(head.buffer, head.byteOffset, Math.min(head.byteLength, 65536)).toString('latin1');
  const { fields, end } = splitHeader(raw);
  if (fields.length < 2 || !fields.some((f) => MAIL_FIELDS.has(f.name.toLowerCase()))) return false;
  return end === 'blank' || (end === 'eof' && complete && head.byteLength <= 65536);
}

/** Bytes from a Latin-1 string (each character one byte). */
function bytesOf(latin1: string): Buffer {
  return Buffer.from(latin1, 'latin1');
}

/** Decodes bytes in a charset label; `null` when the label is unknown. */
function decodeIn(bytes: Buffer, label: string): string | null {
  const enc = canonicalEncoding(label.replace(/\*.*$/, '')); // RFC 2231 §5: charset*language
  if (enc === null) return null;
  return decodeWith(bytes, enc);
}

/** A header value's raw 8-bit text (RFC 6532 allows UTF-8) as a string: UTF-8 when valid, else Windows-1252. */
function headerText(latin1: string): string {
  // eslint-disable-next-line no-control-regex
  if (!/[^\x00-\x7f]/.test(latin1)) return latin1;
  const bytes = bytesOf(latin1);
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    return iconv.decode(bytes, 'windows-1252');
  }
}

const ENCODED_WORD = /=\?([^?\s]+)\?([BbQq])\?([^?\s]*)\?=/g;

/** The bytes an encoded word's text stands for: `B` base64, `Q` quoted-printable with `_` for space (RFC 2047 §4). */
function encodedWordBytes(kind: string, text: string): Buffer {
  if (kind === 'B' || kind === 'b') return Buffer.from(text, 'base64');
  const out: number[] = [];
  for (let i = 0; i < text.length; i++) {
    const c = text[i] as string;
    if (c === '_') out.push(0x20);
    else if (c === '=' && /^[0-9A-Fa-f]{2}$/.test(text.slice(i + 1, i + 3))) {
      out.push(parseInt(text.slice(i + 1, i + 3), 16));
      i += 2;
    } else out.push(c.charCodeAt(0) & 0xff);
  }
  return Buffer.from(out);
}

/**
 * Decodes RFC 2047 encoded words (`=?charset?Q?…?=`, `=?charset?B?…?=`) in
 * a header value. White space between two adjacent encoded words is
 * dropped (§6.2); adjacent words in the same charset are decoded together,
 * so a character split across two words (a common fault) survives. A word
 * in an unknown charset is left as it is (§6.3). Other text is kept;
 * 8-bit bytes in it are read as UTF-8 (RFC 6532), else Windows-1252.
 */
export function decodeEncodedWords(value: string): string {
  let out = '';
  let last = 0;
  let pending: { charset: string; bytes: Buffer[]; originals: string[] } | null = null;
  const flush = (): void => {
    if (pending === null) return;
    const decoded = decodeIn(Buffer.concat(pending.bytes), pending.charset);
    out += decoded ?? pending.originals.join('');
    pending = null;
  };
  ENCODED_WORD.lastIndex = 0;
  let afterWord = false;
  for (let m = ENCODED_WORD.exec(value); m !== null; m = ENCODED_WORD.exec(value)) {
    const between = value.slice(last, m.index);
    if (!(afterWord && /^[ \t\r\n]*$/.test(between))) {
      flush();
      out += headerText(between);
    }
    const charset = (m[1] as string).toLowerCase().replace(/\*.*$/, '');
    const bytes = encodedWordBytes(m[2] as string, m[3] as string);
    const p = pending as { charset: string; bytes: Buffer[]; originals: string[] } | null;
    if (p !== null && p.charset === charset) {
      p.bytes.push(bytes);
      p.originals.push(m[0]);
    } else {
      flush();
      pending = { charset, bytes: [bytes], originals: [m[0]] };
    }
    last = m.index + m[0].length;
    afterWord = true;
  }
  flush();
  return out + headerText(value.slice(last));
}

/** A header's main value (lower case) and its parameters, names lower case. */
export interface ParamValue {
  readonly value: string;
  readonly params: ReadonlyMap<string, string>;
}

/** Splits at `;` outside quoted strings and comments. */
function splitParams(s: string): string[] {
  const parts: string[] = [];
  let cur = '';
  let quoted = false;
  let comment = 0;
  for (let i = 0; i < s.length; i++) {
    const c = s[i] as string;
    if (quoted) {
      cur += c;
      if (c === '\\' && i + 1 < s.length) cur += s[++i];
      else if (c === '"') quoted = false;
    } else if (c === '"') {
      quoted = true;
      cur += c;
    } else if (c === '(') {
      comment++;
    } else if (c === ')' && comment > 0) {
      comment--;
    } else if (comment > 0) {
      continue;
    } else if (c === ';') {
      parts.push(cur);
      cur = '';
    } else cur += c;
  }
  parts.push(cur);
  return parts;
}

function unquote(v: string): string {
  const t = v.trim();
  if (t.length >= 2 && t[0] === '"' && t[t.length - 1] === '"') return t.slice(1, -1).replace(/\\(.)/g, '$1');
  return t;
}

/** `%XX` escapes of an RFC 2231 extended value to bytes. */
function percentBytes(s: string): Buffer {
  const out: number[] = [];
  for (let i = 0; i < s.length; i++) {
    if (s[i] === '%' && /^[0-9A-Fa-f]{2}$/.test(s.slice(i + 1, i + 3))) {
      out.push(parseInt(s.slice(i + 1, i + 3), 16));
      i += 2;
    } else out.push(s.charCodeAt(i) & 0xff);
  }
  return Buffer.from(out);
}

/**
 * Parses a structured header such as `Content-Type` or
 * `Content-Disposition`: `main/value; name=token; name="quoted"`, with
 * RFC 2231 continuations (`name*0=…; name*1=…`) and extended values
 * (`name*=charset'language'%XX…`). Values in the plain form may hold
 * encoded words (a common practice RFC 2047 §5 does not allow); they are
 * decoded too.
 */
export function parseParams(header: string): ParamValue {
  const [main = '', ...rest] = splitParams(header);
  const plain = new Map<string, string>();
  const pieces = new Map<string, { index: number; extended: boolean; value: string }[]>();
  for (const part of rest) {
    const eq = part.indexOf('=');
    if (eq === -1) continue;
    const rawName = part.slice(0, eq).trim().toLowerCase();
    const value = part.slice(eq + 1);
    const m = /^([^*]+)(?:\*(\d+))?(\*)?$/.exec(rawName);
    if (!m) continue;
    const name = m[1] as string;
    if (m[2] === undefined && m[3] === undefined) {
      if (!plain.has(name)) plain.set(name, unquote(value));
      continue;
    }
    const list = pieces.get(name) ?? [];
    list.push({ index: m[2] === undefined ? 0 : Number(m[2]), extended: m[3] !== undefined, value: unquote(value) });
    pieces.set(name, list);
  }
  const params = new Map<string, string>();
  for (const [name, v] of plain) params.set(name, decodeEncodedWords(v));
  for (const [name, list] of pieces) {
    list.sort((a, b) => a.index - b.index);
    let charset = '';
    const bytes: Buffer[] = [];
    list.forEach((p, i) => {
      let v = p.value;
      if (p.extended && i === 0) {
        const q = /^([^']*)'[^']*'(.*)$/.exec(v);
        if (q) {
          charset = q[1] as string;
          v = q[2] as string;
        }
      }
      bytes.push(p.extended ? percentBytes(v) : bytesOf(v));
    });
    const joined = Buffer.concat(bytes);
    params.set(name, (charset ? decodeIn(joined, charset) : null) ?? headerText(joined.toString('latin1')));
  }
  return { value: main.trim().toLowerCase(), params };
}

/**
 * Quoted-printable (RFC 2045 §6.7) to bytes: `=XX` is a byte, `=` at a
 * line end a soft line break, white space at a line end dropped (rule 3);
 * an `=` that starts neither is kept as it is. Line breaks become LF.
 */
export function decodeQuotedPrintable(latin1: string): Buffer {
  const lines = latin1.split(/\r?\n/);
  const out: number[] = [];
  lines.forEach((rawLine, li) => {
    const line = rawLine.replace(/[ \t]+$/, '');
    let soft = false;
    for (let i = 0; i < line.length; i++) {
      const c = line[i] as string;
      if (c === '=') {
        if (i === line.length - 1) {
          soft = true;
          break;
        }
        const hex = line.slice(i + 1, i + 3);
        if (/^[0-9A-Fa-f]{2}$/.test(hex)) {
          out.push(parseInt(hex, 16));
          i += 2;
          continue;
        }
      }
      out.push(c.charCodeAt(0) & 0xff);
    }
    if (!soft && li < lines.length - 1) out.push(0x0a);
  });
  return Buffer.from(out);
}

/** Base64 (RFC 2045 §6.8) to bytes; characters outside the alphabet are ignored. */
export function decodeBase64(latin1: string): Buffer {
  return Buffer.from(latin1.replace(/[^A-Za-z0-9+/]/g, ''), 'base64');
}

/**
 * Undoes `format=flowed` (RFC 3676 §4): quote depth read from leading `>`,
 * one space of space-stuffing removed, a line ending in a space (other than
 * the signature separator `-- `) joined with the next line of the same
 * depth — without that space when `delSp` (§4.5).
 */
export function unflow(text: string, delSp: boolean): string {
  const out: string[] = [];
  let cur: { depth: number; text: string } | null = null;
  for (const rawLine of text.split('\n')) {
    const m = /^(>*)/.exec(rawLine) as RegExpExecArray;
    const depth = (m[1] as string).length;
    let body = rawLine.slice(depth);
    if (body.startsWith(' ')) body = body.slice(1);
    const flowed = body.endsWith(' ') && body !== '-- ';
    const piece = flowed && delSp ? body.slice(0, -1) : body;
    if (cur !== null && cur.depth === depth) cur.text += piece;
    else {
      if (cur !== null) out.push(render(cur));
      cur = { depth, text: piece };
    }
    if (!flowed) {
      out.push(render(cur));
      cur = null;
    }
  }
  if (cur !== null) out.push(render(cur));
  return out.join('\n');
}

function render(l: { depth: number; text: string }): string {
  return l.depth > 0 ? '>'.repeat(l.depth) + ' ' + l.text : l.text;
}

interface Piece {
  readonly kind: 'plain' | 'html';
  readonly text: string;
}

interface Walk {
  readonly attachments: string[];
  readonly encodings: string[];
  readonly warnings: string[];
  replaced: number;
  readonly forced: string | null;
}

function headerMap(fields: readonly HeaderField[]): Map<string, string> {
  const m = new Map<string, string>();
  for (const f of fields) {
    const k = f.name.toLowerCase();
    if (!m.has(k)) m.set(k, f.value);
  }
  return m;
}

/** The body parts of a multipart body: between `--boundary` lines, before `--boundary--` (RFC 2046 §5.1.1). */
export function splitMultipart(body: string, boundary: string): string[] | null {
  const delim = '--' + boundary;
  const parts: string[] = [];
  let start = -1;
  let pos = 0;
  let found = false;
  while (pos <= body.length) {
    let nl = body.indexOf('\n', pos);
    if (nl === -1) nl = body.length;
    const line = body.slice(pos, nl).replace(/\r$/, '');
    if (line.startsWith(delim)) {
      const restOf = line.slice(delim.length);
      const closing = restOf.startsWith('--');
      if (/^(--)?[ \t]*$/.test(restOf)) {
        found = true;
        if (start !== -1) {
          // The line break before a delimiter belongs to the delimiter.
          let end = pos;
          if (end > start && body[end - 1] === '\n') end--;
          if (end > start && body[end - 1] === '\r') end--;
          parts.push(body.slice(start, end));
        }
        if (closing) return parts;
        start = nl + 1;
      }
    }
    pos = nl + 1;
  }
  if (!found) return null;
  if (start !== -1 && start <= body.length) parts.push(body.slice(start)); // no closing delimiter: keep the last part
  return parts;
}

function partName(headers: Map<string, string>, type: string): string {
  const disp = parseParams(headers.get('content-disposition') ?? '');
  const ct = parseParams(headers.get('content-type') ?? '');
  const name = disp.params.get('filename') ?? ct.params.get('name');
  return name !== undefined && name.trim() !== '' ? name.trim() : `(unnamed ${type})`;
}

function decodeTransfer(body: string, cte: string): Buffer {
  const enc = cte.trim().toLowerCase();
  if (enc === 'base64') return decodeBase64(body);
  if (enc === 'quoted-printable') return decodeQuotedPrintable(body);
  return bytesOf(body);
}

function textOf(headers: Map<string, string>, ct: ParamValue, body: string, w: Walk): string {
  const bytes = decodeTransfer(body, headers.get('content-transfer-encoding') ?? '');
  if (bytes.length === 0) return '';
  const label = ct.params.get('charset');
  let declared: string | null = null;
  if (label !== undefined && label.trim() !== '') {
    declared = canonicalEncoding(label);
    if (declared === null) w.warnings.push(`unknown charset ${JSON.stringify(label)}; the encoding was guessed`);
    // RFC 2045 §5.2: us-ascii is the default, so it says nothing about 8-bit bytes.
    if (/^(us-)?ascii$/i.test(label.trim())) declared = null;
  }
  try {
    const { text, stats } = decodeBuffer(bytes, { hash: false, forced: w.forced, declared: () => declared });
    if (!w.encodings.includes(stats.encoding)) w.encodings.push(stats.encoding);
    w.replaced += stats.invalid;
    let t = normalizeNewlines(text);
    if ((ct.params.get('format') ?? '').toLowerCase() === 'flowed') {
      t = unflow(t, (ct.params.get('delsp') ?? '').toLowerCase() === 'yes');
    }
    return t;
  } catch (err) {
    if (err instanceof InputSkip) {
      w.warnings.push(`a ${ct.value || 'text/plain'} part was not read (${err.reason})`);
      return '';
    }
    throw err;
  }
}

const SIGNATURE_TYPES = new Set(['application/pgp-signature', 'application/pkcs7-signature', 'application/x-pkcs7-signature']);

function walkPart(raw: string, depth: number, w: Walk, inDigest: boolean): Piece[] {
  const { fields, bodyStart } = splitHeader(raw);
  return walkBody(headerMap(fields), raw.slice(bodyStart), depth, w, inDigest);
}

function walkBody(headers: Map<string, string>, body: string, depth: number, w: Walk, inDigest: boolean): Piece[] {
  const ctRaw = headers.get('content-type');
  const ct = parseParams(ctRaw ?? (inDigest ? 'message/rfc822' : 'text/plain'));
  const type = /^[a-z0-9!#$&^_.+-]+\/[a-z0-9!#$&^_.+-]+$/.test(ct.value) ? ct.value : 'text/plain';
  const disposition = parseParams(headers.get('content-disposition') ?? '');
  const hasName = disposition.params.has('filename') || ct.params.has('name');
  const attached = disposition.value === 'attachment' || (hasName && disposition.value !== 'inline');

  if (type.startsWith('multipart/')) {
    const boundary = ct.params.get('boundary');
    if (depth >= MAIL_MAX_DEPTH) {
      w.warnings.push(`multiparts nested deeper than ${MAIL_MAX_DEPTH}; the deeper parts were not read`);
      return [];
    }
    const parts = boundary ? splitMultipart(body, boundary) : null;
    if (parts === null) {
      w.warnings.push(boundary ? `the ${type} boundary never appears; its body was read as plain text` : `a ${type} has no boundary; its body was read as plain text`);
      const text = textOf(headers, parseParams('text/plain'), body, w);
      return text.trim() === '' ? [] : [{ kind: 'plain', text }];
    }
    const digest = type === 'multipart/digest';
    if (type === 'multipart/alternative') {
      // RFC 2046 §5.1.4: alternatives in increasing faithfulness; plain text is preferred here.
      const tries = parts.map((p) => {
        const sub: Walk = { attachments: [], encodings: [], warnings: [], replaced: 0, forced: w.forced };
        return { pieces: walkPart(p, depth + 1, sub, false), sub };
      });
      const nonEmpty = (t: (typeof tries)[number]): boolean => t.pieces.some((x) => x.text.trim() !== '');
      const pick =
        tries.find((t) => nonEmpty(t) && t.pieces.every((x) => x.kind === 'plain')) ??
        tries.find((t) => nonEmpty(t)) ??
        tries[0];
      if (!pick) return [];
      w.attachments.push(...pick.sub.attachments);
      for (const e of pick.sub.encodings) if (!w.encodings.includes(e)) w.encodings.push(e);
      w.warnings.push(...pick.sub.warnings);
      w.replaced += pick.sub.replaced;
      return pick.pieces;
    }
    return parts.flatMap((p) => walkPart(p, depth + 1, w, digest));
  }
  if (SIGNATURE_TYPES.has(type)) return [];
  if (attached || !(type === 'text/plain' || type === 'text/html')) {
    if (type === 'message/rfc822' && !hasName) {
      const inner = headerMap(splitHeader(body).fields).get('subject');
      w.attachments.push(inner !== undefined && inner.trim() !== '' ? `(attached message: ${collapse(decodeEncodedWords(inner))})` : '(attached message)');
    } else {
      w.attachments.push(partName(headers, type));
    }
    return [];
  }
  const text = textOf(headers, ct, body, w);
  if (text.trim() === '') return [];
  return [{ kind: type === 'text/html' ? 'html' : 'plain', text }];
}

function collapse(s: string): string {
  return s.replace(/[\s\u00a0]+/g, ' ').trim();
}

/**
 * Reads one message. `forced` (canonical) decodes text parts that declare
 * no usable charset. Never throws: a message without any text has
 * `source: 'none'` and empty text.
 */
export function readMail(buf: Buffer, options: { readonly forced?: string | null } = {}): MailText {
  const raw = buf.toString('latin1');
  const { fields, bodyStart } = splitHeader(raw);
  const headers = headerMap(fields);
  const w: Walk = { attachments: [], encodings: [], warnings: [], replaced: 0, forced: options.forced ?? null };
  const pieces = walkBody(headers, raw.slice(bodyStart), 0, w, false);
  const texts = pieces.map((p) => (p.kind === 'html' ? htmlToText(p.text).text : p.text.replace(/[ \t]+$/gm, '').trim()));
  const text = texts.filter((t) => t !== '').join('\n\n').trim();
  const subjectRaw = headers.get('subject');
  const subject = subjectRaw === undefined ? '' : capTitle(collapse(decodeEncodedWords(subjectRaw)));
  const source: MailText['source'] = text === '' ? 'none' : pieces.every((p) => p.kind === 'html') ? 'html' : 'plain';
  return {
    subject,
    text,
    source,
    attachments: w.attachments,
    encodings: w.encodings,
    replaced: w.replaced,
    warnings: w.warnings,
    headerFields: fields.length,
  };
}
