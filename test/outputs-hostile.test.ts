/**
 * Outputs under hostile input: control characters from documents never reach
 * the terminal raw; `evaluate` finds the user's label column under the name
 * `group` renamed it to; huge near-copy sets are written in pieces.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { sheaf, tempDir } from './helpers/cli.js';
import { visible, visibleJson, visibleLines } from '../src/cli/visible.js';

const root = path.resolve(__dirname, '..');
const demoCsv = path.join(root, 'corpus-demo', 'tickets.csv');

/** C0, DEL, C1, bidirectional marks, overrides and isolates, line/paragraph separators. */
const RAW = /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u2028\u2029\u202a-\u202e\u2066-\u2069]/u;
const RAW_BUT_NEWLINE = /[\u0000-\u0009\u000b-\u001f\u007f-\u009f\u061c\u200e\u200f\u2028\u2029\u202a-\u202e\u2066-\u2069]/u;

const ESC = '\u001b';
/** Clear screen (CSI 2J), set window title (OSC 0 … BEL), a hyperlink (OSC 8 … ST), a C1 CSI, a right-to-left override. */
const HOSTILE = [`${ESC}[2J`, `${ESC}]0;owned\u0007`, `${ESC}]8;;https://example.invalid/${ESC}\\click${ESC}]8;;${ESC}\\`, '\u009b31m', '\u202eevil'];

describe('visible(): terminal text from documents', () => {
  it('leaves no C0, C1, DEL or bidi control in its output, for any string', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'binary', maxLength: 60 }), (s) => {
        expect(RAW.test(visible(s))).toBe(false);
        expect(RAW_BUT_NEWLINE.test(visibleLines(s))).toBe(false);
        expect(visibleLines(s).split('\n').length).toBe(s.split('\n').length);
      }),
      { numRuns: 2000 },
    );
  });

  it('spells controls as \\x1b and \\u202e, and keeps every other character', () => {
    expect(visible(`a${ESC}[2Jb\u0007\u007f\u0085\n\u202e\u2066é漢😀`)).toBe('a\\x1b[2Jb\\x07\\x7f\\x85\\x0a\\u202e\\u2066é漢😀');
    expect(visibleLines('one\ntwo\r\n')).toBe('one\ntwo\\x0d\n');
  });

  it('visibleJson keeps JSON valid and the value the same', () => {
    fc.assert(
      fc.property(fc.jsonValue(), (v) => {
        const text = JSON.stringify(v, null, 2);
        const out = visibleJson(text);
        expect(RAW_BUT_NEWLINE.test(out)).toBe(false);
        expect(JSON.parse(out)).toEqual(JSON.parse(text));
      }),
      { numRuns: 500 },
    );
  });
});

describe('terminal output of documents holding escape sequences', () => {
  function hostileCsv(dir: string): string {
    const file = path.join(dir, 'hostile.csv');
    const rows = ['id,title,text'];
    for (let i = 0; i < 40; i++) {
      const trick = HOSTILE[i % HOSTILE.length];
      const topic = i % 2 === 0 ? 'heater boiler cabin warm radiator cold night' : 'mooring rope lock gate canal water level';
      rows.push(`"t${i}${trick}","${trick} title ${i}","${topic} ${trick} word${i % 7}"`);
    }
    writeFileSync(file, rows.join('\n') + '\n');
    return file;
  }

  it('group prints titles and ids with their controls spelt out (table, outline, notes)', async () => {
    const dir = tempDir();
    const run = await sheaf(['group', hostileCsv(dir), '--text', 'text', '--id', 'id', '--title', 'title', '--groups', '2', '--out', path.join(dir, 'o'), '--no-report']);
    expect(run.stderr).not.toMatch(RAW_BUT_NEWLINE);
    expect(run.code).toBe(0);
    expect(run.stdout).not.toMatch(RAW_BUT_NEWLINE);
    expect(run.stdout).toMatch(/\\x1b\[2J title|\\x1b]0;owned\\x07 title|\\u202eevil title|\\x9b31m title/);
    // The files keep the text as it was.
    const docs = parse(readFileSync(path.join(dir, 'o', 'documents.csv')), { columns: true }) as Record<string, string>[];
    expect(docs[0].id).toBe(`t0${ESC}[2J`);
  });

  it('group --json keeps JSON that parses to the same text, with no raw control', async () => {
    const dir = tempDir();
    const run = await sheaf(['group', hostileCsv(dir), '--text', 'text', '--id', 'id', '--title', 'title', '--groups', '2', '--out', path.join(dir, 'o'), '--no-report', '--json', '--quiet']);
    expect(run.code).toBe(0);
    expect(run.stdout).not.toMatch(RAW_BUT_NEWLINE);
    const j = JSON.parse(run.stdout);
    const ids: string[] = j.groups.flatMap((g: { exemplars: string[] }) => g.exemplars);
    expect(ids.some((id) => RAW.test(id))).toBe(true);
  });

  it('duplicates --show prints the representative, ids and diffs with controls spelt out', async () => {
    const dir = tempDir();
    const run = await sheaf(['duplicates', hostileCsv(dir), '--text', 'text', '--id', 'id', '--title', 'title', '--threshold', '0.5', '--show', '5', '--out', path.join(dir, 'o')]);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/^set \d+ — representative t\d+\\/m);
    expect(run.stdout).not.toMatch(RAW_BUT_NEWLINE);
    expect(run.stderr).not.toMatch(RAW_BUT_NEWLINE);
  });

  it('evaluate shows a hostile label column name and labels spelt out', async () => {
    const dir = tempDir();
    const col = `kind${ESC}]0;x\u0007`;
    writeFileSync(path.join(dir, 'd.csv'), `id,group,"${col}"\n1,0,"a${ESC}[2J"\n2,0,"a${ESC}[2J"\n3,1,b\u202e\n4,1,b\u202e\n`);
    const run = await sheaf(['evaluate', 'd.csv', '--truth', col], { cwd: dir });
    expect(run.code).toBe(0);
    expect(run.stdout).not.toMatch(RAW_BUT_NEWLINE);
    expect(run.stdout.split('\n')[0]).toBe('Against "kind\\x1b]0;x\\x07" (4 documents): purity 1.000  NMI 1.000  ARI 1.000  V-measure 1.000');
    expect(run.stdout).toContain('a\\x1b[2J');
    const bad = await sheaf(['evaluate', 'd.csv', '--truth', `no${ESC}[2J`], { cwd: dir });
    expect(bad.code).toBe(2);
    expect(bad.stderr).toBe('sheaf: d.csv has no column "no\\u001b[2J" for --truth; its columns are: id, group, kind\\x1b]0;x\\x07\n');
  });
});

describe('evaluate resolves --truth as group does', () => {
  it('scores the user\'s own "label" column (written as input_label), with the NMI group printed', async () => {
    const dir = tempDir();
    // The demo tickets with their category column named "label", a name sheaf also writes.
    const text = readFileSync(demoCsv, 'utf8');
    const firstLine = text.slice(0, text.indexOf('\n')).replace(/\r$/, '');
    expect(firstLine).toBe('ticket_id,created,channel,customer,subject,body,category,priority');
    writeFileSync(path.join(dir, 'tickets.csv'), firstLine.replace('category', 'label') + text.slice(text.indexOf('\n') - 1));
    const g = await sheaf(['group', 'tickets.csv', '--text', 'subject,body', '--id', 'ticket_id', '--groups', '8', '--truth', 'label', '--out', 'o', '--no-report', '--no-duplicates', '--quiet'], { cwd: dir });
    expect(g.code).toBe(0);
    const groupNmi = JSON.parse(readFileSync(path.join(dir, 'o', 'run.json'), 'utf8')).evaluation.nmi as number;
    const header = readFileSync(path.join(dir, 'o', 'documents.csv'), 'utf8').split('\n')[0].split(',');
    expect(header.slice(0, 5)).toEqual(['id', 'group', 'label', 'fit', 'duplicate_set']);
    expect(header).toContain('input_label');
    const e = await sheaf(['evaluate', path.join('o', 'documents.csv'), '--truth', 'label', '--json'], { cwd: dir });
    expect(e.stderr).toBe('');
    expect(e.code).toBe(0);
    const j = JSON.parse(e.stdout);
    expect(j.nmi).toBe(groupNmi);
    expect(j.nmi).toBeLessThan(0.99); // the groups are not a copy of the labels
    expect(j.field).toBe('label');
    // The renamed name works too, with the same score.
    const e2 = await sheaf(['evaluate', path.join('o', 'documents.csv'), '--truth', 'input_label', '--json'], { cwd: dir });
    expect(JSON.parse(e2.stdout).nmi).toBe(groupNmi);
  });

  it('refuses a name of sheaf\'s own column when no user column was renamed', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'documents.csv'), 'id,group,label,fit,duplicate_set,shape\n1,0,a b,0.5,,x\n2,1,c d,0.5,,y\n');
    const run = await sheaf(['evaluate', 'documents.csv', '--truth', 'label'], { cwd: dir });
    expect(run.code).toBe(2);
    expect(run.stderr).toBe("sheaf: --truth label names a column sheaf wrote in documents.csv, not known labels; its own label column would be input_label, and there is none\n");
  });
});
