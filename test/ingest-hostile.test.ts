/**
 * Hostile inputs at the ingest edge (issue 10, cases 3, 8, 10, 12, 15, 17, 18;
 * issue 12 item 5 for title columns): each test failed before its fix.
 */
import { describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { Readable } from 'node:stream';
import { deflateSync } from 'node:zlib';
import { ingest } from '../src/ingest/index.js';
import { PDF_INFLATED_MAX, readPdf } from '../src/ingest/pdf.js';
import { sheaf } from './helpers/cli.js';
import { tmp, put, usage } from './helpers/files.js';

describe('rows nested very deep (case 10)', () => {
  const deep = (n: number): string => '{"text":"deep row","x":' + '['.repeat(n) + ']'.repeat(n) + '}';

  it('skips a JSON Lines row nested 10,000 deep with its line number, and reads the others', async () => {
    const cwd = tmp();
    put(cwd, 'rows.jsonl', ['{"text":"first row"}', deep(10000), '{"text":"third row"}'].join('\n') + '\n');
    const r = await ingest(['rows.jsonl'], {}, { cwd });
    expect(r.docs.map((d) => d.text)).toEqual(['first row', 'third row']);
    expect(r.docs.map((d) => d.id)).toEqual(['1', '3']);
    expect(r.skipped).toEqual([{ source: 'rows.jsonl:2', reason: 'nested deeper than 256 levels' }]);
  });

  it('skips a JSON array element nested 10,000 deep (objects inside objects too)', async () => {
    const cwd = tmp();
    const objDeep = '{"text":"deep object","x":' + '{"a":'.repeat(10000) + '1' + '}'.repeat(10000) + '}';
    put(cwd, 'rows.json', `[{"text":"first row"},${deep(10000)},${objDeep},{"text":"last row"}]`);
    const r = await ingest(['rows.json'], {}, { cwd });
    expect(r.docs.map((d) => d.text)).toEqual(['first row', 'last row']);
    expect(r.skipped).toEqual([
      { source: 'rows.json#2', reason: 'nested deeper than 256 levels' },
      { source: 'rows.json#3', reason: 'nested deeper than 256 levels' },
    ]);
  });

  it('keeps a row nested exactly 256 levels', async () => {
    const cwd = tmp();
    // The row object is level 1, so 255 brackets make 256 levels.
    put(cwd, 'rows.jsonl', deep(255) + '\n');
    const r = await ingest(['rows.jsonl'], {}, { cwd });
    expect(r.docs.length).toBe(1);
    expect(r.skipped).toEqual([]);
  });
});

const OTHER_FORMAT =
  "not a format sheaf reads; to read it, add a pattern such as --include '**/*' (unknown extensions are read as plain text)";
const SHEAF_WROTE = 'a folder sheaf wrote (an earlier output); never read as input';

describe('folders sheaf wrote are never read (case 12)', () => {
  it('skips an earlier output inside the input folder (marker file) and staging folders, naming each once', async () => {
    const cwd = tmp();
    put(cwd, 'notes/a.md', '# Alpha\n\nalpha notes\n');
    put(cwd, 'notes/out/.sheaf-output', 'This folder was written by sheaf\n');
    put(cwd, 'notes/out/report.html', '<html><body><p>an earlier report</p></body></html>');
    put(cwd, 'notes/out/deeper/summary.txt', 'an earlier summary');
    put(cwd, 'notes/.sheaf-tmp-out-1a2b3c/report.html', '<p>staged</p>');
    put(cwd, 'notes/sub/.sheaf-old-out-4d5e6f/notes.md', '# retired');
    put(cwd, 'notes/sub/b.txt', 'bravo text');
    const r = await ingest(['notes'], { include: ['**/*.{md,txt,html}', '.sheaf-tmp-*/**', 'sub/.sheaf-old-*/**'] }, { cwd });
    expect(r.docs.map((d) => d.source)).toEqual(['notes/a.md', 'notes/sub/b.txt']);
    expect(r.skipped).toEqual([
      { source: 'notes/.sheaf-tmp-out-1a2b3c', reason: SHEAF_WROTE },
      { source: 'notes/out', reason: SHEAF_WROTE },
      { source: 'notes/sub/.sheaf-old-out-4d5e6f', reason: SHEAF_WROTE },
    ]);
  });

  it('an output folder named as the input is skipped as a whole', async () => {
    const cwd = tmp();
    put(cwd, 'out/.sheaf-output', 'This folder was written by sheaf\n');
    put(cwd, 'out/report.html', '<p>an earlier report</p>');
    const err = await usage(ingest(['out'], {}, { cwd }));
    expect(err.message).toBe(`no readable documents in out; skipped out: ${SHEAF_WROTE}`);
  });
});

describe('files of other formats are listed (case 18)', () => {
  it('lists README, .rst, .gz and extensionless files as skipped with how to read them', async () => {
    const cwd = tmp();
    put(cwd, 'docs/a.md', '# Alpha\n\nalpha');
    put(cwd, 'docs/README', 'read me first');
    put(cwd, 'docs/guide.rst', 'Guide\n=====\n');
    put(cwd, 'docs/old/logs.gz', Buffer.from([0x1f, 0x8b, 0x08, 0x00]));
    put(cwd, 'docs/.env', 'SECRET=1'); // a dotfile: never read nor listed
    const r = await ingest(['docs'], {}, { cwd });
    expect(r.docs.map((d) => d.source)).toEqual(['docs/a.md']);
    expect(r.skipped).toEqual([
      { source: 'docs/README', reason: OTHER_FORMAT },
      { source: 'docs/guide.rst', reason: OTHER_FORMAT },
      { source: 'docs/old/logs.gz', reason: OTHER_FORMAT },
    ]);
  });

  it("the hint holds: --include '**/*' reads README and .rst as text and skips the .gz as binary", async () => {
    const cwd = tmp();
    put(cwd, 'docs/README', 'read me first');
    put(cwd, 'docs/guide.rst', 'Guide\n=====\n');
    put(cwd, 'docs/logs.gz', Buffer.from([0x1f, 0x8b, 0x08, 0x00, 0x00]));
    const r = await ingest(['docs'], { include: ['**/*'] }, { cwd });
    expect(r.docs.map((d) => d.source)).toEqual(['docs/README', 'docs/guide.rst']);
    expect(r.skipped).toEqual([{ source: 'docs/logs.gz', reason: 'binary: NUL bytes in the first 8 KiB' }]);
  });

  it('a folder with only other formats says so in its one-line error', async () => {
    const cwd = tmp();
    put(cwd, 'docs/README', 'read me first');
    const err = await usage(ingest(['docs'], {}, { cwd }));
    expect(err.message).toBe(
      "no documents in folder docs (looked for **/*.{txt,md,markdown,html,htm,pdf,docx,eml,mbox}); 1 file(s) of other formats not read, such as README: add --include '**/*' to read them as text",
    );
  });
});

describe('unreadable folders and names that are not UTF-8 (case 15)', () => {
  it('lists a subfolder that cannot be listed, with the reason', async () => {
    const cwd = tmp();
    put(cwd, 'notes/a.md', '# Alpha\n\nalpha');
    put(cwd, 'notes/locked/b.md', '# Bravo');
    const locked = path.join(cwd, 'notes', 'locked');
    const readdirFailure = (abs: string): NodeJS.ErrnoException | null =>
      abs === locked ? Object.assign(new Error('EACCES: permission denied'), { code: 'EACCES', syscall: 'scandir' }) : null;
    const r = await ingest(['notes'], {}, { cwd, readdirFailure });
    expect(r.docs.map((d) => d.source)).toEqual(['notes/a.md']);
    expect(r.skipped).toEqual([{ source: 'notes/locked', reason: 'folder unreadable: permission denied (EACCES); its files were not read' }]);
  });

  it('reads a file whose name is not valid UTF-8 by its raw name', async () => {
    const cwd = tmp();
    put(cwd, 'notes/a.md', '# Alpha\n\nalpha');
    const dir = Buffer.from(path.join(cwd, 'notes') + path.sep, 'utf8');
    writeFileSync(Buffer.concat([dir, Buffer.from('caf\xe9.txt', 'latin1')]), 'a note from the caf\u00e9');
    const r = await ingest(['notes'], {}, { cwd });
    expect(r.skipped).toEqual([]);
    expect(r.docs.map((d) => [d.source, d.text])).toEqual([
      ['notes/a.md', '# Alpha\n\nalpha'],
      ['notes/caf\ufffd.txt', 'a note from the caf\u00e9'],
    ]);
  });
});

/** A one-page PDF whose content stream (Flate) shows `text` and then `padding` spaces; offsets in the xref are exact. */
function paddedPdf(text: string, padding: number): Buffer {
  const content = deflateSync(Buffer.from(`BT /F1 12 Tf 72 720 Td (${text}) Tj ET\n${' '.repeat(padding)}`, 'latin1'));
  const parts: Buffer[] = [];
  const offsets: number[] = [];
  let at = 0;
  const add = (b: Buffer | string): void => {
    const buf = typeof b === 'string' ? Buffer.from(b, 'latin1') : b;
    parts.push(buf);
    at += buf.length;
  };
  add('%PDF-1.4\n');
  const obj = (n: number, body: string | Buffer[]): void => {
    offsets[n] = at;
    if (typeof body === 'string') add(`${n} 0 obj\n${body}\nendobj\n`);
    else {
      add(`${n} 0 obj\n`);
      for (const b of body) add(b);
      add('\nendobj\n');
    }
  };
  obj(1, '<< /Type /Catalog /Pages 2 0 R >>');
  obj(2, '<< /Type /Pages /Kids [3 0 R] /Count 1 >>');
  obj(3, '<< /Type /Page /Parent 2 0 R /MediaBox [0 0 612 792] /Contents 4 0 R /Resources << /Font << /F1 5 0 R >> >> >>');
  obj(4, [Buffer.from(`<< /Length ${content.length} /Filter /FlateDecode >>\nstream\n`, 'latin1'), content, Buffer.from('\nendstream', 'latin1')]);
  obj(5, '<< /Type /Font /Subtype /Type1 /BaseFont /Helvetica >>');
  const xref = at;
  add(`xref\n0 6\n0000000000 65535 f \n${[1, 2, 3, 4, 5].map((n) => `${String(offsets[n]).padStart(10, '0')} 00000 n \n`).join('')}`);
  add(`trailer\n<< /Size 6 /Root 1 0 R >>\nstartxref\n${xref}\n%%EOF\n`);
  return Buffer.concat(parts);
}

describe('PDF streams and devices are bounded (case 8)', () => {
  it('refuses a PDF whose content stream unpacks past the limit, before pdf.js reads it', async () => {
    const pdf = paddedPdf('Bounded text', 2 * 1024 * 1024);
    expect(pdf.length).toBeLessThan(10_000); // 2 MiB of spaces deflate to a few KiB
    await expect(readPdf(pdf, { inflatedMax: 1024 * 1024 })).rejects.toMatchObject({
      reason: 'PDF too large: its compressed streams unpack to more than 1048576 bytes (limit 1048576)',
    });
    // The same file under the default limit (512 MiB) is read.
    expect((await readPdf(pdf)).text).toBe('Bounded text');
    expect(PDF_INFLATED_MAX).toBe(512 * 1024 * 1024);
  });

  it('refuses a device named as an input in one line', async () => {
    const err = await usage(ingest(['/dev/zero'], {}, { cwd: tmp() }));
    expect(err.message).toBe('not a regular file, folder or pipe: /dev/zero');
  });

  it('stops an endless standard input at maxStreamBytes and says so', async () => {
    let sent = 0;
    const endless = new Readable({
      read(): void {
        sent += 4096;
        this.push(sent === 4096 ? 'id,text\n' + '1,more rows\n'.repeat(340) : '2,more rows\n'.repeat(341));
      },
    });
    const err = await usage(ingest(['-'], { maxStreamBytes: 65536 }, { cwd: tmp(), stdin: endless }));
    expect(err.message).toBe(
      'no readable documents in -; skipped stdin: stopped after 65536 bytes: a stream (standard input or a pipe) is read up to maxStreamBytes (65536 bytes); save it to a file to read it whole',
    );
    expect(sent).toBeLessThan(200_000);
  });
});

describe('devices on the command line (case 8)', () => {
  it('group and evaluate refuse /dev/zero with exit 2 and one line', async () => {
    const cwd = tmp();
    for (const argv of [['group', '/dev/zero', '--groups', '2', '--out', 'out'], ['evaluate', '/dev/zero', '--truth', 'label']]) {
      const r = await sheaf(argv, { cwd });
      expect(r.code).toBe(2);
      expect(r.stderr).toBe('sheaf: not a regular file, folder or pipe: /dev/zero\n');
    }
  });
});

describe('titles from a title-like column (issue 12 item 5)', () => {
  it('CSV: takes titles from a subject column when no title is named, and says which column', async () => {
    const cwd = tmp();
    put(cwd, 't.csv', 'id,Subject,body\n7,Instalment marked unpaid,"Good morning,\nmy instalment shows unpaid"\n8,,"Hi Hattie,\nthe card was declined"\n');
    const r = await ingest(['t.csv'], {}, { cwd });
    expect(r.docs.map((d) => d.title)).toEqual(['Instalment marked unpaid', 'Hi Hattie,']);
    expect(r.titleColumns).toEqual([{ source: 't.csv', column: 'Subject' }]);
    // A named title column wins and is not reported as guessed.
    const named = await ingest(['t.csv'], { title: 'id' }, { cwd });
    expect(named.docs.map((d) => d.title)).toEqual(['7', '8']);
    expect(named.titleColumns).toEqual([]);
  });

  it('JSON Lines: takes titles from a headline key; a summary that is the text is not the title', async () => {
    const cwd = tmp();
    put(cwd, 'a.jsonl', '{"headline":"Card declined abroad","text":"Hello,\\nmy card failed in Lisbon"}\n');
    put(cwd, 'b.jsonl', '{"summary":"Hello there,\\nthe app crashes"}\n');
    const r = await ingest(['a.jsonl', 'b.jsonl'], {}, { cwd });
    expect(r.docs.map((d) => d.title)).toEqual(['Card declined abroad', 'Hello there,']);
    expect(r.titleColumns).toEqual([{ source: 'a.jsonl', column: 'headline' }]);
  });
});

describe('rows merged by a stray quote (case 3)', () => {
  /** 60 rows; the body of row 11 (line 12) opens a quote that a stray quote in row 30 (line 31) closes. */
  function strayQuote(): string {
    const lines = ['id,body,team'];
    for (let i = 1; i <= 60; i++) {
      if (i === 11) lines.push(`${i},"unterminated body ${i},billing`);
      else if (i === 30) lines.push(`${i},stray quote",billing`);
      else lines.push(`${i},Ticket body number ${i},billing`);
    }
    return lines.join('\n') + '\n';
  }

  it('warns with the line numbers, lists the record as data and counts rows in against documents out', async () => {
    const cwd = tmp();
    put(cwd, 't.csv', strayQuote());
    const r = await ingest(['t.csv'], {}, { cwd });
    expect(r.docs.length).toBe(41);
    expect(r.warnings).toEqual([
      't.csv: lines 12–31 were read as one record: a quoted field runs over 19 lines shaped like rows of their own (a stray or missing quote?)',
      't.csv: 60 rows read as 41 documents',
    ]);
    expect(r.mergedRecords).toEqual([{ source: 't.csv', firstLine: 12, lastLine: 31, rowLike: 19 }]);
    expect(r.exportCounts).toEqual([{ source: 't.csv', rows: 60, documents: 41 }]);
  });

  it('does not warn for ticket bodies with a few line breaks of prose', async () => {
    const cwd = tmp();
    put(
      cwd,
      't.csv',
      'id,body,team\n' +
        '1,"Hello,\nI tried twice, no luck.\nThe card, again, was refused\n\nThanks, Ana",billing\n' +
        '2,"Hi team,\nthe app crashes on start\nregards",mobile\n' +
        '3,one line body,billing\n',
    );
    const r = await ingest(['t.csv'], {}, { cwd });
    expect(r.docs.map((d) => d.id)).toEqual(['1', '2', '3']);
    expect(r.warnings).toEqual([]);
    expect(r.mergedRecords).toEqual([]);
    expect(r.exportCounts).toEqual([{ source: 't.csv', rows: 3, documents: 3 }]);
  });

  it('counts JSON Lines rows against documents, skipped rows included', async () => {
    const cwd = tmp();
    put(cwd, 'r.jsonl', '{"text":"one"}\nnot json\n{"text":"three"}\n');
    const r = await ingest(['r.jsonl'], {}, { cwd });
    expect(r.exportCounts).toEqual([{ source: 'r.jsonl', rows: 3, documents: 2 }]);
  });
});

describe('NUL bytes in row exports (case 17)', () => {
  it('removes NULs early and late alike from a CSV, keeps every row and says how many', async () => {
    const cwd = tmp();
    const filler = Array.from({ length: 400 }, (_, i) => `${i + 3},filler row number ${i + 3}`).join('\n'); // pushes row 403 past 8 KiB
    put(cwd, 't.csv', `id,text\n1,early\u0000 nul\n2,plain row\n${filler}\n403,late\u0000\u0000 nul\n`);
    const r = await ingest(['t.csv'], {}, { cwd });
    expect(r.skipped).toEqual([]);
    expect(r.docs.length).toBe(403);
    expect(r.docs[0]?.text).toBe('early nul');
    expect(r.docs[402]?.text).toBe('late nul');
    expect(r.docs.some((d) => d.text.includes('\u0000'))).toBe(false);
    expect(r.warnings).toEqual(['t.csv: 3 NUL character(s) removed from the text (a NUL ends text in many programs)']);
  });

  it('does the same for JSON Lines on standard input', async () => {
    const stdin = Readable.from([Buffer.from('{"text":"a\u0000b"}\n{"text":"cd"}\n')]);
    const r = await ingest(['-'], {}, { cwd: tmp(), stdin });
    expect(r.docs.map((d) => d.text)).toEqual(['ab', 'cd']);
    expect(r.warnings).toEqual(['stdin: 1 NUL character(s) removed from the text (a NUL ends text in many programs)']);
  });

  it('still skips a file that is truly binary', async () => {
    const cwd = tmp();
    const bytes = Buffer.alloc(9000);
    for (let i = 0; i < bytes.length; i++) bytes[i] = (i * 37 + 11) % 256;
    put(cwd, 'noise.csv', bytes);
    put(cwd, 'zeros.csv', Buffer.alloc(9000));
    put(cwd, 'ok.csv', 'id,text\n1,fine\n');
    const r = await ingest(['noise.csv', 'zeros.csv', 'ok.csv'], {}, { cwd });
    expect(r.docs.map((d) => d.text)).toEqual(['fine']);
    expect(r.skipped.map((s) => s.source)).toEqual(['noise.csv', 'zeros.csv']);
    expect(r.skipped[1]?.reason).toBe('binary: 100% control characters in the first 8 KiB');
  });
});

describe('--max-stream-bytes on the command line (case 8)', () => {
  it('caps standard input and says so in one line, exit 2', async () => {
    const r = await sheaf(['group', '-', '--groups', '2', '--out', 'out', '--max-stream-bytes', '2048'], {
      cwd: tmp(),
      stdin: 'id,text\n' + '1,a row of text\n'.repeat(300),
    });
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n').at(-1)).toBe(
      'sheaf: no readable documents in -; skipped stdin: stopped after 2048 bytes: a stream (standard input or a pipe) is read up to --max-stream-bytes (2048 bytes); save it to a file to read it whole',
    );
  });
});
