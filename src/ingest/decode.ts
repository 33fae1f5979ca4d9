/**
 * Bytes to text: the encoding chosen ({@link chooseEncoding}: byte order
 * marks, a forced or declared encoding, UTF-16 without a byte order mark,
 * UTF-8, legacy encodings), binary detection, replacement characters
 * counted, and the SHA-256 digest of the bytes, all in one pass so exports
 * of any size stream through.
 *
 * A stream is judged by its first {@link SNIFF_BYTES} bytes; a whole buffer
 * ({@link decodeBuffer}) by all of its bytes (binary detection always looks
 * at the first {@link SNIFF_BYTES}).
 *
 * @module
 */
import { createHash, type Hash } from 'node:crypto';
import { TextDecoder } from 'node:util';
import { isAscii } from 'node:buffer';
import iconv from 'iconv-lite';
import { chooseEncoding, iconvDecodes, utf8Census, type EncodingBasis, type EncodingChoice } from './charset.js';

/** How many leading bytes are inspected for NUL bytes, control characters and invalid UTF-8. */
export const SNIFF_BYTES = 8192;

/** Share of replaced characters in the first {@link SNIFF_BYTES} above which UTF-8 input counts as binary. */
export const BINARY_INVALID_SHARE = 0.25;

/**
 * Share of control characters (U+0001–U+001F other than tab, line feed,
 * vertical tab, form feed, carriage return, U+001A and escape; and U+007F)
 * in the first {@link SNIFF_BYTES} above which input counts as binary.
 * Random bytes hold about 10%; text practically none.
 */
export const BINARY_CONTROL_SHARE = 0.05;

/** Thrown while reading an input that is skipped, not fatal: binary, empty, unreadable, broken. */
export class InputSkip extends Error {
  override readonly name = 'InputSkip';
  /** One-line reason, as listed in `skipped`. */
  readonly reason: string;
  constructor(reason: string) {
    super(reason);
    this.reason = reason;
  }
}

/** What the decoder saw, known once the input has ended. */
export interface DecodeStats {
  /** Bytes read. */
  bytes: number;
  /** Lower-case hex SHA-256 of the bytes read (`''` when hashing was off). */
  sha256: string;
  /**
   * Characters replaced by U+FFFD: invalid UTF-8 or UTF-16 sequences, bytes
   * the encoding leaves undefined. Genuine U+FFFD characters in UTF-8 or
   * UTF-16 input are not counted.
   */
  invalid: number;
  /** The encoding used, lower case (`utf-8`, `utf-16le`, `windows-1252`, `iso-8859-2`, …). */
  encoding: string;
  /** Why that encoding. */
  basis: EncodingBasis;
  /** A declared encoding that was not used because the bytes are valid UTF-8. */
  ignoredDeclaration?: string;
  /** NUL characters removed from the text (only with {@link DecodeOptions.nul} `clean`). */
  nul?: number;
}

/** Options of {@link InputDecoder}. */
export interface DecodeOptions {
  /** `false` skips the SHA-256 (the caller hashes the bytes itself); `stats().sha256` is then `''`. */
  readonly hash?: boolean;
  /** A canonical encoding to use unless a byte order mark says otherwise. */
  readonly forced?: string | null;
  /** Finds the encoding the content declares (canonical) from its first bytes, e.g. an HTML `<meta charset>`. */
  readonly declared?: ((head: Uint8Array) => string | null) | null;
  /**
   * NUL bytes: `refuse` (default) makes an input with one in its first
   * {@link SNIFF_BYTES} binary and leaves later ones in the text; `clean`
   * (row exports) judges binary by the share of control characters and NULs
   * alone and removes every NUL from the text, counting them in
   * {@link DecodeStats.nul}, wherever they are.
   */
  readonly nul?: 'refuse' | 'clean';
}

const REPLACEMENT = '\uFFFD';

function countChar(s: string, ch: string): number {
  let n = 0;
  for (let i = s.indexOf(ch); i !== -1; i = s.indexOf(ch, i + 1)) n++;
  return n;
}

/** The bytes a genuine U+FFFD has in an encoding, and whether it must sit at an even offset. */
function genuinePattern(encoding: string): { bytes: Buffer; even: boolean } | null {
  if (encoding === 'utf-8') return { bytes: Buffer.from([0xef, 0xbf, 0xbd]), even: false };
  if (encoding === 'utf-16le') return { bytes: Buffer.from([0xfd, 0xff]), even: true };
  if (encoding === 'utf-16be') return { bytes: Buffer.from([0xff, 0xfd]), even: true };
  return null;
}

/** Decodes chunks in one encoding. */
export interface Inner {
  write(buf: Buffer): string;
  end(): string;
}

function innerDecoder(encoding: string): Inner {
  if (encoding === 'utf-8') return utf8Decoder();
  if (encoding === 'utf-16le' || encoding === 'utf-16be' || !iconvDecodes(encoding)) {
    // TextDecoder drops a leading byte order mark by default; it also decodes what iconv-lite lacks (ISO-2022-JP).
    const d = new TextDecoder(encoding);
    return { write: (b) => d.decode(b, { stream: true }), end: () => d.decode() };
  }
  const d = iconv.getDecoder(encoding, { stripBOM: true });
  return { write: (b) => d.write(b), end: () => d.end() ?? '' };
}

/**
 * Where the complete UTF-8 sequences of `buf` end: its length, or the start of
 * a last sequence whose lead byte asks for more bytes than are left. Cutting
 * there is cutting before a byte that is not a continuation byte, where a
 * decoder following the WHATWG Encoding Standard starts afresh, so decoding
 * the parts one by one gives the text of the whole.
 */
export function utf8CompleteEnd(buf: Uint8Array): number {
  const n = buf.length;
  for (let back = 1; back <= 3 && back <= n; back++) {
    const b = buf[n - back]!;
    if ((b & 0xc0) === 0x80) continue; // a continuation byte: look further back
    if (b < 0xc0) return n; // ASCII
    const need = b >= 0xf0 ? 4 : b >= 0xe0 ? 3 : 2;
    return back < need ? n - back : n;
  }
  return n;
}

/**
 * Streaming UTF-8 decoding with the output of `new TextDecoder('utf-8')` in
 * stream mode (replacement characters as the Encoding Standard places them,
 * a leading byte order mark dropped) at the speed of `Buffer#toString`: each
 * chunk is decoded up to its last complete sequence ({@link utf8CompleteEnd}),
 * the few bytes after it wait for the next chunk. Compared with TextDecoder
 * on random bytes and random cuts in test/ingest-encodings.test.ts.
 */
export function utf8Decoder(): Inner {
  let held: Buffer | null = null;
  let started = false;
  const text = (s: string): string => {
    if (started || s.length === 0) return s;
    started = true;
    return s.charCodeAt(0) === 0xfeff ? s.slice(1) : s;
  };
  return {
    write(b: Buffer): string {
      const buf = held === null ? b : Buffer.concat([held, b]);
      held = null;
      const cut = utf8CompleteEnd(buf);
      if (cut < buf.length) held = Buffer.from(buf.subarray(cut));
      const part = cut === buf.length ? buf : buf.subarray(0, cut);
      // ASCII bytes are their own Latin-1 text: the cheapest decoding (and V8 keeps the string one byte a character).
      return text(isAscii(part) ? part.toString('latin1') : part.toString('utf8'));
    },
    end(): string {
      const rest = held === null ? '' : held.toString('utf8');
      held = null;
      return text(rest);
    },
  };
}

/** Counts a byte pattern across chunk seams, optionally only at even offsets of the whole input. */
class PatternCounter {
  count = 0;
  private tail: Buffer = Buffer.alloc(0);
  private offset = 0; // absolute offset of the chunk being fed

  constructor(private readonly pattern: { bytes: Buffer; even: boolean }) {}

  feed(buf: Buffer): void {
    const p = this.pattern.bytes;
    const len = p.length;
    const ok = (abs: number): boolean => !this.pattern.even || abs % 2 === 0;
    if (this.tail.length > 0) {
      // Occurrences that start in the bytes before this chunk and end in it.
      const seam = Buffer.concat([this.tail, buf.subarray(0, len - 1)]);
      const tailStart = this.offset - this.tail.length;
      for (let i = 0; i < this.tail.length && i + len <= seam.length; i++) {
        if (seam.subarray(i, i + len).equals(p) && ok(tailStart + i)) this.count++;
      }
    }
    for (let i = buf.indexOf(p); i !== -1; i = buf.indexOf(p, i + 1)) {
      if (ok(this.offset + i)) this.count++;
    }
    const last = buf.length >= len - 1 ? buf.subarray(buf.length - (len - 1)) : Buffer.concat([this.tail, buf]).subarray(-(len - 1));
    this.tail = Buffer.from(last);
    this.offset += buf.length;
  }
}

function isControl(c: number): boolean {
  return (c >= 0x01 && c <= 0x08) || (c >= 0x0e && c <= 0x19) || (c >= 0x1c && c <= 0x1f) || c === 0x7f;
}

/**
 * Why the first bytes of an input make it binary, or `null`. An input with
 * a byte order mark is text by its own word.
 */
function binaryReason(sample: Buffer, choice: EncodingChoice, complete: boolean, cleanNul: boolean): string | null {
  if (choice.basis === 'bom') return null;
  const sixteen = choice.encoding.startsWith('utf-16') || choice.encoding.startsWith('utf-32') || choice.encoding.startsWith('ucs');
  if (!sixteen && !cleanNul && sample.includes(0)) return 'binary: NUL bytes in the first 8 KiB';
  let probe: string;
  try {
    const inner = innerDecoder(choice.encoding);
    probe = inner.write(sample) + (complete ? inner.end() : '');
  } catch {
    return null;
  }
  if (probe.length === 0) return null;
  let controls = 0;
  let nul = 0;
  for (let i = 0; i < probe.length; i++) {
    const c = probe.charCodeAt(i);
    if (isControl(c)) controls++;
    else if (c === 0) nul++;
  }
  if (sixteen && !cleanNul && nul > 0) return 'binary: NUL characters in the first 8 KiB';
  if ((controls + nul) / probe.length > BINARY_CONTROL_SHARE) {
    return `binary: ${Math.round((100 * (controls + nul)) / probe.length)}% control characters in the first 8 KiB`;
  }
  if (choice.encoding === 'utf-8') {
    const c = utf8Census(sample, complete);
    if (c.chars > 0 && c.invalid / c.chars > BINARY_INVALID_SHARE) {
      return `binary: ${Math.round((100 * c.invalid) / c.chars)}% of the characters in the first 8 KiB are not valid UTF-8`;
    }
  }
  return null;
}

/**
 * Incremental decoder. Feed chunks with {@link InputDecoder.push}, then call
 * {@link InputDecoder.end}; both return decoded text. The first
 * {@link SNIFF_BYTES} are held back until they can be judged, so a binary
 * input throws {@link InputSkip} before any text is returned.
 */
export class InputDecoder {
  private readonly hash: Hash | null;
  private readonly forced: string | null;
  private readonly declared: ((head: Uint8Array) => string | null) | null;
  private head: Buffer[] = [];
  private headBytes = 0;
  private inner: Inner | null = null;
  private choice: EncodingChoice = { encoding: 'utf-8', basis: 'utf-8' };
  private genuine: PatternCounter | null = null;
  private bytes = 0;
  private replaced = 0;
  private readonly cleanNul: boolean;
  private nul = 0;

  /** See {@link DecodeOptions}. */
  constructor(options: DecodeOptions = {}) {
    this.hash = options.hash === false ? null : createHash('sha256');
    this.forced = options.forced ?? null;
    this.declared = options.declared ?? null;
    this.cleanNul = options.nul === 'clean';
  }

  /** Adds bytes; returns the text decoded so far (possibly empty). */
  push(chunk: Uint8Array | string): string {
    const buf = typeof chunk === 'string' ? Buffer.from(chunk, 'utf8') : Buffer.from(chunk.buffer, chunk.byteOffset, chunk.byteLength);
    if (buf.length === 0) return '';
    this.hash?.update(buf);
    this.bytes += buf.length;
    if (this.inner === null) {
      this.head.push(buf);
      this.headBytes += buf.length;
      if (this.headBytes < SNIFF_BYTES) return '';
      return this.start(false);
    }
    return this.decode(buf);
  }

  /**
   * Takes a whole input at once (instead of {@link InputDecoder.push}): the
   * encoding is chosen from all of its bytes. Returns the text; call
   * {@link InputDecoder.end} after it.
   */
  pushWhole(buf: Uint8Array): string {
    if (this.bytes > 0) throw new Error('pushWhole must be the only input');
    const b = Buffer.from(buf.buffer, buf.byteOffset, buf.byteLength);
    this.hash?.update(b);
    this.bytes = b.length;
    if (b.length === 0) return '';
    this.head = [b];
    this.headBytes = b.length;
    return this.start(true);
  }

  /** Ends the input; returns the remaining text. Throws {@link InputSkip} for an empty or binary input. */
  end(): string {
    let text = '';
    if (this.inner === null) {
      if (this.headBytes === 0) throw new InputSkip('empty (0 bytes)');
      text = this.start(true);
    }
    const rest = this.dropNul((this.inner as Inner).end());
    this.replaced += countChar(rest, REPLACEMENT);
    return text + rest;
  }

  /** Byte count, digest, encoding and replacement count; call after {@link InputDecoder.end}. */
  stats(): DecodeStats {
    const s: DecodeStats = {
      bytes: this.bytes,
      sha256: this.hash ? this.hash.digest('hex') : '',
      invalid: Math.max(0, this.replaced - (this.genuine?.count ?? 0)),
      encoding: this.choice.encoding,
      basis: this.choice.basis,
    };
    if (this.choice.ignoredDeclaration !== undefined) s.ignoredDeclaration = this.choice.ignoredDeclaration;
    if (this.cleanNul) s.nul = this.nul;
    return s;
  }

  private start(complete: boolean): string {
    const head = Buffer.concat(this.head, this.headBytes);
    this.head = [];
    // A stream is judged by exactly its first SNIFF_BYTES, so the choice does not depend on how it is cut into chunks.
    const sample = complete ? head : head.subarray(0, SNIFF_BYTES);
    let declared: string | null = null;
    if (this.declared) declared = this.declared(sample);
    this.choice = chooseEncoding(sample, { forced: this.forced, declared, complete });
    const why = binaryReason(head.subarray(0, SNIFF_BYTES), this.choice, complete && head.length <= SNIFF_BYTES, this.cleanNul);
    if (why !== null) throw new InputSkip(why);
    this.inner = innerDecoder(this.choice.encoding);
    const pattern = genuinePattern(this.choice.encoding);
    this.genuine = pattern ? new PatternCounter(pattern) : null;
    return this.decode(head);
  }

  private decode(buf: Buffer): string {
    this.genuine?.feed(buf);
    const text = this.dropNul((this.inner as Inner).write(buf));
    this.replaced += countChar(text, REPLACEMENT);
    return text;
  }

  /** With `nul: 'clean'`, the text without its NUL characters (counted). */
  private dropNul(text: string): string {
    if (!this.cleanNul || !text.includes('\0')) return text;
    this.nul += countChar(text, '\0');
    return text.replaceAll('\0', '');
  }
}

/** Decodes a whole buffer at once, choosing the encoding from all its bytes; see {@link InputDecoder}. */
export function decodeBuffer(buf: Uint8Array, options: DecodeOptions = {}): { text: string; stats: DecodeStats } {
  const d = new InputDecoder(options);
  const text = d.pushWhole(buf) + d.end();
  return { text, stats: d.stats() };
}

/**
 * Decodes a stream of chunks lazily. `done` receives the stats once the
 * stream has ended. Throws {@link InputSkip} (before yielding) for binary or
 * empty input.
 */
export async function* decodeStream(
  source: AsyncIterable<Uint8Array | string>,
  done: (stats: DecodeStats) => void,
  options: DecodeOptions = {},
): AsyncGenerator<string, void, undefined> {
  const d = new InputDecoder(options);
  for await (const chunk of source) {
    const text = d.push(chunk);
    if (text.length > 0) yield text;
  }
  const text = d.end();
  done(d.stats());
  if (text.length > 0) yield text;
}
