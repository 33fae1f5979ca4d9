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
/**
 * The identifier family in one pass, alternatives tried in this order at each position:
 * - `uuid`: a UUID (8-4-4-4-12 hexadecimal digits, the RFC 9562 layout);
 * - `hex`: a hexadecimal hash or key: 16 or more hex digits, with both digits and letters;
 * - `code`: a ticket or order id: 1–10 letters, an optional `-` `_` `#` `:`, 3 or more digits,
 *   optional `-digits` groups (INC0012345, ORD-48213, TCK-2024-0042);
 * - `hash`: a number written after `#` (`#48213`), not an HTML character reference;
 * - `num`: a run of 5 or more digits standing alone (not part of a decimal or a word).
 */
const ID_FAMILY = new RegExp(
  [
    '(?<uuid>(?<![\\p{L}\\p{N}])[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}(?![\\p{L}\\p{N}]))',
    '(?<hex>(?<![\\p{L}\\p{N}])(?=[0-9a-f]*[0-9])(?=[0-9a-f]*[a-f])[0-9a-f]{16,}(?![\\p{L}\\p{N}]))',
    '(?<code>(?<![\\p{L}\\p{N}_-])\\p{L}{1,10}[-_#:]?\\p{N}{3,}(?:[-_/]\\p{N}+)*(?![\\p{L}\\p{N}_]))',
    '(?<hash>(?<![\\p{L}\\p{N}&#])#\\p{N}{3,}(?![\\p{L}\\p{N}]))',
    '(?<num>(?<![\\p{L}\\p{N}.,])\\p{N}{5,}(?![\\p{L}\\p{N}]))',
  ].join('|'),
  'giu',
);

/** A digit: without one no identifier of the family can match. */
const ANY_DIGIT = /\p{N}/u;

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
  if (ANY_DIGIT.test(t)) {
    t = t.replace(ID_FAMILY, (...args: unknown[]) => {
      const groups = args[args.length - 1] as Record<string, string | undefined>;
      if (groups['num'] !== undefined) {
        counts.number++;
        return PLACEHOLDERS.number;
      }
      counts.id++;
      return PLACEHOLDERS.id;
    });
  }
  return t;
}
