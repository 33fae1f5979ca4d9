/**
 * Titles from text: one line, white space collapsed, cut to a readable length.
 * Pure; shared by the readers (ingest) and the cleaning stage, which retakes a
 * title after cleaning.
 *
 * @module
 */

/** Longest title kept, in characters (code points); longer ones are cut at a word and end with "…". */
export const TITLE_MAX = 120;

/**
 * One-line title: white space (including no-break spaces) collapsed, trimmed,
 * and cut to {@link TITLE_MAX} characters — at the last space in the final
 * third when there is one — followed by "…".
 */
export function capTitle(s: string): string {
  // A long line (a one-line ticket is all first line) is cut from a bounded head when that head alone is
  // long enough: the same title as from the whole line, without flattening megabytes of text.
  const head = TITLE_MAX * 8;
  if (s.length > head) {
    const quick = capTitleOf(s.slice(0, head));
    if (quick.cut) return quick.title;
  }
  return capTitleOf(s).title;
}

/** Code units of the code point at `i` (2 for a surrogate pair, else 1), as `Array.from` splits strings. */
function unitsAt(s: string, i: number): number {
  const c = s.charCodeAt(i);
  if (c < 0xd800 || c > 0xdbff || i + 1 >= s.length) return 1;
  const d = s.charCodeAt(i + 1);
  return d >= 0xdc00 && d <= 0xdfff ? 2 : 1;
}

function capTitleOf(s: string): { title: string; cut: boolean } {
  const flat = s.replace(/[\s\u00a0]+/g, ' ').trim();
  // At most TITLE_MAX + 1 code points are ever looked at.
  let end = 0;
  let count = 0;
  while (end < flat.length && count <= TITLE_MAX) {
    end += unitsAt(flat, end);
    count++;
  }
  if (count <= TITLE_MAX) return { title: flat, cut: false };
  let at = 0;
  for (let i = 0; i < TITLE_MAX; i++) {
    at += unitsAt(flat, at);
  }
  let cut = flat.slice(0, at);
  const space = cut.lastIndexOf(' ');
  if (space >= Math.floor((TITLE_MAX * 2) / 3)) cut = cut.slice(0, space);
  return { title: cut.trimEnd() + '…', cut: true };
}

/** The first line with anything but white space, as a title ({@link capTitle}); `''` when there is none. */
export function firstLine(text: string): string {
  let start = 0;
  while (start <= text.length) {
    let end = text.indexOf('\n', start);
    if (end === -1) end = text.length;
    const line = text.slice(start, end);
    if (/[^\s\u00a0]/.test(line)) return capTitle(line);
    start = end + 1;
  }
  return '';
}
