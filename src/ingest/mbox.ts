/**
 * Mailbox files (`.mbox`, RFC 4155 "The application/mbox Media Type") split
 * into their messages, each then read by the e-mail reader.
 *
 * RFC 4155 §2: a mailbox is a series of messages, each starting with a
 * "From_" line (`From ` followed by the envelope sender and a timestamp)
 * and ending with an empty line. Lines inside a message that would look like
 * a From_ line are written with a `>` in front (`>From `); the "mboxrd"
 * variant also quotes lines already starting with `>From ` by adding one more
 * `>` (`>>From `). Both are undone here by removing one `>` from every line
 * of the form `>…>From ` (common practice for reading either variant; an
 * "mboxo" line that truly began with `>From ` loses its `>`, which the
 * format cannot tell apart).
 *
 * A line starting with `From ` opens a new message when it is the first
 * line, or follows an empty line, or has the full From_ shape (`From
 * <sender> <asctime date>`), so mailboxes written without the empty line are
 * split too. LF and CRLF line endings are both read; bytes are kept as they
 * are (each message declares its own character sets).
 *
 * @module
 */

/** The shape of a complete From_ line: `From sender Www Mmm dd hh:mm[:ss] [zone] yyyy` (RFC 4155 §2, asctime date). */
const FROM_LINE = /^From \S+ +(?:Mon|Tue|Wed|Thu|Fri|Sat|Sun) (?:Jan|Feb|Mar|Apr|May|Jun|Jul|Aug|Sep|Oct|Nov|Dec) +\d{1,2} \d{1,2}:\d{2}(?::\d{2})?(?: [A-Za-z+\-0-9]+)? \d{4}\s*$/;

/** One message of a mailbox. */
export interface MboxMessage {
  /** 1-based position in the mailbox. */
  readonly index: number;
  /** The line (1-based) of its From_ line. */
  readonly line: number;
  /** The message as bytes: From_ line removed, `>From ` lines unquoted, the separating empty line dropped. */
  readonly bytes: Buffer;
}

/** True when the bytes (after blank lines) start with a complete From_ line (`From sender asctime-date`). */
export function looksLikeMbox(b: Uint8Array): boolean {
  const head = Buffer.from(b.buffer, b.byteOffset, Math.min(b.byteLength, 1024)).toString('latin1').replace(/^(?:\r?\n)+/, '');
  const nl = head.indexOf('\n');
  return nl !== -1 && FROM_LINE.test(head.slice(0, nl).replace(/\r$/, ''));
}

const FROM = Buffer.from('From ', 'latin1');

/** True when `buf[start…end)` (a line without its LF) is empty or a lone CR. */
function blank(buf: Buffer, start: number, end: number): boolean {
  return end === start || (end === start + 1 && buf[start] === 0x0d);
}

/** True when the line starts with `>`s followed by `From ` (a quoted From_ line). */
function quotedFrom(buf: Buffer, start: number, end: number): boolean {
  let i = start;
  while (i < end && buf[i] === 0x3e) i++;
  return i > start && end - i >= 5 && buf.compare(FROM, 0, 5, i, i + 5) === 0;
}

/**
 * Splits a mailbox into its messages (see the module's description),
 * working on the bytes line by line (a mailbox may be larger than the
 * longest string). Returns `null` when it does not start (after blank
 * lines) with a From_ line.
 */
export function splitMbox(buf: Buffer): MboxMessage[] | null {
  // Line starts and ends (without the LF).
  let pos = 0;
  let lineNo = 0;
  const nextLine = (): { start: number; end: number } | null => {
    if (pos >= buf.length) return null;
    const nl = buf.indexOf(0x0a, pos);
    const start = pos;
    const end = nl === -1 ? buf.length : nl;
    pos = nl === -1 ? buf.length : nl + 1;
    lineNo++;
    return { start, end };
  };
  const startsWithFrom = (l: { start: number; end: number }): boolean => l.end - l.start >= 5 && buf.compare(FROM, 0, 5, l.start, l.start + 5) === 0;
  let line = nextLine();
  while (line !== null && blank(buf, line.start, line.end)) line = nextLine();
  if (line === null || !startsWithFrom(line)) return null;
  const out: MboxMessage[] = [];
  let parts: Buffer[] = [];
  let startLine = lineNo;
  let prevBlank = false;
  let lastBlank: { start: number; end: number } | null = null;
  const finish = (): void => {
    // The empty line that ends a message (RFC 4155 §2) is not part of it.
    if (lastBlank !== null) parts.pop();
    out.push({ index: out.length + 1, line: startLine, bytes: Buffer.concat(parts) });
  };
  for (line = nextLine(); line !== null; line = nextLine()) {
    const { start, end } = line;
    if (startsWithFrom(line)) {
      const bare = buf.toString('latin1', start, Math.min(end, start + 512)).replace(/\r$/, '');
      if (prevBlank || FROM_LINE.test(bare)) {
        finish();
        parts = [];
        startLine = lineNo;
        prevBlank = false;
        lastBlank = null;
        continue;
      }
    }
    const withNl = buf.subarray(quotedFrom(buf, start, end) ? start + 1 : start, end);
    parts.push(withNl, NL);
    prevBlank = blank(buf, start, end);
    lastBlank = prevBlank ? line : null;
    if (prevBlank) {
      // Keep the blank line and its LF as one part, so finish() can drop it whole.
      parts.pop();
      parts.pop();
      parts.push(Buffer.concat([withNl, NL]));
    }
  }
  finish();
  return out;
}

const NL = Buffer.from('\n', 'latin1');
