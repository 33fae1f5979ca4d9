/**
 * `sheaf assign --stream`: one row per input row on stdout, the same bytes
 * whatever the batch size and however the input is cut into shards, and the
 * same groups as the folder-writing assign given the same cleaning.
 */
import { describe, expect, it, beforeAll } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import fc from 'fast-check';
import { sheaf, tempDir } from './helpers/cli.js';
import { textLines } from '../src/cli/stream-rows.js';
import { modelFromJson } from '../src/model/index.js';
import { streamCleaning } from '../src/report/assigned-rows.js';
import { EventEmitter } from 'node:events';
import { Readable } from 'node:stream';
import { runCli } from '../src/cli/program.js';

/** A stdout that is always full: write() returns false and `drain` comes later; records what it saw. */
class SlowSink extends EventEmitter {
  readonly isTTY = false;
  writes: string[] = [];
  drains = 0;
  writesAtDrain: number[] = [];
  constructor(private readonly failAfter: number | null = null) {
    super();
  }
  write(text: string): boolean {
    this.writes.push(text);
    if (this.failAfter !== null && this.writes.length >= this.failAfter) {
      setImmediate(() => this.emit('error', Object.assign(new Error('write EPIPE'), { code: 'EPIPE' })));
      return false;
    }
    setTimeout(() => {
      this.drains++;
      this.writesAtDrain.push(this.writes.length);
      this.emit('drain');
    }, 2);
    return false;
  }
}

const root = path.resolve(__dirname, '..');
const demoCsv = path.join(root, 'corpus-demo', 'tickets.csv');

/** The demo export as records (header first), and back as CSV text with a header on every shard. */
const records = parse(readFileSync(demoCsv), { bom: true }) as string[][];
const header = records[0];
const rows = records.slice(1);
const quote = (c: string) => (/[",\r\n]/.test(c) ? `"${c.replace(/"/g, '""')}"` : c);
const csvOf = (rs: string[][]) => [header, ...rs].map((r) => r.map(quote).join(',')).join('\n') + '\n';
const jsonlOf = (rs: string[][]) => rs.map((r) => JSON.stringify(Object.fromEntries(header.map((h, i) => [h, r[i]])))).join('\n') + '\n';

describe('sheaf assign --stream', () => {
  let model: string;
  const flags = ['--text', 'subject,body', '--id', 'ticket_id'];
  const stream = (input: string, extra: string[] = []) => sheaf(['assign', '-', '--model', model, ...flags, '--stream', 'jsonl', '--quiet', ...extra], { stdin: input });

  beforeAll(async () => {
    const out = path.join(tempDir(), 'fit');
    const run = await sheaf(['group', demoCsv, ...flags, '--groups', '8', '--out', out, '--quiet']);
    expect(run.code).toBe(0);
    model = path.join(out, 'model.json');
  });

  it('writes one JSON line per input row, in input order, with the groups the folder assign gives under the same cleaning', async () => {
    const s = await sheaf(['assign', demoCsv, '--model', model, ...flags, '--stream', 'jsonl', '--clean', 'none']);
    expect(s.code).toBe(0);
    expect(s.stderr).toBe("sheaf: 457 row(s) filed into the model's 8 groups\n");
    const lines = s.stdout.trimEnd().split('\n').map((l) => JSON.parse(l));
    expect(lines).toHaveLength(457);
    expect(lines.map((l) => l.id)).toEqual(rows.map((r) => r[0]));
    const dir = tempDir();
    const f = await sheaf(['assign', demoCsv, '--model', model, ...flags, '--clean', 'none', '--out', path.join(dir, 'a'), '--quiet']);
    expect(f.code).toBe(0);
    const folder = parse(readFileSync(path.join(dir, 'a', 'assigned.csv')), { columns: true, bom: true }) as Record<string, string>[];
    for (let i = 0; i < 457; i++) {
      expect(lines[i].id).toBe(folder[i].id);
      expect(lines[i].group === null ? '' : String(lines[i].group)).toBe(folder[i].group);
      expect(lines[i].label ?? '').toBe(folder[i].label);
      expect(lines[i].fit === null ? '' : lines[i].fit.toFixed(4)).toBe(folder[i].fit);
      expect(lines[i].status).toBe(folder[i].status);
      expect(lines[i].second_group === null ? '' : String(lines[i].second_group)).toBe(folder[i].second_group);
      expect(lines[i].second_label ?? '').toBe(folder[i].second_label);
      expect(lines[i].second_fit === null ? '' : lines[i].second_fit.toFixed(4)).toBe(folder[i].second_fit);
    }
    expect(Object.keys(lines[0])).toEqual(['id', 'group', 'label', 'fit', 'status', 'second_group', 'second_label', 'second_fit']);
  });

  it('gives the same bytes whatever the batch size', async () => {
    const input = csvOf(rows);
    const whole = await stream(input);
    expect(whole.code).toBe(0);
    for (const batch of ['1', '7', '100']) {
      const b = await stream(input, ['--batch', batch]);
      expect(b.code).toBe(0);
      expect(b.stdout).toBe(whole.stdout);
    }
  });

  it('gives the same bytes when the input is cut into shards at random and the shard outputs joined in order (fast-check)', async () => {
    const input = csvOf(rows);
    const whole = (await stream(input)).stdout;
    await fc.assert(
      fc.asyncProperty(fc.uniqueArray(fc.integer({ min: 1, max: rows.length - 1 }), { maxLength: 4 }), fc.integer({ min: 1, max: 300 }), async (cuts, batch) => {
        const at = [0, ...cuts.sort((a, b) => a - b), rows.length];
        let joined = '';
        for (let s = 0; s + 1 < at.length; s++) {
          const r = await stream(csvOf(rows.slice(at[s], at[s + 1])), ['--batch', String(batch)]);
          expect(r.code).toBe(0);
          joined += r.stdout;
        }
        expect(joined).toBe(whole);
      }),
      { numRuns: 6, seed: 17 },
    );
  });

  it('reads JSON Lines as it reads CSV, and writes CSV with the header once and no byte order mark', async () => {
    const fromCsv = await stream(csvOf(rows));
    const fromJsonl = await stream(jsonlOf(rows));
    expect(fromJsonl.code).toBe(0);
    expect(fromJsonl.stdout).toBe(fromCsv.stdout);
    const dir = tempDir();
    writeFileSync(path.join(dir, 'a.csv'), csvOf(rows.slice(0, 200)));
    writeFileSync(path.join(dir, 'b.jsonl'), jsonlOf(rows.slice(200)));
    const c = await sheaf(['assign', 'a.csv', 'b.jsonl', '--model', model, ...flags, '--stream', 'csv', '--quiet'], { cwd: dir });
    expect(c.code).toBe(0);
    expect(c.stdout.startsWith('id,group,label,fit,status,second_group,second_label,second_fit\r\n')).toBe(true);
    expect(c.stdout.split('\r\n').filter((l) => l.startsWith('id,group,')).length).toBe(1);
    const table = parse(c.stdout, { columns: true }) as Record<string, string>[];
    const lines = fromCsv.stdout.trimEnd().split('\n').map((l) => JSON.parse(l));
    expect(table).toHaveLength(457);
    table.forEach((t, i) => {
      expect(t.id).toBe(lines[i].id);
      expect(t.group).toBe(lines[i].group === null ? '' : String(lines[i].group));
      expect(t.fit).toBe(lines[i].fit === null ? '' : lines[i].fit.toFixed(4));
      expect(t.status).toBe(lines[i].status);
    });
  });

  it('reads a semicolon-separated export as the folder assign does (delimiter taken from the header)', async () => {
    const semi = 'ticket_id;body\nA1;"water pump broken; no water from the taps"\nA2;wifi router keeps dropping\n';
    const comma = 'ticket_id,body\nA1,"water pump broken; no water from the taps"\nA2,wifi router keeps dropping\n';
    const a = await sheaf(['assign', '-', '--model', model, '--text', 'body', '--id', 'ticket_id', '--stream', 'jsonl', '--quiet'], { stdin: semi });
    const b = await sheaf(['assign', '-', '--model', model, '--text', 'body', '--id', 'ticket_id', '--stream', 'jsonl', '--quiet'], { stdin: comma });
    expect(a.code).toBe(0);
    expect(a.stdout).toBe(b.stdout);
    expect(a.stdout.split('\n').filter(Boolean).map((l) => JSON.parse(l).id)).toEqual(['A1', 'A2']);
  });

  it('numbers rows when there is no id column, and marks a row with no known term as new with no group', async () => {
    const s = await sheaf(['assign', '-', '--model', model, '--text', 'body', '--stream', 'jsonl', '--quiet'], { stdin: 'body\n"zzqx yyvw"\nwater pump broken no water from the taps\n' });
    expect(s.code).toBe(0);
    const lines = s.stdout.trimEnd().split('\n').map((l) => JSON.parse(l));
    expect(lines[0]).toEqual({ id: '1', group: null, label: null, fit: null, status: 'new', second_group: null, second_label: null, second_fit: null });
    expect(lines[1].id).toBe('2');
    expect(typeof lines[1].group).toBe('number');
  });

  it('refuses what it cannot do with one exact line and exit code 2', async () => {
    const dir = tempDir();
    const cases: [string[], string, string?][] = [
      [['--stream', 'xml'], 'sheaf: --stream must be one of jsonl, csv; got "xml"\n'],
      [['--stream', 'jsonl', '--clean', 'auto'], 'sheaf: --clean auto judges the whole pile, which a stream cannot; choose tickets or none (default: the model’s)\n'],
      [['--stream', 'jsonl', '--batch', '0'], 'sheaf: --batch must be a whole number of rows from 1; got 0\n'],
      [['--stream', 'jsonl', '--out', 'x'], 'sheaf: --stream writes rows to stdout and --out a folder; give one of them\n'],
      [['--stream', 'csv', '--json'], 'sheaf: --stream writes rows to stdout and --json the counts; give one of them\n'],
      [['--stream', 'jsonl'], 'sheaf: stdin line 2 is not a JSON object; got 3\n', '{"ticket_id":"a","body":"x"}\n3\n'],
    ];
    for (const [extra, message, stdin] of cases) {
      const r = await sheaf(['assign', '-', '--model', model, '--text', 'body', ...extra], { cwd: dir, stdin: stdin ?? 'body\nx\n' });
      expect(r.stderr).toBe(message);
      expect(r.code).toBe(2);
    }
    const f = await sheaf(['assign', dir, '--model', model, '--stream', 'jsonl'], { cwd: dir });
    expect(f.stderr).toBe(`sheaf: --stream reads files or - (stdin), not folders; got ${dir}\n`);
    expect(f.code).toBe(2);
  });

  it("applies the model's recorded cleaning without the boilerplate rule", () => {
    const m = modelFromJson(readFileSync(model, 'utf8'));
    const c = streamCleaning(m);
    expect(c.mode).toBe(m.cleaning.mode === 'auto' ? 'tickets' : m.cleaning.mode);
    expect(c.rules.boilerplate).toBe(false);
    expect(c.rules.quotes).toBe(m.cleaning.rules.quotes);
    expect(streamCleaning(m, 'none').mode).toBe('none');
  });

  it('waits for drain after every write stdout refuses, and stops quietly when the reader goes away', async () => {
    const run = (sink: SlowSink) =>
      runCli(['assign', '-', '--model', model, ...flags, '--stream', 'jsonl', '--batch', '50', '--quiet'], {
        stdout: sink as never,
        stderr: { write: () => true },
        stdin: Readable.from([Buffer.from(csvOf(rows))]),
        cwd: process.cwd(),
        env: {},
      });
    const slow = new SlowSink();
    expect(await run(slow)).toBe(0);
    expect(slow.writes.length).toBe(Math.ceil(457 / 50));
    // Each write after the first came only once the one before it had drained.
    expect(slow.writesAtDrain).toEqual(slow.writes.map((_, i) => i + 1));
    expect(slow.writes.join('')).toBe((await stream(csvOf(rows))).stdout);
    const gone = new SlowSink(2);
    expect(await run(gone)).toBe(0);
    expect(gone.writes.length).toBe(2);
  });

  it('splits lines at LF and CRLF across chunk boundaries', async () => {
    const out: string[] = [];
    async function* chunks() {
      yield 'a\r';
      yield '\nb\n\nc';
      yield 'd\r\n';
      yield 'e';
    }
    for await (const l of textLines(chunks())) out.push(l);
    expect(out).toEqual(['a', 'b', '', 'cd', 'e']);
  });
});
