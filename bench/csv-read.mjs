// CSV reading speed, MB/s on one core: csv-parse against our scanner (src/ingest/csv-records.ts), on the same
// file in the same process, interleaved (csv-parse, fast, csv-parse, fast, ...), median of the rounds.
//
//   node bench/csv-read.mjs [--input FILE] [--size 60k] [--rounds 5] [--results FILE]
//
// Three levels, each for both parsers:
//   records   the parser alone: decoded string chunks (64 KiB reads) -> records
//   readCsv   records -> documents (columns chosen, fields kept, texts joined): the CSV reader as ingest calls it
//   ingest    ingest([file]) end to end (bytes read, encoding detected, decoded, the reader): the default path only
// MB = 10^6 bytes of the file. Without --input, bench/generate.mjs makes the synthetic export (same seed, same bytes).
// Appends (or replaces) its section in --results (default bench/csv-read.md) and prints it.

import { createReadStream, existsSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { generateCorpus, parseSize, sizeName } from './generate.mjs';

const here = path.dirname(fileURLToPath(import.meta.url));
const dist = process.env.SHEAF_DIST ? path.dirname(process.env.SHEAF_DIST) : path.join(here, '..', 'dist');
const { csvItems } = await import(pathToFileURL(path.join(dist, 'ingest', 'csv-records.js')).href);
const { readCsvWith } = await import(pathToFileURL(path.join(dist, 'ingest', 'csv.js')).href);
const { ingest } = await import(pathToFileURL(path.join(dist, 'index.js')).href);

const argv = process.argv.slice(2);
const opt = (name, dflt) => {
  const i = argv.indexOf(name);
  return i >= 0 && i + 1 < argv.length ? argv[i + 1] : dflt;
};
const rounds = Number(opt('--rounds', '5'));
let input = opt('--input', null);
if (!input) {
  const n = parseSize(opt('--size', '60k'));
  input = path.join(here, 'out', `synth-${sizeName(n)}.csv`);
  if (!existsSync(input)) await generateCorpus({ n, seed: 7, file: input });
}
const bytes = statSync(input).size;
const resultsFile = path.resolve(opt('--results', path.join(here, 'csv-read.md')));

const chunks = () => createReadStream(input, { encoding: 'utf8', highWaterMark: 1 << 16 });
const options = { text: ['text'], id: 'id', title: null, delimiter: null };

async function records(engine) {
  let n = 0;
  for await (const batch of csvItems(chunks(), ',', { lastEnd: 0 }, engine)) n += batch.length;
  return n;
}
async function reader(engine) {
  const r = await readCsvWith(chunks(), path.basename(input), 'csv', options, engine);
  return r.docs.length;
}
async function whole() {
  const r = await ingest([input], { text: ['text'], id: 'id' }, { cwd: process.cwd() });
  return r.docs.length;
}

async function timeIt(fn) {
  globalThis.gc?.();
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const out = await fn();
  const ms = performance.now() - t0;
  const c = process.cpuUsage(c0);
  return { ms, cpuMs: (c.user + c.system) / 1000, out };
}

const cases = [
  ['records', 'csv-parse', () => records('csv-parse')],
  ['records', 'fast', () => records('fast')],
  ['readCsv', 'csv-parse', () => reader('csv-parse')],
  ['readCsv', 'fast', () => reader('fast')],
  ['ingest', 'fast (default)', whole],
];
const seen = new Map(cases.map(([l, e]) => [`${l}/${e}`, []]));
const counts = new Map();
// Warm-up round (JIT), not counted.
for (const [, , fn] of cases) await fn();
for (let r = 0; r < rounds; r++) {
  for (const [level, engine, fn] of cases) {
    const t = await timeIt(fn);
    seen.get(`${level}/${engine}`).push(t);
    counts.set(`${level}/${engine}`, t.out);
  }
}
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const mbps = (ms) => bytes / 1e6 / (ms / 1000);
const rows = [];
const med = new Map();
for (const [level, engine] of cases) {
  const ts = seen.get(`${level}/${engine}`);
  const ms = median(ts.map((t) => t.ms));
  const cpu = median(ts.map((t) => t.cpuMs));
  med.set(`${level}/${engine}`, { ms, cpu });
  rows.push([level, engine, `${ms.toFixed(0)} ms`, `${cpu.toFixed(0)} ms`, mbps(ms).toFixed(1), mbps(cpu).toFixed(1), String(counts.get(`${level}/${engine}`))]);
}
const ratio = (lv) => (med.get(`${lv}/csv-parse`).cpu / med.get(`${lv}/fast`).cpu).toFixed(2);
const lines = [
  '## CSV reading, MB/s (bench/csv-read.mjs)',
  '',
  `Written by \`node --expose-gc bench/csv-read.mjs ${argv.join(' ')}\` on ${new Date().toISOString()}; input ${path.basename(input)}, ${(bytes / 1e6).toFixed(1)} MB; median of ${rounds} interleaved rounds after a warm-up; Node ${process.version}. MB/s by CPU time is the steadier figure on a shared machine.`,
  '',
  '| level | parser | wall | CPU | MB/s (wall) | MB/s (CPU) | records / documents |',
  '| --- | --- | --- | --- | --- | --- | --- |',
  ...rows.map((r) => `| ${r.join(' | ')} |`),
  '',
  `Scanner vs csv-parse (CPU): records ${ratio('records')}×, readCsv ${ratio('readCsv')}×. Target of issue #16: ≥ 50 MB/s reading on one core.`,
  '',
];
const text = lines.join('\n');
writeFileSync(resultsFile, text + '\n');
process.stdout.write(text + '\n');
