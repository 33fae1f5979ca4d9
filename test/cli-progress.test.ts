/**
 * Progress bars (issue 15): drawn on stderr only when it is a terminal and a
 * stage has run longer than a second; the terminal put back (cursor shown,
 * line wrap on) when a bar ends, on SIGINT/SIGTERM and on an error; the
 * k-means engine, the near-copy search and reading report progress as data.
 */
import { describe, expect, it } from 'vitest';
import { EventEmitter } from 'node:events';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { PROGRESS_DELAY_MS, SHOW_CURSOR, WRAP_ON, progressReporter, restoreTerminal } from '../src/cli/progress.js';
import { installStagingCleanup } from '../src/cli/signals.js';
import { runCli } from '../src/cli/program.js';
import { sphericalKMeans } from '../src/cluster/kmeans.js';
import { findDuplicates } from '../src/near-copies.js';
import { ingest } from '../src/ingest/index.js';
import { csrFromDense as fromDense } from './helpers/csr.js';
import { tempDir } from './helpers/cli.js';

const HIDE_CURSOR = '\x1b[?25l';
const WRAP_OFF = '\x1b[?7l';

/** A terminal-like stderr that records what is written, and a clock the test moves. */
function fakeTerminal() {
  let text = '';
  let clock = 0;
  const stderr = Object.assign(new EventEmitter(), {
    isTTY: true,
    columns: 80,
    rows: 24,
    write: (s: string) => ((text += s), true),
    cursorTo: (_x: number, _y?: number, cb?: () => void) => (cb?.(), true),
    clearLine: (_d: number, cb?: () => void) => (cb?.(), true),
    moveCursor: (_x: number, _y: number, cb?: () => void) => (cb?.(), true),
  });
  return {
    io: { stdout: { write: () => true, isTTY: false }, stderr, cwd: process.cwd(), env: {}, now: () => clock },
    text: () => text,
    tick: (ms: number) => (clock += ms),
  };
}

/** True when the cursor is shown and wrap is on after the last time a bar hid or turned it off. */
function restoredAfterLastHide(text: string): boolean {
  const hide = Math.max(text.lastIndexOf(HIDE_CURSOR), text.lastIndexOf(WRAP_OFF));
  return hide >= 0 && text.indexOf(SHOW_CURSOR, hide) > hide && text.indexOf(WRAP_ON, hide) > hide;
}

describe('progress bars', () => {
  it('draws nothing for a stage shorter than a second, and nothing when stderr is not a terminal or --quiet', () => {
    const t = fakeTerminal();
    const p = progressReporter(t.io, false);
    p.update('read', 0, 100);
    t.tick(PROGRESS_DELAY_MS - 1);
    p.update('read', 50, 100);
    p.done();
    expect(t.text()).toBe('');
    const quiet = fakeTerminal();
    const q = progressReporter(quiet.io, true);
    q.update('read', 0, 100);
    quiet.tick(5000);
    q.update('read', 1, 100);
    expect(quiet.text()).toBe('');
    const pipe = fakeTerminal();
    const r = progressReporter({ ...pipe.io, stderr: { write: pipe.io.stderr.write, isTTY: false } }, false);
    r.update('read', 0, 100);
    pipe.tick(5000);
    r.update('read', 1, 100);
    expect(pipe.text()).toBe('');
  });

  it('draws a bar once a stage has run a second, and shows the cursor and turns wrap back on when done', () => {
    const t = fakeTerminal();
    const p = progressReporter(t.io, false);
    p.update('k-means', 0, 300);
    t.tick(PROGRESS_DELAY_MS);
    p.update('k-means', 30, 300);
    expect(t.text()).toContain(HIDE_CURSOR);
    expect(t.text()).toContain(WRAP_OFF);
    expect(t.text()).toContain('k-means');
    expect(t.text()).toContain('30/300');
    expect(restoredAfterLastHide(t.text())).toBe(false);
    p.done();
    expect(restoredAfterLastHide(t.text())).toBe(true);
  });

  it('restores the terminal on SIGINT while a bar is drawn, then exits with 130', () => {
    const t = fakeTerminal();
    const signals = new EventEmitter();
    let code = -1;
    installStagingCleanup(signals, t.io.stderr, (c) => (code = c));
    const p = progressReporter(t.io, false);
    p.update('read', 0, 1000);
    t.tick(2000);
    p.update('read', 10, 1000);
    expect(restoredAfterLastHide(t.text())).toBe(false);
    signals.emit('SIGINT');
    expect(code).toBe(130);
    expect(restoredAfterLastHide(t.text())).toBe(true);
    expect(t.text().endsWith(`${SHOW_CURSOR}${WRAP_ON}sheaf: stopped by SIGINT\n`)).toBe(true);
    // Nothing left to restore: a second call writes nothing.
    const before = t.text();
    restoreTerminal();
    expect(t.text()).toBe(before);
  });

  it('restores the terminal when a command fails while its bar is drawn, before the one-line message', async () => {
    const t = fakeTerminal();
    const dir = tempDir();
    writeFileSync(path.join(dir, 'a.csv'), 'id,body\n1,some words here\n2,other words there\n');
    // Every read of the clock moves it two seconds on, so the reading bar is drawn at its first report.
    const io = { ...t.io, cwd: dir, now: () => t.tick(2000) };
    const code = await runCli(['group', 'a.csv', '--text', 'nosuch', '--groups', '2', '--out', 'o'], io);
    expect(code).toBe(2);
    const text = t.text();
    expect(text).toContain(HIDE_CURSOR);
    expect(restoredAfterLastHide(text)).toBe(true);
    expect(text.endsWith('\x1b[2Ksheaf: a.csv has no column "nosuch" for --text; its columns are: id, body\n')).toBe(true);
  });
});

describe('every command shows its long stages (a clock that moves two seconds at every look)', () => {
  /** Runs the CLI with a terminal stderr; returns the stage names drawn, stdout and the code. */
  async function drawn(argv: string[], cwd: string): Promise<{ stages: string[]; stdout: string; code: number; restored: boolean }> {
    const t = fakeTerminal();
    let stdout = '';
    const io = { ...t.io, cwd, now: () => t.tick(2000), stdout: { write: (s: string) => ((stdout += s), true), isTTY: false } };
    const code = await runCli(argv, io);
    const stages = [...new Set([...t.text().matchAll(/\x1b\[1G([a-z-]+) /g)].map((m) => m[1] as string))];
    return { stages, stdout, code, restored: restoredAfterLastHide(t.text()) };
  }

  it('group: read, analyze, k-means, near-copies; assign: read, assign; duplicates: read, analyze, near-copies; stdout data only', async () => {
    const dir = tempDir();
    const rows = ['printer jams paper tray', 'printer paper tray jams', 'invoice charged twice refund', 'invoice refund charged twice'];
    writeFileSync(path.join(dir, 't.csv'), ['id,body', ...rows.map((r, i) => `${i},${r}`)].join('\n') + '\n');
    const g = await drawn(['group', 't.csv', '--text', 'body', '--groups', '2', '--out', 'o', '--no-report', '--json'], dir);
    expect(g.code).toBe(0);
    expect(g.stages).toEqual(['read', 'analyze', 'k-means', 'near-copies']);
    expect(g.restored).toBe(true);
    expect(JSON.parse(g.stdout).groups).toHaveLength(2);
    const a = await drawn(['assign', 't.csv', '--model', 'o', '--text', 'body', '--out', 'a', '--json'], dir);
    expect(a.code).toBe(0);
    expect(a.stages).toEqual(['read', 'assign']);
    expect(JSON.parse(a.stdout).documents).toBe(4);
    const d = await drawn(['duplicates', 't.csv', '--text', 'body', '--out', 'd', '--json'], dir);
    expect(d.code).toBe(0);
    expect(d.stages).toEqual(['read', 'analyze', 'near-copies']);
    expect(d.restored).toBe(true);
    expect(JSON.parse(d.stdout).threshold).toBe(0.9);
  });
});

describe('progress as data from the library', () => {
  it('k-means reports every pass: restarts × maxIterations steps, ending at the total', () => {
    const m = fromDense([
      [1, 0, 0],
      [0.9, 0.1, 0],
      [0, 1, 0],
      [0, 0.9, 0.1],
      [0, 0, 1],
      [0.1, 0, 0.9],
    ]);
    const seen: [number, number][] = [];
    const withHook = sphericalKMeans(m, { groups: 3, seed: 4, restarts: 2, maxIterations: 10 }, (d, t) => seen.push([d, t]));
    const without = sphericalKMeans(m, { groups: 3, seed: 4, restarts: 2, maxIterations: 10 });
    // The hook changes nothing in the result.
    expect(Array.from(withHook.assignments)).toEqual(Array.from(without.assignments));
    expect(seen.every(([, t]) => t === 20)).toBe(true);
    expect(seen.at(-1)).toEqual([20, 20]);
    expect(seen).toContainEqual([10, 20]); // the first restart's end
    for (let i = 1; i < seen.length; i++) expect(seen[i][0]).toBeGreaterThanOrEqual(seen[i - 1][0]);
    // Passes actually run are reported one by one before each restart's end.
    expect(seen[0]).toEqual([1, 20]);
  });

  it('the near-copy search reports rows analysed and rows joined, each stage ending at its total', () => {
    const docs = ['printer jams paper tray', 'printer jams paper tray', 'invoice charged twice refund', 'invoice charged twice again'].map((text, i) => ({ id: String(i), source: 's', title: '', text, fields: new Map<string, string>() }));
    const seen: string[] = [];
    findDuplicates(docs, { threshold: 0.5 }, { progress: (stage, d, t) => seen.push(`${stage} ${d}/${t}`) });
    expect(seen).toEqual(['analyze 0/4', 'analyze 1/4', 'analyze 2/4', 'analyze 3/4', 'analyze 4/4', 'near-copies 0/8', 'near-copies 1/8', 'near-copies 2/8', 'near-copies 3/8', 'near-copies 4/8', 'near-copies 8/8']);
  });

  it('reading reports bytes: 0 of the total first, then every chunk, ending at the files’ size', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'a.txt'), 'twelve bytes');
    writeFileSync(path.join(dir, 'b.csv'), 'id,body\n1,hello\n');
    const seen: [number, number][] = [];
    await ingest(['a.txt', 'b.csv'], { text: ['body'] }, { cwd: dir, progress: (d, t) => seen.push([d, t]) });
    expect(seen[0]).toEqual([0, 12 + 16]);
    expect(seen.at(-1)).toEqual([28, 28]);
  });
});
