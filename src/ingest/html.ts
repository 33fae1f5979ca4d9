/**
 * HTML reduced to text with htmlparser2.
 *
 * @module
 */
import { Parser } from 'htmlparser2';
import { capTitle } from './text.js';

/** Elements whose content is never text: scripts, styles, templates, fallbacks, drawings, and `<title>` (kept as the title). */
const DROPPED = new Set(['script', 'style', 'noscript', 'template', 'svg', 'math', 'iframe', 'object', 'canvas', 'title']);

/** Elements that start and end a line. */
const BLOCKS = new Set([
  'address', 'article', 'aside', 'blockquote', 'body', 'caption', 'dd', 'details', 'dialog', 'div', 'dl', 'dt',
  'fieldset', 'figcaption', 'figure', 'footer', 'form', 'h1', 'h2', 'h3', 'h4', 'h5', 'h6', 'header', 'hgroup',
  'hr', 'html', 'legend', 'li', 'main', 'menu', 'nav', 'ol', 'p', 'pre', 'section', 'summary', 'table', 'tbody',
  'tfoot', 'thead', 'tr', 'ul', 'br', 'option', 'select', 'textarea',
]);

/** Elements whose content is set apart from its neighbours by a space (table cells). */
const CELLS = new Set(['td', 'th']);

/** What an HTML document reduces to. */
export interface HtmlText {
  /** Text lines: white space collapsed (kept inside `<pre>`), each line trimmed, empty lines dropped, joined by `\n`. */
  readonly text: string;
  /** The `<title>`, else the first `<h1>`, else the first line of the text; white space collapsed. */
  readonly title: string;
}

/**
 * Reduces HTML to text. Entities are decoded. `script`, `style`, `noscript`,
 * `template`, `svg`, `math`, `iframe`, `object`, `canvas` and `title` give
 * no text (the title is the title); block elements (`p`, `div`, `li`, `h1`…,
 * `tr`, `br`…) end the line; `td`/`th` are separated by a space. An image's
 * `alt` text is kept as words (it often carries meaning a figure shows).
 * Comments, doctype and processing instructions are dropped.
 */
export function htmlToText(html: string): HtmlText {
  const lines: string[] = [];
  let line = '';
  let dropped = 0;
  let pre = 0;
  let inTitle = false;
  let titleText = '';
  let titleSeen = false;
  let h1Depth = 0;
  let h1Text = '';
  let h1Done = false;

  const endLine = (): void => {
    const t = line.replace(/[ \t\f\u00a0]+$/g, '').replace(/^[ \t\f\u00a0]+/g, '');
    if (t !== '') lines.push(t);
    line = '';
  };
  const addText = (data: string): void => {
    if (pre > 0) {
      const parts = data.replace(/\r\n?/g, '\n').split('\n');
      parts.forEach((p, i) => {
        if (i > 0) endLine();
        line += p.replace(/\u00a0/g, ' ');
      });
    } else {
      line += data.replace(/[\s\u00a0]+/g, ' ');
      line = line.replace(/ {2,}/g, ' ');
    }
  };

  const parser = new Parser(
    {
      onopentag(name, attribs) {
        if (name === 'title' && !titleSeen && dropped === 0) inTitle = true;
        if (DROPPED.has(name)) {
          dropped++;
          return;
        }
        if (dropped > 0) return;
        if (name === 'h1' && !h1Done) h1Depth++;
        if (BLOCKS.has(name)) endLine();
        if (name === 'pre') pre++;
        if (CELLS.has(name)) addText(' ');
        if (name === 'img' && typeof attribs['alt'] === 'string' && attribs['alt'].trim() !== '') {
          addText(' ' + attribs['alt'] + ' ');
        }
      },
      ontext(data) {
        if (inTitle) titleText += data;
        if (dropped > 0) return;
        if (h1Depth > 0) h1Text += data;
        addText(data);
      },
      onclosetag(name) {
        if (name === 'title' && inTitle) {
          inTitle = false;
          titleSeen = true;
        }
        if (DROPPED.has(name)) {
          dropped = Math.max(0, dropped - 1);
          return;
        }
        if (dropped > 0) return;
        if (name === 'h1' && h1Depth > 0) {
          h1Depth--;
          if (h1Depth === 0) h1Done = h1Text.trim() !== '';
          if (!h1Done) h1Text = '';
        }
        if (name === 'pre') pre = Math.max(0, pre - 1);
        if (CELLS.has(name)) addText(' ');
        if (BLOCKS.has(name)) endLine();
      },
    },
    { decodeEntities: true, lowerCaseTags: true, lowerCaseAttributeNames: true },
  );
  parser.write(html);
  parser.end();
  endLine();
  const text = lines.join('\n');
  const title = capTitle(titleText) || (h1Done ? capTitle(h1Text) : '') || capTitle(lines[0] ?? '');
  return { text, title };
}
