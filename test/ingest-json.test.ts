import { describe, expect, it } from 'vitest';
import { Readable } from 'node:stream';
import { readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { ingest } from '../src/ingest/index.js';
import { tmp, usage } from './helpers/files.js';

const FIX = path.join(path.dirname(fileURLToPath(import.meta.url)), 'fixtures', 'ingest');
// Values as Python's json module parsed them (test/fixtures/ingest/make_fixtures.py).
const PY = JSON.parse(readFileSync(path.join(FIX, 'expected.json'), 'utf8')) as Record<string, unknown>;

describe('JSON arrays', () => {
  it('reaches nested values with dotted paths and keeps top-level columns as fields', async () => {
    const r = await ingest(['nested.json'], { text: ['ticket.subject', 'ticket.body'], id: 'id', title: 'ticket.subject' }, { cwd: FIX });
    const py = PY['nested.json'] as { id: string; ticket: { subject: string; body: string } }[];
    expect(r.docs.map((d) => d.id)).toEqual(py.map((o) => o.id));
    expect(r.docs.map((d) => d.text)).toEqual(py.map((o) => `${o.ticket.subject}\n\n${o.ticket.body}`));
    expect(r.docs.map((d) => d.title)).toEqual(py.map((o) => o.ticket.subject));
    // Columns: the union of top-level keys in first-seen order, id left out; non-strings as JSON, null/missing as ''.
    expect(r.docs.map((d) => [...d.fields])).toEqual([
      [
        ['ticket', '{"subject":"Login fails","body":"Cannot sign in since Monday"}'],
        ['tags', '["auth","web"]'],
        ['score', '3'],
        ['extra', ''],
      ],
      [
        ['ticket', '{"subject":"Refund","body":"Charged twice for one order"}'],
        ['tags', '[]'],
        ['score', ''],
        ['extra', ''],
      ],
      [
        ['ticket', '{"subject":"Dark mode","body":"Please add a dark theme"}'],
        ['tags', ''],
        ['score', ''],
        ['extra', 'true'],
      ],
    ]);
    expect(r.docs.map((d) => d.source)).toEqual(['nested.json#1', 'nested.json#2', 'nested.json#3']);
  });

  it('guesses a nested text column by its last segment', async () => {
    const r = await ingest(['nested.json'], { id: 'id' }, { cwd: FIX });
    expect(r.docs[0]?.text).toBe('Cannot sign in since Monday');
  });

  it('lists top-level and nested leaf paths (and array paths, tags[]) when a column is missing', async () => {
    const e = await usage(ingest(['nested.json'], { text: ['ticket.bdy'] }, { cwd: FIX }));
    expect(e.message).toBe(
      'nested.json has no column "ticket.bdy" for --text; its columns are: id, ticket.subject, ticket.body, tags, tags[], score, extra',
    );
    expect(e.option).toBe('text');
  });

  it('skips a JSON file that is not an array, or broken, saying what and where', async () => {
    const dir = tmp();
    writeFileSync(path.join(dir, 'obj.json'), '  "just a string"');
    writeFileSync(path.join(dir, 'bad.json'), '[\n  {"text": "a"},\n  {"text": "b"}');
    writeFileSync(path.join(dir, 'good.json'), '[{"text": "fine"}]');
    const r = await ingest(['obj.json', 'bad.json', 'good.json'], {}, { cwd: dir });
    expect(r.docs.map((d) => d.text)).toEqual(['fine']);
    expect(r.skipped).toEqual([
      { source: 'obj.json', reason: 'not a JSON array of objects: it holds a string' },
      // The array is never closed: the parser stops just after the 15 characters of line 3.
      { source: 'bad.json', reason: 'not valid JSON (line 3, column 16)' },
    ]);
    const e = await usage(ingest(['obj.json'], {}, { cwd: dir }));
    expect(e.message).toBe('no readable documents in obj.json; skipped obj.json: not a JSON array of objects: it holds a string');
  });

  it('skips array elements that are not objects, keeping row numbers', async () => {
    const dir = tmp();
    writeFileSync(path.join(dir, 'a.json'), '[{"text": "one"}, 5, null, {"text": "four"}]');
    const r = await ingest(['a.json'], {}, { cwd: dir });
    expect(r.docs.map((d) => [d.id, d.text])).toEqual([
      ['1', 'one'],
      ['4', 'four'],
    ]);
    expect(r.skipped).toEqual([
      { source: 'a.json#2', reason: 'not a JSON object (a number)' },
      { source: 'a.json#3', reason: 'not a JSON object (null)' },
    ]);
  });

  it('reads a .json file that is really JSON Lines, with a warning', async () => {
    const dir = tmp();
    writeFileSync(path.join(dir, 'l.json'), '{"text": "one"}\n{"text": "two"}\n');
    const r = await ingest(['l.json'], {}, { cwd: dir });
    expect(r.docs.map((d) => d.text)).toEqual(['one', 'two']);
    expect(r.warnings).toEqual(['l.json is not one JSON value; read as JSON Lines (one object per line)']);
  });
});

describe('JSON Lines', () => {
  it('skips a bad line with its line number, ignores blank lines, keeps __proto__ and constructor as columns', async () => {
    const py = PY['messages.jsonl'] as { line: number; bad: string | null; value?: Record<string, unknown> }[];
    const r = await ingest(['messages.jsonl'], { id: 'id' }, { cwd: FIX });
    const good = py.filter((p) => p.bad === null);
    expect(r.docs.map((d) => d.id)).toEqual(good.map((p) => String(p.value?.['id'])));
    expect(r.docs.map((d) => d.text)).toEqual(good.map((p) => p.value?.['text']));
    expect(r.skipped).toEqual(
      py
        .filter((p) => p.bad !== null)
        .map((p) => ({ source: `messages.jsonl:${p.line}`, reason: p.bad === 'json' ? 'not valid JSON' : 'not a JSON object (an array)' })),
    );
    expect(r.skipped.map((s) => s.source)).toEqual(['messages.jsonl:3', 'messages.jsonl:4']);
    expect([...(r.docs[0]?.fields ?? [])]).toEqual([
      ['text', 'first message'],
      ['__proto__', 'p'],
      ['constructor', 'c'],
    ]);
    expect([...(r.docs[1]?.fields ?? [])]).toEqual([
      ['text', 'third message'],
      ['__proto__', ''],
      ['constructor', '{"x":1}'],
    ]);
    const e = await usage(ingest(['messages.jsonl'], { text: ['constructor.y'] }, { cwd: FIX }));
    expect(e.message).toBe(
      'messages.jsonl has no column "constructor.y" for --text; its columns are: id, text, __proto__, constructor, constructor.x',
    );
  });

  it('numbers rows by non-blank line (bad lines included) when there is no id column', async () => {
    const r = await ingest(['messages.jsonl'], {}, { cwd: FIX });
    expect(r.docs.map((d) => d.id)).toEqual(['1', '4']);
    expect(r.docs.map((d) => d.source)).toEqual(['messages.jsonl#1', 'messages.jsonl#4']);
  });

  it('reads __proto__ as an id or text column without touching prototypes', async () => {
    const dir = tmp();
    writeFileSync(path.join(dir, 'p.jsonl'), '{"__proto__": "x1", "constructor": "hello"}\n');
    const r = await ingest(['p.jsonl'], { id: '__proto__', text: ['constructor'] }, { cwd: dir });
    expect(r.docs[0]?.id).toBe('x1');
    expect(r.docs[0]?.text).toBe('hello');
    expect([...(r.docs[0]?.fields ?? [])]).toEqual([['constructor', 'hello']]);
    // A column that is not there is not found on Object.prototype either.
    const e = await usage(ingest(['p.jsonl'], { text: ['constructor'], title: 'toString' }, { cwd: dir }));
    expect(e.message).toBe('p.jsonl has no column "toString" for --title; its columns are: __proto__, constructor');
  });

  it('sniffs JSON Lines and JSON arrays on standard input', async () => {
    let r = await ingest(['-'], { id: 'k' }, { cwd: os.tmpdir(), stdin: Readable.from([Buffer.from('\n {"k": "a", "body": "x"}\n{"k": "b", "bo'), Buffer.from('dy": "y"}')]) });
    expect(r.docs.map((d) => [d.id, d.text, d.source])).toEqual([
      ['a', 'x', 'stdin#1'],
      ['b', 'y', 'stdin#2'],
    ]);
    r = await ingest(['-'], {}, { cwd: os.tmpdir(), stdin: Readable.from([Buffer.from('[{"message": "m1"}, {"message": "m2"}]')]) });
    expect(r.docs.map((d) => [d.id, d.text])).toEqual([
      ['1', 'm1'],
      ['2', 'm2'],
    ]);
    r = await ingest(['-'], { format: 'text' }, { cwd: os.tmpdir(), stdin: Readable.from([Buffer.from('\n  Just a note\nsecond line\n')]) });
    expect(r.docs).toEqual([{ id: 'stdin', source: 'stdin', title: 'Just a note', text: 'Just a note\nsecond line', fields: new Map() }]);
  });
});
