import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { ELLIPSIS, wordDiff, type DiffPiece } from '../src/duplicates/index.js';
import { UsageError } from '../src/util/errors.js';

const wordsOf = (s: string): string[] => s.split(/\s+/).filter(Boolean);
const side = (pieces: DiffPiece[], drop: 'added' | 'removed'): string =>
  pieces
    .filter((p) => p.kind !== drop)
    .map((p) => p.text)
    .join('');

describe('wordDiff', () => {
  it('marks replaced words and shortens the unchanged stretches around them', () => {
    const rep = 'please reset the password for the shared mailbox of the support team today';
    const member = 'please reset the login for the shared mailbox of the support team today';
    expect(wordDiff(rep, member, { context: 2 })).toEqual([
      { kind: 'same', text: `${ELLIPSIS} reset the ` },
      { kind: 'removed', text: 'password' },
      { kind: 'added', text: 'login' },
      { kind: 'same', text: ` for the ${ELLIPSIS}` },
    ]);
  });

  it('keeps both ends of a long unchanged stretch between two changes', () => {
    const rep = 'one two three four five six seven eight nine';
    const member = 'ONE two three four five six seven eight NINE';
    const pieces = wordDiff(rep, member, { context: 2 });
    expect(pieces.map((p) => p.kind)).toEqual(['removed', 'added', 'same', 'removed', 'added']);
    expect(pieces[2]!.text).toBe(` two three ${ELLIPSIS} seven eight `);
    // With more context than the stretch has words, nothing is left out.
    expect(wordDiff(rep, member, { context: 4 })[2]!.text).toBe(' two three four five six seven eight ');
    // Context 0 keeps only the spacing next to the changes.
    expect(wordDiff(rep, member, { context: 0 })[2]!.text).toBe(` ${ELLIPSIS} `);
  });

  it('shows added and removed stretches whole', () => {
    const pieces = wordDiff('the printer is offline', 'the printer on floor three is offline again', { context: 10 });
    expect(pieces.filter((p) => p.kind === 'added').map((p) => wordsOf(p.text))).toEqual([['on', 'floor', 'three'], ['again']]);
    expect(pieces.some((p) => p.kind === 'removed')).toBe(false);
  });

  it('reduces identical texts to one shortened unchanged piece', () => {
    expect(wordDiff('a b c d e', 'a b c d e', { context: 3 })).toEqual([{ kind: 'same', text: `a b c ${ELLIPSIS}` }]);
    expect(wordDiff('a b', 'a b', { context: 3 })).toEqual([{ kind: 'same', text: 'a b' }]);
    expect(wordDiff('', '')).toEqual([]);
  });

  it('cuts the list at maxPieces, ending with an ellipsis piece', () => {
    const rep = 'a b c d e f g h';
    const member = 'a X c Y e Z g W';
    const all = wordDiff(rep, member, { context: 5 });
    expect(all.length).toBeGreaterThan(5);
    const cut = wordDiff(rep, member, { context: 5, maxPieces: 5 });
    expect(cut.length).toBe(5);
    expect(cut.slice(0, 4)).toEqual(all.slice(0, 4));
    expect(cut[4]).toEqual({ kind: 'same', text: ELLIPSIS });
  });

  it('with ample context, the unchanged and removed pieces give the representative\'s words, unchanged and added the member\'s (fast-check)', () => {
    const text = fc.array(fc.constantFrom('disk', 'full', 'error,', 'again.', 'the', 'server', 'is'), { maxLength: 14 }).map((w) => w.join(' '));
    fc.assert(
      fc.property(text, text, (rep, member) => {
        const pieces = wordDiff(rep, member, { context: 1000 });
        expect(wordsOf(side(pieces, 'added'))).toEqual(wordsOf(rep));
        expect(wordsOf(side(pieces, 'removed'))).toEqual(wordsOf(member));
        for (const p of pieces) expect(p.text).not.toBe('');
      }),
      { numRuns: 300 },
    );
  });

  it('validates its options with one-line messages', () => {
    for (const [options, message] of [
      [{ context: -1 }, 'context must be a whole number from 0 to 1000; got -1'],
      [{ context: 1.5 }, 'context must be a whole number from 0 to 1000; got 1.5'],
      [{ maxPieces: 0 }, 'maxPieces must be a whole number from 1 to 1000000; got 0'],
    ] as const) {
      let error: unknown;
      try {
        wordDiff('a', 'b', options);
      } catch (e) {
        error = e;
      }
      expect(error).toBeInstanceOf(UsageError);
      expect((error as UsageError).message).toBe(message);
    }
  });
});
