// Restarts screened on a sample against restarts run in full, on the rows the pipeline groups (TF-IDF rows
// from `sheaf group ... --save-vectors DIR`, reduced to 50 dimensions the way the pipeline does below 100k
// documents, or left as they are with --no-reduce), in one process, interleaved: k-means CPU time, objective
// on all rows, NMI against the planted topics (column `topic` of the CSV the vectors came from).
//
//   node bench/screen-ratio.mjs --dir DIR --csv FILE.csv [--k 100] [--runs 2] [--variants off,10000:1,20000:1]
//                               [--no-reduce] [--mini-batch] [--threads 1] [--ref REFDIST]
//
// A variant is `off` (screen: false), or `SIZE:KEEP[:PASSES]` (screen: true, screenSize SIZE, screenKeep KEEP,
// screenPasses PASSES).
// With --ref, `ref` is a run of the reference build's sphericalKMeans with its own defaults.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { parse } from 'csv-parse/sync';

const args = process.argv.slice(2);
const opt = (name, dflt) => {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : dflt;
};
const dir = opt('--dir', null);
const csv = opt('--csv', null);
if (!dir || !csv) {
  console.error('usage: node bench/screen-ratio.mjs --dir DIR --csv FILE.csv [--k 100] [--runs 2] [--variants off,10000:1] [--no-reduce] [--mini-batch] [--threads 1] [--ref REFDIST]');
  process.exit(2);
}
const k = Number(opt('--k', '100'));
const runs = Number(opt('--runs', '2'));
const threads = Number(opt('--threads', '1'));
const variants = opt('--variants', 'off,10000:1').split(',');
const miniBatch = args.includes('--mini-batch');
const refDist = opt('--ref', null);
const here = path.dirname(fileURLToPath(import.meta.url));
const lib = await import(pathToFileURL(path.join(here, '..', 'dist', 'index.js')).href);
const ref = refDist ? await import(pathToFileURL(path.resolve(refDist, 'index.js')).href) : null;

const lines = readFileSync(path.join(dir, 'vectors.mtx'), 'utf8').split('\n');
let h = 0;
while (lines[h].startsWith('%')) h++;
const [rows, cols, nnz] = lines[h].trim().split(/\s+/).map(Number);
const indptr = new Int32Array(rows + 1);
const indices = new Int32Array(nnz);
const values = new Float32Array(nnz);
for (let q = 0; q < nnz; q++) {
  const [r, c, v] = lines[h + 1 + q].split(' ');
  indptr[Number(r)]++;
  indices[q] = Number(c) - 1;
  values[q] = Number(v);
}
for (let r = 0; r < rows; r++) indptr[r + 1] += indptr[r];
let matrix = { rows, cols, indptr, indices, values };
const nonEmpty = lib.countNonEmptyRows(matrix);

// Planted topics, by id, in the row order of the vectors.
const ids = readFileSync(path.join(dir, 'ids.txt'), 'utf8').split('\n').filter((s) => s.length > 0);
const records = parse(readFileSync(csv), { columns: true });
const topicOf = new Map(records.map((r) => [r.id, r.topic]));
const topicNumber = new Map();
const truth = new Int32Array(rows);
for (let r = 0; r < rows; r++) {
  const t = topicOf.get(ids[r]);
  if (!topicNumber.has(t)) topicNumber.set(t, topicNumber.size);
  truth[r] = topicNumber.get(t);
}

const cpu = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};
if (!args.includes('--no-reduce')) {
  const reduce = lib.reductionFor(lib.resolveReduceSetting(undefined), nonEmpty, cols);
  if (reduce) {
    const c0 = cpu();
    matrix = lib.reduceForGrouping(matrix, reduce, 1, nonEmpty).matrix;
    console.log(`reduced to ${reduce.dims} dimensions in ${((cpu() - c0) / 1000).toFixed(1)} s CPU`);
  }
}
console.log(`matrix ${matrix.rows} × ${matrix.cols}, ${matrix.indptr[matrix.rows]} stored values; k ${k}, miniBatch ${miniBatch ? 'true' : 'auto'}, threads ${threads}, ${runs} runs each, interleaved`);

function nmiOf(assignments) {
  const t = [];
  const p = [];
  for (let r = 0; r < rows; r++) {
    if (assignments[r] < 0) continue;
    t.push(truth[r]);
    p.push(assignments[r]);
  }
  return lib.nmi(lib.contingency(Int32Array.from(t), Int32Array.from(p)));
}

const names = [...variants, ...(ref ? ['ref'] : [])];
const rec = Object.fromEntries(names.map((n) => [n, { cpu: [], objective: [], nmi: [], kept: '' }]));
for (let run = 0; run < runs; run++) {
  const order = run % 2 === 0 ? names : [...names].reverse();
  for (const name of order) {
    const base = { groups: k, seed: 1 + run, ...(miniBatch ? { miniBatch: true } : {}) };
    let options;
    if (name === 'ref') options = base;
    else if (name === 'off') options = { ...base, screen: false };
    else {
      const [size, keep, passes] = name.split(':').map(Number);
      options = { ...base, screen: true, screenSize: size, screenKeep: keep, ...(passes ? { screenPasses: passes } : {}) };
    }
    const c0 = cpu();
    const w0 = performance.now();
    const res =
      name === 'ref'
        ? ref.sphericalKMeans(matrix, options)
        : threads > 1
          ? await lib.sphericalKMeansParallel(matrix, { ...options, threads })
          : lib.sphericalKMeans(matrix, options);
    const t = (cpu() - c0) / 1000;
    const wall = (performance.now() - w0) / 1000;
    const r = rec[name];
    r.cpu.push(t);
    r.objective.push(res.objective);
    r.nmi.push(nmiOf(res.assignments));
    console.log(`  run ${run + 1} seed ${1 + run} ${name.padEnd(11)} CPU ${t.toFixed(2)} s  wall ${wall.toFixed(2)} s  objective ${res.objective.toFixed(3)}  NMI ${r.nmi.at(-1).toFixed(4)}  passes ${res.iterations}${res.batches ? ` steps ${res.batches}` : ''}`);
  }
}
const mean = (xs) => xs.reduce((a, b) => a + b, 0) / xs.length;
console.log('variant      CPU (mean)  objective (mean)  NMI (mean)');
for (const name of names) {
  const r = rec[name];
  console.log(`${name.padEnd(12)} ${mean(r.cpu).toFixed(2).padStart(8)} s  ${mean(r.objective).toFixed(3).padStart(14)}  ${mean(r.nmi).toFixed(4)}`);
}
if (rec.off) {
  for (const name of names) {
    if (name === 'off') continue;
    const gap = rec[name].objective.map((o, i) => (o - rec.off.objective[i]) / rec.off.objective[i]);
    console.log(`${name}: CPU off / ${name} ${(mean(rec.off.cpu) / mean(rec[name].cpu)).toFixed(2)}×, objective vs off ${gap.map((g) => (100 * g).toFixed(3) + '%').join(', ')}`);
  }
}
