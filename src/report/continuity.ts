/**
 * The "since last run" view of a grouping run continued from a previous model:
 * its run.json record, its terminal lines and the body of the report's
 * "Since the previous run" view. Pure.
 *
 * @module
 */
import type { Continuity } from '../continuity/match.js';
import { escapeHtml } from './html-escape.js';

/** The `continuity` record of run.json: the previous model, the settings, every group's change and the gone groups. */
export function continuityRecord(c: Continuity): Record<string, unknown> {
  const count = (change: string) => c.groups.filter((g) => g.change === change).length;
  return {
    previous: c.source,
    matchSimilarity: c.options.minSimilarity,
    sizeChange: c.options.sizeChange,
    counts: { continued: count('continued'), grown: count('grown'), shrunk: count('shrunk'), new: count('new'), gone: c.gone.length },
    groups: c.groups.map((g) => ({ id: g.id, change: g.change, size: g.size, previous: g.previous, similarity: g.similarity })),
    gone: c.gone,
  };
}

/** Terminal lines: one summary line, then one line per group that is new, grown, shrunk, renumbered, and per gone group. */
export function continuityLines(c: Continuity, labelOf: (id: number) => string): string[] {
  const r = continuityRecord(c).counts as Record<string, number>;
  const lines = [
    `Since the previous run (${c.source}): ${r.continued + r.grown + r.shrunk} continued (${r.grown} grown, ${r.shrunk} shrunk), ${r.new} new, ${r.gone} gone.`,
  ];
  for (const g of c.groups) {
    if (g.change === 'new') lines.push(`  new     ${g.id} ${labelOf(g.id)} (${g.size})`);
    else if (g.change !== 'continued' || g.previous!.id !== g.id) {
      const was = g.previous!.id !== g.id ? `, was ${g.previous!.id}` : '';
      lines.push(`  ${g.change.padEnd(7)} ${g.id} ${labelOf(g.id)} (${g.previous!.size} → ${g.size}${was})`);
    }
  }
  for (const g of c.gone) lines.push(`  gone    ${g.id} ${g.label} (${g.size})`);
  return lines;
}

/** The report view's body: a line on the previous model and the rule, then a table of every group's change and the gone groups (all text escaped). */
export function continuityHtml(c: Continuity, labelOf: (id: number) => string): string {
  const row = (cells: readonly (string | number)[]) => `<tr>${cells.map((x) => `<td>${escapeHtml(x)}</td>`).join('')}</tr>`;
  const rows = [
    ...c.groups.map((g) => row([g.id, labelOf(g.id), g.change, g.previous ? `${g.previous.id} ${g.previous.label}` : '', g.previous ? g.previous.size : '', g.size, g.similarity === null || g.similarity === undefined ? '' : g.similarity.toFixed(3)])),
    ...c.gone.map((g) => row(['', g.label, 'gone', `${g.id} ${g.label}`, g.size, 0, g.closest.toFixed(3)])),
  ];
  return (
    `<p>Compared with ${escapeHtml(c.source)}: a group continues an earlier one when their centres' cosine is at least ${escapeHtml(c.options.minSimilarity)} (an optimal one-to-one matching); it keeps that group's number and name.</p>` +
    `<div class="table-wrap"><table><thead><tr><th>group</th><th>name</th><th>change</th><th>previous group</th><th>previous size</th><th>size</th><th>similarity</th></tr></thead><tbody>${rows.join('')}</tbody></table></div>`
  );
}
