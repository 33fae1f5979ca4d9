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
import { duplicatesJson, duplicatesJsonChunks, nearCopyPairsCsvChunks, type DuplicateOutputSource } from '../src/report/duplicates.js';
import { jsonText } from '../src/report/outputs.js';
import { diffText } from '../src/cli/duplicates.js';

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
    const docs = parse(readFileSync(path.join(dir, 'o', 'documents.csv')), { columns: true, bom: true }) as Record<string, string>[];
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

  it('near-copy word changes: our own marks around spelt-out controls, no bracket notation', () => {
    const line = visible(diffText({ pieces: [{ kind: 'same', text: 'refund ' }, { kind: 'added', text: `now${ESC}[2J` }, { kind: 'removed', text: 'later\u202e' }] }));
    expect(line).toBe('refund ▸now\\x1b[2J◂▹later\\u202e◃');
    expect(line).not.toMatch(/⟦|\{\+|\[-/);
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
    const header = readFileSync(path.join(dir, 'o', 'documents.csv'), 'utf8').replace(/^\uFEFF/, '').split('\n')[0].split(',');
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

describe('near-copy outputs of a run with millions of pairs', () => {
  it('duplicatesJsonChunks is the text of jsonText(duplicatesJson()), piece by piece; the pairs file has every pair', () => {
    // One set of 12 rows (66 pairs: 11 with the representative, row 0, and 55 others: 50 listed) and one of 2.
    const docs = Array.from({ length: 14 }, (_, i) => ({ id: `d${i}`, text: '', title: '', source: '', fields: new Map<string, string>() }));
    const a: number[] = [];
    const b: number[] = [];
    const sim: number[] = [];
    for (let i = 0; i < 12; i++) for (let j = i + 1; j < 12; j++) {
      a.push(i);
      b.push(j);
      sim.push(0.9 + ((i * 12 + j) % 17) / 200);
    }
    a.push(12);
    b.push(13);
    sim.push(0.95);
    const setOf = Int32Array.from({ length: 14 }, (_, i) => (i < 12 ? 0 : 1));
    const mk = (id: number, members: number[]) => ({ id, representative: members[0], members: Int32Array.from(members), similarityToRepresentative: Float32Array.from(members, () => 0.95), meanSimilarity: 0.95, weakest: 0.9, chained: false });
    const src = {
      docs, by: 'tfidf', threshold: 0.9, setOf,
      sets: [mk(0, [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11]), mk(1, [12, 13])],
      pairs: { a: Int32Array.from(a), b: Int32Array.from(b), similarity: Float32Array.from(sim), threshold: 0.9 },
    } as unknown as DuplicateOutputSource;
    const pieces = [...duplicatesJsonChunks(src, { note: 'x' })];
    expect(pieces.length).toBeGreaterThan(3);
    expect(pieces.join('')).toBe(jsonText(duplicatesJson(src, { note: 'x' })));
    const j = JSON.parse(pieces.join(''));
    expect(j.sets[0].pairCount).toBe(66);
    expect(j.sets[0].pairs).toHaveLength(11 + 50);
    // The 5 left out are the weakest of the 55 others.
    const listed = new Set(j.sets[0].pairs.map((p: { a: string; b: string }) => `${p.a}-${p.b}`));
    const others = a.map((x, p) => [x, b[p], Math.fround(sim[p])] as const).filter(([x]) => x !== 0 && x < 12);
    const weakestListed = Math.min(...others.filter(([x, y]) => listed.has(`d${x}-d${y}`)).map((t) => t[2]));
    for (const [x, y, v] of others.filter(([x, y]) => !listed.has(`d${x}-d${y}`))) expect(v).toBeLessThanOrEqual(weakestListed);
    expect(j.sets[1].pairs).toEqual([{ a: 'd12', b: 'd13', similarity: 0.95 }]);
    const csv = [...nearCopyPairsCsvChunks(src)].join('');
    expect(csv.split('\r\n').filter((l) => l !== '')).toHaveLength(1 + 67);
    expect(csv.split('\r\n').at(-2)).toBe('1,d12,d13,0.950000');
  });

  it('writes 100k rows in sets of 100 near-copies (4.95M pairs; one JSON string of them was too long): every pair in near-copy-pairs.csv, a bounded share per set in duplicates.json', async () => {
    const dir = tempDir();
    // 1000 themes of 8 invented words; each row is its theme plus a reference number (not a term by default),
    // so no two texts are equal but every row has the same vector as the other 99 of its theme.
    const syllables = ['ka', 'lo', 'mi', 'ru', 'te', 'sa', 'no', 'vi', 'de', 'pa', 'zu', 'be', 'go', 'ha', 'ji'];
    const word = (i: number): string => {
      let s = '';
      do {
        s += syllables[i % 15];
        i = Math.floor(i / 15);
      } while (i > 0);
      return s + 'q';
    };
    const lines = ['id,text'];
    for (let r = 0; r < 100_000; r++) {
      const theme = Math.floor(r / 100);
      const words: string[] = [];
      for (let w = 0; w < 8; w++) words.push(word(theme * 8 + w));
      lines.push(`lanternfen-ticket-${String(r).padStart(6, '0')},${words.join(' ')} ref ${r}`);
    }
    writeFileSync(path.join(dir, 'near.csv'), lines.join('\n') + '\n');
    try {
      const run = await sheaf(['duplicates', 'near.csv', '--text', 'text', '--id', 'id', '--clean', 'none', '--out', 'o', '--quiet'], { cwd: dir });
      expect(run.stderr).toBe('');
      expect(run.code).toBe(0);
      const counts = JSON.parse(readFileSync(path.join(dir, 'o', 'run.json'), 'utf8')).counts;
      expect(counts).toMatchObject({ documents: 100_000, sets: 1000, inSets: 100_000, pairs: 1000 * ((100 * 99) / 2) });
      // Count the pairs file's records without holding it as one string.
      const { createReadStream } = await import('node:fs');
      let newlines = 0;
      let head = '';
      for await (const chunk of createReadStream(path.join(dir, 'o', 'near-copy-pairs.csv'))) {
        const buf = chunk as Buffer;
        if (head === '') head = buf.subarray(0, 80).toString('utf8');
        for (let i = 0; i < buf.length; i++) if (buf[i] === 10) newlines++;
      }
      expect(head.split('\r\n')[0]).toBe('\uFEFFset,a,b,similarity'); // the UTF-8 byte order mark first
      expect(newlines - 1).toBe(counts.pairs);
      const dup = JSON.parse(readFileSync(path.join(dir, 'o', 'duplicates.json'), 'utf8'));
      expect(dup.pairs).toBe(counts.pairs);
      expect(dup.pairsFile).toBe('near-copy-pairs.csv');
      expect(dup.sets).toHaveLength(1000);
      for (const s of dup.sets.slice(0, 20)) {
        expect(s.pairCount).toBe(4950);
        // 99 pairs with the representative, then the 50 strongest others.
        expect(s.pairs).toHaveLength(99 + 50);
        expect(s.pairs.filter((p: { a: string; b: string }) => p.a === s.representative || p.b === s.representative)).toHaveLength(99);
      }
    } finally {
      const { rmSync } = await import('node:fs');
      rmSync(dir, { recursive: true, force: true });
    }
  }, 180_000);
});
