/**
 * What the commands show in the terminal: the group table, a compact view of
 * the tree's top levels, the scores of each number of groups tried, and the
 * comparison with known labels.
 *
 * @module
 */
import type { GroupResult } from '../pipeline.js';
import type { Evaluation } from '../report/outputs.js';
import { fixed } from '../report/csv.js';
import { clip, renderTable } from './table.js';
import { visible } from './visible.js';
import { methodOf } from '../methods/index.js';

/** The group table: id, size, name, cohesion, two exemplar titles. */
export function groupTable(result: GroupResult, width: number): string[] {
  const rows = result.groups.map((g) => [
    String(g.id),
    String(g.size),
    result.mixed[g.id] === 1 ? `${g.label} (mixed)` : g.label,
    fixed(g.cohesion, 2),
    g.exemplars
      .slice(0, 2)
      .map((r) => result.docs[r].title || result.docs[r].id)
      .join(' | '),
  ]);
  return renderTable(
    [
      { heading: 'group', align: 'right' },
      { heading: 'size', align: 'right' },
      { heading: 'name', min: 16 },
      { heading: 'cohesion', align: 'right' },
      { heading: 'for example', min: 20 },
    ],
    rows,
    width,
  );
}

/**
 * The top levels of the tree over the groups as an indented outline: each
 * inner node shows its documents and the similarity at which its two parts
 * join; each leaf its group id, size and name. Below `depth` levels a branch
 * is summarised in one line.
 */
export function treeOutline(result: GroupResult, width: number, depth = 4): string[] {
  const tree = result.tree;
  const n = tree.leaves;
  if (n === 0) return [];
  const docs = new Float64Array(2 * n - 1);
  for (let g = 0; g < n; g++) docs[g] = result.groups[g].size;
  for (let m = 0; m < n - 1; m++) docs[n + m] = docs[tree.left[m]] + docs[tree.right[m]];
  const leavesUnder = (node: number): number => (node < n ? 1 : tree.size[node - n]);
  const lines: string[] = [];
  const visit = (node: number, prefix: string, branch: string, level: number): void => {
    let text: string;
    if (node < n) {
      const g = result.groups[node];
      text = `group ${g.id}: ${visible(g.label)} (${g.size})`;
    } else if (level >= depth) {
      text = `${docs[node]} documents in ${leavesUnder(node)} groups (joined at ${fixed(tree.similarity[node - n], 2)}) …`;
    } else {
      text = `${docs[node]} documents, parts alike at ${fixed(tree.similarity[node - n], 2)}`;
    }
    lines.push(clip(prefix + branch + text, width));
    if (node < n || level >= depth) return;
    const m = node - n;
    // Larger part first, so the outline reads from the main themes down.
    const [a, b] = docs[tree.left[m]] >= docs[tree.right[m]] ? [tree.left[m], tree.right[m]] : [tree.right[m], tree.left[m]];
    const childPrefix = prefix + (branch === '' ? '' : branch === '├─ ' ? '│  ' : '   ');
    visit(a, childPrefix, '├─ ', level + 1);
    visit(b, childPrefix, '└─ ', level + 1);
  };
  visit(2 * n - 2, '', '', 0);
  return lines;
}

/** The scores of each number of groups tried (objective, knee, silhouette), the chosen one marked, and any warning. */
export function choiceLines(result: GroupResult): string[] {
  const c = result.choice;
  if (!c) return [];
  if (c.by === 'similarity') {
    return [
      `Cut the tree over ${c.treeLeaves} ${methodOf(result).leaves.short} where average similarity falls below ${result.options.minSimilarity}: ${c.chosen} groups.`,
    ];
  }
  const lines = [
    `Chose ${c.chosen} groups at the knee of the objective (Σ cosine to the group centre) over the cuts of a tree over ${c.treeLeaves} ` +
      `${methodOf(result).leaves.long} (silhouette on ${c.sampled} sampled documents):`,
  ];
  const rows = c.tried.map((t) => [
    String(t.groups),
    fixed(t.objective, 2),
    fixed(t.knee, 3),
    Number.isFinite(t.silhouette) ? fixed(t.silhouette, 3) : '–',
    t.groups === c.chosen ? '◀ chosen' : '',
  ]);
  const headings = ['groups', 'objective', 'knee', 'silhouette'].map((heading) => ({ heading, align: 'right' as const }));
  lines.push(...renderTable([...headings, { heading: '' }], rows, 60));
  for (const w of c.warnings) lines.push(`Warning: ${w}.`);
  return lines;
}

/** Scores against known labels and, per known label, where its documents went. */
export function evaluationLines(e: Evaluation, width: number, top = 15): string[] {
  const s = e.scores;
  const lines = [
    `Against "${visible(e.field)}" (${e.scored} documents${e.leftOut ? `, ${e.leftOut} left out: no group or no label` : ''}): ` +
      `purity ${fixed(s.purity, 3)}  NMI ${fixed(s.nmi, 3)}  ARI ${fixed(s.ari, 3)}  V-measure ${fixed(s.vMeasure, 3)}`,
  ];
  const rows = e.contingency.slice(0, top).map((r) => [
    r.label,
    String(r.size),
    r.groups
      .slice(0, 4)
      .map((g) => `group ${g.group}: ${g.count} (${Math.round((100 * g.count) / r.size)}%)`)
      .join(', ') + (r.groups.length > 4 ? ', …' : ''),
  ]);
  lines.push(...renderTable([{ heading: e.field, min: 8 }, { heading: 'size', align: 'right' }, { heading: 'went to', min: 20 }], rows, width));
  if (e.contingency.length > top) lines.push(`… and ${e.contingency.length - top} more labels (all in run.json)`);
  return lines;
}
