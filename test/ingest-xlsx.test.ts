/**
 * Workbooks (.xlsx) read as row exports. The workbooks are written by the
 * tests with write-excel-file (a general-purpose xlsx writer, dev
 * dependency); the expected values are what the test asked it to write.
 */
import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { readFileSync } from 'node:fs';
import writeXlsxFile from 'write-excel-file/node';
import { ingest } from '../src/ingest/index.js';
import { serialToText, sharedStrings, isDateFormatCode, columnOf } from '../src/ingest/xlsx.js';
import { put, tmp, usage } from './helpers/files.js';
import { sheaf } from './helpers/cli.js';

async function workbook(): Promise<Buffer> {
  return writeXlsxFile([
    {
      sheet: 'Tickets',
      data: [
        ['id', 'subject', 'body', 'opened', 'count', 'ok'],
        ['T-1', 'Refund', 'Card charged twice', { value: new Date(Date.UTC(2026, 10, 3)), type: Date, format: 'yyyy-mm-dd' }, 3, true],
        [null, null, null],
        ['T-2', 'Login', 'Cannot sign in <after> "reset" & more\nsecond line', null, 0.25, false],
      ],
    },
    { sheet: 'Notes', data: [['Text', 'Who'], ['the boiler hums at night', 'Ana'], ['', 'Ben']] },
  ]).toBuffer();
}

describe('workbooks (.xlsx)', () => {
  it('reads the first sheet like a CSV export: header row, columns, joined-back fields, dates and booleans', async () => {
    const dir = tmp();
    put(dir, 'tickets.xlsx', await workbook());
    const r = await ingest(['tickets.xlsx'], { id: 'id', text: ['body'], title: 'subject' }, { cwd: dir });
    expect(r.docs.map((d) => d.id)).toEqual(['T-1', 'T-2']);
    expect(r.docs.map((d) => d.text)).toEqual(['Card charged twice', 'Cannot sign in <after> "reset" & more\nsecond line']);
    expect(r.docs.map((d) => d.title)).toEqual(['Refund', 'Login']);
    expect(r.docs.map((d) => d.source)).toEqual(['tickets.xlsx#1', 'tickets.xlsx#2']);
    expect(r.docs.map((d) => Object.fromEntries(d.fields))).toEqual([
      { subject: 'Refund', body: 'Card charged twice', opened: '2026-11-03', count: '3', ok: 'TRUE' },
      { subject: 'Login', body: 'Cannot sign in <after> "reset" & more\nsecond line', opened: '', count: '0.25', ok: 'FALSE' },
    ]);
    expect([...r.exportRows]).toEqual([1, 1]);
    expect(r.warnings).toEqual(['tickets.xlsx: read its first sheet "Tickets" of 2 (the others: Notes; pick one with --sheet)']);
    expect(r.exportCounts).toEqual([{ source: 'tickets.xlsx', rows: 2, documents: 2 }]);
    expect(r.inputs[0]?.kind).toBe('file');
  });

  it('picks a sheet by name (case-insensitively too) and guesses the text column', async () => {
    const dir = tmp();
    put(dir, 'book.xlsx', await workbook());
    const r = await ingest(['book.xlsx'], { sheet: 'notes' }, { cwd: dir });
    expect(r.docs.map((d) => [d.id, d.text, d.fields.get('Who')])).toEqual([
      ['1', 'the boiler hums at night', 'Ana'],
      ['2', '', 'Ben'],
    ]);
    expect(r.warnings).toEqual(['book.xlsx: 1 row(s) have no text (rows 2)']);
  });

  it('refuses a sheet the workbook lacks, naming the sheets it has', async () => {
    const dir = tmp();
    put(dir, 'book.xlsx', await workbook());
    const e = await usage(ingest(['book.xlsx'], { sheet: 'Summary' }, { cwd: dir }));
    expect(e.message).toBe('book.xlsx has no sheet "Summary" for --sheet; its sheets are: Tickets, Notes');
  });

  it('refuses an old binary .xls workbook with a reason (and any OLE file named .xlsx)', async () => {
    const dir = tmp();
    const ole = Buffer.concat([Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]), Buffer.alloc(504)]);
    put(dir, 'old.xls', ole);
    put(dir, 'locked.xlsx', ole);
    put(dir, 'notes.txt', 'one readable note');
    const r = await ingest(['old.xls', 'locked.xlsx', 'notes.txt'], {}, { cwd: dir });
    expect(r.skipped).toEqual([
      { source: 'old.xls', reason: 'an old binary workbook (.xls BIFF or .xlsb) is not read: save it as .xlsx or CSV (no well-kept library for that format was found)' },
      {
        source: 'locked.xlsx',
        reason: 'an old binary workbook (.xls BIFF) or a password-protected one (an OLE compound file): save it as .xlsx without a password, or as CSV',
      },
    ]);
    const alone = await usage(ingest(['old.xls'], {}, { cwd: dir }));
    expect(alone.message).toBe(
      'no readable documents in old.xls; skipped old.xls: an old binary workbook (.xls BIFF or .xlsb) is not read: save it as .xlsx or CSV (no well-kept library for that format was found)',
    );
  });

  it('reads a workbook by its content when its extension says nothing, and says in a folder that it must be named as a file', async () => {
    const dir = tmp();
    put(dir, 'export.bin', await workbook());
    const r = await ingest(['export.bin'], { sheet: 'Notes' }, { cwd: dir });
    expect(r.docs.map((d) => d.text)).toEqual(['the boiler hums at night', '']);
    put(dir, 'f/book.xlsx', await workbook());
    put(dir, 'f/a.txt', 'a note');
    const f = await ingest(['f'], { include: ['**/*'] }, { cwd: dir });
    expect(f.skipped).toEqual([{ source: 'f/book.xlsx', reason: 'a spreadsheet workbook: name the file itself as an input to read its rows' }]);
  });

  it('warns when --sheet is given and no workbook was read', async () => {
    const dir = tmp();
    put(dir, 'rows.csv', 'id,body\n1,a row\n');
    const r = await ingest(['rows.csv'], { sheet: 'Notes' }, { cwd: dir });
    expect(r.warnings).toEqual(['the sheet option applies only to workbooks (.xlsx); none was read']);
  });

  it('groups a workbook on the command line: documents.csv joins back to the sheet\'s rows', async () => {
    const dir = tmp();
    const rows: (string | number)[][] = [['ticket', 'topic', 'body']];
    const topics = ['printer jams paper tray', 'password reset login locked', 'invoice refund charged twice'];
    for (let i = 0; i < 12; i++) rows.push([`K-${i + 1}`, `topic ${i % 3}`, `${topics[i % 3]} case ${i + 1}`]);
    put(dir, 'desk.xlsx', await writeXlsxFile(rows).toBuffer());
    const out = path.join(dir, 'out');
    const r = await sheaf(['group', 'desk.xlsx', '--id', 'ticket', '--text', 'body', '--groups', '3', '--no-report', '--out', out, '--quiet'], { cwd: dir });
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const csv = readFileSync(path.join(out, 'documents.csv'), 'utf8').replace(/^\uFEFF/, '').split(/\r?\n/);
    expect(csv[0]).toBe('id,group,label,fit,duplicate_set,next_group,next_margin,topic,body');
    expect(csv[1]).toMatch(/^K-1,\d,[^,]*,[0-9.]+,[^,]*,\d,-?[0-9.]+,topic 0,printer jams paper tray case 1$/);
    expect(csv.filter((l) => l !== '').length).toBe(13);
  });

  it('takes --sheet on the command line', async () => {
    const dir = tmp();
    put(dir, 'book.xlsx', await workbook());
    const out = path.join(dir, 'out');
    const r = await sheaf(['group', 'book.xlsx', '--sheet', 'Nope', '--groups', '2', '--out', out], { cwd: dir });
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('sheaf: book.xlsx has no sheet "Nope" for --sheet; its sheets are: Tickets, Notes\n');
  });
});

describe('workbook parts', () => {
  it('date serials: the 1900 system with its 1900-02-29, and the 1904 system (ECMA-376 Part 1 §18.17.4.1, from memory)', () => {
    expect(serialToText(1, false)).toBe('1900-01-01');
    expect(serialToText(59, false)).toBe('1900-02-28');
    expect(serialToText(61, false)).toBe('1900-03-01');
    expect(serialToText(46329, false)).toBe('2026-11-03');
    expect(serialToText(46329.5, false)).toBe('2026-11-03 12:00:00');
    expect(serialToText(0.75, false)).toBe('18:00:00');
    expect(serialToText(0, true)).toBe('1904-01-01');
  });

  it('shared strings: rich-text runs joined, phonetic runs left out, entities decoded', () => {
    const xml =
      '<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><si><t>plain &amp; simple</t></si>' +
      '<si><r><rPr><b/></rPr><t>bold</t></r><r><t xml:space="preserve"> then plain</t></r></si>' +
      '<si><t>東京</t><rPh sb="0" eb="2"><t>トウキョウ</t></rPh></si></sst>';
    expect(sharedStrings(xml)).toEqual(['plain & simple', 'bold then plain', '東京']);
  });

  it('number formats and cell references', () => {
    expect(isDateFormatCode('yyyy-mm-dd')).toBe(true);
    expect(isDateFormatCode('[h]:mm')).toBe(true);
    expect(isDateFormatCode('0.00%')).toBe(false);
    expect(isDateFormatCode('"days "0')).toBe(false);
    expect(columnOf('A1')).toBe(0);
    expect(columnOf('Z9')).toBe(25);
    expect(columnOf('AA10')).toBe(26);
    expect(columnOf('12')).toBe(-1);
  });
});
