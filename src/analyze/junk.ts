/**
 * Tokens that name nothing whatever the language: machine-made strings
 * (hashes, identifiers, date and time fragments), the placeholders that
 * ticket cleaning writes, and the words of HTML markup and web navigation
 * that leak into mail and exported pages. The analyzer drops them when
 * `junk` is on (the default), so they neither weigh in the vectors nor
 * name a group.
 *
 * The rules are sheaf's own, written from the junk seen naming groups on
 * real corpora (`6b2fefb9`, `06t18`, `font · br`, `xnumx`).
 *
 * @module
 */

import { PLACEHOLDERS } from '../clean/placeholders.js';

/**
 * Markup and navigation words (HTML tags, attributes and entities, URL
 * parts). Kept short on purpose: only words that are almost never topic
 * words. `font`, `size`, `color` and `home` stay in: they name real things
 * (the Debian `fonts` section is about fonts).
 */
export const MARKUP_WORDS: readonly string[] = Object.freeze([
  'nbsp', 'amp', 'quot', 'apos', 'lt', 'gt', 'br', 'hr', 'href', 'src', 'img', 'div', 'span', 'td', 'tr',
  'th', 'tbody', 'thead', 'tfoot', 'ul', 'ol', 'li', 'px', 'pt', 'em', 'bgcolor', 'cellpadding',
  'cellspacing', 'colspan', 'rowspan', 'valign', 'halign', 'hspace', 'vspace', 'nowrap', 'charset',
  'doctype', 'xmlns', 'http', 'https', 'www', 'html', 'htm', 'php', 'aspx', 'mailto', 'com', 'prev',
]);

/** The words dropped as junk by the analyzer: {@link MARKUP_WORDS} and the cleaning placeholders. */
export const JUNK_WORDS: readonly string[] = Object.freeze([...MARKUP_WORDS, ...Object.values(PLACEHOLDERS)].sort());

const HEX_RE = /^[0-9a-f]+$/;
const NUMBER_RE = /^\p{N}$/u;

/**
 * True for a token holding a number character that looks machine-made
 * rather than a word:
 * - more than half of its characters are digits (`06t18`, `1990s`,
 *   `h264`, `x86`); `mp3`, `ipv6`, `amd64`, `3d`, `10th` stay;
 * - letters and digits alternate three times or more (`ab12cd34`,
 *   `6b2fefb9`); `k8s`, `v2a` stay;
 * - six characters or more of hexadecimal digits mixing digits and letters
 *   (`2fefb9`, `deadbeef01`).
 * Tokens without any digit are never junk by this rule.
 */
export function isJunkToken(token: string): boolean {
  let digits = 0;
  let letters = 0;
  let runs = 0;
  let prev = 0; // 1 digit, 2 other
  for (const ch of token) {
    const kind = (ch >= '0' && ch <= '9') || (ch > '\x7f' && NUMBER_RE.test(ch)) ? 1 : 2;
    if (kind === 1) digits++;
    else letters++;
    if (kind !== prev) runs++;
    prev = kind;
  }
  if (digits === 0) return false;
  const length = digits + letters;
  if (digits * 2 > length) return true;
  if (runs >= 4) return true;
  return length >= 6 && letters > 0 && HEX_RE.test(token);
}
