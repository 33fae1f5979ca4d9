/**
 * Text from documents (titles, ids, labels, diffs, column names, file names)
 * made safe to print on a terminal: every character a terminal would act on
 * instead of showing is written out as a visible escape, so a document cannot
 * clear the screen, retitle the window, plant a hyperlink or reorder what the
 * reader sees.
 *
 * Rendered visibly: C0 controls (U+0000–U+001F), DEL (U+007F), C1 controls
 * (U+0080–U+009F), the bidirectional marks, embeddings, overrides and isolates
 * (U+061C, U+200E, U+200F, U+202A–U+202E, U+2066–U+2069) and the line and
 * paragraph separators (U+2028, U+2029). Characters up to U+00FF are written
 * `\x1b`, the others `\u202e`, the spelling JavaScript and C use for them.
 *
 * @module
 */

/** Every character {@link visible} rewrites. */
export const TERMINAL_CONTROL = /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u2028\u2029\u202a-\u202e\u2066-\u2069]/gu;

/** The same set without the line feed, for text whose line breaks are meant. */
const CONTROL_BUT_NEWLINE = /[\u0000-\u0009\u000b-\u001f\u007f-\u009f\u061c\u200e\u200f\u2028\u2029\u202a-\u202e\u2066-\u2069]/gu;

function spell(ch: string): string {
  const cp = ch.charCodeAt(0);
  return cp <= 0xff ? `\\x${cp.toString(16).padStart(2, '0')}` : `\\u${cp.toString(16).padStart(4, '0')}`;
}

/** One line of terminal text: every control character, line breaks included, written as `\x1b` / `\u202e`. */
export function visible(text: string): string {
  return text.replace(TERMINAL_CONTROL, spell);
}

/** Terminal text of several lines: like {@link visible}, but line feeds stay line feeds. */
export function visibleLines(text: string): string {
  return text.replace(CONTROL_BUT_NEWLINE, spell);
}

/**
 * JSON text for the terminal: the characters of {@link visible} that JSON
 * leaves raw (C1, DEL, bidirectional marks, separators) written as `\u009b`
 * escapes, so the text still parses to the same value. Line feeds between
 * tokens stay.
 */
export function visibleJson(text: string): string {
  return text.replace(CONTROL_BUT_NEWLINE, (ch) => `\\u${ch.charCodeAt(0).toString(16).padStart(4, '0')}`);
}
