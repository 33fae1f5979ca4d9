/**
 * Output folders lose nothing (issue 10, cases 1, 2, 4, 13 and part of 16):
 * an input inside --out, a person's own files in an earlier output,
 * --save-vectors overlapping --out, staging folders left by a signal or a
 * dead process, and an --out that cannot be written.
 */
import { describe, expect, it } from 'vitest';
import { EventEmitter } from 'node:events';
import { spawn, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, readFileSync, readdirSync, symlinkSync, utimesSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { sheaf, tempDir } from './helpers/cli.js';
import {
  LEGACY_OUTPUT_FILES,
  MARKER,
  assertWritable,
  liveStagingFolders,
  manifestFiles,
  removeStaleStaging,
  writeOutput,
} from '../src/report/folder.js';
import { installStagingCleanup } from '../src/cli/signals.js';
import { checkOutputFolders } from '../src/cli/out-paths.js';
import type { CliIo } from '../src/cli/io.js';
import { UsageError } from '../src/util/errors.js';

/** Twelve short tickets on two invented themes (a ferry line's bookings and its lost property desk). */
function tinyCsv(): string {
  const rows = ['id,body'];
  for (let i = 0; i < 6; i++) rows.push(`b${i},"booking refund for the ferry ticket ${i}, refund the booking fare please"`);
  for (let i = 0; i < 6; i++) rows.push(`l${i},"lost umbrella left on deck ${i}, lost property desk found the umbrella"`);
  return rows.join('\n') + '\n';
}

/** A folder with tickets.csv and an earlier `group` output in prev/. */
async function earlierRun(): Promise<string> {
  const dir = tempDir();
  writeFileSync(path.join(dir, 'tickets.csv'), tinyCsv());
  const first = await sheaf(['group', 'tickets.csv', '--text', 'body', '--groups', '2', '--out', 'prev', '--quiet'], { cwd: dir });
  expect(first.code).toBe(0);
  return dir;
}

const groupArgs = ['--text', 'body', '--groups', '2'];

describe('an input inside the output folder (case 1)', () => {
  it('group refuses prev/tickets.csv --out prev before any work, and the file stays', async () => {
    const dir = await earlierRun();
    cpSync(path.join(dir, 'tickets.csv'), path.join(dir, 'prev', 'tickets.csv'));
    const before = readdirSync(path.join(dir, 'prev')).sort();
    const run = await sheaf(['group', 'prev/tickets.csv', ...groupArgs, '--out', 'prev'], { cwd: dir });
    expect(run.stderr).toBe('sheaf: input prev/tickets.csv lies inside the output folder prev, which this run would replace; move it or choose another --out\n');
    expect(run.code).toBe(2);
    expect(run.stdout).toBe('');
    expect(readdirSync(path.join(dir, 'prev')).sort()).toEqual(before);
    expect(readFileSync(path.join(dir, 'prev', 'tickets.csv'), 'utf8')).toBe(tinyCsv());
  });

  it('resolves symbolic links: a link outside to a file inside is refused', async () => {
    const dir = await earlierRun();
    cpSync(path.join(dir, 'tickets.csv'), path.join(dir, 'prev', 'tickets.csv'));
    symlinkSync(path.join(dir, 'prev', 'tickets.csv'), path.join(dir, 'link.csv'));
    const run = await sheaf(['group', 'link.csv', ...groupArgs, '--out', 'prev'], { cwd: dir });
    expect(run.stderr).toBe('sheaf: input link.csv lies inside the output folder prev, which this run would replace; move it or choose another --out\n');
    expect(run.code).toBe(2);
    // And an --out reached through a link to the folder holding the input.
    symlinkSync(path.join(dir, 'prev'), path.join(dir, 'alias'));
    const viaAlias = await sheaf(['group', 'prev/tickets.csv', ...groupArgs, '--out', 'alias'], { cwd: dir });
    expect(viaAlias.stderr).toBe('sheaf: input prev/tickets.csv lies inside the output folder alias, which this run would replace; move it or choose another --out\n');
    expect(existsSync(path.join(dir, 'prev', 'tickets.csv'))).toBe(true);
  });

  it('tree refuses an input folder that is the output folder', async () => {
    const dir = await earlierRun();
    const run = await sheaf(['tree', 'prev', '--out', 'prev', '--quiet'], { cwd: dir });
    expect(run.stderr).toBe('sheaf: input prev lies inside the output folder prev, which this run would replace; move it or choose another --out\n');
    expect(run.code).toBe(2);
  });

  it('assign refuses a --model inside its --out (the model would be replaced)', async () => {
    const dir = await earlierRun();
    const run = await sheaf(['assign', 'tickets.csv', '--text', 'body', '--model', 'prev/model.json', '--out', 'prev'], { cwd: dir });
    expect(run.stderr).toBe('sheaf: input prev/model.json lies inside the output folder prev, which this run would replace; move it or choose another --out\n');
    expect(run.code).toBe(2);
    expect(existsSync(path.join(dir, 'prev', 'model.json'))).toBe(true);
  });

  it('duplicates refuses an input inside its --save-vectors folder', async () => {
    const dir = await earlierRun();
    const vec = await sheaf(['group', 'tickets.csv', ...groupArgs, '--out', 'o', '--save-vectors', 'vec', '--quiet'], { cwd: dir });
    expect(vec.code).toBe(0);
    cpSync(path.join(dir, 'tickets.csv'), path.join(dir, 'vec', 'tickets.csv'));
    const run = await sheaf(['duplicates', 'vec/tickets.csv', '--text', 'body', '--out', 'd', '--save-vectors', 'vec'], { cwd: dir });
    expect(run.stderr).toBe('sheaf: input vec/tickets.csv lies inside the output folder vec, which this run would replace; move it or choose another --save-vectors\n');
    expect(run.code).toBe(2);
    expect(existsSync(path.join(dir, 'd'))).toBe(false);
  });
});

describe("a person's own files in an earlier output (case 2)", () => {
  it('writes a manifest of every file written into .sheaf-output', async () => {
    const dir = await earlierRun();
    const files = readdirSync(path.join(dir, 'prev')).filter((f) => f !== MARKER).sort();
    const manifest = JSON.parse(readFileSync(path.join(dir, 'prev', MARKER), 'utf8'));
    expect(manifest.sheaf).toBe('output folder');
    expect(manifest.files).toEqual(files);
    expect(files).toEqual(['documents.csv', 'duplicates.csv', 'duplicates.json', 'groups.json', 'model.json', 'near-copy-pairs.csv', 'report.html', 'run.json', 'tree.nwk']);
  });

  it('refuses and names a note the person added, and keeps every file', async () => {
    const dir = await earlierRun();
    writeFileSync(path.join(dir, 'prev', 'notes.txt'), 'call the harbour master');
    const before = readdirSync(path.join(dir, 'prev')).sort();
    const run = await sheaf(['group', 'tickets.csv', ...groupArgs, '--out', 'prev'], { cwd: dir });
    expect(run.stderr).toBe('sheaf: output folder prev holds notes.txt, which sheaf did not write; move it or choose another --out\n');
    expect(run.code).toBe(2);
    expect(readdirSync(path.join(dir, 'prev')).sort()).toEqual(before);
    expect(readFileSync(path.join(dir, 'prev', 'notes.txt'), 'utf8')).toBe('call the harbour master');
  });

  it('names a folder the person added, and a file in place of one sheaf wrote as a folder', async () => {
    const dir = await earlierRun();
    mkdirSync(path.join(dir, 'prev', 'drafts'));
    writeFileSync(path.join(dir, 'prev', 'drafts', 'a.txt'), 'x');
    const run = await sheaf(['group', 'tickets.csv', ...groupArgs, '--out', 'prev'], { cwd: dir });
    expect(run.stderr).toBe('sheaf: output folder prev holds drafts/, which sheaf did not write; move it or choose another --out\n');
    expect(run.code).toBe(2);
    const lib = tempDir();
    const out = path.join(lib, 'o');
    await writeOutput(out, new Map([['sub/x.txt', 'x']]));
    expect((await writeOutput(out, new Map([['sub/x.txt', 'y']]))).replaced).toBe(true);
    writeFileSync(path.join(out, 'sub', 'mine.txt'), 'mine');
    await expect(writeOutput(out, new Map([['sub/x.txt', 'z']]))).rejects.toThrow(
      new UsageError(`output folder ${out} holds sub/mine.txt, which sheaf did not write; move it or choose another --out`, 'out'),
    );
    expect(readFileSync(path.join(out, 'sub', 'x.txt'), 'utf8')).toBe('y');
  });

  it('replaces a folder holding only its own files and says so on stderr', async () => {
    const dir = await earlierRun();
    const run = await sheaf(['group', 'tickets.csv', ...groupArgs, '--out', 'prev'], { cwd: dir });
    expect(run.stderr).toBe('sheaf: replacing the earlier run in prev\n');
    expect(run.code).toBe(0);
    const fresh = await sheaf(['group', 'tickets.csv', ...groupArgs, '--out', 'new'], { cwd: dir });
    expect(fresh.stderr).toBe('');
    const lib = tempDir();
    expect((await writeOutput(path.join(lib, 'o'), new Map([['a.txt', 'a']]))).replaced).toBe(false);
    expect((await writeOutput(path.join(lib, 'o'), new Map([['b.txt', 'b']]))).replaced).toBe(true);
    expect(readdirSync(path.join(lib, 'o')).sort()).toEqual([MARKER, 'b.txt']);
  });

  it('reads a marker without a manifest (earlier versions) as listing only the file names sheaf could write', async () => {
    expect(manifestFiles('This folder was written by sheaf; sheaf may replace it on the next run.\n')).toBe(LEGACY_OUTPUT_FILES);
    const dir = tempDir();
    writeFileSync(path.join(dir, 'tickets.csv'), tinyCsv());
    mkdirSync(path.join(dir, 'old'));
    writeFileSync(path.join(dir, 'old', MARKER), 'This folder was written by sheaf; sheaf may replace it on the next run.\n');
    writeFileSync(path.join(dir, 'old', 'documents.csv'), 'id\n');
    writeFileSync(path.join(dir, 'old', 'run.json'), '{}\n');
    const ok = await sheaf(['group', 'tickets.csv', ...groupArgs, '--out', 'old'], { cwd: dir });
    expect(ok.stderr).toBe('sheaf: replacing the earlier run in old\n');
    expect(ok.code).toBe(0);
    writeFileSync(path.join(dir, 'old', MARKER), 'This folder was written by sheaf; sheaf may replace it on the next run.\n');
    writeFileSync(path.join(dir, 'old', 'budget.xlsx'), 'numbers');
    const refused = await sheaf(['group', 'tickets.csv', ...groupArgs, '--out', 'old'], { cwd: dir });
    expect(refused.stderr).toBe('sheaf: output folder old holds budget.xlsx, which sheaf did not write; move it or choose another --out\n');
    expect(refused.code).toBe(2);
  });
});

describe('--save-vectors overlapping --out (case 4)', () => {
  const cases: [string, string[], string][] = [
    ['the same folder', ['--out', 'o', '--save-vectors', 'o'], 'sheaf: --save-vectors o and --out o overlap (the same folder, or one inside the other); choose two separate folders\n'],
    ['vectors inside --out', ['--out', 'o', '--save-vectors', 'o/vec'], 'sheaf: --save-vectors o/vec and --out o overlap (the same folder, or one inside the other); choose two separate folders\n'],
    ['--out inside the vectors', ['--out', 'v/o', '--save-vectors', 'v'], 'sheaf: --save-vectors v and --out v/o overlap (the same folder, or one inside the other); choose two separate folders\n'],
    ['the same folder spelled two ways', ['--out', 'o', '--save-vectors', './x/../o/'], 'sheaf: --save-vectors ./x/../o/ and --out o overlap (the same folder, or one inside the other); choose two separate folders\n'],
  ];
  for (const command of ['group', 'duplicates']) {
    for (const [what, flags, message] of cases) {
      it(`${command}: ${what}`, async () => {
        const dir = tempDir();
        writeFileSync(path.join(dir, 'tickets.csv'), tinyCsv());
        const args = command === 'group' ? groupArgs : ['--text', 'body'];
        const run = await sheaf([command, 'tickets.csv', ...args, ...flags], { cwd: dir });
        expect(run.stderr).toBe(message);
        expect(run.code).toBe(2);
        expect(readdirSync(dir)).toEqual(['tickets.csv']);
      });
    }
  }
});

describe('a --save-vectors folder sheaf did not write', () => {
  it('is refused naming --save-vectors, and the error names option saveVectors (was out)', async () => {
    const dir = tempDir();
    mkdirSync(path.join(dir, 'v'));
    writeFileSync(path.join(dir, 'v', 'mine.txt'), 'my own file');
    const io = { cwd: dir, stderr: { write: () => true } } as unknown as CliIo;
    const err = await checkOutputFolders({ inputs: [], out: 'o', saveVectors: 'v' }, io).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(UsageError);
    expect((err as UsageError).message).toBe('output folder v already exists and was not written by sheaf; choose another --save-vectors or empty it');
    expect((err as UsageError).option).toBe('saveVectors');
    expect(readdirSync(path.join(dir, 'v'))).toEqual(['mine.txt']);
  });
});

describe('staging folders after a signal or a dead process (case 13)', () => {
  /** The pid of a process that has ended. */
  function deadPid(): number {
    const r = spawnSync(process.execPath, ['-e', '']);
    expect(r.status).toBe(0);
    return r.pid as number;
  }

  it('a later write removes staging folders whose process is gone, and keeps live ones', async () => {
    const dir = tempDir();
    const dead = deadPid();
    const stale = path.join(dir, `.sheaf-tmp-o-p${dead}-0123456789ab`);
    mkdirSync(stale);
    writeFileSync(path.join(stale, 'documents.csv'), 'personal data');
    mkdirSync(path.join(dir, `.sheaf-tmp-o-p${dead}-probe`)); // a writability probe of a killed run
    const liveOne = path.join(dir, `.sheaf-tmp-o-p${process.ppid}-0123456789ab`);
    mkdirSync(liveOne);
    const otherTarget = path.join(dir, `.sheaf-tmp-other-p${dead}-0123456789ab`);
    mkdirSync(otherTarget);
    const legacyOld = path.join(dir, '.sheaf-tmp-o-aaaaaaaaaaaa');
    mkdirSync(legacyOld);
    const twoHoursAgo = new Date(Date.now() - 2 * 3600 * 1000);
    utimesSync(legacyOld, twoHoursAgo, twoHoursAgo);
    const legacyYoung = path.join(dir, '.sheaf-tmp-o-bbbbbbbbbbbb');
    mkdirSync(legacyYoung);
    await writeOutput(path.join(dir, 'o'), new Map([['a.txt', 'a']]));
    expect(readdirSync(dir).sort()).toEqual(
      [path.basename(legacyYoung), path.basename(liveOne), path.basename(otherTarget), 'o'].sort(),
    );
  });

  it('puts back an earlier run a dead process had swapped out when the target is missing', async () => {
    const dir = tempDir();
    const old = path.join(dir, `.sheaf-old-o-p${deadPid()}-0123456789ab`);
    mkdirSync(old);
    writeFileSync(path.join(old, MARKER), 'x');
    expect(await removeStaleStaging(path.join(dir, 'o'))).toEqual([old]);
    expect(readdirSync(dir)).toEqual(['o']);
    expect(readdirSync(path.join(dir, 'o'))).toEqual([MARKER]);
  });

  it('SIGINT in the middle of staging removes the staging folder and exits 130 (handler in-process)', async () => {
    const dir = tempDir();
    const signals = new EventEmitter();
    let stderr = '';
    let exitCode: number | null = null;
    installStagingCleanup(signals, { write: (s: string) => (stderr += s) }, (c) => (exitCode = c));
    let seenWhileStaging: string[] = [];
    let afterSignal: string[] = [];
    function* rows(): Generator<string> {
      yield 'id,text\n';
      seenWhileStaging = readdirSync(dir).filter((f) => f.startsWith('.sheaf-tmp-'));
      expect(liveStagingFolders()).toEqual(seenWhileStaging.map((f) => path.join(dir, f)));
      signals.emit('SIGINT');
      afterSignal = readdirSync(dir);
      yield 'r1,personal\n';
    }
    await expect(writeOutput(path.join(dir, 'o'), new Map<string, Iterable<string>>([['documents.csv', rows()], ['run.json', ['{}']]]))).rejects.toThrow(`writing ${path.join(dir, 'o')} was stopped`);
    expect(seenWhileStaging).toHaveLength(1);
    expect(seenWhileStaging[0]).toMatch(new RegExp(`^\\.sheaf-tmp-o-p${process.pid}-[0-9a-f]{12}$`));
    expect(afterSignal).toEqual([]);
    expect(exitCode).toBe(130);
    expect(stderr).toBe('sheaf: stopped by SIGINT; the unfinished output was removed\n');
    expect(readdirSync(dir)).toEqual([]);
    expect(liveStagingFolders()).toEqual([]);
  });
  it('SIGINT to the built CLI while it stages: exit 130 and no .sheaf-tmp-* folder left (child process, dist/)', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'tickets.csv'), tinyCsv());
    // The preload holds the swap of the staging folder into place, so the signal surely lands while staging.
    const hold = path.join(__dirname, 'helpers', 'hold-swap.mjs');
    const main = path.resolve(__dirname, '..', 'dist', 'cli', 'main.js');
    const child = spawn(process.execPath, ['--import', hold, main, 'group', 'tickets.csv', ...groupArgs, '--out', 'o', '--quiet'], { cwd: dir, stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (b: Buffer) => (stderr += b.toString()));
    let finished = false;
    const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => ((finished = true), resolve(code))));
    // Wait for a staging folder holding every output file (run.json is written last): the run is then held just
    // before the swap. The folder list is read afresh each time: the writability probe made before the work is a
    // short-lived folder of the same prefix, and waiting inside it would wait for ever.
    let staged: string[] = [];
    while (staged.length === 0 && !finished) {
      staged = readdirSync(dir).filter((f) => f.startsWith('.sheaf-tmp-o-') && existsSync(path.join(dir, f, 'run.json')));
      if (staged.length === 0) await new Promise((r) => setTimeout(r, 20));
    }
    expect(staged).toHaveLength(1);
    expect(finished).toBe(false);
    child.kill('SIGINT');
    expect(await exited).toBe(130);
    expect(stderr).toBe('sheaf: stopped by SIGINT; the unfinished output was removed\n');
    expect(readdirSync(dir)).toEqual(['tickets.csv']);
  }, 60_000);
});

describe('an --out that cannot be written (case 16, part)', () => {
  it('refuses before the work when the folder above --out is a file', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'tickets.csv'), tinyCsv());
    writeFileSync(path.join(dir, 'f.txt'), 'a file');
    const run = await sheaf(['group', 'tickets.csv', ...groupArgs, '--out', 'f.txt/o'], { cwd: dir });
    expect(run.stderr).toBe(`sheaf: cannot write --out f.txt/o (${path.join(dir, 'f.txt')} is not a folder); choose another --out\n`);
    expect(run.code).toBe(2);
  });

  it('turns a refused probe (EACCES, as a read-only folder gives a non-root user) into one line', async () => {
    // Tests run as root here, where chmod does not stop writes: the error is injected.
    const dir = tempDir();
    const denied = (): Promise<never> => Promise.reject(Object.assign(new Error('EACCES: permission denied'), { code: 'EACCES' }));
    await expect(assertWritable(path.join(dir, 'new', 'o'), 'new/o', '--out', 'out', { mkdir: denied, writeFile: async () => undefined })).rejects.toThrow(
      new UsageError('cannot write --out new/o (EACCES); choose another --out', 'out'),
    );
    mkdirSync(path.join(dir, 'ro'));
    await expect(assertWritable(path.join(dir, 'ro'), 'ro', '--save-vectors', 'saveVectors', { mkdir: async () => undefined, writeFile: denied })).rejects.toThrow(
      new UsageError('cannot write --save-vectors ro (EACCES); choose another --save-vectors', 'saveVectors'),
    );
    // The real calls leave nothing behind.
    await assertWritable(path.join(dir, 'ro'), 'ro', '--out', 'out');
    expect(readdirSync(dir)).toEqual(['ro']);
    expect(readdirSync(path.join(dir, 'ro'))).toEqual([]);
  });
});
