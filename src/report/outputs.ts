/**
 * Formats a grouping run as the files of an output folder. Pure: returns
 * strings; writing them is the job of {@link writeOutputFolder}.
 *
 * @module
 */
import type { GroupResult } from '../pipeline.js';
import { treeToJson } from '../cluster/tree.js';
import { toNewick } from '../cluster/newick.js';
import { encodeLabels, externalScores, type ExternalScores } from '../evaluate/index.js';
import { csvChunks, fixed } from './csv.js';
import { round } from '../util/round.js';

/** Columns sheaf puts first in `documents.csv`. */
export const DOCUMENT_COLUMNS = ['id', 'group', 'label', 'fit', 'duplicate_set'] as const;

/**
 * Columns after {@link DOCUMENT_COLUMNS}: the closest group other than the document's own (`next_group`) and
 * own cosine minus that group's cosine (`next_margin`), both in the space the groups were formed in.
 */
export const NEXT_COLUMNS = ['next_group', 'next_margin'] as const;

/** The label column of an unsorted document in `documents.csv` (its group column is empty, its fit kept). */
export const UNSORTED_LABEL = '(unsorted)';

/** Per-document extras other stages may add (for example near-duplicate set ids). */
export interface DocumentExtras {
  /** Near-duplicate set per row, -1 for none. */
  readonly duplicateSet?: Int32Array;
}

/**
 * `documents.csv`: one row per document in the order given, `id, group, label,
 * fit, duplicate_set`, then the export's own columns in their order (the union
 * over all documents). A user column whose name clashes with one of ours is
 * written as `input_<name>`. Documents with no terms have an empty group.
 */
export function documentsCsv(result: GroupResult, extras: DocumentExtras = {}): string {
  return [...documentsCsvChunks(result, extras)].join('');
}

/** {@link documentsCsv} in pieces, for writing inputs too large for one string. */
export function documentsCsvChunks(result: GroupResult, extras: DocumentExtras = {}): Generator<string> {
  const own = new Set<string>([...DOCUMENT_COLUMNS, ...NEXT_COLUMNS]);
  const userColumns: string[] = [];
  const seen = new Set<string>();
  for (const doc of result.docs) {
    for (const key of doc.fields.keys()) {
      if (!seen.has(key)) {
        seen.add(key);
        userColumns.push(key);
      }
    }
  }
  const header = [...DOCUMENT_COLUMNS, ...NEXT_COLUMNS, ...userColumns.map((c) => (own.has(c) ? `input_${c}` : c))];
  const { assignments, fit } = result.partition;
  const labels = result.groups.map((g) => g.label);
  const dup = extras.duplicateSet;
  const unsorted = new Set(result.unsorted.rows);
  function* rows(): Generator<string[]> {
    for (let k = 0; k < result.inputOrder.length; k++) {
      const i = result.inputOrder[k];
      const doc = result.docs[i];
      const g = assignments[i];
      const row = [
        doc.id,
        g >= 0 ? String(g) : '',
        g >= 0 ? labels[g] : unsorted.has(i) ? UNSORTED_LABEL : '',
        g >= 0 || unsorted.has(i) ? fixed(fit[i]) : '',
        dup && dup[i] >= 0 ? String(dup[i]) : '',
        ...nextCells(result, i),
      ];
      for (const c of userColumns) row.push(doc.fields.get(c) ?? '');
      yield row;
    }
  }
  // The formula guard on sheaf's own columns only: the user's columns are written as they were (see csv.ts).
  return csvChunks(header, rows(), { guarded: DOCUMENT_COLUMNS.length });
}

/** The `next_group` and `next_margin` cells of row `i` (empty for documents in no group). */
function nextCells(result: GroupResult, i: number): [string, string] {
  const g = result.next.group[i];
  const m = result.next.margin[i];
  return [g >= 0 ? String(g) : '', g >= 0 && Number.isFinite(m) ? fixed(m) : ''];
}

/** The shape of `groups.json`. */
export interface GroupsJson {
  readonly groups: {
    id: number;
    label: string;
    terms: { term: string; weight: number }[];
    size: number;
    cohesion: number;
    /** Highest cosine between this group's centroid and another group's (null with one group). */
    separation: number | null;
    /** Mean silhouette of the group's sampled members (null when none was sampled). */
    silhouette: number | null;
    exemplars: string[];
    /** True when the group's cohesion is low relative to the others (see cluster/unsorted.ts). */
    mixed: boolean;
  }[];
  /** Documents set apart as unsorted (fit below the pile's threshold), and that threshold (null when off). */
  readonly unsorted: { count: number; threshold: number | null };
  /** Average-link tree over the groups: leaves are group ids, node `groups + i` is made by merge `i`. */
  readonly tree: {
    method: string;
    leaves: number;
    root: number | null;
    nodes: { id: number; children: [number, number] | null; similarity: number | null; groups: number; documents: number; label?: string }[];
  };
  readonly [extra: string]: unknown;
}

function finiteOrNull(v: number, digits = 6): number | null {
  return Number.isFinite(v) ? round(v, digits) : null;
}

/** `groups.json`: groups with label, weighted terms, size, cohesion, separation, exemplar ids, and the tree over them. */
export function groupsJson(result: GroupResult, extra: Record<string, unknown> = {}): GroupsJson {
  const sizes = result.groups.map((g) => g.size);
  const tree = treeToJson(result.tree, { leafDocuments: sizes });
  return {
    groups: result.groups.map((g) => ({
      id: g.id,
      label: g.label,
      terms: g.terms.map((t) => ({ term: t.term, weight: round(t.weight, 6) })),
      size: g.size,
      cohesion: round(g.cohesion, 6),
      separation: finiteOrNull(result.quality.separation[g.id]),
      silhouette: finiteOrNull(result.quality.silhouette.perGroup[g.id]),
      exemplars: g.exemplars.map((r) => result.docs[r].id),
      mixed: result.mixed[g.id] === 1,
    })),
    unsorted: { count: result.unsorted.rows.length, threshold: finiteOrNull(result.unsorted.threshold) },
    tree: {
      method: 'average-link (UPGMA) on cosine over the groups',
      leaves: tree.leaves,
      root: tree.root,
      nodes: tree.nodes.map((node) => ({
        id: node.id,
        children: node.children,
        similarity: node.similarity === null ? null : round(node.similarity, 6),
        groups: node.size,
        documents: node.documents ?? 0,
        ...(node.children === null ? { label: result.groups[node.id].label } : {}),
      })),
    },
    ...extra,
  };
}

/** `tree.nwk`: the tree over the groups in Newick, leaves named `<id> <label>`. */
export function treeNewick(result: GroupResult): string {
  return toNewick(result.tree, result.groups.map((g) => `${g.id} ${g.label}`)) + '\n';
}

/** Scores of the groups against known labels, and where each known label went. */
export interface Evaluation {
  readonly field: string;
  /** Documents scored (in a group and with a known label). */
  readonly scored: number;
  /** Documents left out (no group, or an empty label). */
  readonly leftOut: number;
  readonly scores: Omit<ExternalScores, 'contingency'>;
  /** One row per known label, largest first: where its documents went. */
  readonly contingency: { label: string; size: number; groups: { group: string; count: number }[] }[];
}

/**
 * Compares predicted groups with known labels (`truth[i]` and `predicted[i]`
 * for the same document; empty strings are left out).
 */
export function evaluateLabels(field: string, truth: readonly string[], predicted: readonly string[]): Evaluation {
  const keep: number[] = [];
  for (let i = 0; i < truth.length; i++) if (truth[i] !== '' && predicted[i] !== '') keep.push(i);
  const t = encodeLabels(keep.map((i) => truth[i]));
  const p = encodeLabels(keep.map((i) => predicted[i]));
  const all = externalScores(t.codes, p.codes);
  const { contingency: c, ...scores } = all;
  const rows = t.names.map((label, a) => {
    const groups: { group: string; count: number }[] = [];
    for (let b = 0; b < c.cols; b++) {
      const count = c.counts[a * c.cols + b];
      if (count > 0) groups.push({ group: p.names[b], count });
    }
    groups.sort((x, y) => y.count - x.count || compareGroupNames(x.group, y.group));
    return { label, size: c.rowTotals[a], groups };
  });
  rows.sort((x, y) => y.size - x.size || (x.label < y.label ? -1 : 1));
  return { field, scored: keep.length, leftOut: truth.length - keep.length, scores, contingency: rows };
}

function compareGroupNames(a: string, b: string): number {
  const na = Number(a);
  const nb = Number(b);
  if (Number.isFinite(na) && Number.isFinite(nb)) return na - nb;
  return a < b ? -1 : a > b ? 1 : 0;
}

/** `{ purity, nmi, ari, v_measure, contingency }` for scripts (`sheaf evaluate --json`). */
export function evaluationJson(e: Evaluation): unknown {
  return {
    field: e.field,
    scored: e.scored,
    left_out: e.leftOut,
    purity: round(e.scores.purity, 6),
    nmi: round(e.scores.nmi, 6),
    ari: round(e.scores.ari, 6),
    v_measure: round(e.scores.vMeasure, 6),
    homogeneity: round(e.scores.homogeneity, 6),
    completeness: round(e.scores.completeness, 6),
    rand_index: round(e.scores.randIndex, 6),
    contingency: e.contingency,
  };
}

export { round } from '../util/round.js';

/** JSON text with two-space indentation and a final newline. */
export function jsonText(value: unknown): string {
  return JSON.stringify(value, null, 2) + '\n';
}
