// Mini-batch spherical k-means (the path piles of 200k+ rows take) against a reference build, on the
// same TF-IDF matrix (vectors.mtx from `sheaf group ... --save-vectors DIR`), in one process, interleaved:
// CPU time per run, the ratio, and whether assignments, centroids and objective are bit-identical.
//
//   node bench/minibatch-ratio.mjs --mtx DIR/vectors.mtx --ref REFDIST [--k 100] [--runs 2] [--restarts 1]
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const args = process.argv.slice(2);
const opt = (name, dflt) => {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : dflt;
};
const mtx = opt('--mtx', null);
const refDist = opt('--ref', null);
if (!mtx || !refDist) {
  console.error('usage: node bench/minibatch-ratio.mjs --mtx vectors.mtx --ref REFDIST [--k 100] [--runs 2] [--restarts 1]');
  process.exit(2);
}
const k = Number(opt('--k', '100'));
const runs = Number(opt('--runs', '2'));
const restarts = Number(opt('--restarts', '1'));
const here = path.dirname(fileURLToPath(import.meta.url));
const libs = {
  ref: await import(pathToFileURL(path.resolve(refDist, 'index.js')).href),
  ours: await import(pathToFileURL(path.join(here, '..', 'dist', 'index.js')).href),
};

const lines = readFileSync(mtx, 'utf8').split('\n');
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
const matrix = { rows, cols, indptr, indices, values };
console.log(`matrix ${rows} × ${cols}, ${nnz} stored values; k ${k}, miniBatch true, restarts ${restarts}, ${runs} runs each, interleaved`);

const cpu = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};
const times = { ref: [], ours: [] };
const out = {};
for (let r = 0; r < runs; r++) {
  for (const name of r % 2 === 0 ? ['ref', 'ours'] : ['ours', 'ref']) {
    const c0 = cpu();
    out[name] = libs[name].sphericalKMeans(matrix, { groups: k, seed: 1, restarts, miniBatch: true });
    times[name].push(cpu() - c0);
  }
}
const same = (a, b) => a.length === b.length && a.every((x, i) => Object.is(x, b[i]));
for (const name of ['ref', 'ours']) console.log(`${name.padEnd(4)} CPU ${times[name].map((t) => (t / 1000).toFixed(2)).join(', ')} s`);
const best = (xs) => Math.min(...xs);
console.log(`ratio ref / ours (best CPU): ${(best(times.ref) / best(times.ours)).toFixed(2)}×`);
console.log(
  `bit-identical: assignments ${same(out.ref.assignments, out.ours.assignments)}, centroids ${same(out.ref.centroids, out.ours.centroids)}, objective ${Object.is(out.ref.objective, out.ours.objective)} (${out.ours.objective}), batches ${out.ref.batches} / ${out.ours.batches}`,
);
