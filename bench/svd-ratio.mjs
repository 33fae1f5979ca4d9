// Truncated SVD (src/reduce/svd.ts) against a reference build of the same
// function, on the same matrix, in one process, runs interleaved: CPU time per
// run and the ratio reference / ours, and whether the outputs are bit-identical.
// With --threads T (> 1) ours also runs on T threads (truncatedSvdParallel of
// src/parallel/svd-parallel.ts), interleaved with the others; CPU is the whole
// process's (workers included), wall is what a user waits.
//
// Usage:
//   node bench/svd-ratio.mjs --mtx DIR/vectors.mtx --ref REFDIST [--runs 2] [--dims 50] [--seed 1] [--threads 2]
// The matrix comes from `sheaf group ... --save-vectors DIR` (the TF-IDF rows
// the reduce stage sees). REFDIST is a built dist/ of the reference commit
// (e.g. `git archive REF src | tar -x -C /tmp/ref && npx tsc -p tsconfig.build.json --outDir ...`,
// or a copy of dist/ taken before the change).
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL, fileURLToPath } from 'node:url';

const args = process.argv.slice(2);
const opt = (name, dflt) => {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : dflt;
};
const mtx = opt('--mtx', null);
const refDist = opt('--ref', null);
if (!mtx || !refDist) {
  console.error('usage: node bench/svd-ratio.mjs --mtx vectors.mtx --ref REFDIST [--runs 2] [--dims 50] [--seed 1]');
  process.exit(2);
}
const runs = Number(opt('--runs', '2'));
const dims = Number(opt('--dims', '50'));
const seed = Number(opt('--seed', '1'));
const here = path.dirname(fileURLToPath(import.meta.url));
const ours = await import(pathToFileURL(path.join(here, '..', 'dist', 'index.js')).href);
const threads = Number(opt('--threads', '1'));
const ref = await import(pathToFileURL(path.resolve(refDist, 'index.js')).href);

/** MatrixMarket coordinate file (rows in order, as sheaf writes it) → CSR with Float32 values. */
function readMtx(file) {
  const text = readFileSync(file, 'utf8');
  let pos = text.indexOf('\n') + 1;
  while (text[pos] === '%') pos = text.indexOf('\n', pos) + 1;
  const headEnd = text.indexOf('\n', pos);
  const [rows, cols, nnz] = text.slice(pos, headEnd).trim().split(/\s+/).map(Number);
  pos = headEnd + 1;
  const indptr = new Int32Array(rows + 1);
  const indices = new Int32Array(nnz);
  const values = new Float32Array(nnz);
  let k = 0;
  let lastRow = 0;
  while (k < nnz) {
    const end = text.indexOf('\n', pos);
    const line = text.slice(pos, end < 0 ? text.length : end);
    pos = end + 1;
    const a = line.indexOf(' ');
    const b = line.indexOf(' ', a + 1);
    const r = Number(line.slice(0, a)) - 1;
    if (r < lastRow) throw new Error('rows out of order');
    while (lastRow < r) indptr[++lastRow] = k;
    indices[k] = Number(line.slice(a + 1, b)) - 1;
    values[k] = Number(line.slice(b + 1));
    k++;
  }
  while (lastRow < rows) indptr[++lastRow] = k;
  return { rows, cols, indptr, indices, values };
}

const matrix = readMtx(mtx);
console.log(`matrix ${matrix.rows} × ${matrix.cols}, ${matrix.values.length} stored values; dims ${dims}, seed ${seed}, ${runs} runs each, interleaved`);
const cpu = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};
const variants = [
  ['ref', () => ref.truncatedSvd(matrix, { dims }, ref.createRng(seed))],
  ['ours', () => ours.truncatedSvd(matrix, { dims }, ours.createRng(seed))],
];
if (threads > 1) variants.push([`ours×${threads}`, () => ours.truncatedSvdParallel(matrix, { dims }, ours.createRng(seed), { threads })]);
const times = Object.fromEntries(variants.map(([name]) => [name, []]));
const outs = {};
for (let r = 0; r < runs; r++) {
  // Rotate the order from run to run, so no variant always runs first.
  const order = variants.map((_, i) => variants[(i + r) % variants.length]);
  for (const [name, run] of order) {
    const c0 = cpu();
    const t0 = performance.now();
    const svd = await run();
    times[name].push({ cpu: cpu() - c0, wall: performance.now() - t0 });
    outs[name] = svd;
  }
}
const same = (a, b) => a.length === b.length && a.every((x, i) => Object.is(x, b[i]));
const median = (xs, key) => {
  const s = xs.map((x) => x[key]).sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};
for (const [name] of variants) {
  const t = times[name];
  console.log(
    `${name.padEnd(7)} CPU ${t.map((x) => (x.cpu / 1000).toFixed(2)).join(', ')} s (median ${(median(t, 'cpu') / 1000).toFixed(2)}); wall ${t.map((x) => (x.wall / 1000).toFixed(2)).join(', ')} s (median ${(median(t, 'wall') / 1000).toFixed(2)})`,
  );
}
for (const [name] of variants.slice(1)) {
  console.log(`ratio ref / ${name} (median CPU): ${(median(times.ref, 'cpu') / median(times[name], 'cpu')).toFixed(2)}×; (median wall): ${(median(times.ref, 'wall') / median(times[name], 'wall')).toFixed(2)}×`);
}
for (const [name] of variants.slice(1)) {
  let maxDiff = 0;
  for (let i = 0; i < outs.ref.rows.length; i++) maxDiff = Math.max(maxDiff, Math.abs(outs.ref.rows[i] - outs[name].rows[i]));
  console.log(
    `bit-identical ${name} vs ref: components ${same(outs.ref.components, outs[name].components)}, singular values ${same(outs.ref.singularValues, outs[name].singularValues)}, rows ${same(outs.ref.rows, outs[name].rows)} (largest row difference ${maxDiff})`,
  );
}
