// ingest() end to end (bytes read, encoding chosen, decoded, hashed, CSV read, ids checked) against a
// reference build, on the same file, in one process, interleaved: CPU time per run, MB/s (10^6 bytes of
// the file per CPU second) and the ratio. Checks both give the same documents.
//
//   node bench/ingest-ratio.mjs --input FILE.csv --ref REFDIST [--rounds 6] [--text text] [--id id]
import { statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { isDeepStrictEqual } from 'node:util';

const args = process.argv.slice(2);
const opt = (name, dflt) => {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : dflt;
};
const input = opt('--input', null);
const refDist = opt('--ref', null);
if (!input || !refDist) {
  console.error('usage: node bench/ingest-ratio.mjs --input FILE --ref REFDIST [--rounds 6] [--text text] [--id id]');
  process.exit(2);
}
const rounds = Number(opt('--rounds', '6'));
const options = { text: opt('--text', 'text').split(','), id: opt('--id', 'id') };
const here = path.dirname(fileURLToPath(import.meta.url));
const libs = {
  ref: await import(pathToFileURL(path.resolve(refDist, 'index.js')).href),
  ours: await import(pathToFileURL(path.join(here, '..', 'dist', 'index.js')).href),
};
const mb = statSync(input).size / 1e6;
const cpu = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};
const times = { ref: [], ours: [] };
const last = {};
for (let r = 0; r < rounds; r++) {
  for (const name of r % 2 === 0 ? ['ref', 'ours'] : ['ours', 'ref']) {
    globalThis.gc?.();
    const c0 = cpu();
    const result = await libs[name].ingest([input], options, { cwd: process.cwd() });
    times[name].push(cpu() - c0);
    last[name] = result;
  }
}
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
console.log(`${path.basename(input)}: ${mb.toFixed(1)} MB, ${last.ours.docs.length} documents, ${rounds} rounds interleaved (first round included)`);
for (const name of ['ref', 'ours']) {
  console.log(`${name.padEnd(4)} CPU ms ${times[name].map((t) => t.toFixed(0)).join(', ')}; median ${median(times[name]).toFixed(0)} ms = ${(mb / (median(times[name]) / 1000)).toFixed(1)} MB/s`);
}
console.log(`ratio ref / ours (median CPU): ${(median(times.ref) / median(times.ours)).toFixed(2)}×`);
const strip = (r) => ({ docs: r.docs, warnings: r.warnings, skipped: r.skipped, inputs: r.inputs, decoding: r.decoding });
console.log(`same documents, warnings, skips, digests and decoding notes: ${isDeepStrictEqual(strip(last.ref), strip(last.ours))}`);
