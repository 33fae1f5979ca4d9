/**
 * `sheaf group`: read the inputs, group them, name the groups, write the
 * output folder and show a table of groups.
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
import { renderTable } from './table.js';
import { ingest, resolveIngestOptions, type IngestOptions } from '../ingest/index.js';
import { groupDocuments, resolveGroupOptions, type GroupOptions, type GroupResult } from '../pipeline.js';
import { documentsCsv, groupsJson, jsonText, round } from '../report/outputs.js';
import { assertReplaceable, writeOutputFolder } from '../report/folder.js';
import { toMatrixMarket } from '../vectorize/index.js';
import { UsageError } from '../util/errors.js';
import { fixed } from '../report/csv.js';

/** Raw flag values as commander hands them over. */
export interface GroupFlags {
  text?: string;
  id?: string;
  title?: string;
  format?: string;
  delimiter?: string;
  include?: string[];
  exclude?: string[];
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
  restarts?: string;
  maxIterations?: string;
  seed?: string;
  terms?: string;
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
    .option('--exclude <glob>', 'skip files in folders matching this pattern (repeatable)', collect);
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

/** Registers `group` on the program. */
export function registerGroup(program: Command, io: CliIo, setExit: (code: number) => void): void {
  const cmd = program
    .command('group')
    .description('sort documents into named groups')
    .argument('<inputs...>', 'folders, files (.txt .md .html .csv .tsv .jsonl .json), or - for stdin');
  addInputFlags(cmd);
  addAnalysisFlags(cmd);
  cmd
    .requiredOption('--groups <k>', 'number of groups')
    .option('--restarts <n>', 'seeded k-means runs; the best is kept')
    .option('--max-iterations <n>', 'cap on k-means iterations per run')
    .option('--seed <n>', 'random seed; the same seed and input give the same output')
    .option('--terms <n>', 'terms listed per group')
    .option('--out <dir>', 'output folder', 'sheaf-out')
    .option('--save-vectors <dir>', 'also write the TF-IDF matrix (MatrixMarket), terms and ids to this folder')
    .option('--json', 'print the groups as JSON on stdout')
    .option('--quiet', 'no progress bars or notes on stderr')
    .action(async (inputs: string[], flags: GroupFlags) => {
      setExit(await runGroup(inputs, flags, io));
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

/** Turns flags into the library's option objects (validated here, before any reading). */
export async function groupOptionsFromFlags(
  flags: GroupFlags,
  io: CliIo,
): Promise<{ ingest: IngestOptions; group: GroupOptions }> {
  const ingestOptions = resolveIngestOptions({
    text: list(flags.text) ?? null,
    id: flags.id ?? null,
    title: flags.title ?? null,
    format: flags.format as IngestOptions['format'],
    delimiter: flags.delimiter ?? null,
    ...(flags.include ? { include: flags.include } : {}),
    ...(flags.exclude ? { exclude: flags.exclude } : {}),
  });
  const group: GroupOptions = {
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
    kmeans: {
      groups: wholeNumber(flags.groups, 'groups') as number,
      restarts: wholeNumber(flags.restarts, 'restarts'),
      maxIterations: wholeNumber(flags.maxIterations, 'maxIterations'),
      seed: wholeNumber(flags.seed, 'seed'),
    },
    label: { terms: wholeNumber(flags.terms, 'terms') },
  };
  resolveGroupOptions(group);
  return { ingest: ingestOptions, group };
}

async function runGroup(inputs: string[], flags: GroupFlags, io: CliIo): Promise<number> {
  const now = io.now ?? (() => performance.now());
  const startedAt = new Date();
  const { ingest: ingestOptions, group } = await groupOptionsFromFlags(flags, io);
  const outDir = path.resolve(io.cwd, flags.out);
  await assertReplaceable(outDir, flags.out);
  if (flags.saveVectors) await assertReplaceable(path.resolve(io.cwd, flags.saveVectors), flags.saveVectors);

  const note = (line: string): void => {
    if (!flags.quiet) io.stderr.write(line + '\n');
  };
  const t0 = now();
  const read = await ingest(inputs, ingestOptions, { cwd: io.cwd, stdin: io.stdin });
  const readMs = now() - t0;
  reportSkips(read.skipped, read.warnings, note);
  if (read.docs.length === 0) {
    throw new UsageError(`no readable documents in ${inputs.join(', ')} (${read.skipped.length} skipped)`);
  }

  const progress = progressReporter(io, flags.quiet ?? false);
  let result: GroupResult;
  try {
    result = groupDocuments(read.docs, group, { now, progress: (s, d, t) => progress.update(s, d, t) });
  } finally {
    progress.done();
  }
  if (result.emptyRows.length > 0) {
    note(
      `sheaf: note: ${result.emptyRows.length} document(s) have no terms after analysis; they are in no group ` +
        `(listed in documents.csv with an empty group and in run.json)`,
    );
  }

  const tw = now();
  const files = new Map<string, string>();
  files.set('documents.csv', documentsCsv(result));
  const groupsDoc = groupsJson(result);
  files.set('groups.json', jsonText(groupsDoc));
  const writeMs = now() - tw;
  const timings = [
    { stage: 'read', ms: readMs, items: read.docs.length },
    ...result.timings,
    { stage: 'write', ms: writeMs, items: read.docs.length },
  ];
  files.set(
    'run.json',
    jsonText(
      runJson({ inputs, flags, ingestOptions, result, read, timings, startedAt, finishedAt: new Date() }),
    ),
  );
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
    io.stdout.write(jsonText(groupsDoc));
    note(`sheaf: wrote ${shownWritten.join(', ')}`);
  } else {
    printGroups(result, io);
    io.stdout.write(
      `\n${read.docs.length} documents (${read.skipped.length} skipped, ${result.emptyRows.length} without terms) ` +
        `in ${result.groups.length} groups; ${result.vocabulary.terms.length} terms.\nWrote:\n` +
        shownWritten.map((p) => `  ${p}\n`).join(''),
    );
  }
  return 0;
}

/** Warnings and skips on stderr: the first few, then a count. */
function reportSkips(skipped: readonly { source: string; reason: string }[], warnings: readonly string[], note: (l: string) => void): void {
  const cap = 10;
  for (const s of skipped.slice(0, cap)) note(`sheaf: skipped ${s.source}: ${s.reason}`);
  if (skipped.length > cap) note(`sheaf: … and ${skipped.length - cap} more skipped (listed in run.json)`);
  for (const w of warnings.slice(0, cap)) note(`sheaf: warning: ${w}`);
  if (warnings.length > cap) note(`sheaf: … and ${warnings.length - cap} more warnings (in run.json)`);
}

/** The group table: id, size, name, cohesion, two exemplar titles. */
export function printGroups(result: GroupResult, io: CliIo): void {
  const rows = result.groups.map((g) => [
    String(g.id),
    String(g.size),
    g.label,
    fixed(g.cohesion, 2),
    g.exemplars
      .slice(0, 2)
      .map((r) => result.docs[r].title || result.docs[r].id)
      .join(' | '),
  ]);
  const lines = renderTable(
    [
      { heading: 'group', align: 'right' },
      { heading: 'size', align: 'right' },
      { heading: 'name', min: 16 },
      { heading: 'cohesion', align: 'right' },
      { heading: 'for example', min: 20 },
    ],
    rows,
    Math.max(60, io.stdout.columns ?? 110),
  );
  io.stdout.write(lines.join('\n') + '\n');
}

interface RunJsonInput {
  inputs: string[];
  flags: GroupFlags;
  ingestOptions: IngestOptions;
  result: GroupResult;
  read: Awaited<ReturnType<typeof ingest>>;
  timings: { stage: string; ms: number; items: number }[];
  startedAt: Date;
  finishedAt: Date;
}

/** `run.json`: settings, versions, input digests, what was skipped and why, stage timings. */
function runJson(x: RunJsonInput): unknown {
  const { result, read } = x;
  const km = result.kmeans;
  return {
    tool: 'sheaf',
    command: 'group',
    startedAt: x.startedAt.toISOString(),
    finishedAt: x.finishedAt.toISOString(),
    versions: versions(),
    inputs: read.inputs,
    settings: {
      ingest: x.ingestOptions,
      analyzer: result.options.analyzer,
      vectorize: result.options.vectorize,
      kmeans: result.options.kmeans,
      label: result.options.label,
      out: x.flags.out,
    },
    counts: {
      documents: read.docs.length,
      skipped: read.skipped.length,
      grouped: read.docs.length - result.emptyRows.length,
      withoutTerms: result.emptyRows.length,
      terms: result.vocabulary.terms.length,
      nonZeros: result.matrix.indptr[result.matrix.rows],
    },
    kmeans: {
      groups: km.groups,
      objective: round(km.objective, 6),
      iterations: km.iterations,
      converged: km.converged,
      restartObjectives: Array.from(km.restartObjectives, (v) => round(v, 6)),
      reseeded: km.reseeded,
    },
    skipped: read.skipped,
    warnings: read.warnings,
    withoutTerms: Array.from(result.emptyRows, (r) => result.docs[r].id),
    timings: x.timings.map((t) => ({
      stage: t.stage,
      ms: round(t.ms, 1),
      documentsPerSecond: t.ms > 0 ? Math.round((t.items / t.ms) * 1000) : null,
    })),
  };
}
