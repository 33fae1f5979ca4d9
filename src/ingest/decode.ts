/**
 * Bytes to text: byte order marks, binary detection, UTF-8 with replacement
 * of invalid sequences (counted), and the SHA-256 digest of the bytes, all
 * in one pass so exports of any size stream through.
 *
 * @module
 */
import { createHash, type Hash } from 'node:crypto';
import { TextDecoder } from 'node:util';

/** How many leading bytes are inspected for NUL bytes and invalid UTF-8. */
export const SNIFF_BYTES = 8192;

/** Share of replaced characters in the first {@link SNIFF_BYTES} above which a file counts as binary. */
export const BINARY_INVALID_SHARE = 0.25;

/** Thrown while reading an input that is skipped, not fatal: binary, empty, unreadable. */
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
  /** Lower-case hex SHA-256 of the bytes read. */
  sha256: string;
  /** Invalid byte sequences replaced by U+FFFD (genuine U+FFFD characters in the input are not counted). */
  invalid: number;
  /** The encoding used: `utf-8`, or `utf-16le` / `utf-16be` when the input starts with that byte order mark. */
  encoding: 'utf-8' | 'utf-16le' | 'utf-16be';
}

const REPLACEMENT = '\uFFFD';
const UTF8_REPLACEMENT = Buffer.from([0xef, 0xbf, 0xbd]);

function countChar(s: string, ch: string): number {
  let n = 0;
  for (let i = s.indexOf(ch); i !== -1; i = s.indexOf(ch, i + 1)) n++;
  return n;
}

function countBytes(buf: Buffer, pattern: Buffer): number {
  let n = 0;
  for (let i = buf.indexOf(pattern); i !== -1; i = buf.indexOf(pattern, i + pattern.length)) n++;
  return n;
}

/**
 * Incremental decoder. Feed chunks with {@link InputDecoder.push}, then call
 * {@link InputDecoder.end}; both return decoded text. The first
 * {@link SNIFF_BYTES} are held back until they can be judged, so a binary
 * input throws {@link InputSkip} before any text is returned.
 */
export class InputDecoder {
  private readonly hash: Hash | null;
  private head: Buffer[] = [];
  private headBytes = 0;
  private decoder: TextDecoder | null = null;
  private encoding: DecodeStats['encoding'] = 'utf-8';
  private bytes = 0;
  private replaced = 0;
  private genuine = 0;
  private tail: Buffer = Buffer.alloc(0);

  /** `hash: false` skips the SHA-256 (the caller hashes the bytes itself); `stats().sha256` is then `''`. */
  constructor(options: { readonly hash?: boolean } = {}) {
    this.hash = options.hash === false ? null : createHash('sha256');
  }

  /** Adds bytes; returns the text decoded so far (possibly empty). */
  push(chunk: Uint8Array | string): string {
    const buf = typeof chunk === 'string' ? Buffer.from(chunk, 'utf8') : Buffer.from(chunk.buffer, chunk.byteOffset, chunk.byteLength);
    if (buf.length === 0) return '';
    this.hash?.update(buf);
    this.bytes += buf.length;
    if (this.decoder === null) {
      this.head.push(buf);
      this.headBytes += buf.length;
      if (this.headBytes < SNIFF_BYTES) return '';
      return this.start();
    }
    return this.decode(buf);
  }

  /** Ends the input; returns the remaining text. Throws {@link InputSkip} for an empty or binary input. */
  end(): string {
    let text = '';
    if (this.decoder === null) {
      if (this.headBytes === 0) throw new InputSkip('empty (0 bytes)');
      text = this.start();
    }
    const rest = (this.decoder as TextDecoder).decode();
    this.replaced += countChar(rest, REPLACEMENT);
    return text + rest;
  }

  /** Byte count, digest and replacement count; call after {@link InputDecoder.end}. */
  stats(): DecodeStats {
    return { bytes: this.bytes, sha256: this.hash ? this.hash.digest('hex') : '', invalid: Math.max(0, this.replaced - this.genuine), encoding: this.encoding };
  }

  private start(): string {
    const head = Buffer.concat(this.head, this.headBytes);
    this.head = [];
    if (head.length >= 2 && head[0] === 0xff && head[1] === 0xfe) this.encoding = 'utf-16le';
    else if (head.length >= 2 && head[0] === 0xfe && head[1] === 0xff) this.encoding = 'utf-16be';
    if (this.encoding === 'utf-8') {
      const sample = head.subarray(0, SNIFF_BYTES);
      if (sample.includes(0)) throw new InputSkip('binary: NUL bytes in the first 8 KiB');
      const probe = new TextDecoder('utf-8').decode(sample, { stream: true });
      const bad = countChar(probe, REPLACEMENT) - countBytes(sample, UTF8_REPLACEMENT);
      const chars = probe.length;
      if (chars > 0 && bad / chars > BINARY_INVALID_SHARE) {
        throw new InputSkip(`binary: ${Math.round((100 * bad) / chars)}% of the characters in the first 8 KiB are not valid UTF-8`);
      }
    }
    // TextDecoder drops a leading byte order mark by default.
    this.decoder = new TextDecoder(this.encoding);
    return this.decode(head);
  }

  private decode(buf: Buffer): string {
    if (this.encoding === 'utf-8') {
      this.genuine += countBytes(buf, UTF8_REPLACEMENT);
      if (this.tail.length > 0) {
        // A genuine EF BF BD split across two chunks.
        const seam = Buffer.concat([this.tail, buf.subarray(0, 2)]);
        for (let i = 0; i < this.tail.length; i++) {
          if (seam[i] === 0xef && seam[i + 1] === 0xbf && seam[i + 2] === 0xbd) this.genuine++;
        }
      }
      this.tail = Buffer.from(buf.length >= 2 ? buf.subarray(buf.length - 2) : Buffer.concat([this.tail, buf]).subarray(-2));
    }
    const text = (this.decoder as TextDecoder).decode(buf, { stream: true });
    this.replaced += countChar(text, REPLACEMENT);
    return text;
  }
}

/** Decodes a whole buffer at once; see {@link InputDecoder}. */
export function decodeBuffer(buf: Uint8Array, options: { readonly hash?: boolean } = {}): { text: string; stats: DecodeStats } {
  const d = new InputDecoder(options);
  const text = d.push(buf) + d.end();
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
): AsyncGenerator<string, void, undefined> {
  const d = new InputDecoder();
  for await (const chunk of source) {
    const text = d.push(chunk);
    if (text.length > 0) yield text;
  }
  const text = d.end();
  done(d.stats());
  if (text.length > 0) yield text;
}
