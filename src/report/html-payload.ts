/**
 * The data block embedded in the HTML report: a compact, column-wise form of
 * {@link ReportData} that the page's script reads with `JSON.parse`. Strings are
 * kept exactly; fits and similarities are rounded to {@link PAYLOAD_DIGITS}
 * decimals, the precision the page shows, so what a list is sorted by is what
 * it shows (and 100k documents stay a few MB).
 *
 * @module
 */
import type { ReportData, ReportDiffPiece } from './report-data.js';
import { roundOrNull } from './html-escape.js';

/** Decimals kept for fits and similarities in the embedded data (and shown by the page). */
export const PAYLOAD_DIGITS = 3;

/** A diff piece as `[kind, text]`, kind 0 = same, 1 = added, 2 = removed. */
export type PayloadDiffPiece = [0 | 1 | 2, string];

/** The embedded data block (version 1). Every per-document list has one entry per document, in input order. */
export interface ReportPayload {
  readonly format: 1;
  readonly groups: { readonly id: number[]; readonly label: string[]; readonly size: number[] };
  readonly documents: {
    readonly id: string[];
    readonly title: string[];
    /** Group id, -1 for none. */
    readonly group: number[];
    /** Rounded fit; `null` when not finite. */
    readonly fit: (number | null)[];
    /** Near-duplicate set id, -1 for none. */
    readonly duplicateSet: number[];
  };
  readonly duplicates: null | {
    readonly threshold: number | null;
    readonly by: string;
    readonly sets: {
      readonly id: number;
      readonly representative: string;
      readonly members: { readonly id: string; readonly similarity: number | null; readonly diff: PayloadDiffPiece[] | null }[];
    }[];
  };
}

const KIND_CODE: Readonly<Record<ReportDiffPiece['kind'], 0 | 1 | 2>> = { same: 0, added: 1, removed: 2 };

/** Builds the embedded data block from the report data. */
export function reportPayload(data: ReportData): ReportPayload {
  const n = data.documents.length;
  const documents = {
    id: new Array<string>(n),
    title: new Array<string>(n),
    group: new Array<number>(n),
    fit: new Array<number | null>(n),
    duplicateSet: new Array<number>(n),
  };
  for (let i = 0; i < n; i++) {
    const d = data.documents[i];
    documents.id[i] = String(d.id);
    documents.title[i] = String(d.title);
    documents.group[i] = wholeOr(d.group, -1);
    documents.fit[i] = roundOrNull(d.fit, PAYLOAD_DIGITS);
    documents.duplicateSet[i] = wholeOr(d.duplicateSet, -1);
  }
  return {
    format: 1,
    groups: {
      id: data.groups.map((g) => wholeOr(g.id, -1)),
      label: data.groups.map((g) => String(g.label)),
      size: data.groups.map((g) => wholeOr(g.size, 0)),
    },
    documents,
    duplicates: data.duplicates
      ? {
          threshold: roundOrNull(data.duplicates.threshold, 6),
          by: String(data.duplicates.by),
          sets: data.duplicates.sets.map((s) => ({
            id: wholeOr(s.id, -1),
            representative: String(s.representative),
            members: s.members.map((m) => ({
              id: String(m.id),
              similarity: roundOrNull(m.similarity, PAYLOAD_DIGITS),
              diff: m.diff ? m.diff.map((p): PayloadDiffPiece => [KIND_CODE[p.kind] ?? 0, String(p.text)]) : null,
            })),
          })),
        }
      : null,
  };
}

/** The value if it is a safe integer, else `fallback` (ids and counts only ever reach the page as integers). */
function wholeOr(value: number, fallback: number): number {
  return Number.isSafeInteger(value) ? value : fallback;
}
