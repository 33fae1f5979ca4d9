/**
 * The sheaf command line, built on commander with `exitOverride`, so the
 * whole CLI runs inside tests without exiting the process.
 *
 * @module
 */
import { Command, CommanderError } from 'commander';
import type { CliIo } from './io.js';
import { usageLine } from './parse.js';
import { versions } from './versions.js';
import { visible } from './visible.js';
import { restoreTerminal } from './progress.js';
import { UsageError } from '../util/errors.js';

/** Exit codes: 0 done, 1 failed while running, 2 bad usage or unusable input. */
export const EXIT = Object.freeze({ ok: 0, failed: 1, usage: 2 });

type Register = (program: Command, io: CliIo, setExit: (code: number) => void) => void;

/** The commands by module, in the order help lists them; a module is loaded only when one of its commands is wanted. */
const COMMAND_MODULES: readonly (readonly [readonly string[], () => Promise<readonly Register[]>])[] = [
  [['group', 'tree'], async () => import('./group.js').then((m) => [m.registerGroup, m.registerTree])],
  [['duplicates'], async () => import('./duplicates.js').then((m) => [m.registerDuplicates])],
  [['evaluate'], async () => import('./evaluate.js').then((m) => [m.registerEvaluate])],
  [['assign'], async () => import('./assign.js').then((m) => [m.registerAssign])],
  [['organize'], async () => import('./organize.js').then((m) => [m.registerOrganize])],
  [['count-terms', 'merge-counts'], async () => import('./term-counts.js').then((m) => [m.registerTermCounts])],
];

/**
 * Builds the program; `setExit` receives the exit code an action decides on.
 * With `command` naming a command, only that command's module is loaded and
 * registered (a run does not load the code of the others); otherwise all are.
 */
export async function createProgram(io: CliIo, setExit: (code: number) => void, command?: string): Promise<Command> {
  const program = new Command('sheaf')
    .description('Sort a pile of text documents into named groups, a tree of themes and near-copy sets.')
    .version(versions().sheaf, '-V, --version')
    .exitOverride()
    .showHelpAfterError('(run with --help for usage)')
    .configureOutput({
      writeOut: (s) => io.stdout.write(s),
      writeErr: (s) => io.stderr.write(s),
      outputError: (s, write) => write(s.replace(/^error: /, 'sheaf: ')),
    });
  const only = COMMAND_MODULES.filter(([names]) => command !== undefined && names.includes(command));
  for (const [, load] of only.length > 0 ? only : COMMAND_MODULES) for (const register of await load()) register(program, io, setExit);
  for (const sub of program.commands) {
    sub.exitOverride().configureOutput({
      writeOut: (s) => io.stdout.write(s),
      writeErr: (s) => io.stderr.write(s),
      outputError: (s, write) => write(s.replace(/^error: /, 'sheaf: ')),
    });
  }
  return program;
}

/** Library names (camelCase) of every long flag of every command, for error messages. */
function knownOptions(program: Command): string[] {
  const names = new Set<string>();
  for (const cmd of [program, ...program.commands]) {
    for (const opt of cmd.options) {
      const long = opt.long?.replace(/^--(no-)?/, '');
      if (long) names.add(long.replace(/-([a-z])/g, (_, c: string) => c.toUpperCase()));
    }
  }
  return [...names];
}

/**
 * Runs the CLI on `argv` (the arguments after the program name) and resolves
 * to the exit code. Never exits the process and never throws: usage errors
 * become one line on stderr and code 2; failures become one line and code 1
 * (with the stack only when SHEAF_DEBUG is set).
 */
export async function runCli(argv: readonly string[], io: CliIo): Promise<number> {
  let code: number = EXIT.ok;
  const program = await createProgram(
    io,
    (c) => {
      code = c;
    },
    argv[0],
  );
  if (argv.length === 0) {
    program.outputHelp();
    return EXIT.usage;
  }
  try {
    await program.parseAsync([...argv], { from: 'user' });
    return code;
  } catch (err) {
    restoreTerminal(); // a bar drawn when the error came: cursor shown, line wrap on, before the message
    if (err instanceof CommanderError) {
      if (err.code === 'commander.helpDisplayed' || err.code === 'commander.version' || err.code === 'commander.help') {
        return EXIT.ok;
      }
      return EXIT.usage; // commander already printed its one line
    }
    if (err instanceof UsageError) {
      // The flags of every command, as when all were registered (the run may have loaded only its own).
      const all = await createProgram(io, () => undefined);
      io.stderr.write(`sheaf: ${visible(usageLine(err, knownOptions(all), argv[0]))}\n`);
      return EXIT.usage;
    }
    const e = err as Error;
    io.stderr.write(`sheaf: failed: ${visible(e?.message ?? String(err))}\n`);
    if (io.env.SHEAF_DEBUG && e?.stack) io.stderr.write(e.stack + '\n');
    return EXIT.failed;
  }
}
