/**
 * Plain text and Markdown documents: line endings, titles, front matter and
 * link targets.
 *
 * @module
 */
import { capTitle, firstLine } from '../util/title.js';

export { TITLE_MAX, capTitle, firstLine } from '../util/title.js';

/** `\r\n` and lone `\r` become `\n`. */
export function normalizeNewlines(s: string): string {
  return s.indexOf('\r') === -1 ? s : s.replace(/\r\n?/g, '\n');
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
