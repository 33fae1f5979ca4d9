/** Runs the CLI in-process with captured output (test helper). */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { runCli } from '../../src/cli/program.js';

export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

export async function sheaf(argv: string[], options: { cwd?: string; stdin?: string } = {}): Promise<CliRun> {
  let stdout = '';
  let stderr = '';
  const code = await runCli(argv, {
    stdout: { write: (s: string) => (stdout += s), isTTY: false },
    stderr: { write: (s: string) => (stderr += s), isTTY: false },
    stdin: options.stdin !== undefined ? Readable.from([Buffer.from(options.stdin)]) : undefined,
    cwd: options.cwd ?? process.cwd(),
    env: {},
  });
  return { code, stdout, stderr };
}

export function tempDir(prefix = 'sheaf-test-'): string {
  return mkdtempSync(path.join(tmpdir(), prefix));
}
