/**
 * Ctrl-C on a real terminal while a progress bar is drawn (issue 15): the CLI,
 * built, runs under util-linux `script` (a pseudo-terminal, so stderr is a
 * TTY), reading an export from a named pipe the test feeds slowly; once the
 * bar has hidden the cursor, the test types Ctrl-C (byte 0x03, which the
 * terminal turns into SIGINT) and checks the bytes the terminal received:
 * after the last cursor-hide / wrap-off, the cursor is shown (ESC [?25h) and
 * line wrap is on again (ESC [?7h), then the one-line message, exit code 130.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import { closeSync, openSync, ftruncateSync, writeFileSync } from 'node:fs';
import { open } from 'node:fs/promises';
import path from 'node:path';
import { PDFDocument, StandardFonts } from 'pdf-lib';
import { buildForWorkers } from './helpers/build-workers.js';
import { tempDir } from './helpers/cli.js';

const HIDE_CURSOR = '\x1b[?25l';
const WRAP_OFF = '\x1b[?7l';
const SHOW_CURSOR = '\x1b[?25h';
const WRAP_ON = '\x1b[?7h';

function hasScript(): boolean {
  try {
    execFileSync('script', ['--version'], { stdio: 'pipe' });
    return true;
  } catch {
    return false;
  }
}

let built = '';

describe('Ctrl-C during a progress bar on a terminal', () => {
  beforeAll(() => {
    // `script` is part of util-linux (Debian: bsdutils); the check below fails loudly when it is missing.
    built = buildForWorkers('sheaf-tty-', ['src/cli/main.ts', 'src/analyze/natural.d.ts', 'src/analyze/stopword.d.ts']);
  }, 300_000);
  let feeding: NodeJS.Timeout | undefined;
  afterAll(() => clearInterval(feeding));

  it('shows the cursor and turns line wrap back on, then stops with 130', async () => {
    expect(hasScript()).toBe(true);
    const dir = tempDir();
    execFileSync('mkfifo', [path.join(dir, 'live.csv')]);
    // A second export of 20 MB (sparse, never read: the run is stopped first) gives the reading bar its total.
    writeFileSync(path.join(dir, 'later.csv'), '');
    const fd = openSync(path.join(dir, 'later.csv'), 'r+');
    ftruncateSync(fd, 20 * 1024 * 1024);
    closeSync(fd);
    const main = path.join(built, 'dist', 'cli', 'main.js');
    const env: Record<string, string> = { PATH: process.env.PATH ?? '/usr/bin:/bin', HOME: process.env.HOME ?? dir, TERM: 'xterm', SHELL: '/bin/sh' };
    const child = spawn('script', ['-q', '-e', '-c', `${process.execPath} ${main} group live.csv later.csv --text body --groups 2 --out o`, '/dev/null'], {
      cwd: dir,
      env,
      stdio: ['pipe', 'pipe', 'pipe'],
    });
    let screen = '';
    child.stdout.on('data', (b: Buffer) => (screen += b.toString('latin1')));
    child.stderr.on('data', (b: Buffer) => (screen += b.toString('latin1')));
    const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));

    // Feed the pipe slowly: a row every 100 ms, so reading lasts well past the bar's one-second delay.
    // Opened for reading and writing, so opening never waits for the reader (Linux fifo(7)).
    const pipe = await open(path.join(dir, 'live.csv'), 'r+');
    await pipe.write('id,body\n');
    let row = 0;
    feeding = setInterval(() => {
      row++;
      pipe.write(`${row},printer jams the paper tray again on floor ${row}\n`).catch(() => clearInterval(feeding));
    }, 100);

    const deadline = Date.now() + 60_000;
    while (!screen.includes(HIDE_CURSOR) && Date.now() < deadline) await new Promise((r) => setTimeout(r, 100));
    expect(screen).toContain(HIDE_CURSOR);
    expect(screen).toContain(WRAP_OFF);
    child.stdin.write('\x03'); // Ctrl-C, as typed
    const code = await exited;
    clearInterval(feeding);
    await pipe.close().catch(() => undefined);

    const lastHide = Math.max(screen.lastIndexOf(HIDE_CURSOR), screen.lastIndexOf(WRAP_OFF));
    const after = screen.slice(lastHide);
    expect(after).toContain(SHOW_CURSOR);
    expect(after).toContain(WRAP_ON);
    expect(after).toContain('sheaf: stopped by SIGINT');
    expect(after.indexOf(SHOW_CURSOR)).toBeLessThan(after.indexOf('sheaf: stopped by SIGINT'));
    expect(code).toBe(130);
  }, 120_000);
});

describe('stdout carries data only: --json with PDF inputs and optional packages omitted', () => {
  const root = path.resolve(__dirname, '..');
  const preload = path.join(root, 'test', 'fixtures', 'terminal', 'no-canvas.cjs');

  it('the environment reproduces the problem: pdf.js alone prints its warnings on stdout', () => {
    const r = spawnSync(process.execPath, ['--require', preload, '--input-type=module', '-e', "await import('pdfjs-dist/legacy/build/pdf.mjs')"], { cwd: root, encoding: 'utf8' });
    expect(r.stdout).toContain('Warning: Cannot load "@napi-rs/canvas" package');
  });

  it('group --json on PDFs (written by pdf-lib) prints JSON that parses, and nothing else', async () => {
    if (built === '') built = buildForWorkers('sheaf-tty-', ['src/cli/main.ts', 'src/analyze/natural.d.ts', 'src/analyze/stopword.d.ts']);
    const dir = tempDir();
    const texts = ['harbour tide boats report early', 'harbour tide boats report late', 'invoice refund charged twice', 'invoice refund charged again'];
    for (const [i, t] of texts.entries()) {
      const doc = await PDFDocument.create();
      const font = await doc.embedFont(StandardFonts.Helvetica);
      doc.addPage([600, 800]).drawText(t, { x: 50, y: 700, size: 12, font });
      writeFileSync(path.join(dir, `${i}.pdf`), await doc.save());
    }
    const main = path.join(built, 'dist', 'cli', 'main.js');
    const r = spawnSync(process.execPath, ['--require', preload, main, 'group', '.', '--groups', '2', '--json', '--out', 'o'], { cwd: dir, encoding: 'utf8', env: { PATH: process.env.PATH ?? '' } });
    expect(r.stdout).not.toContain('Warning:');
    const parsed = JSON.parse(r.stdout) as { groups: { size: number }[] };
    expect(parsed.groups.map((g) => g.size).sort()).toEqual([2, 2]);
    expect(r.status).toBe(0);
  }, 300_000);
});
