/**
 * A shortcut for the cleaning stage's `auto` detection: a pile whose every
 * document holds at most one non-blank line cannot be counted as holding
 * ticket clutter, so the full cleaning pass that only serves to count it can
 * be skipped. Pure.
 *
 * Why (see `cleanDocuments` and `replies.ts`): each rule that counts clutter
 * (a quoted line, reply history, a signature, a greeting) removes the
 * non-blank lines it counts. On a document with one non-blank line, any rule
 * that fires removes that line, which would leave the document empty; such a
 * document keeps its text (`keptWhole`) and counts in no rule. A document
 * with no non-blank line gives no rule anything to match. So `withClutter`
 * is 0, whatever the rules and the other documents (boilerplate only removes
 * lines too).
 *
 * @module
 */
import type { Doc } from '../types.js';

/** True when `text` holds at most one non-blank line (lines as `cleanDocuments` splits them: `\r\n`, `\r` or `\n`; blank = only white space). */
export function atMostOneLine(text: string): boolean {
  if (text.indexOf('\n') === -1 && text.indexOf('\r') === -1) return true;
  let content = 0;
  for (const line of text.split(/\r\n?|\n/)) {
    if (line.trim() !== '' && ++content > 1) return false;
  }
  return true;
}

/** True when every document of `docs` holds at most one non-blank line: cleaning would count none of them as holding clutter. */
export function noClutterPossible(docs: readonly Doc[]): boolean {
  for (let i = 0; i < docs.length; i++) if (!atMostOneLine(docs[i]!.text)) return false;
  return true;
}
