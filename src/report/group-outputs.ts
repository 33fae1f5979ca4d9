/**
 * Every output file of a grouping run in one call: `groupOutputs(result, …)`
 * gives the files as a `Map<name, content>` ready for `writeOutputFolder`
 * (documents.csv, groups.json, duplicates.csv/json, near-copy-pairs.csv, model.json, report.html,
 * tree.nwk, the method's own files; or tree.json for the tree alone), and
 * `vectorFiles` the `--save-vectors` folder. Pure.
 *
 * @module
 */
import type { Csr, Doc } from '../types.js';
import type { GroupResult } from '../pipeline.js';
import type { DuplicateRun } from '../near-copies.js';
import type { FileContent } from './folder.js';
import { methodOf } from '../methods/index.js';
import { modelJsonOf } from '../model/source.js';
import { toMatrixMarket } from '../vectorize/index.js';
import { documentsCsvChunks, groupsJson, jsonText, treeNewick } from './outputs.js';
import { PAIRS_FILE, duplicatesCsv, duplicatesJsonChunks, nearCopyPairsCsvChunks } from './duplicates.js';
import { renderReport } from './html.js';
import { reportFromRun, type ReportContext } from './report-from-run.js';
import type { TrendsInput } from './report-extras.js';
import { csvText, withCsvBom } from './csv.js';
import { trendRows } from '../trends/index.js';

/** Near-copies found in the run's own vectors, and at which threshold. */
export interface GroupNearCopies {
  readonly found: Pick<DuplicateRun, 'pairs' | 'sets' | 'setOf' | 'diffs'>;
  readonly threshold: number;
}

/** What {@link groupOutputs} writes besides the result. */
export interface GroupOutputOptions {
  /** `group` (default): every file; `tree`: tree.json and the Newick files only. */
  readonly kind?: 'group' | 'tree';
  /** Near-copies to write (duplicates.csv/json, duplicate_set, the report's sets), or null. */
  readonly near?: GroupNearCopies | null;
  /** The model's `createdBy` (e.g. `sheaf 0.1.0`). */
  readonly createdBy: string;
  /** report.html's heading and metadata, or null for no report. */
  readonly report?: ReportContext | null;
  /** Counts per group over time (trends.csv and the report), when a date was given. */
  readonly trends?: TrendsInput | null;
  /** A UTF-8 byte order mark before every CSV file (default true; see `withCsvBom`). */
  readonly bom?: boolean;
}

/** The output files of a grouping run, in the order they are listed to the user (run.json is added by the caller, last). */
export function groupOutputs(result: GroupResult, options: GroupOutputOptions): Map<string, FileContent> {
  const files = new Map<string, FileContent>();
  const groupsDoc = groupsJson(result);
  const near = options.near ?? null;
  if ((options.kind ?? 'group') === 'group') {
    // In pieces of 10k rows: never one string (a string holds at most ~537M characters).
    files.set('documents.csv', [...documentsCsvChunks(result, near ? { duplicateSet: near.found.setOf } : {})]);
    files.set('groups.json', jsonText(groupsDoc));
    if (near) {
      const src = { docs: result.docs, by: 'tfidf', threshold: near.threshold, sets: near.found.sets, pairs: near.found.pairs, setOf: near.found.setOf };
      files.set('duplicates.csv', duplicatesCsv(src));
      files.set('duplicates.json', duplicatesJsonChunks(src));
      files.set(PAIRS_FILE, nearCopyPairsCsvChunks(src));
    }
    files.set('model.json', modelJsonOf(result, options.createdBy, groupsDoc.tree));
    if (options.report) {
      files.set(
        'report.html',
        renderReport(
          reportFromRun(result, near ? near.found : null, near ? { threshold: near.threshold, by: 'cosine of TF-IDF vectors' } : null, {
            ...options.report,
            trends: options.trends ?? null,
          }),
        ),
      );
    }
    if (options.trends) files.set('trends.csv', csvText(['group', 'period', 'count'], trendRows(options.trends.trends, result.partition.groups)));
  } else {
    files.set('tree.json', jsonText({ tree: groupsDoc.tree, groups: groupsDoc.groups.map((g) => ({ id: g.id, label: g.label, size: g.size })) }));
  }
  files.set('tree.nwk', treeNewick(result));
  for (const [name, content] of methodOf(result).outputs(result, result.docs)) files.set(name, content);
  return options.bom === false ? files : withCsvBom(files);
}

/** What the JSON summary on stdout holds: groups.json for `group`, the tree for `tree`. */
export function groupSummaryJson(result: GroupResult, kind: 'group' | 'tree' = 'group'): string {
  const groupsDoc = groupsJson(result);
  return kind === 'group' ? jsonText(groupsDoc) : jsonText({ tree: groupsDoc.tree });
}

/**
 * The vectors of a run as files: `vectors.mtx` (MatrixMarket coordinate),
 * `terms.txt` (the columns, when they have names) and `ids.txt` (the rows).
 */
export function vectorFiles(matrix: Csr, columns: readonly string[] | null, docs: readonly Doc[]): Map<string, string> {
  const files = new Map<string, string>([['vectors.mtx', toMatrixMarket(matrix)]]);
  if (columns !== null) files.set('terms.txt', columns.join('\n') + '\n');
  files.set('ids.txt', docs.map((d) => d.id.replace(/[\r\n]+/g, ' ')).join('\n') + '\n');
  return files;
}
