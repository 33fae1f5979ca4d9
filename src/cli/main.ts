#!/usr/bin/env node
/**
 * The `sheaf` executable: the only place that touches `process` directly.
 *
 * @module
 */
import { runCli } from './program.js';
import { installStagingCleanup } from './signals.js';
import { restoreTerminal } from './progress.js';

installStagingCleanup(process, process.stderr, (code) => process.exit(code));
// Whatever ends the process (an uncaught error included), a bar still drawn gives the terminal back.
process.once('exit', restoreTerminal);
const code = await runCli(process.argv.slice(2), {
  stdout: process.stdout,
  stderr: process.stderr,
  stdin: process.stdin,
  cwd: process.cwd(),
  env: process.env,
});
process.exitCode = code;
