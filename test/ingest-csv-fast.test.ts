import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { csvItems, LONGEST_SCANNED_RECORD, type CsvEngine, type CsvItem } from '../src/ingest/csv-records.js';
import { readCsvWith, swallowedRows, type CsvReadOptions } from '../src/ingest/csv.js';

/** `text` cut at `cuts`, never inside a surrogate pair (a decoder's chunks never split one). */
async function* chunked(text: string, cuts: readonly number[]): AsyncGenerator<string> {
  let at = 0;
  for (const c of [...cuts].sort((a, b) => a - b)) {
    let p = Math.min(text.length, c);
    if (p > 0 && p < text.length && /[\uD800-\uDBFF]/.test(text[p - 1]!)) p++;
    if (p > at) {
      yield text.slice(at, p);
      at = p;
    }
  }
  if (at < text.length) yield text.slice(at);
}

/** What the reader uses of each record (raw only through its lines shaped like rows), or the error and the line reached. */
async function itemsOf(text: string, cuts: readonly number[], delimiter: string, engine: CsvEngine): Promise<unknown> {
  const progress = { lastEnd: 0 };
  const seen: unknown[] = [];
  try {
    for await (const batch of csvItems(chunked(text, cuts), delimiter, progress, engine)) {
      for (const it of batch as CsvItem[]) {
        seen.push([it.record, it.startLine, it.endLine, it.blank, it.endLine > it.startLine + 1 ? swallowedRows(it.raw, delimiter, 3) : 0]);
      }
    }
  } catch (err) {
    // An error makes the whole file a skip: which records got out before it (csv-parse may hold back a
    // chunk's worth) does not matter, only the error and the line it names.
    return { code: (err as { code?: string }).code, line: progress.lastEnd + 1 };
  }
  return seen;
}

async function readOf(text: string, cuts: readonly number[], options: CsvReadOptions, engine: CsvEngine): Promise<unknown> {
  try {
    const r = await readCsvWith(chunked(text, cuts), 'x.csv', 'csv', options, engine);
    return { ...r, docs: r.docs.map((d) => ({ ...d, fields: [...d.fields] })) };
  } catch (err) {
    return { error: (err as Error).message };
  }
}

// Pieces that exercise every state of the scanner: quotes (opening, doubled, stray), every line ending, BOM, delimiters.
const PIECE = fc.constantFrom('a', 'bc', ' ', 'é', '😀', ',', ',', ';', '\t', '"', '""', '\r', '\n', '\r\n', '\uFEFF', 'x,y,z\n', '"q\nr",', '"s""t"');
const TEXT = fc.array(PIECE, { maxLength: 40 }).map((p) => p.join(''));
// Mostly well-formed exports: quoted or plain fields, records of 1 to 4 fields, any line ending.
const FIELD = fc.oneof(
  fc.stringMatching(/^[a-z é]{0,6}$/),
  fc.array(fc.constantFrom('a', ',', '""', '\n', '\r\n', '\r', ' '), { maxLength: 6 }).map((p) => `"${p.join('')}"`),
);
const RECORD = fc.tuple(fc.array(FIELD, { minLength: 1, maxLength: 4 }), fc.constantFrom('\n', '\r\n', '\r'));
const EXPORT = fc.tuple(fc.boolean(), fc.array(RECORD, { maxLength: 12 }), fc.boolean()).map(([bom, recs, lastBreak]) => {
  const body = recs.map(([f, nl], i) => f.join(',') + (i < recs.length - 1 || lastBreak ? nl : '')).join('');
  return (bom ? '\uFEFF' : '') + 'id,text,topic\n' + body;
});
const CUTS = fc.array(fc.nat({ max: 400 }), { maxLength: 6 });

describe('CSV fast scanner against csv-parse (fast-check)', () => {
  it('reads the same records, lines, blanks and errors on random text with quotes, CR/LF, BOM and empty fields', async () => {
    await fc.assert(
      fc.asyncProperty(TEXT, CUTS, fc.constantFrom(',', ';', '\t'), async (text, cuts, delim) => {
        expect(await itemsOf(text, cuts, delim, 'fast')).toEqual(await itemsOf(text, [], delim, 'csv-parse'));
      }),
      { numRuns: 600 },
    );
  });

  it('reads the same records on random well-formed exports, whatever the chunking', async () => {
    await fc.assert(
      fc.asyncProperty(EXPORT, CUTS, async (text, cuts) => {
        expect(await itemsOf(text, cuts, ',', 'fast')).toEqual(await itemsOf(text, [], ',', 'csv-parse'));
      }),
      { numRuns: 400 },
    );
  });

  it('gives the same documents, warnings, merged records and errors as csv-parse through readCsv', async () => {
    const options: CsvReadOptions = { text: ['text'], id: 'id', title: null, delimiter: null };
    const inputs = fc.oneof(EXPORT, TEXT.map((t) => 'id,text,topic\n' + t));
    await fc.assert(
      fc.asyncProperty(inputs, CUTS, async (text, cuts) => {
        expect(await readOf(text, cuts, options, 'fast')).toEqual(await readOf(text, [], options, 'csv-parse'));
      }),
      { numRuns: 300 },
    );
  });

  it('keeps the line numbers of the "read as one record" warning when csv-parse takes over midway', async () => {
    // Rows 1-2 are plain (scanner); row 3 opens a quote that swallows four rows (csv-parse from there on).
    const text = 'id,text,topic\n1,a,t\n2,b,t\n3,"c,t\n4,d,t\n5,e,t\n6,f,t\n7,g",t\n8,h"i,t\n';
    const fast = (await readOf(text, [7, 30], { text: ['text'], id: 'id', title: null, delimiter: null }, 'fast')) as { warnings: string[] };
    expect(fast.warnings).toContain(
      'x.csv: lines 4–8 were read as one record: a quoted field runs over 4 lines shaped like rows of their own (a stray or missing quote?)',
    );
    expect(fast.warnings).toContain('x.csv: 8 rows read as 4 documents');
    expect(fast).toEqual(await readOf(text, [], { text: ['text'], id: 'id', title: null, delimiter: null }, 'csv-parse'));
  });

  it('names the line where a never-closed quote starts, after plain records the scanner read', async () => {
    const text = 'id,text\n1,a\n2,b\r\n3,"c\n4,d\n';
    expect(await readOf(text, [3], { text: ['text'], id: 'id', title: null, delimiter: null }, 'fast')).toEqual({
      error: 'the record starting on line 4 has a quote that is never closed',
    });
  });

  it('hands a record longer than the scanner keeps over to csv-parse and reads it whole', async () => {
    const long = 'w'.repeat(LONGEST_SCANNED_RECORD + 10);
    const text = `id,text\n1,"${long}\n"\n2,b\n`;
    const cuts = Array.from({ length: 20 }, (_, i) => (i + 1) * (LONGEST_SCANNED_RECORD >> 3));
    const items = (await itemsOf(text, cuts, ',', 'fast')) as unknown[][];
    expect(items.map((r) => (r[0] as string[]).map((f) => f.length))).toEqual([[2, 4], [1, long.length + 1], [1, 1]]);
    expect(items.map((r) => [r[1], r[2]])).toEqual([
      [1, 1],
      [2, 3],
      [4, 4],
    ]);
  });
});
