/**
 * CSV files that open cleanly in a spreadsheet (issue 15): a UTF-8 byte order
 * mark before every CSV sheaf writes unless --no-bom, and the formula guard on
 * sheaf's own cells only — the user's joined-back cells are written as they
 * were. Exact bytes.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { csvChunks, csvText, guardCell, withBom, withCsvBom } from '../src/report/csv.js';
import { sheaf, tempDir } from './helpers/cli.js';

const BOM = Buffer.from([0xef, 0xbb, 0xbf]);

/** Six tickets in two themes; one note a spreadsheet would take for a formula, one id that is one. */
function tickets(dir: string): string {
  const file = path.join(dir, 'tickets.csv');
  const rows = [
    'ticket,amount,note,body',
    'T1,-5,-5 refund,printer jams paper tray printer jams again',
    'T2,+3,=SUM(A1:A2),printer paper tray jams every morning printer',
    '=1+1,12,@owner,printer jams the paper tray and stops',
    'T4,7,plain,invoice total wrong charged twice invoice refund',
    'T5,-0.5,-x,invoice charged twice refund the invoice total',
    'T6,9,ok,invoice refund charged twice total wrong',
  ];
  writeFileSync(file, rows.join('\n') + '\n');
  return file;
}

describe('CSV cells: the guard on sheaf’s own columns only', () => {
  it('guards the leading `guarded` columns and writes the rest as they were', () => {
    // Header and rows alike: two columns of sheaf's, then the user's.
    const text = csvText(['id', 'label', '-x', 'note'], [['=a', '-5 refund', '-5 refund', '=SUM(A1)']], { guarded: 2 });
    expect(text).toBe("id,label,-x,note\r\n'=a,'-5 refund,-5 refund,=SUM(A1)\r\n");
    // Without a layout every cell is guarded, as before.
    expect(csvText(['a'], [['@x']])).toBe("a\r\n'@x\r\n");
    // Pieces carry the same layout.
    expect([...csvChunks(['id', 'n'], [['-y', '-y']], { guarded: 1, rowsPerChunk: 1 })].join('')).toBe("id,n\r\n'-y,-y\r\n");
  });

  it('leaves plain numbers alone: -5 is a number, not a formula (common practice)', () => {
    expect(guardCell('-5')).toBe('-5');
    expect(guardCell('1e-3')).toBe('1e-3');
    expect(guardCell('-5 refund')).toBe("'-5 refund");
  });
});

describe('the UTF-8 byte order mark', () => {
  it('goes before a string, pieces of text and bytes, and only before .csv files', () => {
    expect(withBom('a,b\r\n')).toBe('\uFEFFa,b\r\n');
    expect([...(withBom(['a', 'b']) as Iterable<string>)]).toEqual(['\uFEFF', 'a', 'b']);
    expect(Array.from(withBom(new Uint8Array([0x61])) as Uint8Array)).toEqual([0xef, 0xbb, 0xbf, 0x61]);
    const files = withCsvBom(new Map([['x.csv', 'a\r\n'], ['x.json', '{}\n'], ['Y.CSV', 'b\r\n']]));
    expect([...files]).toEqual([['x.csv', '\uFEFFa\r\n'], ['x.json', '{}\n'], ['Y.CSV', '\uFEFFb\r\n']]);
  });
});

describe('sheaf group writes documents.csv for a spreadsheet', () => {
  it('starts with the BOM, guards sheaf’s id, writes the user’s cells as they were', async () => {
    const dir = tempDir();
    const input = tickets(dir);
    const run = await sheaf(['group', input, '--text', 'body', '--id', 'ticket', '--groups', '2', '--no-report', '--out', path.join(dir, 'o'), '--quiet']);
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    const bytes = readFileSync(path.join(dir, 'o', 'documents.csv'));
    expect(bytes.subarray(0, 3).equals(BOM)).toBe(true);
    const lines = bytes.subarray(3).toString('utf8').split('\r\n');
    // The --id column becomes sheaf's id column (not repeated among the user's).
    expect(lines[0]).toBe('id,group,label,fit,duplicate_set,next_group,next_margin,amount,note,body');
    // Sheaf's id cell is guarded; the user's own amount and note cells are not.
    expect(lines[1]).toMatch(/^T1,[01],[^,]+,0\.\d{4},\d*,[01],-?\d\.\d{4},-5,-5 refund,printer jams paper tray printer jams again$/);
    expect(lines[2]).toMatch(/^T2,[01],[^,]+,0\.\d{4},\d*,[01],-?\d\.\d{4},\+3,=SUM\(A1:A2\),printer paper tray jams every morning printer$/);
    expect(lines[3]).toMatch(/^'=1\+1,[01],[^,]+,0\.\d{4},\d*,[01],-?\d\.\d{4},12,@owner,printer jams the paper tray and stops$/);
    expect(lines[5]).toMatch(/^T5,[01],[^,]+,0\.\d{4},\d*,[01],-?\d\.\d{4},-0\.5,-x,invoice charged twice refund the invoice total$/);
    expect(lines[7]).toBe('');
    // The other CSV files of the run carry the mark too.
    for (const f of ['duplicates.csv', 'near-copy-pairs.csv']) expect(readFileSync(path.join(dir, 'o', f)).subarray(0, 3).equals(BOM)).toBe(true);
  });

  it('--no-bom leaves the mark out of every CSV file', async () => {
    const dir = tempDir();
    const input = tickets(dir);
    const run = await sheaf(['group', input, '--text', 'body', '--id', 'ticket', '--groups', '2', '--no-report', '--no-bom', '--out', path.join(dir, 'o'), '--quiet']);
    expect(run.code).toBe(0);
    for (const f of ['documents.csv', 'duplicates.csv', 'near-copy-pairs.csv']) {
      expect(readFileSync(path.join(dir, 'o', f), 'utf8').slice(0, 3), f).toBe(f === 'documents.csv' ? 'id,' : 'set');
    }
  });
});

describe('sheaf duplicates and sheaf assign write the BOM too', () => {
  it('duplicates.csv and near-copy-pairs.csv start with the mark; --no-bom drops it', async () => {
    const dir = tempDir();
    const input = path.join(dir, 'drafts.csv');
    writeFileSync(input, 'id,body\n=a,the same words in the same draft\nb,the same words in the same draft\nc,something else entirely here\n');
    const on = await sheaf(['duplicates', input, '--text', 'body', '--id', 'id', '--out', path.join(dir, 'on'), '--quiet']);
    expect(on.code).toBe(0);
    expect(readFileSync(path.join(dir, 'on', 'duplicates.csv'), 'utf8')).toBe("\uFEFFset,id,similarity,representative\r\n0,'=a,1.0000,'=a\r\n0,b,1.0000,'=a\r\n");
    expect(readFileSync(path.join(dir, 'on', 'near-copy-pairs.csv'), 'utf8')).toBe("\uFEFFset,a,b,similarity\r\n0,'=a,b,1.000000\r\n");
    const off = await sheaf(['duplicates', input, '--text', 'body', '--id', 'id', '--no-bom', '--out', path.join(dir, 'off'), '--quiet']);
    expect(off.code).toBe(0);
    expect(readFileSync(path.join(dir, 'off', 'duplicates.csv'), 'utf8')).toBe("set,id,similarity,representative\r\n0,'=a,1.0000,'=a\r\n0,b,1.0000,'=a\r\n");
  });

  it('assigned.csv starts with the mark and keeps the input’s own cells as they were', async () => {
    const dir = tempDir();
    const input = tickets(dir);
    expect((await sheaf(['group', input, '--text', 'body', '--id', 'ticket', '--groups', '2', '--no-report', '--out', path.join(dir, 'o'), '--quiet'])).code).toBe(0);
    const run = await sheaf(['assign', input, '--model', path.join(dir, 'o', 'model.json'), '--text', 'body', '--id', 'ticket', '--out', path.join(dir, 'a'), '--quiet']);
    expect(run.code).toBe(0);
    const text = readFileSync(path.join(dir, 'a', 'assigned.csv'), 'utf8');
    expect(text.startsWith('\uFEFFid,group,label,fit,status,second_group,second_label,second_fit,amount,note,body\r\n')).toBe(true);
    expect(text).toMatch(/\r\nT1,[01],[^,]+,0\.\d{4},(matched|new),[01],[^,]+,-?\d\.\d{4},-5,-5 refund,printer jams/);
    expect(text).toMatch(/\r\n'=1\+1,[01],[^,]+,0\.\d{4},(matched|new),[01],[^,]+,-?\d\.\d{4},12,@owner,/);
    const off = await sheaf(['assign', input, '--model', path.join(dir, 'o', 'model.json'), '--text', 'body', '--id', 'ticket', '--no-bom', '--out', path.join(dir, 'b'), '--quiet']);
    expect(off.code).toBe(0);
    expect(readFileSync(path.join(dir, 'b', 'assigned.csv'), 'utf8').startsWith('id,group,')).toBe(true);
  });
});
