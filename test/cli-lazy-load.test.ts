/**
 * A run loads only the code its command needs: `sheaf duplicates` does not
 * load the other commands' modules, the model and term-counts readers (zod)
 * or the stemmers of other languages; `sheaf --help` still lists every
 * command. Runs the built CLI (`npm run build` first) in a child process with
 * a module hook that lists every module loaded.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { tempDir } from './helpers/cli.js';

const root = path.resolve(__dirname, '..');
const main = path.join(root, 'dist', 'cli', 'main.js');

/** The URLs of the modules `node dist/cli/main.js ...args` loads, and its stdout. */
function loaded(args: string[]): { urls: string[]; stdout: string } {
  const dir = tempDir();
  const hooks = path.join(dir, 'hooks.mjs');
  const list = path.join(dir, 'loaded.txt');
  writeFileSync(hooks, `import { appendFileSync } from 'node:fs';\nexport async function load(url, context, next) { appendFileSync(${JSON.stringify(list)}, url + '\\n'); return next(url, context); }\n`);
  const register = path.join(dir, 'register.mjs');
  writeFileSync(register, `import { register } from 'node:module';\nregister(${JSON.stringify(pathToFileURL(hooks).href)});\n`);
  writeFileSync(list, '');
  const stdout = execFileSync(process.execPath, ['--import', pathToFileURL(register).href, main, ...args], { cwd: root, encoding: 'utf8' });
  return { urls: execFileSync('cat', [list], { encoding: 'utf8' }).split('\n').filter((l) => l !== ''), stdout };
}

describe('modules loaded by a run', () => {
  it('sheaf duplicates loads its own command only: no grouping code, no zod, no other stemmer', () => {
    const out = path.join(tempDir(), 'o');
    const { urls } = loaded(['duplicates', 'corpus-demo/tickets.csv', '--text', 'subject,body', '--id', 'ticket_id', '--out', out, '--quiet', '--no-report']);
    const has = (part: string): boolean => urls.some((u) => u.includes(part));
    expect(has('/dist/cli/duplicates.js')).toBe(true);
    expect(has('/dist/near-copies.js')).toBe(true);
    for (const part of ['/dist/cli/group.js', '/dist/cli/assign.js', '/dist/cli/evaluate.js', '/dist/cli/organize.js', '/dist/cli/term-counts.js', '/dist/pipeline.js', '/node_modules/zod/', 'porter_stemmer_de.js', 'stemmer_id.js']) {
      expect(has(part), part).toBe(false);
    }
  });

  it('sheaf --help still lists every command', () => {
    const { stdout } = loaded(['--help']);
    for (const name of ['group', 'tree', 'duplicates', 'evaluate', 'assign', 'organize', 'count-terms', 'merge-counts']) expect(stdout).toMatch(new RegExp(`^  ${name}\\b`, 'm'));
  });
});
