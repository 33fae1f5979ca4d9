/**
 * `sheaf evaluate`: scores a `documents.csv` (or any CSV with a group column)
 * against a column of known labels.
 *
 * @module
 */
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import type { Command } from 'commander';
import { parse } from 'csv-parse/sync';
import type { CliIo } from './io.js';
import { evaluationLines } from './render.js';
import { DOCUMENT_COLUMNS, evaluateLabels, evaluationJson, jsonText } from '../report/outputs.js';
import { visible, visibleJson } from './visible.js';
import { UsageError } from '../util/errors.js';
import { checkInputKind } from '../ingest/index.js';
import { matchColumn } from './truth.js';

interface EvaluateFlags {
  truth: string;
  group: string;
  json?: boolean;
}

/** Registers `evaluate` on the program. */
export function registerEvaluate(program: Command, io: CliIo, setExit: (code: number) => void): void {
  program
    .command('evaluate')
    .description('score groups against known labels: purity, NMI, adjusted Rand index, V-measure')
    .argument('<documents.csv>', 'a documents.csv written by sheaf group (or any CSV with a group column)')
    .requiredOption('--truth <column>', 'the column holding the known labels')
    .option('--group <column>', 'the column holding the groups', 'group')
    .option('--json', 'print { purity, nmi, ari, v_measure, contingency } as JSON')
    .action(async (file: string, flags: EvaluateFlags) => {
      setExit(await runEvaluate(file, flags, io));
    });
}

async function runEvaluate(file: string, flags: EvaluateFlags, io: CliIo): Promise<number> {
  let bytes: Buffer;
  try {
    await checkInputKind(path.resolve(io.cwd, file), file); // a device such as /dev/zero never ends
    bytes = await readFile(path.resolve(io.cwd, file));
  } catch (err) {
    if (err instanceof UsageError) throw err;
    const code = (err as { code?: string }).code;
    throw new UsageError(code === 'ENOENT' ? `no such file: ${file}` : `cannot read ${file} (${code ?? 'error'})`);
  }
  let rows: string[][];
  try {
    rows = parse(bytes, { bom: true, relax_column_count: true, skip_empty_lines: true }) as string[][];
  } catch (err) {
    throw new UsageError(`${file} cannot be read as CSV: ${(err as Error).message.split('\n')[0]}`);
  }
  if (rows.length === 0) throw new UsageError(`${file} is empty`);
  const header = rows[0];
  const column = (name: string, option: string): number => {
    const i = header.indexOf(name);
    if (i < 0) throw new UsageError(visible(`${file} has no column ${JSON.stringify(name)} for --${option}; its columns are: ${header.join(', ')}`), option);
    return i;
  };
  const t = column(truthColumn(header, truthName(header, flags.truth), file), 'truth');
  const g = column(flags.group, 'group');
  const body = rows.slice(1);
  if (body.length === 0) throw new UsageError(`${file} has a header but no rows`);
  const e = evaluateLabels(
    flags.truth,
    body.map((r) => r[t] ?? ''),
    body.map((r) => r[g] ?? ''),
  );
  if (e.scored === 0) throw new UsageError(`${file} has no row with both a group and a ${flags.truth} label`);
  if (flags.json) io.stdout.write(visibleJson(jsonText(evaluationJson(e))));
  else io.stdout.write(evaluationLines(e, Math.max(60, io.stdout.columns ?? 110)).join('\n') + '\n');
  return 0;
}

/**
 * `--truth` as the user spelt it, matched to the header as `--text`/`--id`
 * are: exact first, then the one column equal to it when case is ignored
 * (two or more: refused). In a documents.csv sheaf wrote, its own columns are
 * not candidates (their names resolve in {@link truthColumn}).
 */
export function truthName(header: readonly string[], name: string): string {
  const written = DOCUMENT_COLUMNS.every((c, i) => header[i] === c);
  const own = new Set<string>(written ? DOCUMENT_COLUMNS : []);
  if (own.has(name)) return name;
  return matchColumn(header.filter((c) => !own.has(c)), name, 'truth') ?? name;
}

/**
 * The column that holds the known labels called `name`. `sheaf group` writes
 * its own columns first (`id, group, label, fit, duplicate_set`) and renames a
 * user column that has one of those names to `input_<name>`; `--truth` takes
 * the name the user knows, as `group --truth` does, so in a sheaf
 * documents.csv a name of sheaf's own resolves to the renamed column. With no
 * renamed column there, the name would score sheaf's own output against
 * itself: refused.
 */
export function truthColumn(header: readonly string[], name: string, file: string): string {
  const written = DOCUMENT_COLUMNS.every((c, i) => header[i] === c);
  if (!written || !(DOCUMENT_COLUMNS as readonly string[]).includes(name)) return name;
  const renamed = `input_${name}`;
  if (header.includes(renamed)) return renamed;
  throw new UsageError(
    visible(`--truth ${name} names a column sheaf wrote in ${file}, not known labels; its own label column would be ${renamed}, and there is none`),
    'truth',
  );
}
