/**
 * Issue 15's mismatches: `--truth` (group and evaluate) matched like
 * `--text`/`--id` (exact, then the one case-insensitive match, two refused),
 * `--truth folder` for files read from folders, and `--model` naming the
 * output folder of a run. Exact messages.
 */
import { describe, expect, it } from 'vitest';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { sheaf, tempDir } from './helpers/cli.js';
import { matchColumn } from '../src/cli/truth.js';

const ROWS = [
  ['printer jams paper tray printer jams again', 'hardware'],
  ['printer paper tray jams every morning printer', 'hardware'],
  ['printer jams the paper tray and stops', 'hardware'],
  ['invoice total wrong charged twice invoice refund', 'billing'],
  ['invoice charged twice refund the invoice total', 'billing'],
  ['invoice refund charged twice total wrong', 'billing'],
];

function exportWith(dir: string, header: string, extra = (label: string) => label): string {
  const file = path.join(dir, 'tickets.csv');
  writeFileSync(file, [`body,${header}`, ...ROWS.map(([b, l]) => `${b},${extra(l)}`)].join('\n') + '\n');
  return file;
}

describe('matchColumn', () => {
  it('takes the exact name first, then the one case-insensitive match, and refuses two', () => {
    expect(matchColumn(['Kind', 'kind'], 'kind', 'truth')).toBe('kind');
    expect(matchColumn(['Category', 'x'], 'CATEGORY', 'truth')).toBe('Category');
    expect(matchColumn(['a'], 'b', 'truth')).toBeNull();
    expect(() => matchColumn(['Kind', 'KIND'], 'kind', 'truth')).toThrow('--truth "kind" matches 2 columns when case is ignored (Kind, KIND); give one exactly');
  });
});

describe('group --truth matches columns as --text and --id do', () => {
  it('finds "Category" for --truth CATEGORY and scores against it', async () => {
    const dir = tempDir();
    const run = await sheaf(['group', exportWith(dir, 'Category'), '--text', 'BODY', '--groups', '2', '--truth', 'CATEGORY', '--out', path.join(dir, 'o'), '--quiet', '--no-report']);
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    const evaluation = JSON.parse(readFileSync(path.join(dir, 'o', 'run.json'), 'utf8')).evaluation;
    expect(evaluation.field).toBe('Category');
    expect(evaluation.scored).toBe(6);
    // Two plainly separate themes: the groups are the categories.
    expect(evaluation.purity).toBe(1);
  });

  it('refuses a name two columns match when case is ignored', async () => {
    const dir = tempDir();
    const file = path.join(dir, 't.csv');
    writeFileSync(file, ['body,Kind,KIND', ...ROWS.map(([b, l]) => `${b},${l},${l}`)].join('\n') + '\n');
    const run = await sheaf(['group', file, '--text', 'body', '--groups', '2', '--truth', 'kind', '--out', path.join(dir, 'o'), '--quiet']);
    expect(run.stderr).toBe('sheaf: --truth "kind" matches 2 columns when case is ignored (Kind, KIND); give one exactly\n');
    expect(run.code).toBe(2);
  });
});

describe('evaluate --truth matches columns as --text and --id do', () => {
  const csv = 'id,group,Shape\n1,0,round\n2,0,round\n3,1,square\n4,1,square\n';
  it('finds "Shape" for --truth shape', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'd.csv'), csv);
    const run = await sheaf(['evaluate', 'd.csv', '--truth', 'shape', '--json'], { cwd: dir });
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    expect(JSON.parse(run.stdout).purity).toBe(1);
  });

  it('refuses a name two columns match when case is ignored', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'd.csv'), 'id,group,Shape,SHAPE\n1,0,a,a\n2,1,b,b\n');
    const run = await sheaf(['evaluate', 'd.csv', '--truth', 'shape'], { cwd: dir });
    expect(run.stderr).toBe('sheaf: --truth "shape" matches 2 columns when case is ignored (Shape, SHAPE); give one exactly\n');
    expect(run.code).toBe(2);
  });
});

describe('group --truth folder labels files by their first folder below the input folder', () => {
  function folderInput(dir: string): string {
    const root = path.join(dir, 'inbox');
    for (const [i, [text, label]] of ROWS.entries()) {
      // hardware/2026/… two levels down still counts as hardware.
      const sub = label === 'hardware' && i === 0 ? path.join(label, '2026') : label;
      mkdirSync(path.join(root, sub), { recursive: true });
      writeFileSync(path.join(root, sub, `t${i}.txt`), text + '\n');
    }
    writeFileSync(path.join(root, 'loose.txt'), 'printer invoice notes without a folder\n');
    return root;
  }

  it('scores against hardware / billing and leaves out the file directly in the input folder', async () => {
    const dir = tempDir();
    folderInput(dir);
    const run = await sheaf(['group', 'inbox', '--groups', '2', '--truth', 'folder', '--out', 'o', '--quiet', '--no-report'], { cwd: dir });
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    const evaluation = JSON.parse(readFileSync(path.join(dir, 'o', 'run.json'), 'utf8')).evaluation;
    expect(evaluation.field).toBe('folder');
    expect(evaluation.scored).toBe(6);
    expect(evaluation.left_out).toBe(1);
    expect(evaluation.contingency.map((c: { label: string; size: number }) => [c.label, c.size])).toEqual([
      ['billing', 3],
      ['hardware', 3],
    ]);
  });

  it('an export has no folders: --truth folder is an unknown column there', async () => {
    const dir = tempDir();
    const run = await sheaf(['group', exportWith(dir, 'category'), '--text', 'body', '--groups', '2', '--truth', 'folder', '--out', path.join(dir, 'o'), '--quiet']);
    expect(run.stderr).toBe('sheaf: --truth column "folder" is not in the input; its columns are: body, category\n');
    expect(run.code).toBe(2);
  });
});

describe('assign --model takes the output folder of a run', () => {
  it('reads model.json inside the folder, and says so when there is none', async () => {
    const dir = tempDir();
    const input = exportWith(dir, 'category');
    expect((await sheaf(['group', input, '--text', 'body', '--groups', '2', '--out', 'run', '--quiet', '--no-report'], { cwd: dir })).code).toBe(0);
    const run = await sheaf(['assign', input, '--model', 'run', '--text', 'body', '--out', 'a', '--json'], { cwd: dir });
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    expect(JSON.parse(run.stdout).documents).toBe(6);
    expect(JSON.parse(readFileSync(path.join(dir, 'a', 'run.json'), 'utf8')).model.file).toBe(path.join('run', 'model.json'));
    mkdirSync(path.join(dir, 'empty'));
    const none = await sheaf(['assign', input, '--model', 'empty', '--text', 'body', '--out', 'b'], { cwd: dir });
    expect(none.stderr).toBe('sheaf: --model empty is a folder with no model.json in it; name a model.json written by sheaf group, or the output folder of that run\n');
    expect(none.code).toBe(2);
  });
});
