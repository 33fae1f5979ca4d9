/**
 * EDGE: what `sheaf group` hands the report and trends besides the result:
 * links from the output folder to the input files, the date of each document
 * (an export column, or a file's modification time with `--date mtime`), and
 * the report of `sheaf duplicates`.
 *
 * @module
 */
import path from 'node:path';
import { stat } from 'node:fs/promises';
import { pathToFileURL } from 'node:url';
import type { Doc } from '../types.js';
import type { GroupResult } from '../pipeline.js';
import { UsageError } from '../util/errors.js';
import { groupTrends, hasOffset } from '../trends/index.js';
import type { TrendsInput } from '../report/report-extras.js';
import type { DuplicateRun } from '../near-copies.js';
import type { IngestResult } from '../ingest/index.js';
import { duplicatesReportData } from '../report/report-duplicates.js';
import { renderReport } from '../report/html.js';
import { versions } from './versions.js';

/** The `--date` value that asks for the files' modification times. */
export const DATE_MTIME = 'mtime';

/**
 * Per document (in the order given), a link to its file from `outDir`: a
 * relative path with every segment percent-encoded (so it can never be read
 * as a scheme such as `javascript:`), or a file:// URL when no relative path
 * exists (another drive). Export rows and standard input get null.
 */
export function documentLinks(docs: readonly Doc[], exportRows: ArrayLike<boolean | number>, cwd: string, outDir: string): (string | null)[] {
  return docs.map((d, i) => {
    if (exportRows[i] || d.source === '-' || d.source === '') return null;
    const file = path.resolve(cwd, d.source);
    const rel = path.relative(outDir, file);
    if (rel === '' || path.isAbsolute(rel)) return pathToFileURL(file).href;
    return rel.split(path.sep).map(encodeURIComponent).join('/');
  });
}

/**
 * Counts per group over time for `--date COLUMN` (an export column) or
 * `--date mtime` (file modification time, files only; export rows are unparsed).
 * Throws a UsageError when the column is in no document.
 */
export async function trendsFromFlag(result: GroupResult, column: string, exportRows: ArrayLike<boolean | number>, cwd: string): Promise<TrendsInput> {
  const docs = result.docs;
  let dates: string[];
  if (column === DATE_MTIME && !docs.some((d) => d.fields.has(DATE_MTIME))) {
    const isRow = new Uint8Array(docs.length);
    result.inputOrder.forEach((r, i) => (isRow[r] = exportRows[i] ? 1 : 0));
    dates = await Promise.all(
      docs.map(async (d, r) => {
        if (isRow[r]) return '';
        try {
          return (await stat(path.resolve(cwd, d.source))).mtime.toISOString();
        } catch {
          return '';
        }
      }),
    );
  } else {
    // The column was checked before the grouping (assertDateColumn in group.ts).
    dates = docs.map((d) => d.fields.get(column) ?? '');
  }
  const withOffset = dates.filter((v) => v !== '' && hasOffset(v)).length;
  const zone =
    column === DATE_MTIME
      ? 'UTC (file modification times)'
      : withOffset === 0
        ? 'UTC (the values carry no time zone; read as UTC)'
        : `UTC (${withOffset} value(s) carry Z or an offset and were converted to UTC; values without one were read as UTC)`;
  return { column, zone, trends: groupTrends(dates, result.partition.assignments, result.partition.groups) };
}

/** Throws the UsageError of `--date COLUMN` when no document has that column (`mtime` passes). */
export function assertDateColumn(docs: readonly Doc[], column: string): void {
  if (column === DATE_MTIME || docs.some((d) => d.fields.has(column))) return;
  const columns = [...new Set(docs.flatMap((d) => [...d.fields.keys()]))];
  throw new UsageError(
    `--date column ${JSON.stringify(column)} is not in the input; ${columns.length ? `its columns are: ${columns.join(', ')}` : `it has no columns besides the text (--date ${DATE_MTIME} reads the files' modification times)`}`,
    'date',
  );
}


/**
 * `report.html` of `sheaf duplicates` as a `[name, content]` entry (none with `--no-report`).
 * `docs` are the documents as searched (cleaned), `read.docs` as written.
 */
export function duplicatesReportFile(
  run: DuplicateRun,
  inputs: readonly string[],
  read: IngestResult,
  docs: readonly Doc[],
  wanted: boolean,
  cwd: string,
  outDir: string,
): [string, string][] {
  if (!wanted) return [];
  const html = renderReport(
    duplicatesReportData(run, {
      title: `sheaf near-copies — ${inputs.map((i) => (i === '-' ? 'standard input' : path.basename(i))).join(', ')}`,
      createdAt: new Date().toISOString(),
      version: versions().sheaf,
      skipped: read.skipped.length,
      originals: read.docs.length === docs.length ? read.docs.map((d) => d.text) : undefined,
      links: documentLinks(docs, read.exportRows, cwd, outDir),
    }),
  );
  return [['report.html', html]];
}
