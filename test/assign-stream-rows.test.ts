/**
 * `sheaf assign --stream` reads an export's rows as `sheaf group` and the
 * folder-writing `sheaf assign` read them: the same ids (row numbers not
 * shifted by lines holding only spaces), titles (capped), texts (`[]` paths
 * too) and joined-back columns, row by row, on a CSV and a JSON Lines export
 * full of odd cases (byte order mark, CRLF, space-only and blank lines, quoted
 * multi-line fields, a long title, missing text, empty and duplicate ids).
 *
 * The one documented difference: the folder reader makes a repeated id unique
 * (`T1~2`) by looking at the whole pile; a stream cannot look ahead and keeps
 * the id as the row gives it, which is the id that joins back to that row.
 */
import { describe, expect, it, beforeAll } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { Readable } from 'node:stream';
import fc from 'fast-check';
import { sheaf, tempDir } from './helpers/cli.js';
import { streamDocuments } from '../src/cli/assign-stream.js';
import { JSON_INDEX_ROWS } from '../src/cli/stream-rows.js';
import { ingest, resolveIngestOptions, type IngestOptions } from '../src/ingest/index.js';
import type { Doc } from '../src/types.js';

const root = path.resolve(__dirname, '..');
const demoCsv = path.join(root, 'corpus-demo', 'tickets.csv');

const LONG_SUBJECT =
  'Guests at the lake cottage report that the heating, the hot water, the sauna stove and the outdoor lights all failed on the same evening after the storm';

/** The user's rows of the CSV export (header first), as a person would list them. */
const csvUserRows: string[][] = [
  ['ticket_id', 'subject', 'body', 'team'],
  ['T1', 'Heating broken', 'the heating in the cottage is broken\r\nno warm water since monday', 'ops'],
  ['', 'Wifi down', 'wifi router keeps dropping every evening', 'it'],
  ['T3', LONG_SUBJECT, 'pet cleaning fee charged, our dog never went near the beds', 'billing'],
  ['T1', 'Heating again', 'heating still broken "again"', 'ops'],
  ['', '', '', ''],
  ['', 'Late check-in', '', 'front'],
  ['', 'Key box code', 'the key box code does not work', 'front'],
];

const q = (c: string) => (/[",\r\n]/.test(c) || c === '' ? `"${c.replace(/"/g, '""')}"` : c);
const rec = (r: string[]) => r.map(q).join(',') + '\r\n';
const [h, c1, c2, c3, c4, c5, c6, c7] = csvUserRows as [string[], string[], string[], string[], string[], string[], string[], string[]];
/** The CSV text: BOM, CRLF, and between the rows lines holding only spaces or a tab, and a blank line. */
const csvText =
  '\uFEFF' + rec(h) + rec(c1) + '   \r\n' + rec(c2) + '\r\n' + rec(c3) + rec(c4) + ',,,\r\n' + rec(c6) + ' \t \r\n' + rec(c7);
void c5; // the `,,,` row: every cell empty (written unquoted above)

/** The user's rows of the JSON Lines export. */
const jsonUserRows: Record<string, unknown>[] = [
  { id: 'J1', subject: 'Heating broken', body: 'the heating is broken', comments: [], tags: ['heating', 'urgent'], meta: { channel: 'chat' } },
  { id: '', subject: LONG_SUBJECT, body: 'wifi router keeps dropping', comments: [{ body: 'still dropping every evening' }, { body: 'router replaced' }], tags: [] },
  { id: 'J1', subject: 'Heating again', body: '', comments: [{ body: 'no warm water' }] },
  { subject: 'Nothing here' },
  { id: null, body: 'pet cleaning fee charged', comments: [{ author: 'desk' }], tags: ['billing'] },
  { id: 7, subject: 'Key box', body: 'key box code\r\nwrong', tags: ['keys'] },
];
const j = (o: Record<string, unknown>) => JSON.stringify(o) + '\r\n';
const [o1, o2, o3, o4, o5, o6] = jsonUserRows as Record<string, unknown>[];
/** The JSON Lines text: BOM, CRLF, a line of spaces and a blank line between rows. */
const jsonlText = '\uFEFF' + j(o1!) + '    \r\n' + j(o2!) + '\r\n' + j(o3!) + j(o4!) + '\t\r\n' + j(o5!) + j(o6!);

/** A JSON value as the readers write it into a column: strings as they are, null/missing empty, else JSON. */
const cellOf = (v: unknown) => (v === undefined || v === null ? '' : typeof v === 'string' ? v : JSON.stringify(v));

/**
 * The stream's id for a row the folder reader gave `batchId`: the same, or, for an id the folder reader made
 * unique (`T1~2`), the id as the row gives it.
 */
function expectSameId(streamId: string, batchId: string, seenBefore: ReadonlySet<string>): void {
  if (streamId === batchId) return;
  expect(seenBefore.has(streamId)).toBe(true);
  expect(batchId).toMatch(new RegExp(`^${streamId.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}~\\d+$`));
}

async function streamed(file: string, options: Partial<IngestOptions>, cwd: string, stdin?: Readable): Promise<Doc[]> {
  const io = { cwd, env: {}, stdout: { write: () => true }, stderr: { write: () => true }, ...(stdin ? { stdin } : {}) };
  const s = await streamDocuments([file], resolveIngestOptions(options), io);
  const out: Doc[] = [];
  for await (const d of s.docs) out.push(d);
  return out;
}

/** Text cut into pieces at the given places, as a stdin of byte chunks (cuts may fall inside a character). */
function chunked(text: string, cuts: readonly number[]): Readable {
  const bytes = Buffer.from(text, 'utf8');
  const at = [...new Set([0, ...cuts.map((c) => c % (bytes.length + 1)), bytes.length])].sort((a, b) => a - b);
  const parts: Buffer[] = [];
  for (let i = 0; i + 1 < at.length; i++) parts.push(bytes.subarray(at[i], at[i + 1]));
  return Readable.from(parts);
}

/** Both readers over the same text on stdin: the stream's documents and ingest's, or the one-line error of each. */
async function bothReaders(text: string, cuts: readonly number[], options: Partial<IngestOptions>): Promise<{ stream: Doc[] | string; batch: Doc[] | string }> {
  const cwd = process.cwd();
  const stream = await streamed('-', options, cwd, chunked(text, cuts)).catch((e: Error) => e.message);
  const batch = await ingest(['-'], options, { cwd, stdin: chunked(text, cuts) })
    .then((r) => r.docs)
    .catch((e: Error) => e.message);
  return { stream, batch };
}

/** Compares the documents of the two readers row by row. */
function compareDocs(stream: Doc[], batch: Doc[]): void {
  expect(stream.map((d) => d.source)).toEqual(batch.map((d) => d.source));
  const seen = new Set<string>();
  for (let i = 0; i < batch.length; i++) {
    const s = stream[i] as Doc;
    const b = batch[i] as Doc;
    expectSameId(s.id, b.id, seen);
    seen.add(s.id);
    expect({ title: s.title, text: s.text, titleFromText: s.titleFromText }).toEqual({ title: b.title, text: b.text, titleFromText: b.titleFromText });
    expect([...s.fields]).toEqual([...b.fields]);
  }
}

describe('assign --stream reads rows as the whole-export readers do', () => {
  let model: string;
  let dir: string;

  beforeAll(async () => {
    dir = tempDir();
    writeFileSync(path.join(dir, 'odd.csv'), csvText);
    writeFileSync(path.join(dir, 'odd.jsonl'), jsonlText);
    const out = path.join(dir, 'fit');
    const run = await sheaf(['group', demoCsv, '--text', 'subject,body', '--id', 'ticket_id', '--groups', '8', '--out', out, '--quiet']);
    expect(run.code).toBe(0);
    model = path.join(out, 'model.json');
  });

  const cases: { file: string; flags: string[]; options: Partial<IngestOptions> }[] = [
    { file: 'odd.csv', flags: ['--text', 'body', '--id', 'ticket_id'], options: { text: ['body'], id: 'ticket_id' } },
    { file: 'odd.csv', flags: ['--text', 'subject,body'], options: { text: ['subject', 'body'] } },
    { file: 'odd.jsonl', flags: ['--text', 'body,comments[].body', '--id', 'id'], options: { text: ['body', 'comments[].body'], id: 'id' } },
    { file: 'odd.jsonl', flags: ['--text', 'tags[],body', '--title', 'meta.channel'], options: { text: ['tags[]', 'body'], title: 'meta.channel' } },
  ];

  it('gives the same documents (ids, titles, texts, joined-back fields) as ingest, row by row', async () => {
    for (const c of cases) {
      const batch = (await ingest([c.file], c.options, { cwd: dir })).docs;
      const stream = await streamed(c.file, c.options, dir);
      expect(batch.length).toBe(c.file.endsWith('.csv') ? 7 : 6);
      compareDocs(stream, batch);
    }
    // The long subject (152 characters) is capped in both: at most 120 characters, cut at the last space among
    // them (when it falls in their final third), then "…".
    const docs = await streamed('odd.csv', cases[0]!.options, dir);
    expect(docs[2]!.title).toBe('Guests at the lake cottage report that the heating, the hot water, the sauna stove and the outdoor lights all failed on…');
    // Row numbers count rows only: the last CSV row is row 7 whatever lines of spaces stand before it.
    expect(docs.map((d) => d.id)).toEqual(['T1', '2', 'T3', 'T1', '5', '6', '7']);
  });

  it('gives the same documents as ingest on random exports with odd lines, line ends and chunk cuts (fast-check)', async () => {
    const cellChar = fc.constantFrom('a', 'b', 'é', ' ', '"', ',', '\n', '\r', '\t', '\u00a0');
    const cell = fc.oneof(fc.string({ unit: cellChar, maxLength: 12 }), fc.string({ unit: cellChar, minLength: 130, maxLength: 200 }));
    const id = fc.constantFrom('', 'k1', 'k2', 'k2~2', ' k3 ');
    const between = fc.constantFrom('', '   ', ' \t ', null, null, null);
    const cuts = fc.array(fc.nat(), { maxLength: 6 });
    const csvRow = fc.record({ id, title: cell, body: cell, gap: between });
    await fc.assert(
      fc.asyncProperty(fc.array(csvRow, { minLength: 1, maxLength: 12 }), fc.constantFrom('\n', '\r\n'), fc.boolean(), cuts, async (rs, eol, bom, cs) => {
        const field = (v: string) => (/[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v);
        let text = (bom ? '\uFEFF' : '') + 'id,title,body' + eol;
        for (const r of rs) text += (r.gap === null ? '' : r.gap + eol) + [r.id, r.title, r.body].map(field).join(',') + eol;
        const { stream, batch } = await bothReaders(text, cs, { text: ['body'], id: 'id' });
        expect(typeof stream).toBe(typeof batch);
        if (typeof batch === 'string') expect(stream).toBe(batch);
        else compareDocs(stream as Doc[], batch);
      }),
      { numRuns: 40, seed: 23 },
    );
    const jsonRow = fc.record(
      { id: fc.oneof(id, fc.constant(null), fc.integer()), subject: cell, body: cell, comments: fc.array(fc.record({ body: cell }, { requiredKeys: [] }), { maxLength: 3 }), gap: between },
      { requiredKeys: ['gap'] },
    );
    await fc.assert(
      fc.asyncProperty(fc.array(jsonRow, { minLength: 1, maxLength: 12 }), fc.constantFrom('\n', '\r\n'), fc.boolean(), cuts, async (rs, eol, bom, cs) => {
        let text = bom ? '\uFEFF' : '';
        for (const { gap, ...o } of rs) text += (gap === null ? '' : gap + eol) + JSON.stringify(o) + eol;
        const { stream, batch } = await bothReaders(text, cs, { text: ['body', 'comments[].body'], id: 'id' });
        expect(typeof stream).toBe(typeof batch);
        if (typeof batch === 'string') expect(stream).toBe(batch);
        else compareDocs(stream as Doc[], batch);
      }),
      { numRuns: 40, seed: 29 },
    );
  });

  it(`chooses JSON Lines columns from the first ${JSON_INDEX_ROWS} rows, and hands on more rows than a batch`, async () => {
    const many = Array.from({ length: JSON_INDEX_ROWS + 300 }, (_, i) => JSON.stringify(i === 0 ? { body: 'first', comments: [] } : { body: `row ${i}`, comments: [{ body: `note ${i}` }] })).join('\n');
    const { stream, batch } = await bothReaders(many, [4096, 9000], { text: ['body', 'comments[].body'] });
    expect((stream as Doc[]).length).toBe(JSON_INDEX_ROWS + 300);
    compareDocs(stream as Doc[], batch as Doc[]);
    // A path first seen after those rows: the whole-export reader finds it, the stream says it has no such column.
    const late = many + '\n' + JSON.stringify({ body: 'last', late: 'x' });
    const both = await bothReaders(late, [], { text: ['late'] });
    expect((both.batch as Doc[]).at(-1)?.text).toBe('x');
    expect(both.stream).toBe('stdin has no column "late" for --text; its columns are: body, comments, comments[].body');
  });

  it('reads as it goes: the first document comes after a few chunks of a long input, not after the whole of it', async () => {
    const CHUNKS = 1000;
    const ROWS = 20;
    for (const kind of ['csv', 'jsonl'] as const) {
      let pulled = 0;
      async function* source(): AsyncGenerator<Buffer> {
        if (kind === 'csv') yield Buffer.from('id,body\n');
        for (let c = 0; c < CHUNKS; c++) {
          pulled++;
          let text = '';
          for (let r = 0; r < ROWS; r++) {
            const i = c * ROWS + r;
            text += kind === 'csv' ? `r${i},water pump broken in cottage ${i}\n  \n` : JSON.stringify({ id: `r${i}`, body: `water pump broken in cottage ${i}` }) + '\n \n';
          }
          yield Buffer.from(text);
        }
      }
      const s = await streamDocuments(['-'], resolveIngestOptions({ text: ['body'], id: 'id' }), {
        cwd: process.cwd(), env: {}, stdout: { write: () => true }, stderr: { write: () => true }, stdin: Readable.from(source()),
      });
      let n = 0;
      let pulledAtFirst = -1;
      for await (const d of s.docs) {
        if (n === 0) pulledAtFirst = pulled;
        expect(d.id).toBe(`r${n}`);
        n++;
      }
      expect(n).toBe(CHUNKS * ROWS);
      // CSV: one chunk of records; JSON Lines: the rows its columns are chosen from. Stream buffers add a few more.
      expect(pulledAtFirst).toBeGreaterThan(0);
      expect(pulledAtFirst).toBeLessThan((kind === 'csv' ? 1 : JSON_INDEX_ROWS / ROWS) + 40);
    }
  });

  it('writes the ids, groups and fits of the folder assign, and its ids join back to the rows assigned.csv repeats', async () => {
    for (const c of cases) {
      const s = await sheaf(['assign', c.file, '--model', model, ...c.flags, '--clean', 'none', '--stream', 'csv', '--quiet'], { cwd: dir });
      expect(s.stderr).toBe('');
      expect(s.code).toBe(0);
      const f = await sheaf(['assign', c.file, '--model', model, ...c.flags, '--clean', 'none', '--out', 'a', '--quiet'], { cwd: dir });
      expect(f.code).toBe(0);
      const rows = parse(s.stdout, { columns: true }) as Record<string, string>[];
      const folder = parse(readFileSync(path.join(dir, 'a', 'assigned.csv')), { columns: true, bom: true }) as Record<string, string>[];
      expect(rows).toHaveLength(folder.length);
      // assigned.csv repeats the user's columns after its own eight: those the stream's ids must join back to.
      expect(Object.keys(folder[0]!).slice(8).length).toBeGreaterThanOrEqual(3);
      const csv = c.file.endsWith('.csv');
      const idKey = c.flags.includes('--id') ? (csv ? 'ticket_id' : 'id') : null;
      const userRows: Record<string, string>[] = csv
        ? csvUserRows.slice(1).map((r) => Object.fromEntries(csvUserRows[0]!.map((k, i) => [k, r[i] as string])))
        : jsonUserRows.map((o) => Object.fromEntries(Object.keys(o).map((k) => [k, cellOf(o[k])])));
      const seen = new Set<string>();
      const used = new Map<string, number>();
      for (let i = 0; i < folder.length; i++) {
        const r = rows[i]!;
        const b = folder[i]!;
        expectSameId(r.id!, b.id!, seen);
        seen.add(r.id!);
        for (const k of ['group', 'label', 'fit', 'status', 'second_group', 'second_label', 'second_fit']) expect(r[k]).toBe(b[k]);
        // Join the streamed id back to the user's rows: by the id column (the k-th row with a repeated id for
        // its k-th appearance), else by row number for a row whose id is empty.
        const k = used.get(r.id!) ?? 0;
        used.set(r.id!, k + 1);
        const byId = idKey === null ? [] : userRows.filter((u) => (u[idKey] ?? '') === r.id);
        const user = byId.length > 0 ? byId[k] : userRows[Number(r.id) - 1];
        expect(user).toBeDefined();
        if (idKey !== null && byId.length === 0) expect(user![idKey] ?? '').toBe('');
        for (const col of Object.keys(b).slice(8)) if (col !== idKey) expect([col, user![col] ?? '']).toEqual([col, b[col]]);
      }
    }
  });

  it('refuses what a stream cannot read with one exact line and exit code 2', async () => {
    writeFileSync(path.join(dir, 'rows.json'), JSON.stringify(jsonUserRows));
    const cases: [string[], string, string?][] = [
      [['odd.jsonl', '--text', 'body', '--id', 'tags[]'], 'sheaf: --id takes one value per row; "tags[]" names every element of an array\n'],
      [['-', '--text', 'body'], 'sheaf: stdin: the record starting on line 3 has a quote that is never closed\n', 'body\nfine\n"never closed\nmore\n'],
      [['rows.json', '--text', 'body'], 'sheaf: --stream reads CSV, TSV or JSON Lines exports; rows.json is a JSON array, which is read whole (write it as JSON Lines, one object per line)\n'],
      [['-', '--text', 'body'], 'sheaf: --stream reads CSV, TSV or JSON Lines exports; stdin holds a JSON array, which is read whole (write it as JSON Lines, one object per line)\n', ' [{"body":"x"}]\n'],
      [['notes.txt', '--text', 'body'], 'sheaf: --stream reads CSV, TSV or JSON Lines exports; notes.txt is none of .csv, .tsv, .tab, .jsonl, .ndjson (name one with --format)\n'],
    ];
    writeFileSync(path.join(dir, 'notes.txt'), 'body\nx\n');
    for (const [args, message, stdin] of cases) {
      const r = await sheaf(['assign', ...args, '--model', model, '--stream', 'jsonl'], { cwd: dir, ...(stdin === undefined ? {} : { stdin }) });
      expect(r.stderr).toBe(message);
      expect(r.code).toBe(2);
    }
    // The folder assign refuses the array path for --id with the same line.
    const f = await sheaf(['assign', 'odd.jsonl', '--text', 'body', '--id', 'tags[]', '--model', model, '--out', 'b', '--quiet'], { cwd: dir });
    expect(f.stderr).toBe(cases[0]![1]);
  });
});
