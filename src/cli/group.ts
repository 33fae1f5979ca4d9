/**
 * `sheaf group` (and `sheaf tree`, which shares its reading and grouping):
 * flags → options → read → group → outputs → summary. Every file's content
 * comes from the library (`groupOutputs`, `groupRunJson`, `vectorFiles`).
 *
 * @module
 */
import path from 'node:path';
import { availableParallelism } from 'node:os';
import type { Command } from 'commander';
import type { CliIo } from './io.js';
import { wholeNumber } from './parse.js';
import { progressReporter } from './progress.js';
import { versions } from './versions.js';
import { checkMemory, fileInputBytes, formatSize, memoryLimit } from './memory.js';
import { addAnalysisFlags, addInputFlags, cleaningNotes, readInputs, type GroupFlags } from './inputs.js';
import { addGroupingFlags, groupDuplicateOptions, groupOptionsFromFlags } from './group-flags.js';
import { resolveTruth } from './truth.js';
import { groupSummaryLines } from './group-summary.js';
import { groupDocumentsAsync, type GroupResult, type StageTiming } from '../pipeline.js';
import { resolveParallelOptions } from '../parallel/kmeans-parallel.js';
import { kmeansRunner, reduceRunner, vectorizeRunner } from '../parallel/runners.js';
import { evaluateLabels } from '../report/outputs.js';
import { groupOutputs, groupSummaryJson, vectorFiles } from '../report/group-outputs.js';
import { groupRunRecord } from '../report/run-record.js';
import { jsonText } from '../report/outputs.js';
import { writeOutputFolder } from '../report/folder.js';
import { checkOutputFolders } from './out-paths.js';
import { visibleJson, visibleLines } from './visible.js';
import { nearCopiesOfVectors } from '../near-copies.js';
import { AUTO_REDUCE_MAX_DOCUMENTS } from '../reduce/index.js';
import { previousFromFlags, editsFromFlags, guideFromFlags, type EditsFlags, type PreviousFlags } from './previous.js';
import { continuityLines } from '../report/continuity.js';
import { checkGuideRun } from '../edits/guide.js';
import { assertDateColumn, documentLinks, trendsFromFlag } from './report-inputs.js';
import { trendsRecord } from '../report/report-extras.js';

export type { GroupFlags } from './inputs.js';

/** Registers `group` on the program. */
export function registerGroup(program: Command, io: CliIo, setExit: (code: number) => void): void {
  const cmd = program
    .command('group')
    .description('sort documents into named groups')
    .argument('<inputs...>', 'folders, files (formats below), or - for stdin');
  addInputFlags(cmd);
  addAnalysisFlags(cmd);
  addGroupingFlags(cmd, 'number of groups, or auto to choose at the knee of the objective');
  cmd
    .option('--out <dir>', 'output folder', 'sheaf-out')
    .option('--save-vectors <dir>', 'also write the TF-IDF matrix (MatrixMarket), terms and ids to this folder')
    .option('--term-counts <file>', 'take the idf from these document frequencies (sheaf count-terms, merge-counts over the whole collection) instead of the documents grouped')
    .option('--duplicates <t>', 'near-copies at cosine >= t go in duplicate_set, duplicates.csv/json and the report', '0.9')
    .option('--no-duplicates', 'do not look for near-copies')
    .option('--no-report', 'do not write report.html')
    .option('--previous <model>', 'a previous run’s model.json (or its folder): keep its group numbers and names where a group matches one')
    .option('--guide <file>', 'a JSON guide: named groups with seed terms or example ids that k-means starts from (see docs/edits.md)')
    .option('--edits <file>', 'a JSON edits file (rename, merge, split, pin) applied to this run’s groups (see docs/edits.md)')
    .option('--match-similarity <s>', 'least centre cosine for a group to continue a previous one (default 0.5)')
    .option('--no-bom', 'write the CSV files without the UTF-8 byte order mark (spreadsheets need it to show accents right)')
    .option('--date <column>', 'count each group per day, week or month by this column (mtime: the files’ modification times)')
    .option('--json', 'print the groups as JSON on stdout')
    .option('--quiet', 'no progress bars or notes on stderr')
    .action(async (inputs: string[], flags: GroupFlags) => {
      setExit(await runGroup(inputs, flags, io, 'group'));
    });
}

/** Registers `tree` on the program: the tree alone. */
export function registerTree(program: Command, io: CliIo, setExit: (code: number) => void): void {
  const cmd = program
    .command('tree')
    .description('build the tree of themes (average-link) and write it as Newick and JSON')
    .argument('<inputs...>', 'folders, files, or - for stdin');
  addInputFlags(cmd);
  addAnalysisFlags(cmd);
  addGroupingFlags(cmd, 'number of groups at the tree’s leaves, or auto (default auto)');
  cmd
    .option('--out <dir>', 'output folder', 'sheaf-tree')
    .option('--json', 'print the tree as JSON on stdout')
    .option('--quiet', 'no progress bars or notes on stderr')
    .action(async (inputs: string[], flags: GroupFlags) => {
      if (flags.groups === undefined && flags.minSimilarity === undefined) flags.groups = 'auto';
      setExit(await runGroup(inputs, flags, io, 'tree'));
    });
}

async function runGroup(inputs: string[], flags: GroupFlags, io: CliIo, command: 'group' | 'tree'): Promise<number> {
  // Flags → options (resolved once, before anything is read).
  const now = io.now ?? (() => performance.now());
  const startedAt = new Date();
  const limit = memoryLimit(flags.memory);
  // A document-level tree may use the whole limit for its distance matrix.
  const { ingest: ingestOptions, group } = await groupOptionsFromFlags(flags, io, limit);
  const threads = resolveParallelOptions({ threads: wholeNumber(flags.threads, 'threads') ?? Math.min(2, availableParallelism()) }).threads;
  const dupOptions = command === 'group' && typeof flags.duplicates === 'string' ? groupDuplicateOptions(flags.duplicates, group) : null;
  const outDir = path.resolve(io.cwd, flags.out);
  const previous = await previousFromFlags(flags as PreviousFlags, io.cwd);
  const edits = await editsFromFlags(flags as EditsFlags, io.cwd);
  const guide = await guideFromFlags(flags as EditsFlags, io.cwd);
  if (guide) checkGuideRun(guide, group, previous !== null);
  await checkOutputFolders({ inputs, alsoReads: [flags.stopwords, previous?.file, (flags as EditsFlags).edits, (flags as EditsFlags).guide], out: flags.out, saveVectors: flags.saveVectors, quiet: flags.quiet }, io);
  checkMemory(await fileInputBytes(inputs, io.cwd), limit, 'this input');
  const note = (line: string): void => {
    if (!flags.quiet) io.stderr.write(visibleLines(line) + '\n');
  };

  // Read (cleaning is the pipeline's first stage).
  const t0 = now();
  const { read, docs, notes } = await readInputs(inputs, ingestOptions, flags, io, note, null);
  const readMs = now() - t0;
  checkMemory(docs.reduce((a, d) => a + d.text.length, 0), limit, `the text read (${docs.length} documents)`);
  // A column (case-insensitive, as --text/--id) or, for files read from folders, `folder`.
  const truthSource = flags.truth ? resolveTruth(docs, flags.truth, read.inputs.filter((i) => i.kind === 'folder').map((i) => i.path)) : null;
  const dateFlag = (flags as { date?: string }).date;
  if (dateFlag !== undefined) assertDateColumn(docs, dateFlag);

  // Core.
  const progress = progressReporter(io, flags.quiet ?? false);
  let result: GroupResult;
  try {
    result = await groupDocumentsAsync({ docs, exportRows: read.exportRows }, group, { kmeans: kmeansRunner(threads), vectorize: vectorizeRunner(threads), reduce: reduceRunner(threads) }, { now, progress: (s, d, t) => progress.update(s, d, t), ...(previous ? { previous } : {}), ...(edits ? { edits } : {}), ...(guide ? { guide } : {}) });
  } finally {
    progress.done();
  }
  const unsortedSet = new Set(result.unsorted.rows);
  const evaluation = truthSource
    ? evaluateLabels(
        truthSource.field,
        result.docs.map((d) => truthSource.labelOf(d)),
        // Unsorted documents are scored as a class of their own, not left out.
        Array.from(result.partition.assignments, (g, r) => (g >= 0 ? String(g) : unsortedSet.has(r) ? 'unsorted' : '')),
      )
    : null;
  for (const line of [...notes, ...cleaningNotes(result.clean)]) note(line);
  for (const w of result.choice?.warnings ?? []) note(`sheaf: warning: ${w}`);
  if (result.options.reduce?.auto && result.reduced === null && result.docs.length - result.emptyRows.length > AUTO_REDUCE_MAX_DOCUMENTS) {
    note(`sheaf: note: grouped on the TF-IDF rows: reduced vectors are the default up to ${AUTO_REDUCE_MAX_DOCUMENTS} documents (--reduce 50 asks for them)`);
  }
  if (result.emptyRows.length > 0) {
    note(
      `sheaf: note: ${result.emptyRows.length} document(s) have no terms after analysis; they are in no group ` +
        `(listed in documents.csv with an empty group and in run.json)`,
    );
  }
  const td = now();
  const nearBar = progressReporter(io, flags.quiet ?? false);
  let near: { found: ReturnType<typeof nearCopiesOfVectors>; threshold: number } | null = null;
  try {
    near = dupOptions ? { found: nearCopiesOfVectors(result.docs, result.matrix, dupOptions, (d, t) => nearBar.update('near-copies', d, t)), threshold: dupOptions.threshold } : null;
  } finally {
    nearBar.done();
  }
  const dupMs = now() - td;

  // Outputs.
  const tw = now();
  const version = versions();
  const date = (flags as { date?: string }).date;
  const trends = command === 'group' && date !== undefined ? await trendsFromFlag(result, date, read.exportRows, io.cwd) : null;
  const files = groupOutputs(result, {
    kind: command,
    near,
    trends,
    createdBy: `sheaf ${version.sheaf}`,
    bom: flags.bom !== false,
    report:
      command === 'group' && flags.report !== false
        ? {
            title: `sheaf — ${inputs.map((i) => (i === '-' ? 'standard input' : path.basename(i))).join(', ')}`,
            createdAt: new Date().toISOString(),
            version: version.sheaf,
            skipped: read.skipped.length,
            originals: docs.map((d) => d.text),
            links: documentLinks(docs, read.exportRows, io.cwd, outDir),
            evaluation,
          }
        : null,
  });
  const pageBytes = files.has('report.html') ? Buffer.byteLength(files.get('report.html') as string) : null;
  const n = read.docs.length;
  const timings: StageTiming[] = [
    { stage: 'read', ms: readMs, items: n },
    ...result.timings,
    ...(near ? [{ stage: 'near-duplicates', ms: dupMs, items: n }] : []),
    { stage: 'write', ms: now() - tw, items: n },
  ];
  const context = { command, startedAt, finishedAt: new Date(), versions: version, cwd: io.cwd, out: flags.out };
  const record = groupRunRecord(result, { context, ingestOptions, read, threads, evaluation, timings });
  Object.assign(record, { trends: trends ? trendsRecord(result, trends) : null, reportBytes: pageBytes });
  files.set('run.json', jsonText(record));
  const written = (await writeOutputFolder(outDir, files)).map((p) => path.join(flags.out, path.basename(p)));
  if (flags.saveVectors) {
    const v = await writeOutputFolder(path.resolve(io.cwd, flags.saveVectors), vectorFiles(result.matrix, result.vocabulary.terms, result.docs));
    written.push(...v.map((p) => path.join(flags.saveVectors as string, path.basename(p))));
  }

  // Summary.
  if (flags.json) {
    io.stdout.write(visibleJson(groupSummaryJson(result, command)));
    note(`sheaf: wrote ${written.join(', ')}`);
    return 0;
  }
  const width = Math.max(60, io.stdout.columns ?? 110);
  // The page's size beside its name: one offline file, loaded whole by the browser.
  const listed = written.map((p) => (pageBytes !== null && path.basename(p) === 'report.html' ? `${p} (${formatSize(pageBytes)}, one offline page)` : p));
  const lines = groupSummaryLines(result, { command, width, evaluation, near, read: { documents: n, skipped: read.skipped.length }, written: listed });
  if (result.continuity) lines.push('', ...continuityLines(result.continuity, (id) => result.groups[id]?.label ?? '').map((l) => visibleLines(l)));
  io.stdout.write(lines.join('\n') + '\n');
  return 0;
}
