/**
 * `findDuplicatesAsync` with the analysis on worker threads gives the very
 * run `findDuplicates` gives on the calling thread: same vectors bit for
 * bit, same pairs, sets, copies and diffs (the demo tickets, and the same
 * tickets with every text repeated, so that exact copies are found).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rmSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { buildForWorkers } from './helpers/build-workers.js';
import { ingest } from '../src/ingest/index.js';
import { findDuplicates, findDuplicatesAsync, type FindDuplicatesOptions } from '../src/near-copies.js';
import { vectorizeRunner } from '../src/parallel/runners.js';
import type { Doc } from '../src/types.js';

const root = fileURLToPath(new URL('..', import.meta.url));
let outDir = '';
let workerUrl: URL;
let docs: Doc[] = [];

beforeAll(async () => {
  outDir = buildForWorkers('sheaf-dups-worker-', ['src/parallel/analyze-parallel.ts', 'src/parallel/analyze-worker.ts', 'src/analyze/natural.d.ts', 'src/analyze/stopword.d.ts']);
  workerUrl = pathToFileURL(join(outDir, 'dist/parallel/analyze-worker.js'));
  const read = await ingest(['corpus-demo/tickets.csv'], { text: ['subject', 'body'], id: 'ticket_id', title: 'subject' }, { cwd: root });
  docs = read.docs;
}, 120_000);

afterAll(() => {
  if (outDir) rmSync(outDir, { recursive: true, force: true });
});

/** The run as plain data: typed arrays as lists. */
function plain(run: Awaited<ReturnType<typeof findDuplicatesAsync>>): unknown {
  return JSON.stringify({ ...run, timings: [], diffs: [...run.diffs], inputOrder: Array.from(run.inputOrder) }, (_k, v: unknown) =>
    ArrayBuffer.isView(v) ? Array.from(v as unknown as ArrayLike<number>) : v,
  );
}

describe('findDuplicatesAsync on two threads', () => {
  const cases: [string, FindDuplicatesOptions][] = [
    ['tfidf 0.7', { threshold: 0.7, show: 5 }],
    ['tfidf 0.9, phrases', { threshold: 0.9, analyzer: { phrases: true } }],
    ['shingles (no runner used)', { by: 'shingles', show: 3 }],
  ];
  for (const [name, options] of cases) {
    it(`gives the run of findDuplicates: ${name}`, async () => {
      const want = findDuplicates(docs, options);
      const got = await findDuplicatesAsync(docs, options, { vectorize: vectorizeRunner(2, { minChars: 1, chunkChars: 4096, workerUrl }) });
      expect(got.pairs.a.length).toBeGreaterThan(0);
      expect(plain(got)).toBe(plain(want));
    });
  }

  it('with every text twice (exact copies), the same run too', async () => {
    const twice = [...docs, ...docs.map((d) => ({ ...d, id: `${d.id}-again` }))];
    const want = findDuplicates(twice, { threshold: 0.9 });
    const got = await findDuplicatesAsync(twice, { threshold: 0.9 }, { vectorize: vectorizeRunner(2, { minChars: 1, chunkChars: 4096, workerUrl }) });
    expect(want.exactCopies).toBeGreaterThanOrEqual(docs.length);
    expect(plain(got)).toBe(plain(want));
  });
});
