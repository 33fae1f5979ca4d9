/**
 * What every command that reads documents shares: the input and analysis
 * flags, turning them into the library's options, reading (and for commands
 * that do not group, cleaning), and the notes shown about it.
 *
 * @module
 */
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import type { Command } from 'commander';
import type { CliIo } from './io.js';
import { collect, decimal, list, wholeNumber } from './parse.js';
import { ingest, resolveIngestOptions, type IngestOptions, type IngestResult } from '../ingest/index.js';
import type { GroupOptions } from '../pipeline.js';
import { UsageError } from '../util/errors.js';
import type { CleanReport } from '../clean/index.js';
import { CLEAN_CHOICES, cleanStage, resolveCleanStage, type CleanChoice, type CleanSettings } from '../clean/stage.js';
import type { Doc } from '../types.js';
import { progressReporter, progressShown } from './progress.js';

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
  maxStreamBytes?: string;
  sheet?: string;
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
  unsorted?: boolean;
  reduce?: string | false;
  splitMixed?: boolean;
  duplicates?: string | false;
  report?: boolean;
  out: string;
  saveVectors?: string;
  termCounts?: string;
  json?: boolean;
  quiet?: boolean;
  /** False with --no-bom: CSV files without the UTF-8 byte order mark. */
  bom?: boolean;
}

/** The formats sheaf reads, shown after the options in the help of every command that reads documents. */
export const READABLE_INPUTS_HELP = `
Inputs read (by extension; a file with another extension by its content):
  one document a file       .txt .md .html .pdf .docx .eml (also inside folders)
  one e-mail a message      .mbox (RFC 4155 mailbox; also inside folders)
  one document a row        .csv .tsv .jsonl .json .xlsx (first sheet, or --sheet), - (standard input)
  one document a reference  .bib (BibTeX) .ris (RIS) .json (CSL JSON item list)
  old binary workbooks (.xls .xlsb) are refused: save them as .xlsx or CSV`;

/** Adds the flags shared by every command that reads documents. */
export function addInputFlags(cmd: Command): Command {
  cmd.addHelpText('after', READABLE_INPUTS_HELP);
  return cmd
    .option('--text <fields>', 'column(s) or JSON field(s) holding the text, comma-separated; dotted paths for nested JSON, [] for every element of an array (comments[].body)')
    .option('--id <field>', 'column or field with each row’s id (default: row number)')
    .option('--title <field>', 'column or field with each row’s title (default: first line of the text)')
    .option('--format <kind>', 'read inputs as auto, csv, tsv, jsonl, json or text', 'auto')
    .option('--delimiter <char>', 'field separator for delimited exports')
    .option('--include <glob>', 'only files in folders matching this pattern (repeatable)', collect)
    .option('--exclude <glob>', 'skip files in folders matching this pattern (repeatable)', collect)
    .option('--clean <mode>', 'auto (default: clean when at least 20% of the documents hold quoted replies, signatures or greetings), tickets (always: drop quoted replies, signatures, greetings, repeated boilerplate; fold links, addresses, numbers) or none')
    .option('--encoding <name>', 'read every file in this character encoding (default: detect)')
    .option('--max-bytes <n>', 'longest document text kept, in bytes (longer ones are cut, and listed in run.json)')
    .option('--max-files <n>', 'read at most this many files from folders')
    .option('--max-stream-bytes <n>', 'most bytes read from standard input or a pipe (default 4 GiB)')
    .option('--sheet <name>', 'the sheet of a workbook (.xlsx) to read (default: the first)');
}

/** Documents as read and then cleaned, with what both steps report. */
export interface ReadInputs {
  /** Summary notes (decoding, truncation, cleaning) for the caller to show once the run has succeeded. */
  readonly notes: readonly string[];
  readonly read: IngestResult;
  readonly docs: readonly Doc[];
  /** What cleaning did, or null when the caller cleans later (the grouping pipeline does). */
  readonly clean: CleanReport | null;
}

/** The cleaning mode from `--clean` (validated), or null for the default. */
export function cleanModeFromFlags(flags: GroupFlags): CleanChoice | null {
  if (flags.clean === undefined) return null;
  if (!(CLEAN_CHOICES as readonly string[]).includes(flags.clean)) {
    throw new UsageError(`clean must be one of ${CLEAN_CHOICES.join(', ')}; got ${JSON.stringify(flags.clean)}`, 'clean');
  }
  return flags.clean as CleanChoice;
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
  clean: CleanSettings | null = resolveCleanStage({ mode: cleanModeFromFlags(flags) ?? 'auto' }),
): Promise<ReadInputs> {
  // Reading progress by bytes (a bar on stderr once reading takes over a second).
  const bar = progressReporter(io, flags.quiet ?? false);
  let read: IngestResult;
  try {
    // Only when a bar can be drawn: the files are sized first for the total.
    const progress = progressShown(io, flags.quiet ?? false) ? (done: number, total: number) => bar.update('read', done, total) : undefined;
    read = await ingest(inputs, ingestOptions, { cwd: io.cwd, stdin: io.stdin, ...(progress ? { progress } : {}) });
  } finally {
    bar.done();
  }
  reportSkips(read.skipped, read.warnings, note);
  const notes: string[] = [];
  if (read.decoding.length > 0) {
    const replaced = read.decoding.filter((d) => d.replaced > 0).length;
    notes.push(`sheaf: note: ${read.decoding.length} file(s) not in plain UTF-8 were decoded${replaced ? ` (${replaced} with damaged characters replaced)` : ''}; see decoding in run.json`);
  }
  for (const t of read.titleColumns) notes.push(`sheaf: note: ${t.source}: titles taken from the column ${JSON.stringify(t.column)} (name another with --title)`);
  if (read.truncated.length > 0) notes.push(`sheaf: note: ${read.truncated.length} document(s) longer than --max-bytes were cut; see truncated in run.json`);
  if (clean === null) return { notes, read, docs: read.docs, clean: null };
  const cleaned = cleanStage(read, clean);
  notes.push(...cleaningNotes(cleaned.report));
  return { notes, read, docs: cleaned.docs, clean: cleaned.report };
}

/** The note on what cleaning removed, when it removed anything. */
export function cleaningNotes(r: CleanReport): string[] {
  if (r.detected && !r.detected.applied) {
    if (r.withClutter === 0) return [];
    return [
      `sheaf: note: documents kept as written: ${Math.round(100 * r.detected.share)}% hold quoted replies, signatures or greetings ` +
        `(cleaning starts at ${Math.round(100 * r.detected.threshold)}%); --clean tickets cleans them anyway`,
    ];
  }
  if (!(r.changed > 0 && r.charsBefore > 0)) return [];
  return [
    `sheaf: note: cleaning removed ${Math.round((100 * (r.charsBefore - r.charsAfter)) / r.charsBefore)}% of the text ` +
      `(quoted replies, signatures, greetings, ${r.boilerplate.found} boilerplate line(s)) from ${r.changed} document(s); --clean none keeps it`,
  ];
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
    .option('--min-df <n>', 'drop terms in fewer documents than this (a count, a share below 1, or auto: 2 from 50 documents up, default)')
    .option('--max-df <n>', 'drop terms in more documents than this (a share up to 1, or a count)')
    .option('--max-terms <n>', 'keep at most this many terms, the most frequent');
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

/** The ingest options from the input flags (validated). */
export function ingestOptionsFromFlags(flags: GroupFlags): IngestOptions {
  cleanModeFromFlags(flags);
  return resolveIngestOptions({
    encoding: flags.encoding ?? null,
    ...(flags.maxBytes !== undefined ? { maxBytes: wholeNumber(flags.maxBytes, 'maxBytes') } : {}),
    ...(flags.maxFiles !== undefined ? { maxFiles: wholeNumber(flags.maxFiles, 'maxFiles') } : {}),
    ...(flags.maxStreamBytes !== undefined ? { maxStreamBytes: wholeNumber(flags.maxStreamBytes, 'maxStreamBytes') } : {}),
    text: list(flags.text) ?? null,
    id: flags.id ?? null,
    title: flags.title ?? null,
    format: flags.format as IngestOptions['format'],
    delimiter: flags.delimiter ?? null,
    sheet: flags.sheet ?? null,
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
      minDf: flags.minDf === 'auto' ? 'auto' : decimal(flags.minDf, 'minDf'),
      maxDf: decimal(flags.maxDf, 'maxDf'),
      maxTerms: wholeNumber(flags.maxTerms, 'maxTerms'),
    },
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

