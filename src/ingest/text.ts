/**
 * Plain text and Markdown documents: line endings, titles, front matter and
 * link targets.
 *
 * @module
 */

/** Longest title kept, in characters (code points); longer ones are cut at a word and end with "…". */
export const TITLE_MAX = 120;

/** `\r\n` and lone `\r` become `\n`. */
export function normalizeNewlines(s: string): string {
  return s.indexOf('\r') === -1 ? s : s.replace(/\r\n?/g, '\n');
}

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

/** A plain text document: line endings normalised, outer white space trimmed; title = first non-empty line. */
export function readPlainText(source: string): { text: string; title: string } {
  const text = normalizeNewlines(source).trim();
  return { text, title: firstLine(text) };
}

const FENCE = /^ {0,3}(`{3,}|~{3,})/;
const ATX = /^ {0,3}#{1,6}(?:[ \t]+(.*?))?[ \t]*$/;
const SETEXT_UNDERLINE = /^ {0,3}(?:=+|-+)[ \t]*$/;
// [text](target) and ![alt](target), target without spaces, optional "title".
const LINK = /(!?)\[([^\]\n]*)\]\((?:[^()\s]|\([^()\s]*\))*(?:[ \t]+(?:"[^"\n]*"|'[^'\n]*'))?\)/g;

function cleanHeading(s: string): string {
  return capTitle(s.replace(/\*\*|`/g, ''));
}

/** The first heading (ATX `# x` or setext `x` over `===`/`---`) outside code fences; `''` if none. */
export function markdownHeading(text: string): string {
  const lines = text.split('\n');
  let fence: string | null = null;
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i] as string;
    const f = FENCE.exec(line);
    if (fence !== null) {
      if (f && (f[1] as string)[0] === fence[0] && (f[1] as string).length >= fence.length) fence = null;
      continue;
    }
    if (f) {
      fence = f[1] as string;
      continue;
    }
    const atx = ATX.exec(line);
    if (atx) {
      const content = (atx[1] ?? '').replace(/(?:^|[ \t]+)#+$/, '').trim();
      if (content !== '') return cleanHeading(content);
      continue;
    }
    const next = lines[i + 1];
    if (next !== undefined && line.trim() !== '' && !/^ {4}|^\t/.test(line) && SETEXT_UNDERLINE.test(next)) {
      return cleanHeading(line);
    }
  }
  return '';
}

/**
 * A Markdown document. A leading YAML front matter block (`---` … `---`) is
 * removed from the text, and its `title:` wins as the title. Links and images
 * keep their text (`[a](url)` → `a`, `![alt](src)` → `alt`) so link targets
 * do not become terms. Title otherwise: the first heading, else the first
 * non-empty line.
 */
export function readMarkdown(source: string): { text: string; title: string } {
  let body = normalizeNewlines(source);
  let metaTitle = '';
  const fm = /^---[ \t]*\n([\s\S]*?\n)?(?:---|\.\.\.)[ \t]*(?:\n|$)/.exec(body);
  if (fm) {
    body = body.slice(fm[0].length);
    const t = /^title:[ \t]*(.*)$/m.exec(fm[1] ?? '');
    if (t) metaTitle = capTitle((t[1] as string).trim().replace(/^(["'])(.*)\1$/, '$2'));
  }
  const text = body.replace(LINK, (_m, _bang: string, label: string) => label).trim();
  const title = metaTitle || markdownHeading(text) || firstLine(text);
  return { text, title };
}
