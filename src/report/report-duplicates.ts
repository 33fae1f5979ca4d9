/**
 * The report of `sheaf duplicates`: the near-copy part alone (the sets, each
 * set's page with what differs, and the documents in sets with their texts).
 * Pure.
 *
 * @module
 */
import type { DuplicateRun } from '../near-copies.js';
import type { ReportData } from './report-data.js';

/** What the page shows besides the search. */
export interface DuplicatesReportContext {
  readonly title: string;
  readonly createdAt: string;
  readonly version: string;
  readonly skipped: number;
  /** Texts as written, in input order (as the documents were given to the search). */
  readonly originals?: readonly string[];
  /** Links to the files, in input order (null for export rows). */
  readonly links?: readonly (string | null)[];
}

/** Report data of a near-copy search: documents in sets (in input order), the sets strongest first. */
export function duplicatesReportData(run: Pick<DuplicateRun, 'docs' | 'inputOrder' | 'options' | 'sets' | 'setOf' | 'diffs'>, context: DuplicatesReportContext): ReportData {
  const rows = run.docs;
  const o = run.options;
  const by = o.by === 'shingles' ? `resemblance of ${o.shingle}-word shingles` : 'cosine of TF-IDF vectors';
  const seen = new Set<string>();
  for (const d of rows) for (const key of d.fields.keys()) seen.add(key);
  const columns = [...seen];
  const documents: ReportData['documents'][number][] = [];
  run.inputOrder.forEach((r, i) => {
    if (run.setOf[r]! < 0) return;
    const original = context.originals?.[i];
    const link = context.links?.[i];
    documents.push({
      id: rows[r]!.id,
      title: rows[r]!.title,
      group: -1,
      fit: Number.NaN,
      duplicateSet: run.setOf[r]!,
      fields: columns.map((c) => rows[r]!.fields.get(c) ?? ''),
      text: original ?? rows[r]!.text,
      ...(original !== undefined && original !== rows[r]!.text ? { cleaned: rows[r]!.text } : {}),
      ...(link ? { link } : {}),
    });
  });
  return {
    kind: 'duplicates',
    title: context.title,
    createdAt: context.createdAt,
    version: context.version,
    settings: [
      { name: 'compared by', value: by },
      { name: 'threshold', value: String(o.threshold) },
    ],
    counts: { documents: rows.length, grouped: 0, withoutTerms: 0, skipped: context.skipped, terms: 0 },
    groups: [],
    documents,
    columns,
    duplicates: {
      threshold: o.threshold,
      by,
      sets: run.sets.map((set) => {
        const diffs = new Map((run.diffs.get(set.id) ?? []).map((d) => [d.row, d.pieces]));
        return {
          id: set.id,
          representative: rows[set.representative]!.id,
          members: Array.from(set.members, (r, j) => ({
            id: rows[r]!.id,
            similarity: set.similarityToRepresentative[j]!,
            ...(diffs.has(r) ? { diff: diffs.get(r) } : {}),
          })),
        };
      }),
    },
  };
}
