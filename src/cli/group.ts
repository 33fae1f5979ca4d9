/**
 * `sheaf group` (and `sheaf tree`, which shares its reading and grouping):
 * read the inputs, group them, name the groups, build the tree, write the
 * output folder and show what was found.
 *
 * @module
 */
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import type { Command } from 'commander';
import type { CliIo } from './io.js';
import { collect, decimal, list, wholeNumber } from './parse.js';
import { progressReporter } from './progress.js';
import { versions } from './versions.js';
import { choiceLines, evaluationLines, groupTable, treeOutline } from './render.js';
import { ingest, resolveIngestOptions, type IngestOptions, type IngestResult } from '../ingest/index.js';
import { groupDocumentsAsync, resolveGroupOptions, type GroupOptions, type GroupResult, type StageTiming } from '../pipeline.js';
import { resolveParallelOptions } from '../parallel/kmeans-parallel.js';
import { kmeansRunner } from '../parallel/runner.js';
import { vectorizeRunner } from '../parallel/analyze-runner.js';
import { checkMemory, fileInputBytes, memoryLimit } from './memory.js';
import { availableParallelism } from 'node:os';
import {
  documentsCsvChunks,
  documentTreeNewick,
  evaluateLabels,
  evaluationJson,
  groupsJson,
  jsonText,
  round,
  treeNewick,
  type Evaluation,
} from '../report/outputs.js';
import { assertReplaceable, writeOutputFolder, type FileContent } from '../report/folder.js';
import { toMatrixMarket } from '../vectorize/index.js';
import { nearCopiesOfVectors, resolveFindDuplicatesOptions } from '../near-copies.js';
import { duplicatesCsv, duplicatesJson } from '../report/duplicates.js';
import { modelReduction, modelToJson } from '../model/index.js';
import { renderReport } from '../report/html.js';
import { reportFromRun } from '../report/report-from-run.js';
import { UsageError } from '../util/errors.js';
import { CLEAN_MODES, cleanDocuments, resolveCleanOptions, type CleanMode, type CleanReport } from '../clean/index.js';
import type { Doc } from '../types.js';

/** Raw flag values as commander hands them over. */
export interface GroupFlags {
  text?: string;
  id?: string;
  title?: string;
  format?: string;
  delimiter?: string;
  include?: string[];
  exclude?: string[];
  clean?: string;
  encoding?: string;
  maxBytes?: string;
  maxFiles?: string;
  lang?: string;
  stopwords?: string;
  stem: boolean;
  minLength?: string;
  numbers?: boolean;
  phrases?: boolean;
  minDf?: string;
  maxDf?: string;
  maxTerms?: string;
  groups?: string;
  range?: string;
  minSimilarity?: string;
  method?: string;
  sample?: string;
  restarts?: string;
  maxIterations?: string;
  seed?: string;
  terms?: string;
  truth?: string;
  threads?: string;
  memory?: string;
  reduce?: string | false;
  duplicates?: string | false;
  report?: boolean;
  out: string;
  saveVectors?: string;
  json?: boolean;
  quiet?: boolean;
}

/** Adds the flags shared by every command that reads documents. */
export function addInputFlags(cmd: Command): Command {
  return cmd
    .option('--text <fields>', 'column(s) or JSON field(s) holding the text, comma-separated; dotted paths for nested JSON')
    .option('--id <field>', 'column or field with each row’s id (default: row number)')
    .option('--title <field>', 'column or field with each row’s title (default: first line of the text)')
    .option('--format <kind>', 'read inputs as auto, csv, tsv, jsonl, json or text', 'auto')
    .option('--delimiter <char>', 'field separator for delimited exports')
    .option('--include <glob>', 'only files in folders matching this pattern (repeatable)', collect)
    .option('--exclude <glob>', 'skip files in folders matching this pattern (repeatable)', collect)
    .option('--clean <mode>', 'tickets (drop quoted replies, signatures, greetings, repeated boilerplate; fold links, addresses, numbers) or none; default: tickets for export rows, none for document files')
    .option('--encoding <name>', 'read every file in this character encoding (default: detect)')
    .option('--max-bytes <n>', 'longest document text kept, in bytes (longer ones are cut, and listed in run.json)')
    .option('--max-files <n>', 'read at most this many files from folders');
}

/** Documents as read and then cleaned, with what both steps report. */
export interface ReadInputs {
  /** Summary notes (decoding, truncation, cleaning) for the caller to show once the run has succeeded. */
  readonly notes: readonly string[];
  readonly read: IngestResult;
  readonly docs: Doc[];
  readonly clean: CleanReport;
}

/** The cleaning mode from `--clean` (validated), or null for the default. */
function cleanModeFromFlags(flags: GroupFlags): CleanMode | null {
  if (flags.clean === undefined) return null;
  if (!(CLEAN_MODES as readonly string[]).includes(flags.clean)) {
    throw new UsageError(`clean must be one of ${CLEAN_MODES.join(', ')}; got ${JSON.stringify(flags.clean)}`, 'clean');
  }
  return resolveCleanOptions({ mode: flags.clean as CleanMode }).mode;
}

/**
 * Reads the inputs and cleans them: with no `--clean`, export rows get ticket
 * cleaning and document files none. Skips and warnings go to `note`.
 */
export async function readInputs(
  inputs: string[],
  ingestOptions: IngestOptions,
  flags: GroupFlags,
  io: CliIo,
  note: (line: string) => void,
): Promise<ReadInputs> {
  const mode = cleanModeFromFlags(flags);
  const read = await ingest(inputs, ingestOptions, { cwd: io.cwd, stdin: io.stdin });
  reportSkips(read.skipped, read.warnings, note);
  const notes: string[] = [];
  if (read.decoding.length > 0) {
    const replaced = read.decoding.filter((d) => d.replaced > 0).length;
    notes.push(`sheaf: note: ${read.decoding.length} file(s) not in plain UTF-8 were decoded${replaced ? ` (${replaced} with damaged characters replaced)` : ''}; see decoding in run.json`);
  }
  if (read.truncated.length > 0) notes.push(`sheaf: note: ${read.truncated.length} document(s) longer than --max-bytes were cut; see truncated in run.json`);
  const cleaned = mode === null ? cleanDocuments(read.docs, { mode: 'tickets' }, read.exportRows) : cleanDocuments(read.docs, { mode });
  const r = cleaned.report;
  if (r.changed > 0 && r.charsBefore > 0) {
    notes.push(
      `sheaf: note: cleaning removed ${Math.round((100 * (r.charsBefore - r.charsAfter)) / r.charsBefore)}% of the text ` +
        `(quoted replies, signatures, greetings, ${r.boilerplate.found} boilerplate line(s)) from ${r.changed} document(s); --clean none keeps it`,
    );
  }
  return { notes, read, docs: cleaned.docs, clean: r };
}

/** Adds the flags that set up the analyzer and the vocabulary. */
export function addAnalysisFlags(cmd: Command): Command {
  return cmd
    .option('--lang <code>', 'language of the texts (ISO 639-1) for stop words and stemming', 'en')
    .option('--stopwords <file>', 'extra stop words, one per line')
    .option('--no-stem', 'keep words unstemmed')
    .option('--min-length <n>', 'shortest term kept, in characters')
    .option('--numbers', 'keep numbers as terms')
    .option('--phrases', 'add two-word phrases as terms')
    .option('--min-df <n>', 'drop terms in fewer documents than this (a count, or a share below 1)')
    .option('--max-df <n>', 'drop terms in more documents than this (a share up to 1, or a count)')
    .option('--max-terms <n>', 'keep at most this many terms, the most frequent');
}

/** Adds the flags that decide how groups are formed. */
export function addGroupingFlags(cmd: Command, groupsHelp: string): Command {
  return cmd
    .option('--groups <k>', groupsHelp)
    .option('--range <a..b>', 'with --groups auto: the numbers of groups tried (default 2..20)')
    .option('--min-similarity <s>', 'instead of --groups: cut the tree where average similarity falls below s')
    .option('--method <m>', 'kmeans (any size) or agglomerative (document-level average-link, smaller piles)', 'kmeans')
    .option('--sample <n>', 'documents sampled for silhouette scores (default 2000)')
    .option('--restarts <n>', 'seeded k-means runs; the best is kept')
    .option('--max-iterations <n>', 'cap on k-means iterations per run')
    .option('--seed <n>', 'random seed; the same seed and input give the same output')
    .option('--terms <n>', 'terms listed per group')
    .option('--truth <field>', 'compare the groups with a column of known labels')
    .option('--reduce <dims>', 'group in reduced vectors: a truncated SVD (latent semantic analysis) of the TF-IDF rows, kept to this many dimensions; names still come from the terms')
    .option('--no-reduce', 'group on the TF-IDF rows themselves (the default)')
    .option('--threads <n>', 'threads for k-means on large inputs (default: up to 2, the cores there are)')
    .option('--memory <size>', 'refuse to start what would need more memory than this, like 8G (default: 60% of the machine)');
}

/** Registers `group` on the program. */
export function registerGroup(program: Command, io: CliIo, setExit: (code: number) => void): void {
  const cmd = program
    .command('group')
    .description('sort documents into named groups')
    .argument('<inputs...>', 'folders, files (.txt .md .html .csv .tsv .jsonl .json), or - for stdin');
  addInputFlags(cmd);
  addAnalysisFlags(cmd);
  addGroupingFlags(cmd, 'number of groups, or auto to choose by silhouette');
  cmd
    .option('--out <dir>', 'output folder', 'sheaf-out')
    .option('--save-vectors <dir>', 'also write the TF-IDF matrix (MatrixMarket), terms and ids to this folder')
    .option('--duplicates <t>', 'near-copies at cosine >= t go in duplicate_set, duplicates.csv/json and the report', '0.9')
    .option('--no-duplicates', 'do not look for near-copies')
    .option('--no-report', 'do not write report.html')
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

/** Reads the user's extra stop-word file: one word a line, `#` starts a comment. */
async function readStopwords(file: string, cwd: string): Promise<string[]> {
  let text: string;
  try {
    text = await readFile(path.resolve(cwd, file), 'utf8');
  } catch {
    throw new UsageError(`stopwords file ${file} cannot be read`, 'stopwords');
  }
  return text
    .split(/\r?\n/)
    .map((l) => l.replace(/#.*/, '').trim())
    .filter((l) => l.length > 0);
}

/** `4..40` → [4, 40]. */
function parseRange(value: string | undefined): [number, number] | undefined {
  if (value === undefined) return undefined;
  const m = /^\s*(\d+)\s*(?:\.\.|-|:)\s*(\d+)\s*$/.exec(value);
  if (!m) throw new UsageError(`range must look like 4..40 (two whole numbers); got ${JSON.stringify(value)}`, 'range');
  return [Number(m[1]), Number(m[2])];
}

/** The ingest options from the input flags (validated). */
export function ingestOptionsFromFlags(flags: GroupFlags): IngestOptions {
  cleanModeFromFlags(flags);
  return resolveIngestOptions({
    encoding: flags.encoding ?? null,
    ...(flags.maxBytes !== undefined ? { maxBytes: wholeNumber(flags.maxBytes, 'maxBytes') } : {}),
    ...(flags.maxFiles !== undefined ? { maxFiles: wholeNumber(flags.maxFiles, 'maxFiles') } : {}),
    text: list(flags.text) ?? null,
    id: flags.id ?? null,
    title: flags.title ?? null,
    format: flags.format as IngestOptions['format'],
    delimiter: flags.delimiter ?? null,
    ...(flags.include ? { include: flags.include } : {}),
    ...(flags.exclude ? { exclude: flags.exclude } : {}),
  });
}

/** The analyzer and vocabulary options from the analysis flags (reads the stop-word file). */
export async function analysisOptionsFromFlags(flags: GroupFlags, io: CliIo): Promise<Pick<GroupOptions, 'analyzer' | 'vectorize'>> {
  return {
    analyzer: {
      lang: flags.lang,
      stem: flags.stem,
      minLength: wholeNumber(flags.minLength, 'minLength'),
      numbers: flags.numbers ?? false,
      phrases: flags.phrases ?? false,
      stopwords: flags.stopwords ? await readStopwords(flags.stopwords, io.cwd) : [],
    },
    vectorize: {
      minDf: decimal(flags.minDf, 'minDf'),
      maxDf: decimal(flags.maxDf, 'maxDf'),
      maxTerms: wholeNumber(flags.maxTerms, 'maxTerms'),
    },
  };
}

/** Turns flags into the library's option objects (validated here, before any reading). */
export async function groupOptionsFromFlags(
  flags: GroupFlags,
  io: CliIo,
): Promise<{ ingest: IngestOptions; group: GroupOptions }> {
  const ingestOptions = ingestOptionsFromFlags(flags);
  const groups = flags.groups === undefined ? undefined : flags.groups.trim().toLowerCase() === 'auto' ? 'auto' : wholeNumber(flags.groups, 'groups');
  const group: GroupOptions = {
    groups,
    minSimilarity: decimal(flags.minSimilarity, 'minSimilarity'),
    method: flags.method as GroupOptions['method'],
    choose: { range: parseRange(flags.range), sampleSize: wholeNumber(flags.sample, 'sample') },
    ...(await analysisOptionsFromFlags(flags, io)),
    kmeans: {
      restarts: wholeNumber(flags.restarts, 'restarts'),
      maxIterations: wholeNumber(flags.maxIterations, 'maxIterations'),
      seed: wholeNumber(flags.seed, 'seed'),
    },
    label: { terms: wholeNumber(flags.terms, 'terms') },
    ...(flags.reduce !== undefined ? { reduce: flags.reduce === false ? false : { dims: wholeNumber(flags.reduce, 'reduce') } } : {}),
  };
  try {
    resolveGroupOptions(group);
  } catch (err) {
    reduceFlagError(err);
    // The library calls the sample size sampleSize; the flag is --sample.
    if (err instanceof UsageError && err.option === 'sampleSize') {
      throw new UsageError(err.message.replace(/^sampleSize/, 'sample'), 'sample');
    }
    throw err;
  }
  return { ingest: ingestOptions, group };
}

/** The reduction's dims are given as --reduce: rethrows a dims error under that name. */
function reduceFlagError(err: unknown): void {
  if (err instanceof UsageError && err.option === 'dims') throw new UsageError(err.message.replace(/^dims/, 'reduce'), 'reduce');
}

/** Options of the near-copy search a grouping run adds with `--duplicates t` (the flag names the threshold). */
function groupDuplicateOptions(value: string, group: GroupOptions): ReturnType<typeof resolveFindDuplicatesOptions> {
  try {
    // Diffs for the strongest sets feed the report.
    return resolveFindDuplicatesOptions({ threshold: decimal(value, 'duplicates'), show: 50, analyzer: group.analyzer, vectorize: group.vectorize });
  } catch (err) {
    if (err instanceof UsageError && err.option === 'threshold') {
      throw new UsageError(err.message.replace(/^threshold/, 'duplicates'), 'duplicates');
    }
    throw err;
  }
}

/** Throws unless some document has the `--truth` column (checked before the heavy work). */
function assertTruthColumn(docs: readonly Doc[], field: string): void {
  if (!docs.some((d) => d.fields.has(field))) {
    const columns = [...new Set(docs.flatMap((d) => [...d.fields.keys()]))];
    throw new UsageError(
      `--truth column ${JSON.stringify(field)} is not in the input; ${columns.length ? `its columns are: ${columns.join(', ')}` : 'it has no columns besides the text'}`,
      'truth',
    );
  }
}

async function runGroup(inputs: string[], flags: GroupFlags, io: CliIo, command: 'group' | 'tree'): Promise<number> {
  const now = io.now ?? (() => performance.now());
  const startedAt = new Date();
  const options = await groupOptionsFromFlags(flags, io);
  const ingestOptions = options.ingest;
  let group = options.group;
  const threads = resolveParallelOptions({ threads: wholeNumber(flags.threads, 'threads') ?? Math.min(2, availableParallelism()) }).threads;
  const dupOptions = command === 'group' && typeof flags.duplicates === 'string' ? groupDuplicateOptions(flags.duplicates, group) : null;
  const limit = memoryLimit(flags.memory);
  // A document-level tree may use the whole limit for its distance matrix.
  group = { ...group, tree: { memoryLimitBytes: limit } };
  const outDir = path.resolve(io.cwd, flags.out);
  await assertReplaceable(outDir, flags.out);
  if (flags.saveVectors) await assertReplaceable(path.resolve(io.cwd, flags.saveVectors), flags.saveVectors);
  checkMemory(await fileInputBytes(inputs, io.cwd), limit, 'this input');
  const width = Math.max(60, io.stdout.columns ?? 110);

  const note = (line: string): void => {
    if (!flags.quiet) io.stderr.write(line + '\n');
  };
  const t0 = now();
  const { read, docs, clean, notes } = await readInputs(inputs, ingestOptions, flags, io, note);
  const readMs = now() - t0;
  checkMemory(docs.reduce((a, d) => a + d.text.length, 0), limit, `the text read (${docs.length} documents)`);
  if (flags.truth) assertTruthColumn(docs, flags.truth);

  const progress = progressReporter(io, flags.quiet ?? false);
  let result: GroupResult;
  try {
    result = await groupDocumentsAsync(docs, group, { kmeans: kmeansRunner(threads), vectorize: vectorizeRunner(threads) }, { now, progress: (s, d, t) => progress.update(s, d, t) });
  } catch (err) {
    reduceFlagError(err);
    throw err;
  } finally {
    progress.done();
  }
  const evaluation = flags.truth
    ? evaluateLabels(
        flags.truth,
        result.docs.map((d) => d.fields.get(flags.truth as string) ?? ''),
        Array.from(result.partition.assignments, (g) => (g >= 0 ? String(g) : '')),
      )
    : null;
  for (const line of notes) note(line);
  if (result.emptyRows.length > 0) {
    note(
      `sheaf: note: ${result.emptyRows.length} document(s) have no terms after analysis; they are in no group ` +
        `(listed in documents.csv with an empty group and in run.json)`,
    );
  }

  const td = now();
  const near = dupOptions ? nearCopiesOfVectors(result.docs, result.matrix, dupOptions) : null;
  const dupMs = now() - td;

  const tw = now();
  const files = new Map<string, FileContent>();
  const groupsDoc = groupsJson(result);
  if (command === 'group') {
    // In pieces of 10k rows: never one string (a string holds at most ~537M characters).
    files.set('documents.csv', [...documentsCsvChunks(result, near ? { duplicateSet: near.setOf } : {})]);
    files.set('groups.json', jsonText(groupsDoc));
    if (near && dupOptions) {
      const src = { docs: result.docs, by: 'tfidf', threshold: dupOptions.threshold, sets: near.sets, pairs: near.pairs, setOf: near.setOf };
      files.set('duplicates.csv', duplicatesCsv(src));
      files.set('duplicates.json', jsonText(duplicatesJson(src)));
    }
    files.set(
      'model.json',
      modelToJson({
        createdBy: `sheaf ${versions().sheaf}`,
        analyzer: result.options.analyzer,
        vocabulary: result.vocabulary,
        groups: result.partition.groups,
        centroids: result.partition.centroids,
        assignments: result.partition.assignments,
        fit: result.partition.fit,
        labels: result.groups.map((g) => ({ id: g.id, label: g.label, terms: g.terms.map((t) => ({ term: t.term, weight: round(t.weight, 6) })), size: g.size })),
        tree: groupsDoc.tree,
        ...(result.reduced ? { reduce: modelReduction(result.reduced) } : {}),
      }),
    );
    if (flags.report !== false) {
      files.set(
        'report.html',
        renderReport(
          reportFromRun(result, near, dupOptions ? { threshold: dupOptions.threshold, by: 'cosine of TF-IDF vectors' } : null, {
            title: `sheaf — ${inputs.map((i) => (i === '-' ? 'standard input' : path.basename(i))).join(', ')}`,
            createdAt: new Date().toISOString(),
            version: versions().sheaf,
            skipped: read.skipped.length,
          }),
        ),
      );
    }
  } else {
    files.set('tree.json', jsonText({ tree: groupsDoc.tree, groups: groupsDoc.groups.map((g) => ({ id: g.id, label: g.label, size: g.size })) }));
  }
  files.set('tree.nwk', treeNewick(result));
  const docTree = documentTreeNewick(result);
  if (docTree !== null) files.set('documents.nwk', docTree);
  const timings: StageTiming[] = [
    { stage: 'read', ms: readMs, items: read.docs.length },
    ...result.timings,
    ...(near ? [{ stage: 'near-duplicates', ms: dupMs, items: read.docs.length }] : []),
    { stage: 'write', ms: now() - tw, items: read.docs.length },
  ];
  files.set('run.json', jsonText(runJson({ threads, command, cwd: io.cwd, flags, ingestOptions, result, read, clean, evaluation, timings, startedAt, finishedAt: new Date() })));
  const written = await writeOutputFolder(outDir, files);
  const shownWritten = written.map((p) => path.join(flags.out, path.basename(p)));
  if (flags.saveVectors) {
    const vectorFiles = new Map<string, string>([
      ['vectors.mtx', toMatrixMarket(result.matrix)],
      ['terms.txt', result.vocabulary.terms.join('\n') + '\n'],
      ['ids.txt', result.docs.map((d) => d.id.replace(/[\r\n]+/g, ' ')).join('\n') + '\n'],
    ]);
    const v = await writeOutputFolder(path.resolve(io.cwd, flags.saveVectors), vectorFiles);
    shownWritten.push(...v.map((p) => path.join(flags.saveVectors as string, path.basename(p))));
  }

  if (flags.json) {
    io.stdout.write(command === 'group' ? jsonText(groupsDoc) : jsonText({ tree: groupsDoc.tree }));
    note(`sheaf: wrote ${shownWritten.join(', ')}`);
    return 0;
  }
  const out: string[] = [];
  if (result.choice) out.push(...choiceLines(result), '');
  if (command === 'group') out.push(...groupTable(result, width), '');
  out.push('Tree of themes (average-link over the groups):', ...treeOutline(result, width, result.groups.length <= 24 ? Infinity : command === 'tree' ? 6 : 4), '');
  if (evaluation) out.push(...evaluationLines(evaluation, width), '');
  if (near && dupOptions) {
    const inSets = near.sets.reduce((a, x) => a + x.members.length, 0);
    out.push(`Near-copies at cosine ≥ ${dupOptions.threshold}: ${near.sets.length} set(s) holding ${inSets} documents (duplicate_set in documents.csv).`, '');
  }
  out.push(
    `${read.docs.length} documents (${read.skipped.length} skipped, ${result.emptyRows.length} without terms) ` +
      `in ${result.groups.length} groups; ${result.vocabulary.terms.length} terms; ` +
      `mean silhouette ${Number.isFinite(result.quality.silhouette.mean) ? result.quality.silhouette.mean.toFixed(3) : '–'}.`,
    'Wrote:',
    ...shownWritten.map((p) => `  ${p}`),
  );
  io.stdout.write(out.join('\n') + '\n');
  return 0;
}

/** The documents that are files of their own (not export rows), in the given order. */
function fileDocuments(docs: readonly Doc[], read: IngestResult): Doc[] {
  const files = new Set<string>();
  read.docs.forEach((d, i) => {
    if (!read.exportRows[i]) files.add(d.id);
  });
  return docs.filter((d) => files.has(d.id));
}

/** What reading and cleaning did, for run.json. */
export function readingRecord(read: IngestResult, clean: CleanReport): Record<string, unknown> {
  return {
    decoding: read.decoding,
    truncated: read.truncated,
    attachmentsNotRead: read.attachments,
    filesNotRead: read.filesNotRead,
    cleaning: clean,
  };
}

/** Warnings and skips on stderr: the first few, then a count. */
export function reportSkips(skipped: readonly { source: string; reason: string }[], warnings: readonly string[], note: (l: string) => void): void {
  const cap = 10;
  for (const s of skipped.slice(0, cap)) note(`sheaf: skipped ${s.source}: ${s.reason}`);
  if (skipped.length > cap) note(`sheaf: … and ${skipped.length - cap} more skipped (listed in run.json)`);
  for (const w of warnings.slice(0, cap)) note(`sheaf: warning: ${w}`);
  if (warnings.length > cap) note(`sheaf: … and ${warnings.length - cap} more warnings (in run.json)`);
}

interface RunJsonInput {
  threads: number;
  command: string;
  cwd: string;
  clean: CleanReport;
  flags: GroupFlags;
  ingestOptions: IngestOptions;
  result: GroupResult;
  read: IngestResult;
  evaluation: Evaluation | null;
  timings: StageTiming[];
  startedAt: Date;
  finishedAt: Date;
}

/** `run.json`: settings, versions, input digests, what was skipped and why, choices, scores, stage timings. */
function runJson(x: RunJsonInput): unknown {
  const { result, read } = x;
  const km = result.kmeans;
  const o = result.options;
  return {
    tool: 'sheaf',
    command: x.command,
    startedAt: x.startedAt.toISOString(),
    finishedAt: x.finishedAt.toISOString(),
    versions: versions(),
    inputs: read.inputs,
    settings: {
      ingest: x.ingestOptions,
      analyzer: o.analyzer,
      vectorize: o.vectorize,
      grouping: { method: o.method, groups: o.groups, minSimilarity: o.minSimilarity, choose: o.choose, tree: o.tree, reduce: o.reduce },
      kmeans: o.kmeans,
      threads: x.threads,
      label: o.label,
      out: x.flags.out,
    },
    counts: {
      documents: read.docs.length,
      skipped: read.skipped.length,
      grouped: read.docs.length - result.emptyRows.length,
      withoutTerms: result.emptyRows.length,
      groups: result.partition.groups,
      terms: result.vocabulary.terms.length,
      nonZeros: result.matrix.indptr[result.matrix.rows],
    },
    choice: result.choice
      ? {
          by: result.choice.by,
          chosen: result.choice.chosen,
          treeLeaves: result.choice.treeLeaves,
          sampled: result.choice.sampled,
          tried: result.choice.tried.map((t) => ({ groups: t.groups, silhouette: Number.isFinite(t.silhouette) ? round(t.silhouette, 6) : null })),
        }
      : null,
    quality: {
      silhouette: Number.isFinite(result.quality.silhouette.mean) ? round(result.quality.silhouette.mean, 6) : null,
      silhouetteSampled: result.quality.silhouette.sampled,
      objective: round(result.partition.objective, 6),
    },
    kmeans: km
      ? {
          groups: km.groups,
          objective: round(km.objective, 6),
          iterations: km.iterations,
          converged: km.converged,
          restartObjectives: Array.from(km.restartObjectives, (v) => round(v, 6)),
          reseeded: km.reseeded,
        }
      : null,
    evaluation: x.evaluation ? evaluationJson(x.evaluation) : null,
    cwd: x.cwd,
    // Documents read from files of their own (not export rows), so `sheaf organize` can sort the files.
    files: fileDocuments(result.docs, read).map((d) => ({ id: d.id, path: path.resolve(x.cwd, d.source) })),
    skipped: read.skipped,
    warnings: read.warnings,
    ...readingRecord(read, x.clean),
    withoutTerms: Array.from(result.emptyRows, (r) => result.docs[r].id),
    timings: x.timings.map((t) => ({
      stage: t.stage,
      ms: round(t.ms, 1),
      documentsPerSecond: t.ms > 0 ? Math.round((t.items / t.ms) * 1000) : null,
    })),
  };
}
