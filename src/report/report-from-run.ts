/**
 * Assembles {@link ReportData} from a grouping run (and its near-copy search,
 * when there was one). Pure.
 *
 * @module
 */
import type { GroupChoice, GroupResult } from '../pipeline.js';
import type { DuplicateRun } from '../near-copies.js';
import type { ReportData } from './report-data.js';
import { methodOf } from '../methods/index.js';
import { round } from '../util/round.js';
import type { Evaluation } from './outputs.js';
import { centreSimilarity, exportColumns, mergeNames, reportEvaluation, reportTrends, type TrendsInput } from './report-extras.js';

/** What the report shows besides the run itself. */
export interface ReportContext {
  readonly title: string;
  /** ISO time the run finished. */
  readonly createdAt: string;
  readonly version: string;
  readonly skipped: number;
  /** Extra settings to list (name, value), after the grouping's own. */
  readonly settings?: readonly { name: string; value: string }[];
  /** Each document's text as written (before cleaning), in input order: the reader shows it beside the cleaned text. */
  readonly originals?: readonly string[];
  /** Per document in input order, a link to its file (relative to the report's folder, or a file:// URL), null for export rows. */
  readonly links?: readonly (string | null)[];
  /** Scores against known labels. */
  readonly evaluation?: Evaluation | null;
  /** Counts per group over time. */
  readonly trends?: TrendsInput | null;
}

/** The report's data for a grouping run; `near` adds the near-duplicate view. */
export function reportFromRun(
  result: GroupResult,
  near: Pick<DuplicateRun, 'sets' | 'setOf' | 'diffs'> | null,
  nearSettings: { threshold: number; by: string } | null,
  context: ReportContext,
): ReportData {
  const p = result.partition;
  const k = p.groups;
  const rows = result.docs;
  const tree = result.tree;
  const o = result.options;
  const unsortedSet = new Set(result.unsorted.rows);
  const columns = exportColumns(result);
  const settings = [
    { name: 'method', value: methodOf(result).title },
    {
      name: 'vectors grouped',
      value: result.reduced
        ? `reduced: ${result.reduced.svd.dims} dimensions (truncated SVD of the TF-IDF rows); names from the terms`
        : 'TF-IDF rows',
    },
    { name: 'groups', value: result.choice ? `${k} (chosen by ${result.choice.by})` : String(k) },
    { name: 'language', value: o.analyzer.lang },
    { name: 'stemming', value: o.analyzer.stem ? 'on' : 'off' },
    { name: 'term pruning', value: `min df ${o.vectorize.minDf}, max df ${o.vectorize.maxDf}, max terms ${o.vectorize.maxTerms ?? 'none'}` },
    { name: 'seed', value: String(o.seed) },
    { name: 'mean silhouette', value: Number.isFinite(result.quality.silhouette.mean) ? result.quality.silhouette.mean.toFixed(3) : '–' },
    ...(nearSettings ? [{ name: 'near-duplicate threshold', value: `${nearSettings.threshold} (${nearSettings.by})` }] : []),
    ...(context.settings ?? []),
  ];
  return {
    title: context.title,
    createdAt: context.createdAt,
    version: context.version,
    settings,
    counts: {
      documents: rows.length,
      grouped: rows.length - result.emptyRows.length - result.unsorted.rows.length,
      withoutTerms: result.emptyRows.length,
      ...(o.refine.unsorted ? { unsorted: result.unsorted.rows.length } : {}),
      skipped: context.skipped,
      terms: result.matrix.cols,
    },
    groups: result.groups.map((g) => ({
      id: g.id,
      label: g.label,
      size: g.size,
      cohesion: g.cohesion,
      ...(Number.isFinite(result.quality.separation[g.id]) ? { separation: result.quality.separation[g.id] } : {}),
      terms: g.terms.map((t) => ({ term: t.term, weight: t.weight, inGroup: t.inGroup, outside: t.outside })),
      exemplars: g.exemplars.map((r) => rows[r].id),
      ...(result.mixed[g.id] === 1 ? { mixed: true } : {}),
    })),
    tree: {
      merges: Array.from({ length: tree.left.length }, (_, i) => ({
        left: tree.left[i],
        right: tree.right[i],
        similarity: tree.similarity[i],
        size: tree.size[i],
      })),
    },
    ...(result.choice && result.choice.by === 'knee'
      ? { choice: { chosen: result.choice.chosen, treeLeaves: result.choice.treeLeaves, warnings: result.choice.warnings, tried: choiceTable(result.choice) } }
      : {}),
    documents: Array.from(result.inputOrder, (r, i) => {
      const original = context.originals?.[i];
      const link = context.links?.[i];
      const period = context.trends ? context.trends.trends.periodOf[r] : -1;
      return {
        id: rows[r].id,
        title: rows[r].title,
        group: p.assignments[r],
        fit: p.assignments[r] >= 0 || unsortedSet.has(r) ? p.fit[r] : Number.NaN,
        duplicateSet: near ? near.setOf[r] : -1,
        next: result.next.group[r],
        margin: result.next.margin[r],
        fields: columns.map((c) => rows[r].fields.get(c) ?? ''),
        text: original ?? rows[r].text,
        ...(original !== undefined && original !== rows[r].text ? { cleaned: rows[r].text } : {}),
        ...(link ? { link } : {}),
        ...(period >= 0 ? { period: context.trends!.trends.periods[period] } : {}),
      };
    }),
    columns,
    similarity: centreSimilarity(p.centroids, result.matrix.cols, k),
    mergeNames: mergeNames(result.groups, Array.from(tree.left, (left, i) => ({ left, right: tree.right[i] }))),
    ...(context.evaluation ? { evaluation: reportEvaluation(context.evaluation) } : {}),
    ...(result.continuity ? { continuity: result.continuity } : {}),
    ...(context.trends ? { trends: reportTrends(result, context.trends) } : {}),
    ...(near && nearSettings
      ? {
          duplicates: {
            threshold: nearSettings.threshold,
            by: nearSettings.by,
            sets: near.sets.map((set) => {
              const diffs = new Map((near.diffs.get(set.id) ?? []).map((d) => [d.row, d.pieces]));
              return {
                id: set.id,
                representative: rows[set.representative].id,
                members: Array.from(set.members, (r, j) => ({
                  id: rows[r].id,
                  similarity: set.similarityToRepresentative[j],
                  ...(diffs.has(r) ? { diff: diffs.get(r) } : {}),
                })),
              };
            }),
          },
        }
      : {}),
  };
}

/** The score table of an automatic choice (run.json and the report): one row per number of groups tried; NaN becomes null. */
export function choiceTable(choice: GroupChoice): { groups: number; objective: number; knee: number; silhouette: number | null; chosen: boolean }[] {
  return choice.tried.map((t) => ({
    groups: t.groups,
    objective: round(t.objective, 6),
    knee: round(t.knee, 6),
    silhouette: Number.isFinite(t.silhouette) ? round(t.silhouette, 6) : null,
    chosen: t.groups === choice.chosen,
  }));
}
