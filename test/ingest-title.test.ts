import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { capTitle, TITLE_MAX } from '../src/ingest/index.js';

/** The obvious version: flatten the whole line, split it into code points with Array.from, cut. */
function naiveCapTitle(s: string): string {
  const flat = s.replace(/[\s\u00a0]+/g, ' ').trim();
  const cps = Array.from(flat);
  if (cps.length <= TITLE_MAX) return flat;
  let cut = cps.slice(0, TITLE_MAX).join('');
  const space = cut.lastIndexOf(' ');
  if (space >= Math.floor((TITLE_MAX * 2) / 3)) cut = cut.slice(0, space);
  return cut.trimEnd() + '…';
}

describe('capTitle', () => {
  it('equals the naive whole-line version on arbitrary lines, long ones and lone surrogates included', () => {
    const piece = fc.oneof(
      fc.string({ maxLength: 40 }),
      fc.string({ unit: 'binary', maxLength: 40 }),
      fc.constantFrom(' ', '\u00a0', '\t\n', '😀', '\ud83d', '\ude00', ' '.repeat(900), 'x'.repeat(300)),
    );
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 60 }), (parts) => {
        const line = parts.join('');
        expect(capTitle(line)).toBe(naiveCapTitle(line));
      }),
      { numRuns: 500 },
    );
  });
});
