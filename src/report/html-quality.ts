/**
 * Report sections about the quality of the grouping: the table of the numbers
 * of groups tried when the number was chosen automatically, with its warnings;
 * the unsorted count and the mixed flag.
 *
 * @module
 */
import type { ReportData } from './report-data.js';
import { escapeHtml as e, formatCount, formatFixed } from './html-escape.js';

/** `unsorted: N` for the overview's counts, when documents were set apart. */
export function unsortedCounts(data: ReportData): [string, string][] {
  return data.counts.unsorted === undefined ? [] : [['Unsorted (fit no group well)', formatCount(data.counts.unsorted)]];
}

/** The "mixed" line of a group's statistics, when it is flagged. */
export function mixedStat(g: ReportData['groups'][number]): string[] {
  return g.mixed ? ['<li><strong>mixed</strong>: cohesion well below the other groups’ (it may hold several themes)</li>'] : [];
}

/** The "Number of groups" section of the overview: empty when the number was given. */
export function choiceSection(data: ReportData): string[] {
  const c = data.choice;
  if (!c) return [];
  const out = [
    '<h3>Number of groups</h3>',
    `<p>Chose <strong>${e(formatCount(c.chosen))}</strong> groups at the knee of the objective (the sum of each document’s cosine to its group’s centre) ` +
      `over the cuts of a tree of ${e(formatCount(c.treeLeaves))} leaves. <strong>Knee</strong> is how far the normalised objective curve rises above the straight line ` +
      'between its ends (Kneedle); the silhouette is shown for comparison.</p>',
  ];
  for (const w of c.warnings) out.push(`<p class="notice">${e(w)}</p>`);
  out.push(
    '<table class="choice"><caption class="visually-hidden">Scores of each number of groups tried</caption><thead><tr>' +
      '<th scope="col" class="num">Groups</th><th scope="col" class="num">Objective</th><th scope="col" class="num">Knee</th><th scope="col" class="num">Silhouette</th><th scope="col"></th>' +
      '</tr></thead><tbody>',
    ...c.tried.map(
      (t) =>
        `<tr${t.chosen ? ' class="chosen"' : ''}><td class="num">${e(formatCount(t.groups))}</td><td class="num">${e(formatFixed(t.objective, 2))}</td>` +
        `<td class="num">${e(formatFixed(t.knee, 3))}</td><td class="num">${t.silhouette === null ? '–' : e(formatFixed(t.silhouette, 3))}</td>` +
        `<td class="text">${t.chosen ? 'chosen' : ''}</td></tr>`,
    ),
    '</tbody></table>',
  );
  return out;
}
