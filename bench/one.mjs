// One benchmark run over one input, in a process of its own so that its peak
// memory is its own. Started by bench/run.mjs as
//
//   node --expose-gc bench/one.mjs --input FILE --out-json FILE [--k 100]
//        [--threshold 0.9] [--min-df 2] [--pairs FILE] [--kernel-dump FILE]
//
// Stages, in order (each timed with performance.now(); its peak RSS is the
// kernel's high-water mark VmHWM, reset through /proc/self/clear_refs after a
// full GC at the start of the stage, so it is exact, not sampled):
//
//   read        ingest() of the CSV (id, topic, text)
//   analyze     a separate analysis-only pass (createAnalyzer().analyze on every
//               text; the terms are counted and dropped), to split the next one
//   groupDocuments' own stages, timed through its `now` hook: analyze+vectorize
//               (analysis fused with fitTfidf, as the pipeline runs it), k-means,
//               tree, quality, label ... whatever the pipeline reports; plus
//               "order" = the time inside groupDocuments outside its stages
//               (canonical id order, option checks, empty-row scan)
//   near-duplicates   findNearDuplicates(matrix, { threshold })
//   write       documentsCsv + groupsJson -> writeOutputFolder (a temp folder)
//
// "vectorize" is reported as (analyze+vectorize) - analyze. Where clear_refs
// cannot be written, a worker thread samples process.memoryUsage.rss() every
// 5 ms instead (and the result says so).

import { readFileSync, writeFileSync, mkdtempSync, rmSync, openSync, writeSync, closeSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import { pathToFileURL } from 'node:url';

// The library under test: ../dist by default; run.mjs --ref points SHEAF_DIST at a build of a commit.
const sheaf = await import(process.env.SHEAF_DIST ? pathToFileURL(process.env.SHEAF_DIST).href : '../dist/index.js');

const args = process.argv.slice(2);
const opt = (name, dflt) => {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : dflt;
};
const input = opt('--input');
const outJson = opt('--out-json');
const k = Number(opt('--k', '100'));
const threshold = Number(opt('--threshold', '0.9'));
const minDf = Number(opt('--min-df', '2'));
const pairsFile = opt('--pairs', null);
const kernelDump = opt('--kernel-dump', null);
const kernelPasses = Number(opt('--kernel-passes', '5'));
// Threads for the pipeline's heavy steps, as the CLI runs them (its `--threads`; run.mjs passes its own): with 1 (default) the
// synchronous groupDocuments runs on this thread; above 1 groupDocumentsAsync with the library's thread runners.
const threads = Number(opt('--threads', '1'));
if (!input || !outJson) {
  console.error('usage: node --expose-gc bench/one.mjs --input FILE --out-json FILE [--k 100] [--threshold 0.9] [--min-df 2]');
  process.exit(2);
}
if (typeof globalThis.gc !== 'function') {
  console.error('bench/one.mjs needs node --expose-gc');
  process.exit(2);
}

/** The runners the CLI's group command hands the pipeline (every runner the library exports). */
function pipelineRunners(n) {
  const r = { kmeans: sheaf.kmeansRunner(n), vectorize: sheaf.vectorizeRunner(n) };
  if (typeof sheaf.reduceRunner === 'function') r.reduce = sheaf.reduceRunner(n);
  return r;
}

// ---------- memory probes (harness time is kept out of every timing) ----------

const KB = 1024;
function statusKb(field) {
  const m = new RegExp(`${field}:\\s+(\\d+) kB`).exec(readFileSync('/proc/self/status', 'utf8'));
  return m ? Number(m[1]) : NaN;
}
let canReset = false;
try {
  writeFileSync('/proc/self/clear_refs', '5');
  canReset = Number.isFinite(statusKb('VmHWM'));
} catch {
  canReset = false;
}

// Fallback: a sampler thread (it runs while the main thread is busy in synchronous code).
let sampler = null;
let shared = null;
if (!canReset) {
  shared = new Int32Array(new SharedArrayBuffer(8)); // [stop flag, max rss kB]
  sampler = new Worker(
    `const { workerData } = require('node:worker_threads');
     const s = new Int32Array(workerData);
     while (Atomics.load(s, 0) === 0) {
       const kb = Math.floor(process.memoryUsage.rss() / 1024);
       if (kb > Atomics.load(s, 1)) Atomics.store(s, 1, kb);
       Atomics.wait(s, 0, 0, 5);
     }`,
    { eval: true, workerData: shared.buffer },
  );
  sampler.unref();
}

function rssBytes() {
  return process.memoryUsage.rss();
}
/** Full GC, then start a new peak window. */
function resetPeak() {
  globalThis.gc();
  globalThis.gc();
  if (canReset) writeFileSync('/proc/self/clear_refs', '5');
  else Atomics.store(shared, 1, Math.floor(rssBytes() / KB));
}
/** Peak RSS (bytes) since the last resetPeak(). */
function peakBytes() {
  if (canReset) return statusKb('VmHWM') * KB;
  return Math.max(Atomics.load(shared, 1) * KB, rssBytes());
}

/** Clock with the harness's own work (GC, probes) subtracted. */
let harnessMs = 0;
let harnessCpu = 0;
const clock = () => performance.now() - harnessMs;
function harness(fn) {
  const t = performance.now();
  const u = process.cpuUsage();
  const v = fn();
  const u2 = process.cpuUsage(u);
  harnessCpu += (u2.user + u2.system) / 1000;
  harnessMs += performance.now() - t;
  return v;
}

const stages = [];
const settings = { k, threshold, minDf, threads, srcTree: process.env.SHEAF_SRC_TREE ?? 'worktree' };
/** Progress so far, so a run that is stopped (time limit, out of memory) still tells what it reached. */
function writePartial(running) {
  writeFileSync(outJson, JSON.stringify({ input: path.basename(input), settings, partial: true, running, stages, windows: typeof windows === 'undefined' ? [] : windows }, null, 2) + '\n');
}
const cpuMs = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};
/** Times one stage: GC and peak reset first (outside the time), then fn, then the peak. */
async function stage(name, items, fn) {
  const startRss = harness(() => {
    process.stderr.write(`[one] ${name} start\n`);
    writePartial(name);
    resetPeak();
    return rssBytes();
  });
  const c0 = cpuMs();
  const t0 = clock();
  const value = await fn();
  const ms = clock() - t0;
  const cpu = cpuMs() - c0;
  const peak = harness(() => peakBytes());
  stages.push({ stage: name, ms, cpuMs: cpu, items, peakRss: peak, startRss });
  harness(() => writePartial(null));
  return value;
}

// ---------- the run ----------

const started = new Date();
const docs = await stage('read', null, async () => {
  const r = await sheaf.ingest([input], { text: ['text'], id: 'id' }, { cwd: process.cwd() });
  return r.docs;
});
stages[stages.length - 1].items = docs.length;
const n = docs.length;

// JIT warm-up on a throwaway analyzer (not timed), so that the analysis-only
// pass and the pipeline's fused pass run equally warm and their difference is
// the vectorizer's own cost.
{
  const warm = sheaf.createAnalyzer({});
  for (let i = 0; i < Math.min(n, 2000); i++) warm.analyze(docs[i].text);
}
let analyzedTerms = 0;
await stage('analyze', n, () => {
  const analyzer = sheaf.createAnalyzer({});
  let terms = 0;
  for (let i = 0; i < n; i++) terms += analyzer.analyze(docs[i].text).length;
  analyzedTerms = terms;
});

// groupDocuments, with its stage boundaries read through the `now` hook: each
// call closes one window (time and peak) and opens the next.
var windows = [];
let windowStart = null;
const hookNow = () => {
  const t = clock();
  const c = cpuMs();
  harness(() => {
    if (windowStart !== null) windows.push({ ms: t - windowStart.t, cpuMs: c - windowStart.c, peakRss: peakBytes(), startRss: windowStart.rss });
    process.stderr.write(`[one] groupDocuments-window-${windows.length} start\n`);
    writePartial(`groupDocuments stage window ${windows.length} (0 = analyze+vectorize, 1 = gap, 2 = k-means, ...)`);
    resetPeak();
    windowStart = { t, rss: rssBytes(), c: cpuMs() };
  });
  return t;
};
const groupOptions = { kmeans: { groups: k }, vectorize: { minDf } };
const gStart = harness(() => {
  resetPeak();
  return { rss: rssBytes() };
});
const gC0 = cpuMs();
const gH0 = harnessCpu;
const gT0 = clock();
const runners = threads > 1 ? pipelineRunners(threads) : null;
const result = runners ? await sheaf.groupDocumentsAsync(docs, groupOptions, runners, { now: hookNow }) : sheaf.groupDocuments(docs, groupOptions, { now: hookNow });
const gMs = clock() - gT0;
const gCpu = cpuMs() - gC0 - (harnessCpu - gH0);
const gLastPeak = harness(() => peakBytes());
let pipelinePeak = gLastPeak;
for (const w of windows) pipelinePeak = Math.max(pipelinePeak, w.peakRss);
const timings = result.timings;
const windowsMatch = windows.length === 2 * timings.length - 1 || windows.length === 2 * timings.length;
let inStages = 0;
let inStagesCpu = 0;
for (let j = 0; j < timings.length; j++) {
  const t = timings[j];
  const w = windowsMatch ? windows[2 * j] : null;
  inStages += t.ms;
  if (w) inStagesCpu += w.cpuMs;
  const name = t.stage === 'analyze+vectorize' ? 'analyze+vectorize' : t.stage;
  stages.push({ stage: name, ms: t.ms, cpuMs: w ? w.cpuMs : null, items: t.items, peakRss: w ? w.peakRss : null, startRss: w ? w.startRss : null, pipeline: true });
}
stages.push({
  stage: 'order',
  ms: gMs - inStages,
  cpuMs: windowsMatch ? gCpu - inStagesCpu : null,
  items: n,
  peakRss: null,
  startRss: gStart.rss,
  pipeline: true,
  note: 'time inside groupDocuments outside its timed stages (canonical order, option checks, empty-row scan)',
});

const matrix = result.matrix;
const partition = result.partition ?? { groups: result.kmeans.groups, assignments: result.kmeans.assignments, centroids: result.kmeans.centroids, fit: result.kmeans.fit };

const dups = await stage('near-duplicates', n, () => sheaf.findNearDuplicates(matrix, { threshold }));

const tmp = mkdtempSync(path.join(os.tmpdir(), 'sheaf-bench-'));
const outDir = path.join(tmp, 'out');
let writtenBytes = 0;
let documentsCsvChars = 0;
await stage('write', n, async () => {
  const files = new Map();
  files.set('documents.csv', sheaf.documentsCsv(result, { duplicateSet: dups.setOf }));
  files.set('groups.json', JSON.stringify(sheaf.groupsJson(result), null, 2) + '\n');
  await sheaf.writeOutputFolder(outDir, files);
  for (const v of files.values()) writtenBytes += Buffer.byteLength(v);
  documentsCsvChars = files.get('documents.csv').length;
});
rmSync(tmp, { recursive: true, force: true });

// ---------- quality checks (not timed) ----------

const truthLabels = result.docs.map((d) => d.fields.get('topic') ?? '');
const truth = sheaf.encodeLabels(truthLabels).codes;
const scores = sheaf.externalScores(truth, partition.assignments);

let planted = null;
if (pairsFile) {
  const rowOf = new Map();
  result.docs.forEach((d, r) => rowOf.set(d.id, r));
  const lines = readFileSync(pairsFile, 'utf8').trim().split('\n').slice(1);
  let together = 0;
  for (const line of lines) {
    const [a, b] = line.split(',');
    const ra = rowOf.get(a);
    const rb = rowOf.get(b);
    if (ra !== undefined && rb !== undefined && dups.setOf[ra] >= 0 && dups.setOf[ra] === dups.setOf[rb]) together++;
  }
  planted = { pairs: lines.length, foundInSameSet: together, recall: lines.length ? together / lines.length : null };
}

// ---------- assignment kernel, for the C baseline (not a stage) ----------

let kernel = null;
if (kernelDump) {
  const kk = partition.groups;
  const out = { assignments: new Int32Array(matrix.rows), fit: new Float32Array(matrix.rows) };
  sheaf.assignToCentroids(matrix, partition.centroids, kk, out); // warm-up
  const per = [];
  for (let p = 0; p < kernelPasses; p++) {
    const t0 = performance.now();
    sheaf.assignToCentroids(matrix, partition.centroids, kk, out);
    per.push(performance.now() - t0);
  }
  let fitSum = 0;
  for (let i = 0; i < out.fit.length; i++) fitSum += out.fit[i];
  // Binary: int32 rows, cols, nnz, k; int32 indptr[rows+1], indices[nnz]; float32 values[nnz], centroids[cols*k]
  const fd = openSync(kernelDump, 'w');
  writeSync(fd, new Uint8Array(Int32Array.of(matrix.rows, matrix.cols, matrix.indptr[matrix.rows], kk).buffer));
  for (const a of [matrix.indptr, matrix.indices, matrix.values, partition.centroids]) {
    writeSync(fd, new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
  }
  closeSync(fd);
  per.sort((a, b) => a - b);
  kernel = {
    passes: kernelPasses,
    msPerPassMedian: per[Math.floor(per.length / 2)],
    msPerPassMin: per[0],
    fitSum,
    assignmentsDigest: digest(out.assignments),
    multiplyAdds: multiplyAdds(matrix, kk),
  };
}

/** The number and boolean fields of an object (whatever the k-means result reports). */
function scalars(o) {
  const out = {};
  for (const [key, v] of Object.entries(o)) if (typeof v === 'number' || typeof v === 'boolean') out[key] = v;
  return out;
}
function digest(a) {
  let h = 0x811c9dc5;
  for (let i = 0; i < a.length; i++) h = Math.imul(h ^ (a[i] + 1), 0x01000193);
  return (h >>> 0).toString(16).padStart(8, '0');
}
function multiplyAdds(m, kk) {
  return m.indptr[m.rows] * kk;
}

let overallPeak = 0;
for (const s of stages) if (s.peakRss !== null) overallPeak = Math.max(overallPeak, s.peakRss);
overallPeak = Math.max(overallPeak, pipelinePeak);

const km = result.kmeans;
const report = {
  input: path.basename(input),
  settings,
  docs: n,
  analyzedTerms,
  k,
  threshold,
  minDf,
  memoryProbe: canReset ? 'VmHWM reset per stage via /proc/self/clear_refs (exact)' : 'worker thread sampling process.memoryUsage.rss() every 5 ms',
  stageWindowsMatched: windowsMatch,
  terms: matrix.cols,
  nnz: matrix.indptr[matrix.rows],
  emptyRows: result.emptyRows.length,
  kmeans: km ? { ...scalars(km), restarts: km.restartObjectives.length, miniBatch: km.batches > 0 } : null,
  duplicates: { pairs: dups.pairs.a.length, sets: dups.sets.length, rowsInSets: dups.setOf.reduce((s, v) => s + (v >= 0 ? 1 : 0), 0) },
  planted,
  nmi: scores.nmi,
  ari: scores.ari,
  purity: scores.purity,
  writtenBytes,
  documentsCsvChars,
  maxStringLength: (await import('node:buffer')).constants.MAX_STRING_LENGTH,
  groupDocumentsMs: gMs,
  groupDocumentsPeakRss: pipelinePeak,
  stages,
  kernel,
  peakRss: overallPeak,
  maxRssAtEnd: process.resourceUsage().maxRSS * KB,
  startedAt: started.toISOString(),
};
writeFileSync(outJson, JSON.stringify(report, null, 2) + '\n');
if (sampler) Atomics.store(shared, 0, 1);
