/**
 * The parts of the report's data that go beyond the groups themselves: each
 * document's text, columns, link and runner-up group; the group × group
 * similarity of the centres; names of the tree's merges; the scores against
 * known labels; counts over time. Pure.
 *
 * @module
 */
import type { GroupResult } from '../pipeline.js';
import type { GroupTrends } from '../trends/index.js';
import type { Evaluation } from './outputs.js';
import type { ReportEvaluation, ReportTrends } from './report-data.js';

/** Terms kept in the name of a merge of the tree. */
const MERGE_NAME_TERMS = 3;

/** Group × group cosine of unit term-major centres (`centroids[t * k + g]`), row-major k × k. */
export function centreSimilarity(centroids: Float32Array, cols: number, k: number): number[] {
  const out = new Array<number>(k * k).fill(0);
  for (let t = 0; t < cols; t++) {
    const base = t * k;
    for (let a = 0; a < k; a++) {
      const va = centroids[base + a]!;
      if (va === 0) continue;
      for (let b = a; b < k; b++) out[a * k + b] += va * centroids[base + b]!;
    }
  }
  for (let a = 0; a < k; a++) for (let b = 0; b < a; b++) out[a * k + b] = out[b * k + a]!;
  return out;
}

/**
 * Name of every merge of the tree (node `k + i`): the {@link MERGE_NAME_TERMS}
 * terms with the largest summed weight over the groups below it, each group's
 * term weights counted once per document of the group (so a large group
 * weighs as its documents do). The groups' own names come from the naming
 * stage; these sums only combine the weights it gave.
 */
export function mergeNames(
  groups: readonly { readonly size: number; readonly terms: readonly { readonly term: string; readonly weight: number }[] }[],
  merges: readonly { readonly left: number; readonly right: number }[],
): string[] {
  const k = groups.length;
  const below: number[][] = [];
  const names: string[] = [];
  for (let i = 0; i < merges.length; i++) {
    const part = (v: number): number[] => (v < k ? [v] : below[v - k] ?? []);
    const leaves = [...part(merges[i]!.left), ...part(merges[i]!.right)];
    below.push(leaves);
    const sum = new Map<string, number>();
    for (const g of leaves) for (const t of groups[g]?.terms ?? []) sum.set(t.term, (sum.get(t.term) ?? 0) + t.weight * groups[g]!.size);
    const top = [...sum].sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0)).slice(0, MERGE_NAME_TERMS);
    names.push(top.map((x) => x[0]).join(' · '));
  }
  return names;
}

/** The report's form of an {@link Evaluation}. */
export function reportEvaluation(e: Evaluation): ReportEvaluation {
  const s = e.scores;
  return {
    field: e.field,
    scored: e.scored,
    leftOut: e.leftOut,
    scores: [
      { name: 'purity', value: s.purity },
      { name: 'NMI', value: s.nmi },
      { name: 'adjusted Rand index', value: s.ari },
      { name: 'V-measure', value: s.vMeasure },
      { name: 'homogeneity', value: s.homogeneity },
      { name: 'completeness', value: s.completeness },
    ],
    contingency: e.contingency,
  };
}

/** What the report shows of a date column's trends. */
export interface TrendsInput {
  readonly column: string;
  readonly zone: string;
  readonly trends: GroupTrends;
}

/** The report's form of the trends (counts per group, unparsed ids in input order, first few). */
export function reportTrends(result: GroupResult, t: TrendsInput, listed = 10): ReportTrends {
  const p = t.trends.periods.length;
  const k = result.partition.groups;
  const rank = new Int32Array(result.docs.length);
  result.inputOrder.forEach((r, i) => (rank[r] = i));
  const unparsed = Array.from(t.trends.unparsed).sort((a, b) => rank[a]! - rank[b]!);
  return {
    column: t.column,
    granularity: t.trends.granularity,
    zone: t.zone,
    periods: t.trends.periods,
    counts: Array.from({ length: k }, (_, g) => Array.from(t.trends.counts.subarray(g * p, g * p + p))),
    rising: Array.from(t.trends.rising),
    unparsed: unparsed.length,
    unparsedIds: unparsed.slice(0, listed).map((r) => result.docs[r]!.id),
  };
}

/** The export's columns, in first-seen order (the same order documents.csv uses). */
export function exportColumns(result: GroupResult): string[] {
  const seen = new Set<string>();
  for (const d of result.docs) for (const key of d.fields.keys()) seen.add(key);
  return [...seen];
}

/** The trends' entry of run.json: column, granularity, zone, periods, counts per group, rising groups, unparsed count and first ids. */
export function trendsRecord(result: GroupResult, t: TrendsInput): Record<string, unknown> {
  const r = reportTrends(result, t);
  return {
    column: r.column,
    granularity: r.granularity,
    zone: r.zone,
    periods: r.periods,
    counts: r.counts.map((c, g) => ({ group: g, counts: c })),
    rising: r.rising,
    unparsed: r.unparsed,
    unparsedIds: r.unparsedIds,
  };
}
