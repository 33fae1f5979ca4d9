/**
 * Plain-text tables for the terminal: columns sized to their content and
 * shrunk to fit the width, long cells cut with an ellipsis.
 *
 * @module
 */
import { visible } from './visible.js';

/** A column: heading, alignment, and the narrowest it may be squeezed to. */
export interface Column {
  readonly heading: string;
  readonly align?: 'left' | 'right';
  readonly min?: number;
}

/** Display width of a string, counting wide East Asian characters as two cells. */
export function cellWidth(text: string): number {
  let w = 0;
  for (const ch of text) {
    const cp = ch.codePointAt(0) ?? 0;
    w += isWide(cp) ? 2 : 1;
  }
  return w;
}

function isWide(cp: number): boolean {
  return (
    (cp >= 0x1100 && cp <= 0x115f) ||
    (cp >= 0x2e80 && cp <= 0xa4cf) ||
    (cp >= 0xac00 && cp <= 0xd7a3) ||
    (cp >= 0xf900 && cp <= 0xfaff) ||
    (cp >= 0xfe30 && cp <= 0xfe4f) ||
    (cp >= 0xff00 && cp <= 0xff60) ||
    (cp >= 0xffe0 && cp <= 0xffe6) ||
    (cp >= 0x1f300 && cp <= 0x1faff) ||
    (cp >= 0x20000 && cp <= 0x3fffd)
  );
}

/** Cuts `text` to at most `width` cells, ending with "…" when cut. */
export function clip(text: string, width: number): string {
  if (cellWidth(text) <= width) return text;
  let out = '';
  let w = 0;
  for (const ch of text) {
    const cw = isWide(ch.codePointAt(0) ?? 0) ? 2 : 1;
    if (w + cw > width - 1) break;
    out += ch;
    w += cw;
  }
  return out + '…';
}

function pad(text: string, width: number, align: 'left' | 'right'): string {
  const gap = ' '.repeat(Math.max(0, width - cellWidth(text)));
  return align === 'right' ? gap + text : text + gap;
}

/** Renders rows under headings, fitted into `maxWidth` cells; returns lines without trailing spaces. */
export function renderTable(given: readonly Column[], rows: readonly (readonly string[])[], maxWidth = 100): string[] {
  const columns = given.map((c) => ({ ...c, heading: visible(c.heading) }));
  // Control characters from documents are shown, never obeyed (and then measured as what is shown).
  const clean = rows.map((r) => r.map((c) => visible(c.replace(/\s+/g, ' ').trim())));
  const widths = columns.map((c, i) => Math.max(cellWidth(c.heading), ...clean.map((r) => cellWidth(r[i] ?? ''))));
  const sep = 2;
  const total = (): number => widths.reduce((a, b) => a + b, 0) + sep * (columns.length - 1);
  // Shrink the widest shrinkable column one cell at a time until it fits.
  while (total() > maxWidth) {
    let widest = -1;
    for (let i = 0; i < columns.length; i++) {
      const min = columns[i].min ?? cellWidth(columns[i].heading);
      if (widths[i] > min && (widest < 0 || widths[i] > widths[widest])) widest = i;
    }
    if (widest < 0) break;
    widths[widest]--;
  }
  const line = (cells: readonly string[]): string =>
    columns
      .map((c, i) => pad(clip(cells[i] ?? '', widths[i]), widths[i], c.align ?? 'left'))
      .join(' '.repeat(sep))
      .replace(/\s+$/, '');
  return [line(columns.map((c) => c.heading)), line(widths.map((w) => '─'.repeat(w))), ...clean.map(line)];
}
