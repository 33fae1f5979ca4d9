/**
 * `sheaf count-terms` writes a shard's document frequencies (a
 * `sheaf-term-counts` file) reading its rows as a stream; `sheaf merge-counts`
 * adds count files together. `sheaf group --term-counts FILE` then takes the
 * idf from the merged counts, so a model fitted on a sample weighs terms as
 * the whole collection does. EDGE.
 *
 * @module
 */
import { readFile, rename, rm, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { Command } from 'commander';
import type { CliIo } from './io.js';
import { addAnalysisFlags, analysisOptionsFromFlags, ingestOptionsFromFlags, type GroupFlags } from './inputs.js';
import { streamDocuments } from './assign-stream.js';
import { createAnalyzer, resolveAnalyzerOptions } from '../analyze/index.js';
import { cleanStage, resolveCleanStage } from '../clean/stage.js';
import { mergeTermCounts, TermCounter, termCountsFromJson, termCountsToJson, type CountsCleaning, type TermCounts } from '../vectorize/df-counts.js';
import type { Doc } from '../types.js';
import type { VectorizeOptions } from '../vectorize/options.js';
import { UsageError, show } from '../util/errors.js';

/** Rows cleaned and analysed at a time. */
const COUNT_BATCH = 1000;

interface CountFlags extends GroupFlags {
  out: string;
}

/** Reads and checks a counts file (one clear line when it is missing or damaged). */
export async function loadTermCounts(file: string, cwd: string): Promise<TermCounts> {
  let text: string;
  try {
    text = await readFile(path.resolve(cwd, file), 'utf8');
  } catch (err) {
    const code = (err as { code?: string }).code;
    throw new UsageError(code === 'ENOENT' ? `no such term-counts file: ${file}` : `cannot read term-counts file ${file} (${code ?? 'error'})`, 'termCounts');
  }
  return termCountsFromJson(text, file);
}

/** The analysis options with the idf taken from a term-counts file when one is named (`--term-counts`). */
export async function withTermCounts<T extends { vectorize?: Partial<VectorizeOptions> }>(analysis: T, file: string | undefined, cwd: string): Promise<T> {
  if (file === undefined) return analysis;
  return { ...analysis, vectorize: { ...analysis.vectorize, idfCounts: await loadTermCounts(file, cwd) } };
}

/** Writes a file whole or not at all: a temporary file beside it, renamed over it. */
async function writeAtomically(file: string, text: string): Promise<void> {
  const tmp = path.join(path.dirname(file), `.${path.basename(file)}.sheaf-tmp-p${process.pid}`);
  try {
    await writeFile(tmp, text);
    await rename(tmp, file);
  } catch (err) {
    await rm(tmp, { force: true });
    const code = (err as { code?: string }).code;
    throw new UsageError(`cannot write ${file} (${code ?? (err as Error).message})`, 'out');
  }
}

/** Registers `count-terms` and `merge-counts` on the program. */
export function registerTermCounts(program: Command, io: CliIo, setExit: (code: number) => void): void {
  const count = program
    .command('count-terms')
    .description('count the documents holding each term in CSV, TSV or JSON Lines files (one shard), as a mergeable term-counts file')
    .argument('<inputs...>', 'CSV, TSV or JSON Lines files, or - for stdin');
  count
    .option('--text <fields>', 'column(s) or JSON field(s) holding the text, comma-separated; dotted paths for nested JSON')
    .option('--format <kind>', 'read inputs as auto, csv, tsv or jsonl', 'auto')
    .option('--delimiter <char>', 'field separator for delimited exports')
    .option('--encoding <name>', 'read every file in this character encoding (default: detect)')
    .option('--max-bytes <n>', 'longest document text kept, in bytes (longer ones are cut)')
    .option('--clean <mode>', 'tickets (default: drop quoted replies, signatures, greetings; fold links, addresses, numbers — not boilerplate, which is judged per pile) or none; use what the model will record', 'tickets');
  addAnalysisFlags(count);
  count
    .requiredOption('--out <file>', 'the term-counts file to write')
    .option('--quiet', 'no notes on stderr')
    .action(async (inputs: string[], flags: CountFlags) => {
      setExit(await runCount(inputs, flags, io));
    });

  program
    .command('merge-counts')
    .description('add term-counts files together (any order, any grouping: the same result)')
    .argument('<files...>', 'term-counts files written by count-terms or merge-counts')
    .requiredOption('--out <file>', 'the merged term-counts file to write')
    .option('--quiet', 'no notes on stderr')
    .action(async (files: string[], flags: { out: string; quiet?: boolean }) => {
      let merged: TermCounts | null = null;
      for (const f of files) {
        const c = await loadTermCounts(f, io.cwd);
        merged = merged === null ? c : mergeTermCounts(merged, c, [files.slice(0, files.indexOf(f)).join(' + '), f]);
      }
      const m = merged as TermCounts;
      await writeAtomically(path.resolve(io.cwd, flags.out), termCountsToJson(m));
      if (!flags.quiet) io.stderr.write(`sheaf: ${files.length} count file(s) merged: ${m.documents} documents, ${m.terms.length} terms → ${flags.out}\n`);
      setExit(0);
    });
}

async function runCount(inputs: string[], flags: CountFlags, io: CliIo): Promise<number> {
  const cleaning = flags.clean as CountsCleaning;
  if (cleaning !== 'tickets' && cleaning !== 'none') throw new UsageError(`clean must be one of tickets, none; got ${show(flags.clean)}`, 'clean');
  const ingestOptions = ingestOptionsFromFlags({ ...flags, clean: undefined });
  const { analyzer: analyzerOptions } = await analysisOptionsFromFlags(flags, io);
  const settings = resolveAnalyzerOptions(analyzerOptions);
  const analyzer = createAnalyzer(settings);
  const clean = resolveCleanStage({ mode: cleaning, boilerplate: false, detect: false });
  const docs = await streamDocuments(inputs, ingestOptions, io);
  const counter = new TermCounter(settings, cleaning);
  const pending: Doc[] = [];
  const flush = (): void => {
    const cleaned = cleanStage({ docs: pending, exportRows: new Uint8Array(pending.length).fill(1) }, clean).docs;
    for (const d of cleaned) counter.add(analyzer.analyze(d.text));
    pending.length = 0;
  };
  for await (const d of docs.docs) {
    pending.push(d);
    if (pending.length >= COUNT_BATCH) flush();
  }
  flush();
  const counts = counter.result();
  await writeAtomically(path.resolve(io.cwd, flags.out), termCountsToJson(counts));
  if (!flags.quiet) io.stderr.write(`sheaf: ${counts.documents} documents, ${counts.terms.length} terms counted → ${flags.out}\n`);
  return 0;
}
