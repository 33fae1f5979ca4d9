// The k-means assignment pass, ours (assignToCentroids, the same sweep as the k-means passes) against
// bench/kernel.c built with `cc -O2`, on the same generated data, interleaved (C, ours, C, ours, ...), and
// k-means on one thread against two (sphericalKMeansParallel), also interleaved. Ratios, not absolute times:
// the machine may be shared.
//
//   node bench/kernel-ratio.mjs [--rows 60000] [--k 100] [--rounds 5] [--no-threads] [--results FILE]
//
// Two shapes of rows, both L2-normalised, with planted topics so that the centroids are realistic:
//   tfidf     short tickets as TF-IDF rows: ~37 non-zeros a row over 50,000 terms (bench/generate.mjs at 60k: 37.5)
//   reduced   reduced vectors (the default `reduce: auto` up to 100k documents): 50 dense dimensions
// The centroids are the means of the planted topics' rows. Same assignments required (digest compared).

import { spawnSync } from 'node:child_process';
import { mkdirSync, openSync, writeSync, closeSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const dist = process.env.SHEAF_DIST ? path.dirname(process.env.SHEAF_DIST) : path.join(here, '..', 'dist');
const sheaf = await import(pathToFileURL(path.join(dist, 'index.js')).href);

const argv = process.argv.slice(2);
const opt = (name, dflt) => {
  const i = argv.indexOf(name);
  return i >= 0 && i + 1 < argv.length ? argv[i + 1] : dflt;
};
const ROWS = Number(opt('--rows', '60000'));
const K = Number(opt('--k', '100'));
const ROUNDS = Number(opt('--rounds', '5'));
const THREADS = !argv.includes('--no-threads');
const resultsFile = path.resolve(opt('--results', path.join(here, 'kernel-ratio.md')));
const outDir = path.join(here, 'out');
mkdirSync(outDir, { recursive: true });

// xorshift-style seeded generator (bench only).
let state = 0x9e3779b9;
const rand = () => {
  state ^= state << 13;
  state ^= state >>> 17;
  state ^= state << 5;
  return (state >>> 0) / 4294967296;
};

function tfidfRows(n, d, topics, perRow) {
  const cores = Array.from({ length: topics }, () => Array.from({ length: 200 }, () => Math.floor(rand() * d)));
  const indptr = new Int32Array(n + 1);
  const idx = [];
  const val = [];
  for (let r = 0; r < n; r++) {
    const core = cores[Math.floor(rand() * topics)];
    const row = new Map();
    const len = perRow - 10 + Math.floor(rand() * 21);
    for (let w = 0; w < len; w++) {
      const t = rand() < 0.6 ? core[Math.floor(rand() ** 2 * core.length)] : Math.floor(rand() ** 3 * d);
      row.set(t, (row.get(t) ?? 0) + 1);
    }
    const terms = [...row.keys()].sort((a, b) => a - b);
    let norm = 0;
    const w = terms.map((t) => (1 + Math.log(row.get(t))) * Math.log(d / (1 + t)));
    for (const x of w) norm += x * x;
    norm = Math.sqrt(norm);
    terms.forEach((t, i) => {
      idx.push(t);
      val.push(w[i] / norm);
    });
    indptr[r + 1] = idx.length;
  }
  return { rows: n, cols: d, indptr, indices: Int32Array.from(idx), values: Float32Array.from(val) };
}

function denseRows(n, d, topics) {
  const centres = Array.from({ length: topics }, () => Array.from({ length: d }, () => rand() - 0.5));
  const indptr = new Int32Array(n + 1);
  const indices = new Int32Array(n * d);
  const values = new Float32Array(n * d);
  for (let r = 0; r < n; r++) {
    const c = centres[Math.floor(rand() * topics)];
    let norm = 0;
    const x = c.map((v) => v + (rand() - 0.5) * 0.8);
    for (const v of x) norm += v * v;
    norm = Math.sqrt(norm);
    for (let t = 0; t < d; t++) {
      indices[r * d + t] = t;
      values[r * d + t] = x[t] / norm;
    }
    indptr[r + 1] = (r + 1) * d;
  }
  return { rows: n, cols: d, indptr, indices, values };
}

/** Term-major centroids: the normalised means of K random groups of rows (a realistic spread of scores). */
function centroidsOf(m) {
  const c = new Float64Array(m.cols * K);
  for (let r = 0; r < m.rows; r++) {
    const g = r % K;
    for (let j = m.indptr[r]; j < m.indptr[r + 1]; j++) c[m.indices[j] * K + g] += m.values[j] * (1 + (r % 7));
  }
  const out = new Float32Array(m.cols * K);
  for (let g = 0; g < K; g++) {
    let s = 0;
    for (let t = 0; t < m.cols; t++) s += c[t * K + g] ** 2;
    s = Math.sqrt(s) || 1;
    for (let t = 0; t < m.cols; t++) out[t * K + g] = c[t * K + g] / s;
  }
  return out;
}

function digest(a) {
  let h = 0x811c9dc5;
  for (let i = 0; i < a.length; i++) h = Math.imul(h ^ (a[i] + 1), 0x01000193);
  return (h >>> 0).toString(16).padStart(8, '0');
}

const exe = path.join(outDir, 'kernel-O2');
const cc = spawnSync('cc', ['-O2', '-o', exe, path.join(here, 'kernel.c')], { encoding: 'utf8' });
if (cc.status !== 0) {
  console.error(`bench: cc -O2 failed: ${cc.stderr}`);
  process.exit(1);
}
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

const lines = ['## k-means assignment pass: ours vs C, and two threads (bench/kernel-ratio.mjs)', ''];
lines.push(`Written by \`node bench/kernel-ratio.mjs ${argv.join(' ')}\` on ${new Date().toISOString()}; ${os.cpus()[0]?.model}, ${os.cpus().length} cores, load average ${os.loadavg()[0].toFixed(2)} at the start; Node ${process.version}; ${spawnSync('cc', ['--version'], { encoding: 'utf8' }).stdout.split('\n')[0]}. Median of ${ROUNDS} interleaved rounds; the C kernel times its own passes (median of 3 per round), ours likewise.`);
lines.push('');
lines.push('| rows | shape | non-zeros | k | ours ms/pass | C -O2 ms/pass | ours / C | same assignments |');
lines.push('| --- | --- | --- | --- | --- | --- | --- | --- |');
const made = [];
for (const [shape, m] of [
  ['tfidf', tfidfRows(ROWS, 50_000, K, 37)],
  ['reduced (50 dims)', denseRows(ROWS, 50, K)],
]) {
  const cents = centroidsOf(m);
  const dump = path.join(outDir, `kernel-ratio-${process.pid}.bin`);
  const fd = openSync(dump, 'w');
  writeSync(fd, new Uint8Array(Int32Array.of(m.rows, m.cols, m.indptr[m.rows], K).buffer));
  for (const a of [m.indptr, m.indices, m.values, cents]) writeSync(fd, new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
  closeSync(fd);
  const out = { assignments: new Int32Array(m.rows), fit: new Float32Array(m.rows) };
  sheaf.assignToCentroids(m, cents, K, out); // warm-up
  const ours = [];
  const theirs = [];
  let same = true;
  for (let r = 0; r < ROUNDS; r++) {
    const c = spawnSync(exe, [dump, '3'], { encoding: 'utf8' });
    const j = JSON.parse(c.stdout);
    theirs.push(j.msPerPassMedian);
    const per = [];
    for (let p = 0; p < 3; p++) {
      const t0 = performance.now();
      sheaf.assignToCentroids(m, cents, K, out);
      per.push(performance.now() - t0);
    }
    ours.push(median(per));
    same &&= j.assignmentsDigest === digest(out.assignments);
  }
  rmSync(dump, { force: true });
  const o = median(ours);
  const t = median(theirs);
  lines.push(`| ${m.rows.toLocaleString('en-US')} | ${shape} | ${m.indptr[m.rows].toLocaleString('en-US')} | ${K} | ${o.toFixed(1)} | ${t.toFixed(1)} | **${(o / t).toFixed(2)}×** | ${same ? 'yes' : 'NO'} |`);
  made.push([shape, m]);
}
lines.push('');
lines.push('Target of issue #16: the assignment pass within 2× of the C kernel (`cc -O2`).');
lines.push('');

if (THREADS) {
  lines.push(`Whole k-means (restarts 1, library defaults otherwise), one thread vs two (\`sphericalKMeansParallel\`, threads 2), interleaved, median of ${ROUNDS}; the results must be bit-identical. On a machine shared with other work a second thread often finds no free core, so the speed-up measured there understates the idle-machine one.`);
  lines.push('');
  lines.push('| shape | rows | one thread s | two threads s | speed-up | identical |');
  lines.push('| --- | --- | --- | --- | --- | --- |');
  for (const [shape, m] of made) {
    const one = [];
    const two = [];
    let same = true;
    for (let r = 0; r < ROUNDS; r++) {
      let t0 = performance.now();
      const a = sheaf.sphericalKMeans(m, { groups: K, restarts: 1 });
      one.push(performance.now() - t0);
      t0 = performance.now();
      const b = await sheaf.sphericalKMeansParallel(m, { groups: K, restarts: 1, threads: 2 });
      two.push(performance.now() - t0);
      same &&= digest(a.assignments) === digest(b.assignments) && a.objective === b.objective;
    }
    const o = median(one);
    const t = median(two);
    lines.push(`| ${shape} | ${m.rows.toLocaleString('en-US')} | ${(o / 1000).toFixed(2)} | ${(t / 1000).toFixed(2)} | **${(o / t).toFixed(2)}×** | ${same ? 'yes' : 'NO'} |`);
  }
  lines.push('');
}
const text = lines.join('\n');
writeFileSync(resultsFile, text + '\n');
process.stdout.write(text + '\n');
