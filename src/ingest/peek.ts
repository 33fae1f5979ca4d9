/**
 * Looking at the start of a text stream without consuming it.
 *
 * @module
 */

/** The start of a stream and the whole stream again (start included). */
export interface Peeked {
  /** The text read so far: everything up to the point where `enough` said yes, or the whole input. */
  readonly head: string;
  /** The full text: `head` first, then the rest of the source. */
  readonly all: AsyncIterable<string>;
}

/**
 * Reads chunks until `enough(head)` holds or the source ends. The source's
 * own errors (a binary input, an unreadable file) surface here.
 */
export async function peekText(source: AsyncIterable<string>, enough: (head: string) => boolean): Promise<Peeked> {
  const it = source[Symbol.asyncIterator]();
  let head = '';
  let ended = false;
  while (!enough(head)) {
    const r = await it.next();
    if (r.done) {
      ended = true;
      break;
    }
    head += r.value;
  }
  const first = head;
  async function* all(): AsyncGenerator<string, void, undefined> {
    if (first.length > 0) yield first;
    if (ended) return;
    try {
      for (;;) {
        const r = await it.next();
        if (r.done) return;
        yield r.value;
      }
    } finally {
      await it.return?.();
    }
  }
  return { head, all: all() };
}

/** True once `head` holds a line break after its first character that is not white space (or the stream has ended). */
export function hasFirstLine(head: string): boolean {
  const m = /\S/.exec(head);
  return m !== null && /[\r\n]/.test(head.slice(m.index));
}

/** The first character that is not white space, or `''`. */
export function firstSignificant(head: string): string {
  const m = /[^\s\uFEFF]/.exec(head);
  return m ? m[0] : '';
}

/** The first bytes of a stream and the whole stream again (those bytes included). */
export interface PeekedBytes {
  /** At least `n` bytes, or the whole input when shorter. */
  readonly head: Buffer;
  /** True when `head` is the whole input. */
  readonly complete: boolean;
  /** Every chunk: `head` first, then the rest of the source. */
  readonly all: AsyncIterable<Uint8Array | string>;
}

/** Reads chunks until at least `n` bytes are in hand or the source ends. The source's own errors surface here. */
export async function peekBytes(source: AsyncIterable<Uint8Array | string>, n: number): Promise<PeekedBytes> {
  const it = source[Symbol.asyncIterator]();
  const parts: Buffer[] = [];
  let size = 0;
  let ended = false;
  while (size < n) {
    const r = await it.next();
    if (r.done) {
      ended = true;
      break;
    }
    const c = r.value;
    const b = typeof c === 'string' ? Buffer.from(c, 'utf8') : Buffer.from(c.buffer, c.byteOffset, c.byteLength);
    parts.push(b);
    size += b.length;
  }
  const head = Buffer.concat(parts, size);
  async function* all(): AsyncGenerator<Uint8Array | string, void, undefined> {
    if (head.length > 0) yield head;
    if (ended) return;
    try {
      for (;;) {
        const r = await it.next();
        if (r.done) return;
        yield r.value;
      }
    } finally {
      await it.return?.();
    }
  }
  return { head, complete: ended, all: all() };
}
