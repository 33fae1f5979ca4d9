/**
 * The data blocks embedded in the HTML report: a compact, column-wise form of
 * {@link ReportData} that the page's script reads with `JSON.parse`, and the
 * documents' texts in separate blocks of {@link TEXT_CHUNK} documents each,
 * parsed only when a document is opened or the texts are searched (so a page
 * of 100k documents opens as fast as one without texts). Strings are kept
 * exactly; fits and similarities are rounded to {@link PAYLOAD_DIGITS}
 * decimals, the precision the page shows, so what a list is sorted by is what
 * it shows.
 *
 * @module
 */
import type { ReportData, ReportDiffPiece } from './report-data.js';
import { roundOrNull } from './html-escape.js';

/** Decimals kept for fits and similarities in the embedded data (and shown by the page). */
export const PAYLOAD_DIGITS = 3;

/**
 * Longest column value kept in the page's main data block (in characters); a longer one (typically the
 * export's text column, which the reader shows in full from the text blocks) is cut and ends with `…`.
 */
export const COLUMN_VALUE_CHARS = 120;

/** Documents per embedded text block. */
export const TEXT_CHUNK = 1000;

/** A diff piece as `[kind, text]`, kind 0 = same, 1 = added, 2 = removed. */
export type PayloadDiffPiece = [0 | 1 | 2, string];

/** The embedded data block (version 2). Every per-document list has one entry per document, in input order. */
export interface ReportPayload {
  readonly format: 2;
  readonly groups: { readonly id: number[]; readonly label: string[]; readonly size: number[]; readonly terms: string[][] };
  readonly documents: {
    readonly id: string[];
    readonly title: string[];
    /** Group id, -1 for none. */
    readonly group: number[];
    /** Rounded fit; `null` when not finite. */
    readonly fit: (number | null)[];
    /** Near-duplicate set id, -1 for none. */
    readonly duplicateSet: number[];
    /** Closest other group, -1 for none; rounded margin or null. */
    readonly next: number[];
    readonly margin: (number | null)[];
    /** Link to the file, or null (export rows). */
    readonly link: (string | null)[];
    /** Period index into `trends.periods`, -1 for none. */
    readonly period: number[];
  };
  /** The export's own columns: `values[c][i]` is column c of document i. */
  readonly columns: { readonly names: string[]; readonly values: string[][] };
  /** Text blocks: `chunks` blocks of `chunk` documents (0 blocks when the report has no texts). */
  readonly texts: { readonly chunk: number; readonly chunks: number };
  /** Tree merges with their names. */
  readonly merges: { readonly left: number; readonly right: number; readonly similarity: number | null; readonly size: number; readonly name: string }[];
  /** Group × group similarity of the centres (rounded), row-major, or null. */
  readonly similarity: (number | null)[] | null;
  readonly trends: null | { readonly periods: string[]; readonly granularity: string };
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

/** One embedded text block: texts as written and, where cleaning changed them, as analysed. */
export interface TextChunk {
  readonly original: string[];
  readonly cleaned: (string | null)[];
}

const KIND_CODE: Readonly<Record<ReportDiffPiece['kind'], 0 | 1 | 2>> = { same: 0, added: 1, removed: 2 };

/** The embedded text blocks (empty when no document carries a text). */
export function textChunks(data: ReportData): TextChunk[] {
  const docs = data.documents;
  if (!docs.some((d) => d.text !== undefined)) return [];
  const out: TextChunk[] = [];
  for (let start = 0; start < docs.length; start += TEXT_CHUNK) {
    const part = docs.slice(start, start + TEXT_CHUNK);
    out.push({ original: part.map((d) => String(d.text ?? '')), cleaned: part.map((d) => (d.cleaned === undefined ? null : String(d.cleaned))) });
  }
  return out;
}

/** Builds the embedded data block from the report data. */
export function reportPayload(data: ReportData): ReportPayload {
  const n = data.documents.length;
  const names = (data.columns ?? []).map(String);
  const periodIndex = new Map((data.trends?.periods ?? []).map((p, i) => [p, i]));
  const documents = {
    id: new Array<string>(n),
    title: new Array<string>(n),
    group: new Array<number>(n),
    fit: new Array<number | null>(n),
    duplicateSet: new Array<number>(n),
    next: new Array<number>(n),
    margin: new Array<number | null>(n),
    link: new Array<string | null>(n),
    period: new Array<number>(n),
  };
  const values = names.map(() => new Array<string>(n));
  for (let i = 0; i < n; i++) {
    const d = data.documents[i];
    documents.id[i] = String(d.id);
    documents.title[i] = String(d.title);
    documents.group[i] = wholeOr(d.group, -1);
    documents.fit[i] = roundOrNull(d.fit, PAYLOAD_DIGITS);
    documents.duplicateSet[i] = wholeOr(d.duplicateSet, -1);
    documents.next[i] = wholeOr(d.next ?? -1, -1);
    documents.margin[i] = roundOrNull(d.margin ?? Number.NaN, PAYLOAD_DIGITS);
    documents.link[i] = d.link === undefined ? null : String(d.link);
    documents.period[i] = d.period === undefined ? -1 : periodIndex.get(d.period) ?? -1;
    for (let c = 0; c < names.length; c++) values[c][i] = cutValue(String(d.fields?.[c] ?? ''));
  }
  const k = data.groups.length;
  const merges = data.tree?.merges ?? [];
  return {
    format: 2,
    groups: {
      id: data.groups.map((g) => wholeOr(g.id, -1)),
      label: data.groups.map((g) => String(g.label)),
      size: data.groups.map((g) => wholeOr(g.size, 0)),
      terms: data.groups.map((g) => g.terms.map((t) => String(t.term))),
    },
    documents,
    columns: { names, values },
    texts: { chunk: TEXT_CHUNK, chunks: data.documents.some((d) => d.text !== undefined) ? Math.ceil(n / TEXT_CHUNK) : 0 },
    merges: merges.map((m, i) => ({
      left: wholeOr(m.left, -1),
      right: wholeOr(m.right, -1),
      similarity: roundOrNull(m.similarity, PAYLOAD_DIGITS),
      size: wholeOr(m.size, 0),
      name: String(data.mergeNames?.[i] ?? ''),
    })),
    similarity: data.similarity && data.similarity.length === k * k ? data.similarity.map((v) => roundOrNull(v, PAYLOAD_DIGITS)) : null,
    trends: data.trends ? { periods: data.trends.periods.map(String), granularity: String(data.trends.granularity) } : null,
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

/** A column value cut to {@link COLUMN_VALUE_CHARS} characters (never inside a surrogate pair), `…` when cut. */
function cutValue(v: string): string {
  if (v.length <= COLUMN_VALUE_CHARS) return v;
  let end = COLUMN_VALUE_CHARS - 1;
  const code = v.charCodeAt(end - 1);
  if (code >= 0xd800 && code <= 0xdbff) end--;
  return v.slice(0, end) + '…';
}
