/**
 * What `sheaf group` and `sheaf tree` print when they are done: the choice of
 * the number of groups, the table of groups, the tree outline, the scores
 * against known labels, the near-copies, the counts and the files written.
 *
 * @module
 */
import type { GroupResult } from '../pipeline.js';
import type { Evaluation } from '../report/outputs.js';
import type { GroupNearCopies } from '../report/group-outputs.js';
import { choiceLines, evaluationLines, groupTable, treeOutline } from './render.js';

/** The lines of the summary on stdout. */
export function groupSummaryLines(
  result: GroupResult,
  x: {
    readonly command: 'group' | 'tree';
    readonly width: number;
    readonly evaluation: Evaluation | null;
    readonly near: GroupNearCopies | null;
    readonly read: { readonly documents: number; readonly skipped: number };
    readonly written: readonly string[];
  },
): string[] {
  const { command, width, evaluation, near } = x;
  const out: string[] = [];
  if (result.choice) out.push(...choiceLines(result), '');
  if (command === 'group') out.push(...groupTable(result, width), '');
  out.push('Tree of themes (average-link over the groups):', ...treeOutline(result, width, result.groups.length <= 24 ? Infinity : command === 'tree' ? 6 : 4), '');
  if (evaluation) out.push(...evaluationLines(evaluation, width), '');
  if (near) {
    const inSets = near.found.sets.reduce((a, s) => a + s.members.length, 0);
    out.push(`Near-copies at cosine ≥ ${near.threshold}: ${near.found.sets.length} set(s) holding ${inSets} documents (duplicate_set in documents.csv).`, '');
  }
  out.push(
    `${x.read.documents} documents (${x.read.skipped} skipped, ${result.emptyRows.length} without terms) ` +
      `in ${result.groups.length} groups${unsortedNote(result)}; ${result.vocabulary.terms.length} terms; ` +
      `mean silhouette ${Number.isFinite(result.quality.silhouette.mean) ? result.quality.silhouette.mean.toFixed(3) : '–'}.`,
    'Wrote:',
    ...x.written.map((p) => `  ${p}`),
  );
  return out;
}

/** ` (unsorted: N)` for the summary line when documents were set apart; empty otherwise. */
function unsortedNote(result: GroupResult): string {
  return result.options.refine.unsorted ? ` (unsorted: ${result.unsorted.rows.length})` : '';
}
