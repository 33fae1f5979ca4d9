import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import path from 'node:path';
import { PDFDocument, StandardFonts, rgb } from 'pdf-lib';
import { Document, HeadingLevel, Packer, Paragraph, TextRun } from 'docx';
import { ingest } from '../src/ingest/index.js';
import { readPdf, headingOf, joinHyphenated } from '../src/ingest/pdf.js';
import { readDocx, coreTitle, decodeXmlText } from '../src/ingest/docx.js';
import { InputSkip } from '../src/ingest/decode.js';
import { tmp, put } from './helpers/files.js';

async function skipOf(p: Promise<unknown>): Promise<string> {
  try {
    await p;
  } catch (err) {
    expect(err).toBeInstanceOf(InputSkip);
    return (err as InputSkip).reason;
  }
  throw new Error('expected an InputSkip');
}

/** A two-page PDF written by pdf-lib: a 24 pt heading and 12 pt body lines. */
async function harbourPdf(options: { title?: string } = {}): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  if (options.title !== undefined) doc.setTitle(options.title);
  const font = await doc.embedFont(StandardFonts.Helvetica);
  const p1 = doc.addPage([600, 800]);
  p1.drawText('Harbour Report', { x: 50, y: 740, size: 24, font });
  p1.drawText('The tide rose early today.', { x: 50, y: 700, size: 12, font });
  p1.drawText('Boats left at noon for the exam-', { x: 50, y: 680, size: 12, font });
  p1.drawText('ple run; well-known routes.', { x: 50, y: 660, size: 12, font });
  const p2 = doc.addPage([600, 800]);
  // WinAnsi characters of the standard fonts: accents, en dash, euro sign.
  p2.drawText('Crème brûlée – 10 € at the quay.', { x: 50, y: 740, size: 12, font });
  return doc.save();
}

describe('PDF (pdf-lib fixtures, read by pdf.js)', () => {
  it('extracts each page line by line, pages joined by line breaks, the title from the metadata', async () => {
    const r = await readPdf(await harbourPdf({ title: 'Tide tables for the north harbour' }));
    expect(r.text).toBe(
      [
        'Harbour Report',
        'The tide rose early today.',
        // A word broken by a hyphen at a line end, lower case on both sides, is joined; other hyphens stay.
        'Boats left at noon for the example run; well-known routes.',
        'Crème brûlée – 10 € at the quay.',
      ].join('\n'),
    );
    expect(r.title).toBe('Tide tables for the north harbour');
    expect(r.pages).toBe(2);
    expect(r.failedPages).toBe(0);
  });

  it('without a Title, takes the first heading-like line: the largest font, clearly above the body', async () => {
    expect((await readPdf(await harbourPdf())).title).toBe('Harbour Report');
    // A file name is no title.
    expect((await readPdf(await harbourPdf({ title: 'report-final.docx' }))).title).toBe('Harbour Report');
    // All one size: the first line.
    expect(headingOf([{ text: 'first', height: 12 }, { text: 'second', height: 12 }])).toBe('first');
    // A two-line heading is joined.
    expect(
      headingOf([
        { text: 'A long title', height: 20 },
        { text: 'over two lines', height: 20 },
        { text: 'body', height: 10 },
        { text: 'more body', height: 10 },
      ]),
    ).toBe('A long title over two lines');
    expect(joinHyphenated('Anglo-\nSaxon, 2019-\n2020, exam-\nple, X-\nray')).toBe('Anglo-\nSaxon, 2019-\n2020, example, X-\nray');
  });

  it('skips a PDF without text (a drawing, as a scan would be)', async () => {
    const doc = await PDFDocument.create();
    doc.addPage([300, 300]).drawRectangle({ x: 10, y: 10, width: 100, height: 50, color: rgb(0.2, 0.4, 0.6) });
    expect(await skipOf(readPdf(await doc.save()))).toBe('no text: the PDF has no text layer (scanned pages need OCR first)');
  });

  it('skips broken PDFs with pdf.js\'s reason', async () => {
    expect(await skipOf(readPdf(Buffer.from('%PDF-1.4\nnot really a PDF at all\n')))).toBe('broken PDF: Invalid PDF structure');
    const whole = await harbourPdf();
    expect(await skipOf(readPdf(whole.subarray(0, 400)))).toBe('broken PDF: Invalid PDF structure');
  });
});

/** A PDF written by hand from its objects (numbered from 1; object 1 is the catalog), with a correct xref table. */
function pdfOf(objects: string[]): Buffer {
  let out = '%PDF-1.4\n';
  const offsets: number[] = [];
  objects.forEach((o, i) => {
    offsets.push(Buffer.byteLength(out, 'latin1'));
    out += `${i + 1} 0 obj\n${o}\nendobj\n`;
  });
  const xref = Buffer.byteLength(out, 'latin1');
  out += `xref\n0 ${objects.length + 1}\n0000000000 65535 f \n` + offsets.map((o) => `${String(o).padStart(10, '0')} 00000 n \n`).join('');
  out += `trailer\n<< /Size ${objects.length + 1} /Root 1 0 R >>\nstartxref\n${xref}\n%%EOF\n`;
  return Buffer.from(out, 'latin1');
}

describe('PDF with a non-embedded CJK font', () => {
  it('maps the codes to text through the packed character maps shipped with pdfjs-dist', async () => {
    // A Type0 font with the predefined CMap UniJIS-UCS2-H (codes are UCS-2) and no ToUnicode: pdf.js must
    // load UniJIS-UCS2-H and Adobe-Japan1-UCS2 from cmaps/ to know the text (without them it reads nothing).
    const content = 'BT /F1 12 Tf 50 700 Td <67714EAC> Tj ET'; // U+6771 U+4EAC
    const pdf = pdfOf([
      '<< /Type /Catalog /Pages 2 0 R >>',
      '<< /Type /Pages /Kids [3 0 R] /Count 1 >>',
      '<< /Type /Page /Parent 2 0 R /MediaBox [0 0 600 800] /Contents 4 0 R /Resources << /Font << /F1 5 0 R >> >> >>',
      `<< /Length ${content.length} >>\nstream\n${content}\nendstream`,
      '<< /Type /Font /Subtype /Type0 /BaseFont /KozMinPro-Regular /Encoding /UniJIS-UCS2-H /DescendantFonts [6 0 R] >>',
      '<< /Type /Font /Subtype /CIDFontType0 /BaseFont /KozMinPro-Regular /CIDSystemInfo << /Registry (Adobe) /Ordering (Japan1) /Supplement 4 >> /FontDescriptor 7 0 R >>',
      '<< /Type /FontDescriptor /FontName /KozMinPro-Regular /Flags 4 /FontBBox [0 0 1000 1000] /ItalicAngle 0 /Ascent 880 /Descent -120 /CapHeight 700 /StemV 80 >>',
    ]);
    expect((await readPdf(pdf)).text).toBe('\u6771\u4eac');
  });
});

// --- Encryption: the standard security handler, revision 2 (40-bit RC4), as ISO 32000-1:2008 §7.6.3
// describes it (Algorithms 1, 2, 3 and 4; from memory). pdf-lib cannot encrypt, so the file is written by hand.
const PAD = Buffer.from('28BF4E5E4E758A4164004E56FFFA01082E2E00B6D0683E802F0CA9FE6453697A', 'hex');

function rc4(key: Uint8Array, data: Uint8Array): Buffer {
  const s = new Uint8Array(256);
  for (let i = 0; i < 256; i++) s[i] = i;
  let j = 0;
  for (let i = 0; i < 256; i++) {
    j = (j + (s[i] as number) + (key[i % key.length] as number)) & 255;
    [s[i], s[j]] = [s[j] as number, s[i] as number];
  }
  const out = Buffer.alloc(data.length);
  let a = 0;
  j = 0;
  for (let k = 0; k < data.length; k++) {
    a = (a + 1) & 255;
    j = (j + (s[a] as number)) & 255;
    [s[a], s[j]] = [s[j] as number, s[a] as number];
    out[k] = (data[k] as number) ^ (s[((s[a] as number) + (s[j] as number)) & 255] as number);
  }
  return out;
}

const md5 = (...parts: Uint8Array[]): Buffer => createHash('md5').update(Buffer.concat(parts)).digest();
const padded = (pw: string): Buffer => Buffer.concat([Buffer.from(pw, 'latin1'), PAD]).subarray(0, 32);

/** A one-page PDF encrypted for `userPassword` (the owner password is "owner"); its page shows `text`. */
function encryptedPdf(userPassword: string, text: string): Buffer {
  const id = Buffer.from('0123456789abcdef0123456789abcdef', 'hex');
  const P = -44;
  const O = rc4(md5(padded('owner')).subarray(0, 5), padded(userPassword)); // Algorithm 3
  const p4 = Buffer.alloc(4);
  p4.writeInt32LE(P);
  const key = md5(padded(userPassword), O, p4, id).subarray(0, 5); // Algorithm 2
  const U = rc4(key, PAD); // Algorithm 4
  const objectKey = (n: number): Buffer => md5(key, Buffer.from([n & 255, (n >> 8) & 255, (n >> 16) & 255, 0, 0])).subarray(0, 10); // Algorithm 1
  const content = rc4(objectKey(4), Buffer.from(`BT /F1 12 Tf 50 700 Td (${text}) Tj ET`, 'latin1'));
  const parts: Buffer[] = [];
  const offsets: number[] = [];
  let length = 0;
  const push = (b: string | Buffer): void => {
    const buf = typeof b === 'string' ? Buffer.from(b, 'latin1') : b;
    parts.push(buf);
    length += buf.length;
  };
  const obj = (n: number, ...body: (string | Buffer)[]): void => {
    offsets[n] = length;
    push(`${n} 0 obj\n`);
    body.forEach(push);
    push('\nendobj\n');
  };
  push('%PDF-1.4\n');
  obj(1, '<< /Type /Catalog /Pages 2 0 R >>');
  obj(2, '<< /Type /Pages /Kids [3 0 R] /Count 1 >>');
  obj(3, '<< /Type /Page /Parent 2 0 R /MediaBox [0 0 600 800] /Contents 4 0 R /Resources << /Font << /F1 5 0 R >> >> >>');
  obj(4, `<< /Length ${content.length} >>\nstream\n`, content, '\nendstream');
  obj(5, '<< /Type /Font /Subtype /Type1 /BaseFont /Helvetica >>');
  obj(6, `<< /Filter /Standard /V 1 /R 2 /O <${O.toString('hex')}> /U <${U.toString('hex')}> /P ${P} >>`);
  const xref = length;
  push('xref\n0 7\n0000000000 65535 f \n');
  for (let n = 1; n <= 6; n++) push(`${String(offsets[n]).padStart(10, '0')} 00000 n \n`);
  push(`trailer\n<< /Size 7 /Root 1 0 R /Encrypt 6 0 R /ID [<${id.toString('hex')}> <${id.toString('hex')}>] >>\nstartxref\n${xref}\n%%EOF\n`);
  return Buffer.concat(parts);
}

describe('encrypted PDF (hand-written, RC4 40-bit standard security handler)', () => {
  it('reads one encrypted with an empty user password (proof the construction is right)', async () => {
    const r = await readPdf(encryptedPdf('', 'Ledger of the lock keepers'));
    expect(r.text).toBe('Ledger of the lock keepers');
  });

  it('skips one that needs a password', async () => {
    expect(await skipOf(readPdf(encryptedPdf('secret', 'Ledger of the lock keepers')))).toBe('encrypted PDF (password needed)');
  });
});

/** A Word document written by the docx package. */
async function lockDocx(title?: string): Promise<Buffer> {
  const doc = new Document({
    ...(title !== undefined ? { title } : {}),
    creator: 'sheaf tests',
    sections: [
      {
        children: [
          new Paragraph({ text: 'Spring lock checks', heading: HeadingLevel.HEADING_1 }),
          new Paragraph({ children: [new TextRun('The upper gate '), new TextRun({ text: 'leaks', bold: true }), new TextRun(' at high water.')] }),
          new Paragraph({ text: '' }),
          new Paragraph({ text: 'Grease the hinges monthly — «always» & <never> skip.' }),
        ],
      },
    ],
  });
  return Packer.toBuffer(doc);
}

describe('DOCX (docx fixtures, read by mammoth)', () => {
  it('extracts paragraphs separated by a blank line, the title from the core properties', async () => {
    const r = await readDocx(await lockDocx('Lock maintenance & care'));
    expect(r.text).toBe('Spring lock checks\n\nThe upper gate leaks at high water.\n\nGrease the hinges monthly — «always» & <never> skip.');
    expect(r.title).toBe('Lock maintenance & care');
  });

  it('takes the first paragraph as title when the core properties have none', async () => {
    expect((await readDocx(await lockDocx())).title).toBe('Spring lock checks');
    expect(coreTitle('<cp:coreProperties><dc:title>A &amp; B &#x263A; &#65;</dc:title></cp:coreProperties>')).toBe('A & B ☺ A');
    expect(coreTitle('<cp:coreProperties><dc:title/></cp:coreProperties>')).toBe('');
    expect(decodeXmlText('&lt;&gt;&quot;&apos;&unknown;&#0;')).toBe('<>"\'&unknown;&#0;');
  });

  it('skips what is not a Word document, saying what it is', async () => {
    expect(await skipOf(readDocx(Buffer.from('just some text in a .docx')))).toBe('not a DOCX: not a zip archive');
    const good = await lockDocx();
    expect(await skipOf(readDocx(good.subarray(0, good.length >> 1)))).toBe('not a DOCX: damaged zip archive (no end of central directory record)');
    // The same archive with the main part renamed (same length, so the zip stays valid).
    const renamed = Buffer.from(good.toString('latin1').split('word/document.xml').join('word/documenX.xml'), 'latin1');
    expect(await skipOf(readDocx(renamed))).toBe('not a DOCX: a zip archive without word/document.xml');
    const ole = Buffer.concat([Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]), Buffer.alloc(504)]);
    expect(await skipOf(readDocx(ole))).toBe(
      'encrypted or old-format Word file (an OLE compound document, not a zip): save it as .docx without a password',
    );
  });
});

describe('readers chosen by content and extension, through ingest', () => {
  it('reads PDF, DOCX and text in one folder, and goes on past broken and encrypted files', async () => {
    const cwd = tmp();
    const f = path.join(cwd, 'papers');
    put(f, 'a-harbour.pdf', await harbourPdf({ title: 'Harbour' }));
    put(f, 'b-locks.docx', await lockDocx('Locks'));
    put(f, 'c-notes.txt', 'Plain notes about tides.');
    put(f, 'd-broken.pdf', '%PDF-1.7\n%garbage only\n');
    put(f, 'e-locked.pdf', encryptedPdf('secret', 'hidden'));
    put(f, 'f-fake.docx', 'I am not a zip');
    put(f, 'g-not-pdf.pdf', 'plain text wearing a .pdf name');
    put(f, 'h-empty.docx', '');
    const r = await ingest(['papers'], {}, { cwd });
    expect(r.docs.map((d) => [d.id, d.title])).toEqual([
      ['a-harbour.pdf', 'Harbour'],
      ['b-locks.docx', 'Locks'],
      ['c-notes.txt', 'Plain notes about tides.'],
    ]);
    expect(r.docs[1]?.text).toBe('Spring lock checks\n\nThe upper gate leaks at high water.\n\nGrease the hinges monthly — «always» & <never> skip.');
    expect(r.skipped).toEqual([
      { source: 'papers/d-broken.pdf', reason: 'broken PDF: Invalid PDF structure' },
      { source: 'papers/e-locked.pdf', reason: 'encrypted PDF (password needed)' },
      { source: 'papers/f-fake.docx', reason: 'not a DOCX: not a zip archive' },
      { source: 'papers/g-not-pdf.pdf', reason: 'not a PDF: no %PDF- header in the first 1 KiB' },
      { source: 'papers/h-empty.docx', reason: 'empty (0 bytes)' },
    ]);
    expect(r.warnings).toEqual([]);
    expect(r.inputs[0]?.files).toBe(8);
  });

  it('recognises a PDF or a Word file by its content under another name, and says so', async () => {
    const cwd = tmp();
    put(cwd, 'scan.txt', await harbourPdf({ title: 'Harbour' }));
    put(cwd, 'minutes', await lockDocx('Minutes'));
    put(cwd, 'data.bin', await harbourPdf());
    const r = await ingest(['scan.txt', 'minutes', 'data.bin'], {}, { cwd });
    expect(r.docs.map((d) => [d.id, d.title])).toEqual([
      ['scan.txt', 'Harbour'],
      ['minutes', 'Minutes'],
      ['data.bin', 'Harbour Report'],
    ]);
    expect(r.warnings).toEqual([
      'scan.txt: read as a PDF by its content, not as its extension ".txt" suggests',
      'minutes: extension "(none)" is not one sheaf knows; read as a Word document by its content',
      'data.bin: extension ".bin" is not one sheaf knows; read as a PDF by its content',
    ]);
  });
});
