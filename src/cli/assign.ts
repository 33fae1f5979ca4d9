/**
 * `sheaf assign`: files new documents into the groups of a saved model, and
 * says which look new.
 *
 * @module
 */
import path from 'node:path';
import type { Command } from 'commander';
import type { CliIo } from './io.js';
import { decimal } from './parse.js';
import { versions } from './versions.js';
import { renderTable } from './table.js';
import { addInputFlags, cleanModeFromFlags, cleaningNotes, ingestOptionsFromFlags, readInputs, type GroupFlags } from './inputs.js';
import { assignedCsv } from '../report/assigned.js';
import { assignCounts, assignRunJson } from '../report/run-record.js';
import { resolveCleanStage } from '../clean/stage.js';
import { applyModel, type ModelApplication } from '../model/apply.js';
import { fixed, withCsvBom } from '../report/csv.js';
import { jsonText } from '../report/outputs.js';
import { visibleJson, visibleLines } from './visible.js';
import { writeOutputFolder } from '../report/folder.js';
import { checkOutputFolders } from './out-paths.js';
import { loadModel, modelFileOf } from './model-path.js';
import { progressReporter } from './progress.js';
import { UsageError } from '../util/errors.js';
import { runAssignStream, DEFAULT_STREAM_BATCH, type AssignStreamFlags } from './assign-stream.js';

interface AssignFlags extends GroupFlags {
  model: string;
  minFit?: string;
}

/** Registers `assign` on the program. */
export function registerAssign(program: Command, io: CliIo, setExit: (code: number) => void): void {
  const cmd = program
    .command('assign')
    .description('file new documents into the groups of a saved model; flag those that fit none')
    .argument('<inputs...>', 'folders, files, or - for stdin');
  addInputFlags(cmd);
  cmd
    .requiredOption('--model <file>', 'a model.json written by sheaf group, or the output folder holding it')
    .option('--min-fit <f>', 'one fit threshold for every group (default: each group’s own, from its training documents)')
    .option('--out <dir>', 'output folder', 'sheaf-assigned')
    .option('--no-bom', 'write assigned.csv without the UTF-8 byte order mark (spreadsheets need it to show accents right)')
    .option('--json', 'print the counts as JSON on stdout')
    .option('--quiet', 'no progress bars or notes on stderr')
    .option('--stream <format>', "write one row per input row to stdout as it goes (jsonl or csv), in constant memory, instead of a folder; reads CSV, TSV or JSON Lines files or - (stdin); cleaning is the model's recorded decision (tickets or none) without the boilerplate rule, which judges a whole pile")
    .option('--batch <n>', `with --stream: rows filed at a time (default ${DEFAULT_STREAM_BATCH}; the output is the same whatever the size)`)
    .action(async (inputs: string[], flags: AssignFlags & Partial<AssignStreamFlags>, command: Command) => {
      if (flags.stream !== undefined) return setExit(await runAssignStream(inputs, flags as AssignStreamFlags, io, command.getOptionValueSource('out') === 'cli'));
      setExit(await runAssign(inputs, flags, io));
    });
}


async function runAssign(inputs: string[], flags: AssignFlags, io: CliIo): Promise<number> {
  const startedAt = new Date();
  const minFit = decimal(flags.minFit, 'minFit');
  if (minFit !== undefined && !(minFit >= -1 && minFit <= 1)) throw new UsageError(`minFit must be a number from -1 to 1; got ${minFit}`, 'minFit');
  const ingestOptions = ingestOptionsFromFlags(flags);
  flags.model = await modelFileOf(flags.model, io.cwd); // a run folder: its model.json
  const model = await loadModel(flags.model, io.cwd);
  const outDir = path.resolve(io.cwd, flags.out);
  await checkOutputFolders({ inputs, alsoReads: [flags.model, flags.stopwords], out: flags.out, quiet: flags.quiet }, io);
  const note = (line: string): void => {
    if (!flags.quiet) io.stderr.write(visibleLines(line) + '\n');
  };
  const { read, notes } = await readInputs(inputs, ingestOptions, flags, io, note, null);
  // The model's cleaning unless --clean says otherwise.
  const mode = cleanModeFromFlags(flags);
  const bar = progressReporter(io, flags.quiet ?? false);
  let a: ModelApplication;
  try {
    a = applyModel(model, read, minFit, mode === null ? model.cleaning : resolveCleanStage({ ...model.cleaning.rules, mode }), (d, t) => bar.update('assign', d, t));
  } finally {
    bar.done();
  }
  const clean = a.clean;
  for (const line of [...notes, ...cleaningNotes(clean)]) note(line);
  const counts = assignCounts(model, a, minFit);
  const context = { command: 'assign', startedAt, finishedAt: new Date(), versions: versions(), cwd: io.cwd, out: flags.out };
  const files = new Map([
    ['assigned.csv', assignedCsv(model, a)],
    ['run.json', assignRunJson(model, a, { context, modelFile: flags.model, minFit, read })],
  ]);
  const written = await writeOutputFolder(outDir, flags.bom === false ? files : withCsvBom(files));
  if (flags.json) {
    io.stdout.write(visibleJson(jsonText(counts)));
    return 0;
  }
  const width = Math.max(60, io.stdout.columns ?? 110);
  const lines = renderTable(
    [
      { heading: 'group', align: 'right' },
      { heading: 'name', min: 16 },
      { heading: 'filed', align: 'right' },
      { heading: 'near but new', align: 'right' },
      { heading: 'min fit', align: 'right' },
    ],
    counts.groups.map((g) => [String(g.id), g.label, String(g.matched), String(g.nearButNew), fixed(g.minFit, 2)]),
    width,
  );
  io.stdout.write(
    [
      ...lines,
      '',
      `${counts.documents} documents: ${counts.matched} filed into the model's ${model.groups} groups, ${counts.new} look new` +
        (a.noKnownTerms ? ` (${a.noKnownTerms} share no term with the model)` : '') +
        '.',
      'Wrote:',
      ...written.map((p) => `  ${path.join(flags.out, path.basename(p))}`),
    ].join('\n') + '\n',
  );
  return 0;
}
