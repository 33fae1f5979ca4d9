/**
 * What differs between a near-copy and its set's representative, word by
 * word, with long unchanged stretches shortened.
 *
 * The diff itself is `diffWords` of the `diff` package (v9 ships ES modules
 * with its own type declarations, so a named import works under NodeNext).
 *
 * @module
 */
import { diffWords } from 'diff';
import { checkWholeNumber, DEFAULT_DUPLICATES_OPTIONS } from './options.js';

/** One stretch of a word diff: unchanged, only in the member (`added`), or only in the representative (`removed`). */
export interface DiffPiece {
  readonly kind: 'same' | 'added' | 'removed';
  readonly text: string;
}

/** Stands for words left out of a shortened unchanged stretch (or for pieces cut off at `maxPieces`). */
export const ELLIPSIS = '…';

/** Options for {@link wordDiff}. */
export interface WordDiffOptions {
  /** Unchanged words kept on each side of a change, 0 to 1000; default 6. */
  readonly context?: number;
  /** Most pieces returned, 1 to 1000000; default 400. Beyond it the last piece is a `same` piece holding {@link ELLIPSIS}. */
  readonly maxPieces?: number;
}

/**
 * Word-level diff from `representative` to `member`. Unchanged stretches are
 * shortened to `context` words next to each change: a leading stretch keeps
 * its last `context` words, a trailing one its first, one between changes
 * both ends when it has more than `2 × context` words; the words left out are
 * replaced by {@link ELLIPSIS}. Identical texts give one `same` piece holding
 * the first `context` words and the ellipsis. Words are runs of non-space
 * characters; spacing inside kept text is preserved. Pure.
 */
export function wordDiff(representative: string, member: string, options: WordDiffOptions = {}): DiffPiece[] {
  const context = checkWholeNumber(options.context ?? DEFAULT_DUPLICATES_OPTIONS.diffContext, 'context', 0, 1000);
  const maxPieces = checkWholeNumber(options.maxPieces ?? DEFAULT_DUPLICATES_OPTIONS.diffMaxPieces, 'maxPieces', 1, 1_000_000);
  const changes = diffWords(representative, member);
  const pieces: DiffPiece[] = [];
  const last = changes.length - 1;
  for (let i = 0; i <= last; i++) {
    const c = changes[i]!;
    if (c.value === '') continue;
    if (c.added) pieces.push({ kind: 'added', text: c.value });
    else if (c.removed) pieces.push({ kind: 'removed', text: c.value });
    else {
      const keepHead = i > 0 || last === 0; // a leading stretch keeps only its end
      const keepTail = i < last; // a trailing stretch keeps only its start
      pieces.push({ kind: 'same', text: shorten(c.value, context, keepHead, keepTail) });
    }
  }
  if (pieces.length > maxPieces) {
    pieces.length = maxPieces - 1;
    pieces.push({ kind: 'same', text: ELLIPSIS });
  }
  return pieces;
}

/** Shortens an unchanged stretch, keeping `context` words at the ends asked for. */
function shorten(text: string, context: number, keepHead: boolean, keepTail: boolean): string {
  const starts: number[] = [];
  const ends: number[] = [];
  const word = /\S+/g;
  for (let m = word.exec(text); m !== null; m = word.exec(text)) {
    starts.push(m.index);
    ends.push(m.index + m[0].length);
  }
  const n = starts.length;
  const kept = (keepHead ? context : 0) + (keepTail ? context : 0);
  if (n <= kept) return text;
  const head = !keepHead ? '' : context > 0 ? text.slice(0, ends[context - 1]) + ' ' : text.slice(0, starts[0]);
  const tail = !keepTail ? '' : context > 0 ? ' ' + text.slice(starts[n - context]) : text.slice(ends[n - 1]);
  return head + ELLIPSIS + tail;
}
