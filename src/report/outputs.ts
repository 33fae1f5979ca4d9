/**
 * Formats a grouping run as the files of an output folder. Pure: returns
 * strings; writing them is the job of {@link writeOutputFolder}.
 *
 * @module
 */
import type { GroupResult } from '../pipeline.js';
import { csvText, fixed } from './csv.js';

/** Columns sheaf puts first in `documents.csv`. */
export const DOCUMENT_COLUMNS = ['id', 'group', 'label', 'fit', 'duplicate_set'] as const;

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
  const own = new Set<string>(DOCUMENT_COLUMNS);
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
  const header = [...DOCUMENT_COLUMNS, ...userColumns.map((c) => (own.has(c) ? `input_${c}` : c))];
  const { assignments, fit } = result.kmeans;
  const labels = result.groups.map((g) => g.label);
  const dup = extras.duplicateSet;
  function* rows(): Generator<string[]> {
    for (let k = 0; k < result.inputOrder.length; k++) {
      const i = result.inputOrder[k];
      const doc = result.docs[i];
      const g = assignments[i];
      const row = [
        doc.id,
        g >= 0 ? String(g) : '',
        g >= 0 ? labels[g] : '',
        g >= 0 ? fixed(fit[i]) : '',
        dup && dup[i] >= 0 ? String(dup[i]) : '',
      ];
      for (const c of userColumns) row.push(doc.fields.get(c) ?? '');
      yield row;
    }
  }
  return csvText(header, rows());
}

/** The `groups` part of `groups.json`. */
export interface GroupsJson {
  readonly groups: {
    id: number;
    label: string;
    terms: { term: string; weight: number }[];
    size: number;
    cohesion: number;
    exemplars: string[];
  }[];
  readonly [extra: string]: unknown;
}

/** `groups.json`: groups with label, weighted terms, size, cohesion and exemplar ids. */
export function groupsJson(result: GroupResult, extra: Record<string, unknown> = {}): GroupsJson {
  return {
    groups: result.groups.map((g) => ({
      id: g.id,
      label: g.label,
      terms: g.terms.map((t) => ({ term: t.term, weight: round(t.weight, 6) })),
      size: g.size,
      cohesion: round(g.cohesion, 6),
      exemplars: g.exemplars.map((r) => result.docs[r].id),
    })),
    ...extra,
  };
}

/** Rounds for JSON output so files stay readable and stable. */
export function round(value: number, digits: number): number {
  const f = 10 ** digits;
  const r = Math.round(value * f) / f;
  return Object.is(r, -0) ? 0 : r;
}

/** JSON text with two-space indentation and a final newline. */
export function jsonText(value: unknown): string {
  return JSON.stringify(value, null, 2) + '\n';
}
