/**
 * Hostile inputs at the ingest edge (issue 10, cases 3, 8, 10, 12, 15, 17, 18;
 * issue 12 item 5 for title columns): each test failed before its fix.
 */
import { describe, expect, it } from 'vitest';
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ingest } from '../src/ingest/index.js';
import { UsageError } from '../src/util/errors.js';

function tmp(): string {
  return mkdtempSync(path.join(os.tmpdir(), 'sheaf-hostile-'));
}

function put(root: string, rel: string, content: string | Buffer): void {
  const p = path.join(root, rel);
  mkdirSync(path.dirname(p), { recursive: true });
  writeFileSync(p, content);
}

async function usage(p: Promise<unknown>): Promise<UsageError> {
  try {
    await p;
  } catch (err) {
    expect(err).toBeInstanceOf(UsageError);
    return err as UsageError;
  }
  throw new Error('expected a UsageError');
}

describe('rows nested very deep (case 10)', () => {
  const deep = (n: number): string => '{"text":"deep row","x":' + '['.repeat(n) + ']'.repeat(n) + '}';

  it('skips a JSON Lines row nested 10,000 deep with its line number, and reads the others', async () => {
    const cwd = tmp();
    put(cwd, 'rows.jsonl', ['{"text":"first row"}', deep(10000), '{"text":"third row"}'].join('\n') + '\n');
    const r = await ingest(['rows.jsonl'], {}, { cwd });
    expect(r.docs.map((d) => d.text)).toEqual(['first row', 'third row']);
    expect(r.docs.map((d) => d.id)).toEqual(['1', '3']);
    expect(r.skipped).toEqual([{ source: 'rows.jsonl:2', reason: 'nested deeper than 256 levels' }]);
  });

  it('skips a JSON array element nested 10,000 deep (objects inside objects too)', async () => {
    const cwd = tmp();
    const objDeep = '{"text":"deep object","x":' + '{"a":'.repeat(10000) + '1' + '}'.repeat(10000) + '}';
    put(cwd, 'rows.json', `[{"text":"first row"},${deep(10000)},${objDeep},{"text":"last row"}]`);
    const r = await ingest(['rows.json'], {}, { cwd });
    expect(r.docs.map((d) => d.text)).toEqual(['first row', 'last row']);
    expect(r.skipped).toEqual([
      { source: 'rows.json#2', reason: 'nested deeper than 256 levels' },
      { source: 'rows.json#3', reason: 'nested deeper than 256 levels' },
    ]);
  });

  it('keeps a row nested exactly 256 levels', async () => {
    const cwd = tmp();
    // The row object is level 1, so 255 brackets make 256 levels.
    put(cwd, 'rows.jsonl', deep(255) + '\n');
    const r = await ingest(['rows.jsonl'], {}, { cwd });
    expect(r.docs.length).toBe(1);
    expect(r.skipped).toEqual([]);
  });
});
