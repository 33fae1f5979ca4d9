import { describe, expect, it } from 'vitest';
import { Readable } from 'node:stream';
import { readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { ingest, type IngestOptions } from '../src/ingest/index.js';
import { tmp, usage } from './helpers/files.js';

const FIX = path.join(path.dirname(fileURLToPath(import.meta.url)), 'fixtures', 'ingest');
// Rows as read by Python's csv module (test/fixtures/ingest/make_fixtures.py).
const PY = JSON.parse(readFileSync(path.join(FIX, 'expected.json'), 'utf8')) as Record<string, unknown>;

function write(dir: string, name: string, content: string | Buffer): string {
  writeFileSync(path.join(dir, name), content);
  return name;
}

function stdinOf(...chunks: (string | Buffer)[]): NodeJS.ReadableStream {
  return Readable.from(chunks.map((c) => (typeof c === 'string' ? Buffer.from(c, 'utf8') : c)));
}

/** Every document as the row it came from: id column first, then fields. */
function rowsOf(docs: { id: string; fields: ReadonlyMap<string, string> }[], idColumn: string | null): string[][] {
  return docs.map((d) => {
    const cells = [...d.fields.values()];
    return idColumn === null ? cells : [d.id, ...cells];
  });
}

describe('CSV exports (RFC 4180 §2)', () => {
  it('reads the RFC 4180 cases exactly as Python csv does', async () => {
    const r = await ingest(['rfc4180.csv'], { id: 'id', text: ['body'] }, { cwd: FIX });
    const py = PY['rfc4180.csv'] as string[][];
    // §2 rule 3: the first record is the header; fields keep every column but the id column.
    expect([...(r.docs[0]?.fields.keys() ?? [])]).toEqual(['subject', 'body']);
    expect(rowsOf(r.docs, 'id')).toEqual(py.slice(1));
    // §2 rule 6: a quoted CRLF stays inside the field, verbatim, in fields.
    expect(r.docs[1]?.fields.get('subject')).toBe('line one\r\nline two');
    // §2 rule 7: "" inside a quoted field is one quote.
    expect(r.docs[0]?.text).toBe('b"bb');
    expect(r.docs[2]?.text).toBe('he said "no", twice');
    // §2 rule 2: the last record has no line break and is still read.
    expect(r.docs[3]?.text).toBe('last record, no line break at the end');
    expect(r.docs.map((d) => d.id)).toEqual(['1', '2', '3', '4']);
    expect(r.docs.map((d) => d.source)).toEqual(['rfc4180.csv#1', 'rfc4180.csv#2', 'rfc4180.csv#3', 'rfc4180.csv#4']);
    expect(r.warnings).toEqual([]);
    expect(r.skipped).toEqual([]);
  });

  it('drops a UTF-8 byte order mark and reads LF line endings the same way', async () => {
    const r = await ingest(['rfc4180-bom.csv'], { id: 'id', text: ['body'] }, { cwd: FIX });
    expect([...(r.docs[0]?.fields.keys() ?? [])]).toEqual(['subject', 'body']);
    expect(rowsOf(r.docs, 'id')).toEqual((PY['rfc4180-bom.csv'] as string[][]).slice(1));
  });

  it('reads TSV as Python csv excel-tab does, quoted tabs included', async () => {
    const r = await ingest(['tickets.tsv'], { id: 'ticket_id', title: 'subject' }, { cwd: FIX });
    expect(rowsOf(r.docs, 'ticket_id')).toEqual((PY['tickets.tsv'] as string[][]).slice(1));
    expect(r.docs.map((d) => d.title)).toEqual(['Printer jam', 'Quoted subject', 'Café menu']);
    expect(r.docs.map((d) => d.text)).toEqual(['Paper stuck in tray 2', 'Tabs inside quotes stay', 'Unicode ✓ survives']);
  });

  it('joins several text columns with a blank line, skips empty ones, takes the first line as title', async () => {
    const dir = tmp();
    write(dir, 't.csv', 'ticket_id,subject,body\nA,Printer,"Jam in\ntray 2"\nB,,Only a body\n');
    const r = await ingest(['t.csv'], { text: ['subject', 'body'], id: 'ticket_id' }, { cwd: dir });
    expect(r.docs.map((d) => d.text)).toEqual(['Printer\n\nJam in\ntray 2', 'Only a body']);
    expect(r.docs.map((d) => d.title)).toEqual(['Printer', 'Only a body']);
    // fields: every column except the id column, text columns included, in header order.
    expect([...(r.docs[0]?.fields ?? [])]).toEqual([
      ['subject', 'Printer'],
      ['body', 'Jam in\ntray 2'],
    ]);
  });

  it('guesses the text column by name, in order of preference, case-insensitively', async () => {
    const dir = tmp();
    write(dir, 'g.csv', 'Summary,Body,other\ns1,b1,o1\n');
    const r = await ingest(['g.csv'], {}, { cwd: dir });
    expect(r.docs[0]?.text).toBe('b1'); // body is preferred over summary
    expect(r.docs[0]?.id).toBe('1'); // no id column: the row number
    expect(r.docs[0]?.title).toBe('s1'); // a summary that is not the text is a title-like column
    expect(r.titleColumns).toEqual([{ source: 'g.csv', column: 'Summary' }]);
  });

  it('names the missing columns exactly', async () => {
    const dir = tmp();
    write(dir, 'tickets.csv', 'ticket_id,subject,body\n1,a,b\n');
    let e = await usage(ingest(['tickets.csv'], { text: ['bdy'] }, { cwd: dir }));
    expect(e.message).toBe('tickets.csv has no column "bdy" for --text; its columns are: ticket_id, subject, body');
    expect(e.option).toBe('text');
    e = await usage(ingest(['tickets.csv'], { id: 'key' }, { cwd: dir }));
    expect(e.message).toBe('tickets.csv has no column "key" for --id; its columns are: ticket_id, subject, body');
    expect(e.option).toBe('id');
    e = await usage(ingest(['tickets.csv'], { title: 'headline' }, { cwd: dir }));
    expect(e.message).toBe('tickets.csv has no column "headline" for --title; its columns are: ticket_id, subject, body');
    expect(e.option).toBe('title');
    write(dir, 'nocol.csv', 'a,b,c\n1,2,3\n');
    e = await usage(ingest(['nocol.csv'], {}, { cwd: dir }));
    expect(e.message).toBe('nocol.csv has no text column; name one with --text (columns: a, b, c)');
    expect(e.option).toBe('text');
  });

  it('matches a named column case-insensitively when there is no exact match', async () => {
    const dir = tmp();
    write(dir, 'c.csv', 'ID,Body\n7,hello\n');
    const r = await ingest(['c.csv'], { text: ['body'], id: 'id' }, { cwd: dir });
    expect(r.docs[0]?.id).toBe('7');
    expect(r.docs[0]?.text).toBe('hello');
  });

  it('reports ragged rows with their line numbers and reads them leniently', async () => {
    const dir = tmp();
    // Line 3 holds a record that spans lines 3-4 (quoted CRLF); line 5 is short, line 6 long.
    write(dir, 'r.csv', 'id,body,extra\r\n1,one,x\r\n2,"two\r\nlines",y\r\n3,short\r\n4,long,z,spill\r\n');
    const r = await ingest(['r.csv'], { id: 'id' }, { cwd: dir });
    expect(r.docs.map((d) => [...d.fields.values()])).toEqual([
      ['one', 'x'],
      ['two\r\nlines', 'y'],
      ['short', ''],
      ['long', 'z'],
    ]);
    expect(r.warnings).toEqual([
      "r.csv: 1 row(s) have fewer fields than the header's 3; the missing ones are empty (lines 5)",
      "r.csv: 1 row(s) have more fields than the header's 3; the extra ones are dropped (lines 6)",
    ]);
  });

  it('skips a file with a quote that is never closed, naming the line, and goes on with the others', async () => {
    const dir = tmp();
    write(dir, 'q.csv', 'id,body\r\n1,"fine\r\nstill fine"\r\n\r\n2,"never closed\r\n3,more\r\n');
    write(dir, 'ok.csv', 'id,body\n7,fine\n');
    const r = await ingest(['q.csv', 'ok.csv'], { id: 'id' }, { cwd: dir });
    expect(r.docs.map((d) => [d.id, d.text])).toEqual([['7', 'fine']]);
    expect(r.skipped).toEqual([{ source: 'q.csv', reason: 'the record starting on line 5 has a quote that is never closed' }]);
    // Alone, it leaves nothing to read: one line naming the file and the reason.
    const e = await usage(ingest(['q.csv'], {}, { cwd: dir }));
    expect(e.message).toBe('no readable documents in q.csv; skipped q.csv: the record starting on line 5 has a quote that is never closed');
  });

  it('keeps a quote inside an unquoted field as a character', async () => {
    const dir = tmp();
    write(dir, 'in.csv', 'id,body\n1,a 5" screen\n');
    const r = await ingest(['in.csv'], { id: 'id' }, { cwd: dir });
    expect(r.docs[0]?.text).toBe('a 5" screen');
  });

  it('finds a semicolon delimiter when the header has no comma, and honours an explicit delimiter', async () => {
    const dir = tmp();
    write(dir, 's.csv', 'id;body\n1;"a;b"\n');
    let r = await ingest(['s.csv'], { id: 'id' }, { cwd: dir });
    expect(r.docs[0]?.text).toBe('a;b');
    expect(r.warnings).toEqual(['s.csv: read with ";" as the delimiter (the header has no commas)']);
    write(dir, 'p.csv', 'id|body,x\n1|a,b\n');
    r = await ingest(['p.csv'], { id: 'id', text: ['body,x'], delimiter: '|' }, { cwd: dir });
    expect(r.docs[0]?.text).toBe('a,b');
    expect(r.warnings).toEqual([]);
  });

  it('renames empty and repeated header names and says so', async () => {
    const dir = tmp();
    write(dir, 'h.csv', 'body,,body\na,b,c\n');
    const r = await ingest(['h.csv'], {}, { cwd: dir });
    expect([...(r.docs[0]?.fields ?? [])]).toEqual([
      ['body', 'a'],
      ['column_2', 'b'],
      ['body~2', 'c'],
    ]);
    expect(r.warnings).toEqual([
      'h.csv: column 2 has no name; called "column_2"',
      'h.csv: column 3 repeats the name "body"; called "body~2"',
    ]);
  });

  it('makes duplicate ids unique and reports them', async () => {
    const dir = tmp();
    write(dir, 'd.csv', 'id,body\n7,a\n7,b\n7~2,c\n7,d\n,e\n');
    const r = await ingest(['d.csv'], { id: 'id' }, { cwd: dir });
    // "7~2" is a real id in the file, so the copies skip it.
    expect(r.docs.map((d) => d.id)).toEqual(['7', '7~3', '7~2', '7~4', '5']);
    expect(r.warnings).toEqual([
      'd.csv: 1 row(s) have an empty id; their row numbers are used instead (rows 5)',
      'd.csv: 2 duplicate id(s) made unique: "7" → "7~3" (d.csv#2), "7" → "7~4" (d.csv#4)',
    ]);
  });

  it('keeps __proto__ and constructor as ordinary columns', async () => {
    const dir = tmp();
    write(dir, 'p.csv', '__proto__,constructor,text\nx,y,z\n');
    const r = await ingest(['p.csv'], { id: 'constructor' }, { cwd: dir });
    const d = r.docs[0];
    expect(d?.id).toBe('y');
    expect([...(d?.fields ?? [])]).toEqual([
      ['__proto__', 'x'],
      ['text', 'z'],
    ]);
    expect(Object.getPrototypeOf({})).toBe(Object.prototype);
  });

  it('reads a CSV from standard input split in awkward chunks', async () => {
    const r = await ingest(['-'], { id: 'id' }, {
      cwd: os.tmpdir(),
      stdin: stdinOf('\uFEFFid,bo', 'dy\r', '\n1,"a\r', '\nb"\r', '\n2,c'),
    });
    expect(r.docs.map((d) => [d.id, d.fields.get('body'), d.source])).toEqual([
      ['1', 'a\r\nb', 'stdin#1'],
      ['2', 'c', 'stdin#2'],
    ]);
    expect(r.inputs).toEqual([
      {
        path: '-',
        kind: 'stdin',
        bytes: Buffer.byteLength('\uFEFFid,body\r\n1,"a\r\nb"\r\n2,c'),
        sha256: (await import('node:crypto')).createHash('sha256').update('\uFEFFid,body\r\n1,"a\r\nb"\r\n2,c').digest('hex'),
      },
    ]);
  });

  it('warns about a header without rows and fails when nothing else was read', async () => {
    const dir = tmp();
    write(dir, 'h.csv', 'id,body\n');
    const e = await usage(ingest(['h.csv'], {}, { cwd: dir }));
    expect(e.message).toBe('no readable documents in h.csv; h.csv has a header but no rows');
  });
});

// A reference writer: every field quoted, quotes doubled, CRLF after each record.
function writeCsv(rows: readonly (readonly string[])[]): { text: string; startLines: number[] } {
  let text = '';
  let line = 1;
  const startLines: number[] = [];
  for (const r of rows) {
    startLines.push(line);
    const rec = r.map((f) => '"' + f.replace(/"/g, '""') + '"').join(',') + '\r\n';
    line += (rec.match(/\r\n|\r|\n/g) ?? []).length;
    text += rec;
  }
  return { text, startLines };
}

function chunked(text: string, cuts: number[]): Buffer[] {
  const bytes = Buffer.from(text, 'utf8');
  const points = [...new Set(cuts.map((c) => c % (bytes.length + 1)))].sort((a, b) => a - b);
  const out: Buffer[] = [];
  let prev = 0;
  for (const p of points) {
    out.push(bytes.subarray(prev, p));
    prev = p;
  }
  out.push(bytes.subarray(prev));
  return out.filter((b) => b.length > 0);
}

describe('CSV round trip (fast-check)', () => {
  const cell = fc.string({ unit: fc.constantFrom('a', 'b', ' ', ',', '"', '\r', '\n', '\r\n', 'é', '✓', '\t', ';') as fc.Arbitrary<string>, maxLength: 12 });

  it('rows written by a reference writer come back unchanged, whatever the chunking', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.integer({ min: 1, max: 4 }).chain((width) =>
          fc.record({
            header: fc.uniqueArray(
              fc.string({ unit: fc.constantFrom('a', 'b', 'x', '_', 'p', 'o', 't', 'r'), minLength: 1, maxLength: 9 }),
              { minLength: width, maxLength: width },
            ),
            rows: fc.array(fc.array(cell, { minLength: width, maxLength: width }), { minLength: 1, maxLength: 8 }),
            cuts: fc.array(fc.nat(400), { maxLength: 6 }),
          }),
        ),
        async ({ header, rows, cuts }) => {
          const { text } = writeCsv([header, ...rows]);
          const opts: Partial<IngestOptions> = { text: [header[0] as string], format: 'csv' };
          const r = await ingest(['-'], opts, { cwd: os.tmpdir(), stdin: Readable.from(chunked(text, cuts)) });
          expect(r.docs.map((d) => [...d.fields.keys()])).toEqual(rows.map(() => header));
          expect(r.docs.map((d) => [...d.fields.values()])).toEqual(rows);
          expect(r.docs.map((d) => d.id)).toEqual(rows.map((_, i) => String(i + 1)));
        },
      ),
      { numRuns: 300, seed: 4180 },
    );
  });

  it('ragged rows are reported at the line where each record starts', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.record({ cells: fc.array(cell, { minLength: 2, maxLength: 2 }), extra: fc.boolean() }), { minLength: 1, maxLength: 9 }),
        fc.array(fc.nat(300), { maxLength: 5 }),
        async (specs, cuts) => {
          const rows = specs.map((s) => (s.extra ? [...s.cells, 'spill'] : s.cells));
          const { text, startLines } = writeCsv([['body', 'other'], ...rows]);
          const r = await ingest(['-'], { format: 'csv' }, { cwd: os.tmpdir(), stdin: Readable.from(chunked(text, cuts)) });
          const longLines = specs.flatMap((s, i) => (s.extra ? [startLines[i + 1] as number] : []));
          const expected =
            longLines.length === 0
              ? []
              : [`stdin: ${longLines.length} row(s) have more fields than the header's 2; the extra ones are dropped (lines ${longLines.join(', ')})`];
          expect(r.warnings.filter((w) => w.includes('fields than'))).toEqual(expected);
        },
      ),
      { numRuns: 300, seed: 2 },
    );
  });
});
