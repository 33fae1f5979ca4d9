#!/usr/bin/env node
/**
 * The `sheaf` executable: the only place that touches `process` directly.
 *
 * @module
 */
import { runCli } from './program.js';
import { installStagingCleanup } from './signals.js';

installStagingCleanup(process, process.stderr, (code) => process.exit(code));
const code = await runCli(process.argv.slice(2), {
  stdout: process.stdout,
  stderr: process.stderr,
  stdin: process.stdin,
  cwd: process.cwd(),
  env: process.env,
});
process.exitCode = code;
