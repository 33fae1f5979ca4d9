/**
 * Identifiers folded into placeholder words, so that every URL, address,
 * ticket number or order id does not become a term of its own (or, shared
 * by a few copies of one notice, a group of its own). The placeholders are
 * plain lower-case words of our own that survive the analyzer unchanged
 * (no stemmer of the supported languages alters them).
 *
 * Pure: no I/O.
 *
 * @module
 */

/** The placeholder word for each kind of identifier. */
export const PLACEHOLDERS = Object.freeze({
  url: 'xurlx',
  email: 'xmailx',
  id: 'xidx',
  number: 'xnumx',
} as const);

/** How many identifiers of each kind were folded. */
export interface PlaceholderCounts {
  url: number;
  email: number;
  id: number;
  number: number;
}

/** `http://`, `https://`, `ftp://` or `www.` up to white space or a quote, not inside a word or an address. */
const URL_RE = /(?<![\p{L}\p{N}@._/-])(?:https?:\/\/|ftp:\/\/|www\.)[^\s<>"'`]+/giu;
/** Punctuation at a URL's end that belongs to the sentence. */
const URL_TAIL = /[.,;:!?)\]}»"']+$/u;
/** An e-mail address (optionally `mailto:`): local part, `@`, a dotted domain. */
const EMAIL_RE = /(?:mailto:)?(?<![\p{L}\p{N}._%+-])[\p{L}\p{N}._%+-]+@[\p{L}\p{N}-]+(?:\.[\p{L}\p{N}-]+)+/gu;
/** A UUID (RFC 9562 layout: 8-4-4-4-12 hexadecimal digits). */
const UUID_RE = /(?<![\p{L}\p{N}])[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}(?![\p{L}\p{N}])/giu;
/** A hexadecimal hash or key: 16 or more hex digits, with both digits and letters. */
const HEX_RE = /(?<![\p{L}\p{N}])(?=[0-9a-f]*[0-9])(?=[0-9a-f]*[a-f])[0-9a-f]{16,}(?![\p{L}\p{N}])/giu;
/** A ticket or order id: 1–10 letters, an optional `-` `_` `#` `:`, 3 or more digits, optional `-digits` groups (INC0012345, ORD-48213, TCK-2024-0042). */
const CODE_RE = /(?<![\p{L}\p{N}_-])\p{L}{1,10}[-_#:]?\p{N}{3,}(?:[-_/]\p{N}+)*(?![\p{L}\p{N}_])/gu;
/** A number written after `#` (`#48213`), not an HTML character reference. */
const HASH_NUMBER_RE = /(?<![\p{L}\p{N}&#])#\p{N}{3,}(?![\p{L}\p{N}])/gu;
/** A run of 5 or more digits standing alone (not part of a decimal or a word). */
const LONG_NUMBER_RE = /(?<![\p{L}\p{N}.,])\p{N}{5,}(?![\p{L}\p{N}])/gu;

/**
 * Replaces URLs, e-mail addresses, UUIDs and hex keys, ticket/order ids and
 * `#` numbers, and long numbers (5+ digits) by {@link PLACEHOLDERS}, in
 * that order, adding to `counts`. Sentence punctuation after a URL is kept.
 */
export function foldIdentifiers(text: string, counts: PlaceholderCounts): string {
  let t = text;
  if (t.includes('://') || /www\./i.test(t)) {
    t = t.replace(URL_RE, (m: string) => {
      const tail = URL_TAIL.exec(m);
      counts.url++;
      return PLACEHOLDERS.url + (tail ? tail[0] : '');
    });
  }
  if (t.includes('@')) {
    t = t.replace(EMAIL_RE, () => {
      counts.email++;
      return PLACEHOLDERS.email;
    });
  }
  const id = (): string => {
    counts.id++;
    return PLACEHOLDERS.id;
  };
  if (/\p{N}/u.test(t)) {
    t = t.replace(UUID_RE, id).replace(HEX_RE, id).replace(CODE_RE, id).replace(HASH_NUMBER_RE, id);
    t = t.replace(LONG_NUMBER_RE, () => {
      counts.number++;
      return PLACEHOLDERS.number;
    });
  }
  return t;
}
