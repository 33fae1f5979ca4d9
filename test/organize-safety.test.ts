/**
 * `sheaf organize` under hostile conditions: links planted inside --into are
 * never followed, only the run's own input files (same SHA-256, under its
 * recorded inputs) are copied, and a file that cannot be placed is skipped
 * with its reason while the rest go on.
 */
import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, readdirSync, symlinkSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { sheaf, tempDir } from './helpers/cli.js';
import { groupFolderName } from '../src/cli/organize.js';

const HEAT = 'heater boiler radiator cabin cold night warm';
const ROPE = 'mooring rope lock gate canal water level';

/** A folder of 8 small notes on two themes; extra files by relative path. */
function notes(dir: string, extra: Record<string, string> = {}): void {
  for (let i = 0; i < 4; i++) {
    writeFileSync(path.join(dir, `heat-${i}.txt`), `${HEAT} note${i}\n`);
    writeFileSync(path.join(dir, `rope-${i}.txt`), `${ROPE} note${i}\n`);
  }
  for (const [rel, text] of Object.entries(extra)) {
    mkdirSync(path.dirname(path.join(dir, rel)), { recursive: true });
    writeFileSync(path.join(dir, rel), text);
  }
}

async function grouped(extra: Record<string, string> = {}): Promise<{ dir: string; folderOf: (id: string) => string }> {
  const dir = tempDir();
  mkdirSync(path.join(dir, 'in'));
  notes(path.join(dir, 'in'), extra);
  const g = await sheaf(['group', 'in', '--groups', '2', '--out', 'run', '--quiet', '--no-report', '--no-duplicates'], { cwd: dir });
  expect(g.stderr).toBe('');
  expect(g.code).toBe(0);
  const rows = parse(readFileSync(path.join(dir, 'run', 'documents.csv')), { columns: true, bom: true }) as Record<string, string>[];
  const byId = new Map(rows.map((r) => [r.id, r]));
  const folderOf = (id: string): string => {
    const r = byId.get(id) as Record<string, string>;
    return groupFolderName(Number(r.group), r.label, 2);
  };
  return { dir, folderOf };
}

describe('organize never writes through a link inside --into', () => {
  it('skips the files whose group folder is a planted link, copies the rest, writes nothing outside', async () => {
    const { dir, folderOf } = await grouped();
    const outside = path.join(dir, 'outside');
    mkdirSync(outside);
    mkdirSync(path.join(dir, 'sorted'));
    const trapped = folderOf('heat-0.txt');
    symlinkSync(outside, path.join(dir, 'sorted', trapped));
    const r = await sheaf(['organize', 'run', '--into', 'sorted'], { cwd: dir });
    expect(r.code).toBe(0);
    expect(readdirSync(outside)).toEqual([]);
    const inTrap = ['heat-0.txt', 'heat-1.txt', 'heat-2.txt', 'heat-3.txt', 'rope-0.txt', 'rope-1.txt', 'rope-2.txt', 'rope-3.txt'].filter((id) => folderOf(id) === trapped);
    expect(inTrap.length).toBeGreaterThan(0);
    expect(r.stdout).toBe(`${8 - inTrap.length} file(s) copied into sorted; ${inTrap.length} skipped.\n`);
    expect(r.stderr.split('\n').filter((l) => l !== '').sort()).toEqual(
      inTrap.map((id) => `sheaf: skipped sorted/${trapped}/${id}: sorted/${trapped} is a link; links inside --into are never followed`).sort(),
    );
  });

  it('never writes through a link planted at a file name', async () => {
    const { dir, folderOf } = await grouped();
    const secret = path.join(dir, 'precious.txt');
    writeFileSync(secret, 'keep me\n');
    mkdirSync(path.join(dir, 'sorted', folderOf('rope-1.txt')), { recursive: true });
    symlinkSync(secret, path.join(dir, 'sorted', folderOf('rope-1.txt'), 'rope-1.txt'));
    const r = await sheaf(['organize', 'run', '--into', 'sorted'], { cwd: dir });
    expect(r.code).toBe(0);
    expect(readFileSync(secret, 'utf8')).toBe('keep me\n');
    expect(r.stdout).toBe('7 file(s) copied into sorted; 1 skipped.\n');
    expect(r.stderr).toBe(`sheaf: skipped sorted/${folderOf('rope-1.txt')}/rope-1.txt: already exists (never overwritten)\n`);
  });
});

describe('organize copies only the run\'s own input files', () => {
  it('refuses a path run.json was made to name outside the inputs, even with its right digest', async () => {
    const { dir } = await grouped();
    const secret = path.join(dir, 'shadow');
    writeFileSync(secret, 'root:secret\n');
    const runFile = path.join(dir, 'run', 'run.json');
    const run = JSON.parse(readFileSync(runFile, 'utf8'));
    // Every file the run read has its SHA-256 recorded.
    for (const f of run.files) expect(f.sha256).toBe(createHash('sha256').update(readFileSync(f.path)).digest('hex'));
    run.files.push({ id: 'shadow', path: secret, sha256: createHash('sha256').update('root:secret\n').digest('hex') });
    writeFileSync(runFile, JSON.stringify(run));
    const r = await sheaf(['organize', 'run', '--into', 'sorted'], { cwd: dir });
    expect(r.code).toBe(0);
    expect(r.stdout).toBe('8 file(s) copied into sorted; 1 skipped.\n');
    expect(r.stderr).toBe('sheaf: skipped shadow: not under an input of the run; not copied\n');
    expect(existsSync(path.join(dir, 'sorted', 'no group', 'shadow'))).toBe(false);
  });

  it('skips an input file changed since the run, and a link swapped in under the inputs', async () => {
    const { dir } = await grouped();
    writeFileSync(path.join(dir, 'in', 'heat-2.txt'), 'something else entirely\n');
    const secret = path.join(dir, 'shadow');
    writeFileSync(secret, `${ROPE} note3\n`); // the same bytes as rope-3.txt, so its digest matches
    const { rmSync } = await import('node:fs');
    rmSync(path.join(dir, 'in', 'rope-3.txt'));
    symlinkSync(secret, path.join(dir, 'in', 'rope-3.txt'));
    const r = await sheaf(['organize', 'run', '--into', 'sorted'], { cwd: dir });
    expect(r.code).toBe(0);
    expect(r.stdout).toBe('6 file(s) copied into sorted; 2 skipped.\n');
    expect(r.stderr.split('\n').filter((l) => l !== '').sort()).toEqual([
      'sheaf: skipped in/heat-2.txt: changed since the run (SHA-256 differs from run.json); not copied',
      'sheaf: skipped in/rope-3.txt: not under an input of the run; not copied',
    ]);
  });
});

describe('organize goes on past files it cannot place', () => {
  it('skips the files of a group whose folder name is taken by a file (EEXIST), copies the others', async () => {
    const { dir, folderOf } = await grouped();
    mkdirSync(path.join(dir, 'sorted'));
    const blocked = folderOf('rope-0.txt');
    writeFileSync(path.join(dir, 'sorted', blocked), 'a file, not a folder\n');
    const r = await sheaf(['organize', 'run', '--into', 'sorted'], { cwd: dir });
    expect(r.code).toBe(0);
    const ids = ['heat-0.txt', 'heat-1.txt', 'heat-2.txt', 'heat-3.txt', 'rope-0.txt', 'rope-1.txt', 'rope-2.txt', 'rope-3.txt'];
    const lost = ids.filter((id) => folderOf(id) === blocked);
    expect(r.stdout).toBe(`${8 - lost.length} file(s) copied into sorted; ${lost.length} skipped.\n`);
    expect(r.stderr.split('\n').filter((l) => l !== '').sort()).toEqual(
      lost.map((id) => `sheaf: skipped sorted/${blocked}/${id}: sorted/${blocked} is a file where its folder goes`).sort(),
    );
    for (const id of ids.filter((x) => folderOf(x) !== blocked)) expect(existsSync(path.join(dir, 'sorted', folderOf(id), id))).toBe(true);
  });

  it('skips a file whose path would be too long (ENAMETOOLONG), copies the others', async () => {
    // A note five folders deep (80-character names): fine where it is, too long under a deep --into.
    const seg = 'n'.repeat(79);
    const deepId = `${seg}1/${seg}2/${seg}3/${seg}4/${seg}5/deep.txt`;
    const { dir, folderOf } = await grouped({ [deepId]: `${HEAT} deep\n` });
    const into = path.join(dir, ...Array.from({ length: 20 }, (_, i) => `${'d'.repeat(180)}${i}`));
    expect(into.length).toBeGreaterThan(3600);
    expect(into.length + 1 + folderOf(deepId).length + 1 + deepId.length).toBeGreaterThan(4096);
    mkdirSync(into, { recursive: true });
    const r = await sheaf(['organize', 'run', '--into', into, '--quiet'], { cwd: dir });
    expect(r.code).toBe(0);
    expect(r.stdout).toBe(`8 file(s) copied into ${into}; 1 skipped.\n`);
    const quietless = await sheaf(['organize', 'run', '--into', into], { cwd: dir });
    expect(quietless.stderr.split('\n').filter((l) => l.includes('deep.txt'))).toEqual([
      `sheaf: skipped ${path.relative(dir, path.join(into, folderOf(deepId), ...deepId.split('/')))}: the path is too long for the file system`,
    ]);
  });
});
