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

/**
 * Splits a mailbox into its messages (see the module's description).
 * Returns `null` when it does not start (after blank lines) with a From_ line.
 */
export function splitMbox(buf: Buffer): MboxMessage[] | null {
  const text = buf.toString('latin1');
  const lines = text.split('\n');
  if (lines.length > 0 && lines[lines.length - 1] === '') lines.pop();
  let i = 0;
  while (i < lines.length && (lines[i] === '' || lines[i] === '\r')) i++;
  if (i >= lines.length || !(lines[i] as string).startsWith('From ')) return null;
  const out: MboxMessage[] = [];
  let body: string[] = [];
  let startLine = i + 1;
  const finish = (): void => {
    // The empty line that ends a message (RFC 4155 §2) is not part of it.
    if (body.length > 0 && (body[body.length - 1] === '' || body[body.length - 1] === '\r')) body.pop();
    out.push({ index: out.length + 1, line: startLine, bytes: Buffer.from(body.join('\n') + (body.length > 0 ? '\n' : ''), 'latin1') });
  };
  for (i = i + 1; i < lines.length; i++) {
    const l = lines[i] as string;
    if (l.startsWith('From ')) {
      const prev = lines[i - 1] as string;
      const bare = l.endsWith('\r') ? l.slice(0, -1) : l;
      if (prev === '' || prev === '\r' || FROM_LINE.test(bare)) {
        finish();
        body = [];
        startLine = i + 1;
        continue;
      }
    }
    body.push(/^>+From /.test(l) ? l.slice(1) : l);
  }
  finish();
  return out;
}
