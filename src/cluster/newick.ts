/**
 * Writes a {@link Dendrogram} in the Newick tree format (J. Felsenstein's
 * specification, "The Newick tree format", PHYLIP documentation).
 *
 * @module
 */

import type { Dendrogram } from './tree.js';

/**
 * Formats the tree as one Newick string ending in `;`.
 *
 * Branch lengths: a node's height is its merge distance `1 - similarity` (leaves at 0),
 * NOT halved, so every root-to-leaf path length equals the root's merge distance and a
 * node sits at the same height as in a linkage dendrogram plot; a branch's length is
 * parent height minus child height (never negative; written in plain decimal notation
 * with up to 10 decimals). The root has no branch length.
 *
 * Labels: written as-is when they contain no blank and none of `( ) [ ] ' : ; ,` or `_`;
 * otherwise (and when empty) wrapped in single quotes with internal single quotes doubled,
 * as the format requires. `_` is quoted too because unquoted underscores read as blanks.
 * Children are written left (smaller id) then right.
 *
 * @throws Error when `leafNames.length` differs from `tree.leaves`.
 */
export function toNewick(tree: Dendrogram, leafNames: readonly string[]): string {
  const n = tree.leaves;
  if (leafNames.length !== n) throw new Error(`toNewick: ${leafNames.length} names for ${n} leaves`);
  if (n === 0) return ';';
  if (n === 1) return `${newickLabel(leafNames[0]!)};`;
  const heightOf = (id: number): number => (id < n ? 0 : Math.max(0, 1 - tree.similarity[id - n]!));
  // iterative post-order (trees from chained data can be n deep)
  const parts: string[] = [];
  const stack: number[] = [2 * n - 2];
  const state: number[] = [0];
  while (stack.length > 0) {
    const top = stack.length - 1;
    const id = stack[top]!;
    if (id < n) {
      parts.push(newickLabel(leafNames[id]!));
      stack.pop();
      state.pop();
      closeBranch(parts, stack, id, heightOf);
      continue;
    }
    const m = id - n;
    const step = state[top]!;
    if (step === 0) {
      parts.push('(');
      state[top] = 1;
      stack.push(tree.left[m]!);
      state.push(0);
    } else if (step === 1) {
      parts.push(',');
      state[top] = 2;
      stack.push(tree.right[m]!);
      state.push(0);
    } else {
      parts.push(')');
      stack.pop();
      state.pop();
      closeBranch(parts, stack, id, heightOf);
    }
  }
  parts.push(';');
  return parts.join('');
}

function closeBranch(
  parts: string[],
  stack: number[],
  id: number,
  heightOf: (id: number) => number,
): void {
  if (stack.length === 0) return; // the root carries no branch length
  const parent = stack[stack.length - 1]!;
  parts.push(`:${formatLength(heightOf(parent) - heightOf(id))}`);
}

/** Quotes a Newick label when it holds a blank, one of `()[]':;,`, `_`, or is empty. */
export function newickLabel(name: string): string {
  if (name.length > 0 && !/[\s()[\]':;,_]/u.test(name)) return name;
  return `'${name.replace(/'/gu, "''")}'`;
}

function formatLength(x: number): string {
  const v = x > 0 ? x : 0;
  const text = v.toFixed(10).replace(/0+$/u, '').replace(/\.$/u, '');
  return text === '' ? '0' : text;
}
