/**
 * The SHA-256 of each document file in run.json (`files[].sha256`, which
 * `sheaf organize` checks before copying) is taken from the bytes as they were
 * read for the grouping: each file is read once, a mailbox in a folder is
 * hashed once, and the digest is that of the bytes grouped even when the file
 * changes before run.json is written. Reference: node:crypto's SHA-256 of the
 * file's bytes.
 */
import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { createReadStream, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { ingest } from '../src/ingest/index.js';
import { runCli } from '../src/cli/program.js';
import { put, tmp } from './helpers/files.js';

const sha = (bytes: Buffer | string): string => createHash('sha256').update(bytes).digest('hex');
const MBOX = 'From ana@example.org Tue Nov  3 09:14:07 2026\nSubject: Boiler\n\nboiler pilot flame out\n\nFrom ben@example.org Tue Nov  3 10:02:00 2026\nSubject: Refund\n\nrefund of the invoice charge\n';

function pile(): string {
  const dir = tmp();
  put(dir, 'notes/a.txt', 'the boiler hums at night and the radiator is cold');
  put(dir, 'notes/b.txt', 'an invoice was charged twice, a refund please');
  put(dir, 'notes/inbox.mbox', MBOX);
  put(dir, 'c.txt', 'the parcel courier left the van at the depot');
  return dir;
}

describe('digests of the document files, taken while they are read', () => {
  it('ingest gives each document file’s SHA-256 by source, reading every file once', async () => {
    const dir = pile();
    const opened: string[] = [];
    const r = await ingest(['notes', 'c.txt'], {}, { cwd: dir, open: (abs) => (opened.push(path.relative(dir, abs)), createReadStream(abs)) });
    expect(opened.sort()).toEqual(['c.txt', path.join('notes', 'a.txt'), path.join('notes', 'b.txt'), path.join('notes', 'inbox.mbox')]);
    expect(r.fileDigests).toEqual(
      new Map([
        ['notes/a.txt', sha(readFileSync(path.join(dir, 'notes/a.txt')))],
        ['notes/b.txt', sha(readFileSync(path.join(dir, 'notes/b.txt')))],
        ['c.txt', sha(readFileSync(path.join(dir, 'c.txt')))],
      ]),
    );
  });

  it('run.json lists the digest of the bytes grouped, not of the file as it is when run.json is written', async () => {
    const dir = pile();
    const before = readFileSync(path.join(dir, 'notes/a.txt'));
    let calls = 0;
    const code = await runCli(['group', 'notes', 'c.txt', '--groups', '2', '--out', 'o', '--quiet', '--no-duplicates'], {
      stdout: { write: () => true, isTTY: false },
      stderr: { write: () => true, isTTY: false },
      cwd: dir,
      env: {},
      // The second reading of the clock ends the read stage: the file changes after it was read.
      now: () => (++calls === 2 && writeFileSync(path.join(dir, 'notes/a.txt'), 'changed after reading'), calls),
    });
    expect(code).toBe(0);
    const run = JSON.parse(readFileSync(path.join(dir, 'o', 'run.json'), 'utf8')) as { files: { id: string; path: string; sha256?: string }[] };
    expect(run.files).toEqual([
      { id: 'a.txt', path: path.join(dir, 'notes', 'a.txt'), sha256: sha(before) },
      { id: 'b.txt', path: path.join(dir, 'notes', 'b.txt'), sha256: sha(readFileSync(path.join(dir, 'notes/b.txt'))) },
      { id: 'c.txt', path: path.join(dir, 'c.txt'), sha256: sha(readFileSync(path.join(dir, 'c.txt'))) },
      // Messages of a mailbox are no files of their own: listed without a digest, as before.
      { id: 'inbox.mbox#1', path: path.join(dir, 'notes', 'inbox.mbox#1') },
      { id: 'inbox.mbox#2', path: path.join(dir, 'notes', 'inbox.mbox#2') },
    ]);
  });
});
