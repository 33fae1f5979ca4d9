import { describe, expect, it } from 'vitest';
import { createReadStream, symlinkSync } from 'node:fs';
import path from 'node:path';
import fc from 'fast-check';
import iconv from 'iconv-lite';
import { PDFDocument, StandardFonts } from 'pdf-lib';
import { Document, Packer, Paragraph } from 'docx';
import { ingest, truncateUtf8, type IngestIo } from '../src/ingest/index.js';
import { readDocumentBytes } from '../src/ingest/documents.js';
import { decodeBuffer, InputSkip } from '../src/ingest/decode.js';
import { readMail } from '../src/ingest/mail.js';
import { createAnalyzer } from '../src/analyze/index.js';
import { cleanDocuments } from '../src/clean/index.js';
import { UsageError } from '../src/util/errors.js';
import { tmp, put } from './helpers/files.js';

async function onePagePdf(text: string): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  const font = await doc.embedFont(StandardFonts.Helvetica);
  doc.addPage([400, 400]).drawText(text, { x: 20, y: 350, size: 12, font });
  return doc.save();
}

async function oneParagraphDocx(text: string): Promise<Buffer> {
  return Packer.toBuffer(new Document({ sections: [{ children: [new Paragraph({ text })] }] }));
}

/** An /Encrypt dictionary whose password checks fail: pdf.js asks for a password. */
function lockedPdf(): Buffer {
  const body = [
    '%PDF-1.4',
    '1 0 obj << /Type /Catalog /Pages 2 0 R >> endobj',
    '2 0 obj << /Type /Pages /Kids [] /Count 0 >> endobj',
    `3 0 obj << /Filter /Standard /V 1 /R 2 /O <${'11'.repeat(32)}> /U <${'22'.repeat(32)}> /P -44 >> endobj`,
  ].join('\n');
  const xref = body.length + 1;
  const offsets = [9, body.indexOf('2 0 obj'), body.indexOf('3 0 obj')];
  return Buffer.from(
    `${body}\nxref\n0 4\n0000000000 65535 f \n${offsets.map((o) => `${String(o).padStart(10, '0')} 00000 n \n`).join('')}` +
      `trailer << /Size 4 /Root 1 0 R /Encrypt 3 0 R /ID [<00112233445566778899aabbccddeeff> <00112233445566778899aabbccddeeff>] >>\nstartxref\n${xref}\n%%EOF\n`,
    'latin1',
  );
}

describe('the bad-input battery: every bad file is a skip or a warning naming it, and the run goes on', () => {
  it('one run over a folder and exports full of trouble', async () => {
    const cwd = tmp();
    const f = path.join(cwd, 'pile');
    put(f, 'good.txt', 'The mooring lines chafe at the stern.');
    put(f, 'paper.pdf', await onePagePdf('Tidal flow under the north bridge.'));
    put(f, 'memo.docx', await oneParagraphDocx('Paint the hull before May.'));
    put(f, 'latin.txt', iconv.encode('Le réservoir d’eau fuit à l’arrière.', 'windows-1252'));
    put(f, 'wide.txt', Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('Wide text from an old editor.', 'utf16le')]));
    put(f, 'image.txt', Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d, 0x49, 0x48, 0x44, 0x52]));
    put(f, 'zero.md', '');
    put(f, 'secret.txt', 'locked away');
    put(f, 'broken.pdf', '%PDF-1.5\n1 0 obj << /Type /Catalog');
    put(f, 'locked.pdf', lockedPdf());
    put(f, 'fake.docx', 'this is not a zip archive');
    symlinkSync('..', path.join(f, 'loop')); // a link loop
    put(cwd, 'quote.csv', 'id,text\n1,"opened and never closed\n2,lost\n');
    put(cwd, 'ragged.csv', 'id,text,extra\n1,short row\n2,long row,x,y\n3,fine,z\n');
    put(cwd, 'dupes.csv', 'id,text\nA,first\nA,second\n');
    const io: IngestIo = {
      cwd,
      open: (abs) => {
        if (abs.endsWith('secret.txt')) {
          const e = Object.assign(new Error(`EACCES: permission denied, open '${abs}'`), { code: 'EACCES', syscall: 'open' });
          return (async function* () {
            throw e;
          })();
        }
        return createReadStream(abs);
      },
    };
    const r = await ingest(['pile', 'quote.csv', 'ragged.csv', 'dupes.csv'], { id: 'id' }, io);
    expect(r.docs.map((d) => [d.id, d.text])).toEqual([
      ['good.txt', 'The mooring lines chafe at the stern.'],
      ['latin.txt', 'Le réservoir d’eau fuit à l’arrière.'],
      ['memo.docx', 'Paint the hull before May.'],
      ['paper.pdf', 'Tidal flow under the north bridge.'],
      ['wide.txt', 'Wide text from an old editor.'],
      ['1', 'short row'],
      ['2', 'long row'],
      ['3', 'fine'],
      ['A', 'first'],
      ['A~2', 'second'],
    ]);
    expect(r.skipped).toEqual([
      { source: 'pile/broken.pdf', reason: 'broken PDF: Invalid PDF structure' },
      { source: 'pile/fake.docx', reason: 'not a DOCX: not a zip archive' },
      { source: 'pile/image.txt', reason: 'binary: NUL bytes in the first 8 KiB' },
      { source: 'pile/locked.pdf', reason: 'encrypted PDF (password needed)' },
      { source: 'pile/secret.txt', reason: 'unreadable: permission denied (EACCES)' },
      { source: 'pile/zero.md', reason: 'empty (0 bytes)' },
      { source: 'quote.csv', reason: 'the record starting on line 2 has a quote that is never closed' },
    ]);
    expect(r.warnings).toEqual([
      "ragged.csv: 1 row(s) have fewer fields than the header's 3; the missing ones are empty (lines 2)",
      "ragged.csv: 1 row(s) have more fields than the header's 3; the extra ones are dropped (lines 3)",
      'dupes.csv: 1 duplicate id(s) made unique: "A" → "A~2" (dupes.csv#2)',
    ]);
    expect(r.decoding).toEqual([
      { source: 'pile/latin.txt', encoding: 'windows-1252', basis: 'detected', replaced: 0 },
      { source: 'pile/wide.txt', encoding: 'utf-16le', basis: 'bom', replaced: 0 },
    ]);
    expect(Array.from(r.exportRows)).toEqual([0, 0, 0, 0, 0, 1, 1, 1, 1, 1]);
    // The loop link was never entered: the folder's files are read once.
    expect(r.inputs[0]).toMatchObject({ path: 'pile', kind: 'folder', files: 10 });
  });

  it('cuts texts longer than maxBytes at a character boundary and lists them', async () => {
    const cwd = tmp();
    put(cwd, 'long.txt', 'é'.repeat(700)); // 1400 bytes of UTF-8
    put(cwd, 'short.txt', 'short');
    put(cwd, 'rows.csv', `id,text\nr1,${'x'.repeat(2000)}\nr2,ok\n`);
    const r = await ingest(['long.txt', 'short.txt', 'rows.csv'], { maxBytes: 1025, id: 'id' }, { cwd });
    expect(r.docs.map((d) => [d.id, d.text.length, Buffer.byteLength(d.text)])).toEqual([
      ['long.txt', 512, 1024],
      ['short.txt', 5, 5],
      ['r1', 1025, 1025],
      ['r2', 2, 2],
    ]);
    expect(r.truncated).toEqual([
      { id: 'long.txt', source: 'long.txt', bytes: 1400, keptBytes: 1024 },
      { id: 'r1', source: 'rows.csv#1', bytes: 2000, keptBytes: 1025 },
    ]);
    expect(r.warnings).toEqual([
      'long.txt: 1 text(s) longer than maxBytes (1025 bytes) cut to that length: long.txt (1400 bytes)',
      'rows.csv: 1 text(s) longer than maxBytes (1025 bytes) cut to that length: rows.csv#1 (2000 bytes)',
    ]);
    expect(truncateUtf8('a😀b', 4)).toEqual({ text: 'a', bytes: 6, keptBytes: 1 });
    expect(truncateUtf8('short', 1024)).toBeNull();
  });

  it('reads at most maxFiles files when asked, counting the rest', async () => {
    const cwd = tmp();
    for (const n of ['a', 'b', 'c', 'd']) put(cwd, `f/${n}.txt`, `file ${n}`);
    put(cwd, 'one.txt', 'one');
    const r = await ingest(['one.txt', 'f'], { maxFiles: 3 }, { cwd });
    expect(r.docs.map((d) => d.id)).toEqual(['one.txt', 'a.txt', 'b.txt']);
    expect(r.filesNotRead).toBe(2);
    expect(r.warnings).toEqual(['maxFiles 3: 2 more file(s) were not read']);
    const all = await ingest(['one.txt', 'f'], {}, { cwd });
    expect(all.filesNotRead).toBe(0);
    expect(all.docs.length).toBe(5);
  });
});

describe('fuzz: random and damaged bytes never escape as errors', () => {
  const kinds = ['.pdf', '.docx', '.eml', '.txt', '.html', '.md', '', '.dat'];

  it('every document reader returns a document or an InputSkip for random bytes', async () => {
    await fc.assert(
      fc.asyncProperty(fc.uint8Array({ maxLength: 3000 }), fc.constantFrom(...kinds), fc.constantFrom('', '%PDF-1.4\n', 'PK\u0003\u0004', 'From: a@b\r\nSubject: x\r\n\r\n'), async (bytes, ext, prefix) => {
        const buf = Buffer.concat([Buffer.from(prefix, 'latin1'), bytes]);
        try {
          const r = await readDocumentBytes(buf, ext, null);
          expect(typeof r.text).toBe('string');
          expect(r.text.length).toBeGreaterThan(0);
        } catch (err) {
          expect(err).toBeInstanceOf(InputSkip);
          expect((err as InputSkip).reason).not.toMatch(/\n/);
        }
      }),
      { numRuns: 250, seed: 21 },
    );
  });

  it('damaged PDFs, DOCX files and e-mails (bytes flipped or cut) are read or skipped', async () => {
    const pdf = Buffer.from(await onePagePdf('Tidal flow under the north bridge.'));
    const docx = await oneParagraphDocx('Paint the hull before May.');
    const eml = Buffer.from(
      'From: a@b\r\nSubject: =?UTF-8?B?w6k=?=\r\nContent-Type: multipart/mixed; boundary=q\r\n\r\n--q\r\nContent-Type: text/plain; charset=utf-8\r\nContent-Transfer-Encoding: quoted-printable\r\n\r\ncaf=C3=A9 =\r\nnoir\r\n--q\r\nContent-Type: application/pdf; name=x.pdf\r\nContent-Transfer-Encoding: base64\r\n\r\nJVBERi0=\r\n--q--\r\n',
      'latin1',
    );
    const damage = fc.record({
      flips: fc.array(fc.tuple(fc.nat(), fc.integer({ min: 0, max: 255 })), { maxLength: 12 }),
      cut: fc.option(fc.nat(), { nil: undefined }),
    });
    await fc.assert(
      fc.asyncProperty(fc.constantFrom<[Buffer, string]>([pdf, '.pdf'], [docx, '.docx'], [eml, '.eml']), damage, async ([orig, ext], d) => {
        let buf = Buffer.from(orig);
        for (const [at, value] of d.flips) buf[at % buf.length] = value;
        if (d.cut !== undefined) buf = buf.subarray(0, d.cut % (buf.length + 1));
        try {
          await readDocumentBytes(buf, ext, null);
        } catch (err) {
          expect(err).toBeInstanceOf(InputSkip);
        }
      }),
      { numRuns: 150, seed: 22 },
    );
  });

  it('ingest lists a fuzzed file as a document or a skip, never failing the run', async () => {
    const cwd = tmp();
    put(cwd, 'anchor.txt', 'an anchor document so the run has something to read');
    let n = 0;
    await fc.assert(
      fc.asyncProperty(
        fc.uint8Array({ maxLength: 2000 }),
        fc.constantFrom(...kinds, '.csv', '.jsonl', '.json'),
        async (bytes, ext) => {
          const name = `fuzz-${n++}${ext}`;
          // Exports get a valid header: a header without a text column is a usage error by design.
          const head = ext === '.csv' ? Buffer.from('id,text\n') : Buffer.alloc(0);
          put(cwd, name, Buffer.concat([head, bytes]));
          const r = await ingest(['anchor.txt', name], {}, { cwd });
          const fromFuzz = r.docs.filter((d) => d.source === name || d.source.startsWith(`${name}#`)).length;
          const skips = r.skipped.filter((s) => s.source === name || s.source.startsWith(`${name}:`) || s.source.startsWith(`${name}#`)).length;
          expect(r.docs[0]?.id).toBe('anchor.txt');
          expect(fromFuzz + skips + (r.warnings.some((w) => w.startsWith(name)) ? 1 : 0)).toBeGreaterThan(0);
        },
      ),
      { numRuns: 120, seed: 23 },
    );
  });

  it('decoding, the analyzer, the e-mail parser and cleaning never throw on random bytes', () => {
    const analyzer = createAnalyzer({ lang: 'en' });
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 4000 }), (bytes) => {
        let text = '';
        try {
          text = decodeBuffer(bytes).text;
        } catch (err) {
          expect(err).toBeInstanceOf(InputSkip);
          text = Buffer.from(bytes).toString('latin1');
        }
        expect(Array.isArray(analyzer.analyze(text))).toBe(true);
        expect(typeof readMail(Buffer.from(bytes)).text).toBe('string');
        const docs = [{ id: 'x', source: 'x', title: 'T', text, fields: new Map<string, string>() }];
        const c = cleanDocuments(docs);
        expect(c.docs.length).toBe(1);
        expect(c.docs[0]?.title).toBe('T');
      }),
      { numRuns: 400, seed: 24 },
    );
  });

  it('still fails with one line when nothing at all is readable', async () => {
    const cwd = tmp();
    put(cwd, 'a.pdf', '%PDF-1.4 junk');
    put(cwd, 'b.docx', 'junk');
    await expect(ingest(['a.pdf', 'b.docx'], {}, { cwd })).rejects.toThrow(
      new UsageError('no readable documents in a.pdf, b.docx; skipped a.pdf: broken PDF: Invalid PDF structure; b.docx: not a DOCX: not a zip archive'),
    );
  });
});
