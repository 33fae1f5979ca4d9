/**
 * The outputs every command shares come from one place: `--save-vectors`
 * writes the same three files wherever its help promises them, and run.json
 * starts with the same skeleton for group, duplicates and assign.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { sheaf, tempDir } from './helpers/cli.js';

const root = path.resolve(__dirname, '..');
const demoCsv = path.join(root, 'corpus-demo', 'tickets.csv');
const base = ['--text', 'subject,body', '--id', 'ticket_id'];

describe('shared outputs', () => {
  it('sheaf duplicates --save-vectors writes terms.txt beside vectors.mtx and ids.txt (its help promises the columns)', async () => {
    const dir = tempDir();
    const run = await sheaf(['duplicates', demoCsv, ...base, '--out', path.join(dir, 'o'), '--save-vectors', path.join(dir, 'v'), '--quiet']);
    expect(run.code).toBe(0);
    expect(readdirSync(path.join(dir, 'v')).filter((f) => !f.startsWith('.')).sort()).toEqual(['ids.txt', 'terms.txt', 'vectors.mtx']);
    const header = readFileSync(path.join(dir, 'v', 'vectors.mtx'), 'utf8').split('\n').find((l) => !l.startsWith('%'))!;
    const cols = Number(header.split(' ')[1]);
    const terms = readFileSync(path.join(dir, 'v', 'terms.txt'), 'utf8').trimEnd().split('\n');
    expect(terms).toHaveLength(cols);
    expect(readFileSync(path.join(dir, 'v', 'ids.txt'), 'utf8').trimEnd().split('\n')).toHaveLength(457);
  });

  it('run.json starts with the same skeleton in every command', async () => {
    const dir = tempDir();
    const g = await sheaf(['group', demoCsv, ...base, '--groups', '4', '--out', path.join(dir, 'g'), '--quiet', '--no-report']);
    const d = await sheaf(['duplicates', demoCsv, ...base, '--out', path.join(dir, 'd'), '--quiet']);
    const a = await sheaf(['assign', demoCsv, ...base, '--model', path.join(dir, 'g', 'model.json'), '--out', path.join(dir, 'a'), '--quiet']);
    expect([g.code, d.code, a.code]).toEqual([0, 0, 0]);
    for (const [folder, command] of [['g', 'group'], ['d', 'duplicates'], ['a', 'assign']] as const) {
      const r = JSON.parse(readFileSync(path.join(dir, folder, 'run.json'), 'utf8'));
      expect(Object.keys(r).slice(0, 6)).toEqual(['tool', 'command', 'startedAt', 'finishedAt', 'versions', 'inputs']);
      expect(r.command).toBe(command);
      expect(r.inputs[0].sha256).toMatch(/^[0-9a-f]{64}$/);
      expect(r.cleaning.mode).toBe('tickets');
    }
  });
});
