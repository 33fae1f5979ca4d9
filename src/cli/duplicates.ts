/**
 * `sheaf duplicates`: the sets of near-copies, strongest first, and what
 * differs inside them.
 *
 * @module
 */
import path from 'node:path';
import { availableParallelism } from 'node:os';
import type { Command } from 'commander';
import type { CliIo } from './io.js';
import { decimal, wholeNumber } from './parse.js';
import { versions } from './versions.js';
import { progressReporter } from './progress.js';
import { addAnalysisFlags, addInputFlags, analysisOptionsFromFlags, ingestOptionsFromFlags, readInputs, type GroupFlags } from './inputs.js';
import { duplicatesRunJson } from '../report/run-record.js';
import { renderTable, clip } from './table.js';
import { visible, visibleJson, visibleLines } from './visible.js';
import { findDuplicatesAsync, resolveFindDuplicatesOptions, type CompareBy, type DuplicateRun, type FindDuplicatesOptions, type MemberDiff } from '../near-copies.js';
import { PAIRS_FILE, duplicatesCsv, duplicatesJsonChunks, nearCopyPairsCsvChunks } from '../report/duplicates.js';
import { jsonText } from '../report/outputs.js';
import { fixed, withCsvBom } from '../report/csv.js';
import { writeOutputFolder, type FileContent } from '../report/folder.js';
import { checkOutputFolders } from './out-paths.js';
import type { DiffPiece } from '../duplicates/index.js';
import { duplicatesReportFile } from './report-inputs.js';
import { vectorizeRunner } from '../parallel/runners.js';
import { resolveParallelOptions } from '../parallel/kmeans-parallel.js';

interface DuplicatesFlags extends GroupFlags {
  threshold?: string;
  by?: string;
  shingle?: string;
  show?: string;
}

/** Registers `duplicates` on the program. */
export function registerDuplicates(program: Command, io: CliIo, setExit: (code: number) => void): void {
  const cmd = program
    .command('duplicates')
    .description('find sets of near-copies (every pair at or above a similarity), strongest first')
    .argument('<inputs...>', 'folders, files, or - for stdin');
  addInputFlags(cmd);
  addAnalysisFlags(cmd);
  cmd
    .option('--threshold <t>', 'similarity at or above which two documents are near-copies (default 0.9, or 0.8 with shingles)')
    .option('--by <what>', 'tfidf (shared words, order ignored) or shingles (runs of words: order matters)', 'tfidf')
    .option('--shingle <w>', 'words per shingle with --by shingles (default 4)')
    .option('--show <n>', 'print what differs inside the n strongest sets', '0')
    .option('--threads <n>', 'threads for the analysis of large inputs (default: up to 2, the cores there are)')
    .option('--out <dir>', 'output folder', 'sheaf-duplicates')
    .option('--save-vectors <dir>', 'also write the vectors compared (MatrixMarket), their columns (terms.txt, with --by tfidf) and ids')
    .option('--no-bom', 'write the CSV files without the UTF-8 byte order mark (spreadsheets need it to show accents right)')
    .option('--no-report', 'do not write report.html')
    .option('--json', 'print duplicates.json on stdout')
    .option('--quiet', 'no progress bars or notes on stderr')
    .action(async (inputs: string[], flags: DuplicatesFlags) => {
      setExit(await runDuplicates(inputs, flags, io));
    });
}

/** The library options for a near-copy search from the flags (validated). */
export async function duplicateOptionsFromFlags(flags: DuplicatesFlags, io: CliIo, show: number): Promise<FindDuplicatesOptions> {
  const analysis = await analysisOptionsFromFlags(flags, io);
  const options: FindDuplicatesOptions = {
    by: flags.by as CompareBy,
    threshold: decimal(flags.threshold, 'threshold'),
    shingle: wholeNumber(flags.shingle, 'shingle'),
    show,
    ...analysis,
  };
  resolveFindDuplicatesOptions(options);
  return options;
}

async function runDuplicates(inputs: string[], flags: DuplicatesFlags, io: CliIo): Promise<number> {
  const now = io.now ?? (() => performance.now());
  const startedAt = new Date();
  const show = wholeNumber(flags.show, 'show') ?? 0;
  const ingestOptions = ingestOptionsFromFlags(flags);
  const options = await duplicateOptionsFromFlags(flags, io, Math.max(show, 10));
  const threads = resolveParallelOptions({ threads: wholeNumber(flags.threads, 'threads') ?? Math.min(2, availableParallelism()) }).threads;
  const outDir = path.resolve(io.cwd, flags.out);
  await checkOutputFolders({ inputs, alsoReads: [flags.stopwords], out: flags.out, saveVectors: flags.saveVectors, quiet: flags.quiet }, io);
  const note = (line: string): void => {
    if (!flags.quiet) io.stderr.write(visibleLines(line) + '\n');
  };
  const t0 = now();
  const { read, docs, clean, notes } = await readInputs(inputs, ingestOptions, flags, io, note);
  const readMs = now() - t0;
  const bar = progressReporter(io, flags.quiet ?? false);
  let run: DuplicateRun;
  try {
    run = await findDuplicatesAsync(docs, options, { vectorize: vectorizeRunner(threads) }, { now, progress: (stage, d, t) => bar.update(stage, d, t) });
  } finally {
    bar.done();
  }
  for (const line of notes) note(line);
  const o = run.options;
  const src = { docs: run.docs, by: o.by, threshold: o.threshold, sets: run.sets, pairs: run.pairs, setOf: run.setOf };
  // Written in pieces: all pairs of a large run do not fit in one string.
  const files = new Map<string, FileContent>([
    ['duplicates.csv', duplicatesCsv(src)],
    ['duplicates.json', duplicatesJsonChunks(src)],
    [PAIRS_FILE, nearCopyPairsCsvChunks(src)],
    ...duplicatesReportFile(run, inputs, read, docs, flags.report !== false, io.cwd, outDir),
    [
      'run.json',
      duplicatesRunJson(run, {
        context: { command: 'duplicates', startedAt, finishedAt: new Date(), versions: versions(), cwd: io.cwd, out: flags.out },
        ingestOptions,
        read,
        clean,
        timings: [{ stage: 'read', ms: readMs, items: read.docs.length }, ...run.timings],
      }),
    ],
  ]);
  const written = (await writeOutputFolder(outDir, flags.bom === false ? files : withCsvBom(files))).map((p) => path.join(flags.out, path.basename(p)));
  if (flags.saveVectors) {
    // Loaded only here: the grouping outputs' module brings the model reader (zod) a near-copy run does not otherwise need.
    const { vectorFiles } = await import('../report/group-outputs.js');
    const v = await writeOutputFolder(path.resolve(io.cwd, flags.saveVectors), vectorFiles(run.matrix, run.columns, run.docs));
    written.push(...v.map((p) => path.join(flags.saveVectors as string, path.basename(p))));
  }
  if (flags.json) {
    for (const piece of duplicatesJsonChunks(src)) io.stdout.write(visibleJson(piece));
    note(`sheaf: wrote ${written.join(', ')}`);
    return 0;
  }
  const width = Math.max(60, io.stdout.columns ?? 110);
  io.stdout.write([...duplicateLines(run, width, show), '', 'Wrote:', ...written.map((p) => `  ${p}`)].join('\n') + '\n');
  return 0;
}

/** The terminal summary of a search: a table of sets, chaining warnings, and diffs of the first `show` sets. */
export function duplicateLines(run: DuplicateRun, width: number, show: number): string[] {
  const o = run.options;
  const measure = o.by === 'tfidf' ? 'cosine' : `resemblance of ${o.shingle}-word shingles`;
  const inSets = run.sets.reduce((a, s) => a + s.members.length, 0);
  const lines = [
    `${run.sets.length} near-duplicate set(s) holding ${inSets} of ${run.docs.length} documents, at ${measure} ≥ ${o.threshold}` +
      (run.exactCopies ? ` (${run.exactCopies} exact cop${run.exactCopies === 1 ? 'y' : 'ies'})` : '') +
      '.',
  ];
  if (run.sets.length === 0) return lines;
  const top = run.sets.slice(0, 30);
  lines.push(
    '',
    ...renderTable(
      [
        { heading: 'set', align: 'right' },
        { heading: 'size', align: 'right' },
        { heading: 'mean', align: 'right' },
        { heading: 'weakest', align: 'right' },
        { heading: 'representative', min: 20 },
      ],
      top.map((s) => [
        String(s.id),
        String(s.members.length),
        fixed(s.meanSimilarity, 2),
        fixed(s.weakest, 2),
        `${run.docs[s.representative].id}  ${run.docs[s.representative].title}`,
      ]),
      width,
    ),
  );
  if (run.sets.length > top.length) lines.push(`… and ${run.sets.length - top.length} more sets (all in duplicates.csv)`);
  for (const s of run.sets.filter((x) => x.chained)) {
    lines.push(
      `note: set ${s.id} chains: its weakest member is only ${fixed(s.weakest, 2)} alike to the representative ` +
        `(threshold ${o.threshold}); its members are linked through one another`,
    );
  }
  for (const s of run.sets.slice(0, show)) {
    lines.push('', `set ${s.id} — representative ${visible(run.docs[s.representative].id)}: ${clip(visible(run.docs[s.representative].title), width - 30)}`);
    for (const d of run.diffs.get(s.id) ?? []) {
      const i = Array.from(s.members).indexOf(d.row);
      lines.push(`  ${visible(run.docs[d.row].id)} (${fixed(s.similarityToRepresentative[i], 2)}): ${visible(diffText(d))}`);
    }
  }
  return lines;
}

/**
 * A diff as one line, marked as the report marks it: words only in this copy between a filled pair `▸…◂`,
 * words only in the representative between a hollow pair `▹…◃` (filled: present here; hollow: gone).
 */
export function diffText(d: MemberDiff | { pieces: readonly DiffPiece[] }): string {
  if (!d.pieces.some((p) => p.kind !== 'same')) return '(identical text)';
  const parts = d.pieces.map((p) => (p.kind === 'same' ? p.text : p.kind === 'added' ? `▸${p.text}◂` : `▹${p.text}◃`));
  return parts.join('').replace(/\s+/g, ' ').trim();
}
