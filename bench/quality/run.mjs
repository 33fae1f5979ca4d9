// Quality benchmark: `npm run bench -- --quality [flags]` (or `node bench/quality/run.mjs [flags]`).
//
// On every labelled corpus bench/quality/corpora.mjs can build from installed packages, at the
// true number of classes k, over 5 seeds: NMI and ARI of sheaf's groupDocuments (library defaults
// unless a variant says otherwise) against the labels, side by side with the scikit-learn
// reference (bench/quality/reference.py) run by /usr/bin/python3 in the same run on the same texts.
// Writes its own section of bench/results.md (the rest of the file is kept) and prints it.
//
//   --seeds 0,1,2,3,4        seeds (ours: kmeans.seed; reference: random_state)
//   --corpora a,b            only these corpora (default: all that can be built)
//   --variant 'NAME=JSON'    a sheaf column: JSON merged into groupDocuments' options
//                            (e.g. 'min-df 2={"vectorize":{"minDf":2}}'); repeatable; NAME may end in
//                            @REF to run that commit's src/ (exported and built under bench/out/)
//                            default: one column "sheaf" with the defaults
//   --reduce N               add a column with sheaf's reduced vectors (the option `reduce: N`
//                            of groupDocuments) when the built library has it; skipped otherwise
//   --no-reference           skip scikit-learn
//   --no-build               do not run `npm run build` first
//   --install                let corpora.mjs download what a corpus needs (apt-get)
//   --results FILE           default bench/results.md

import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { buildCorpora, QUALITY_DIR } from './corpora.mjs';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '..', '..');
const PYTHON = '/usr/bin/python3';

const argv = process.argv.slice(2).filter((a) => a !== '--quality');
const has = (f) => argv.includes(f);
const opt = (name, dflt) => {
  const i = argv.indexOf(name);
  return i >= 0 && i + 1 < argv.length ? argv[i + 1] : dflt;
};
const all = (name) => argv.flatMap((a, i) => (a === name && i + 1 < argv.length ? [argv[i + 1]] : []));
const log = (line) => process.stderr.write(line + '\n');

// Flags this benchmark knows (a value follows those in VALUED); --help prints them, anything else is refused.
const FLAGS = ['--no-build', '--no-reference'];
const VALUED = ['--corpora', '--reduce', '--results', '--seeds', '--variant'];
if (argv.includes('--help')) {
  process.stdout.write(`npm run bench -- --quality [${FLAGS.join('] [')}] [${VALUED.map((f) => `${f} VALUE`).join('] [')}]\n`);
  process.exit(0);
}
for (let i = 0; i < argv.length; i++) {
  if (VALUED.includes(argv[i])) i++;
  else if (!FLAGS.includes(argv[i])) {
    process.stderr.write(`bench --quality: unknown flag ${argv[i]}; known: ${[...FLAGS, ...VALUED].join(', ')}\n`);
    process.exit(2);
  }
}

const SEEDS = opt('--seeds', '0,1,2,3,4').split(',').map(Number);
const REFERENCE = !has('--no-reference');
const REDUCE = opt('--reduce', null);
const resultsFile = path.resolve(opt('--results', path.join(root, 'bench', 'results.md')));

// ---------- variants and builds ----------

const variants = (all('--variant').length ? all('--variant') : ['sheaf={}']).map((spec) => {
  const eq = spec.indexOf('=');
  if (eq < 0) throw new Error(`--variant wants NAME=JSON; got ${spec}`);
  const label = spec.slice(0, eq);
  const at = label.lastIndexOf('@');
  return { name: label, ref: at > 0 ? label.slice(at + 1) : null, options: JSON.parse(spec.slice(eq + 1)) };
});
if (REDUCE !== null) variants.push({ name: `sheaf reduce ${REDUCE}`, ref: null, options: { reduce: { dims: Number(REDUCE) } }, optional: true });

if (!has('--no-build')) {
  log('quality: npm run build');
  const b = spawnSync('npm', ['run', 'build'], { cwd: root, stdio: ['ignore', 'ignore', 'inherit'] });
  if (b.status !== 0) {
    console.error('quality: npm run build failed (or pass --no-build)');
    process.exit(1);
  }
}

const gitOut = (args) => spawnSync('git', ['-C', root, ...args], { encoding: 'utf8' }).stdout.trim();

/** The dist/index.js of the work tree, or of a commit built once under bench/out/build-<src tree>. */
function distFor(ref) {
  if (!ref) return { dist: path.join(root, 'dist', 'index.js'), commit: gitOut(['rev-parse', '--short=12', 'HEAD']) + (gitOut(['status', '--porcelain', 'src']) ? ' + uncommitted src/' : '') };
  const sha = gitOut(['rev-parse', ref]);
  if (!sha) throw new Error(`--variant ...@${ref}: not a commit here`);
  const tree = gitOut(['rev-parse', `${sha}:src`]);
  const dir = path.join(root, 'bench', 'out', `build-${tree.slice(0, 12)}`);
  if (!existsSync(path.join(dir, 'dist', 'index.js'))) {
    log(`quality: building ${ref} in ${path.relative(root, dir)}`);
    rmSync(dir, { recursive: true, force: true });
    mkdirSync(dir, { recursive: true });
    const arch = spawnSync('sh', ['-c', `git -C "${root}" archive ${sha} src tsconfig.json tsconfig.build.json package.json | tar -x -C "${dir}"`], { stdio: 'inherit' });
    if (arch.status !== 0) throw new Error('git archive failed');
    spawnSync('ln', ['-s', path.join(root, 'node_modules'), path.join(dir, 'node_modules')]);
    const b = spawnSync(path.join(root, 'node_modules', '.bin', 'tsc'), ['-p', 'tsconfig.build.json'], { cwd: dir, stdio: ['ignore', 'inherit', 'inherit'] });
    if (b.status !== 0) throw new Error(`${ref} does not build`);
  }
  return { dist: path.join(dir, 'dist', 'index.js'), commit: sha.slice(0, 12) };
}

const libs = new Map();
for (const v of variants) {
  const key = v.ref ?? '';
  if (!libs.has(key)) {
    const { dist, commit } = distFor(v.ref);
    libs.set(key, { lib: await import(pathToFileURL(dist).href), commit });
  }
  v.lib = libs.get(key).lib;
  v.commit = libs.get(key).commit;
}

// ---------- corpora ----------

const only = opt('--corpora', null)?.split(',');
const { built: corpora, missing } = buildCorpora(only, { log });
if (!corpora.length) {
  console.error('quality: no corpus could be built; see the messages above');
  process.exit(2);
}

let refOk = REFERENCE;
if (REFERENCE) {
  const check = spawnSync(PYTHON, ['-c', 'import sklearn'], { encoding: 'utf8' });
  if (check.status !== 0) {
    log(`quality: ${PYTHON} lacks scikit-learn (apt-get install -y python3-sklearn); the reference is skipped`);
    refOk = false;
  }
}

// ---------- runs ----------

const readDocs = (file) =>
  readFileSync(file, 'utf8')
    .split('\n')
    .filter((l) => l.trim())
    .map((l) => JSON.parse(l));

const cpuMs = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};

const loads = [os.loadavg()[0]];
const results = [];
const started = new Date().toISOString();
for (const c of corpora) {
  const docs = readDocs(c.file);
  const labels = docs.map((d) => d.label);
  const k = new Set(labels).size;
  const row = { corpus: c, k, ours: new Map(), reference: null };
  for (const v of variants) {
    const { groupDocuments, encodeLabels, externalScores } = v.lib;
    if (v.optional && !v.unavailable) {
      // Unknown top-level keys may be ignored silently: the column runs only when the resolved options carry it.
      let resolved = null;
      try {
        resolved = v.lib.resolveGroupOptions?.({ ...v.options, groups: 2 }) ?? null;
      } catch {
        resolved = null;
      }
      if (resolved?.reduce === undefined || resolved?.reduce === null) {
        log(`quality: this build has no reduce option; the "${v.name}" column is skipped`);
        v.unavailable = true;
      }
    }
    if (v.unavailable) continue;
    const truth = encodeLabels(labels).codes;
    const runs = [];
    for (const seed of SEEDS) {
      // The seed is a top-level option since the options were reshaped; commits before that read kmeans.seed
      // (and ignored unknown top-level keys), so a built commit that refuses kmeans.seed gets the new spelling.
      const oldStyle = { ...v.options, groups: k, seed, kmeans: { ...(v.options.kmeans ?? {}), seed } };
      const newStyle = { ...v.options, groups: k, seed };
      const call = (o) => groupDocuments(docs.map((d) => ({ id: d.id, text: d.text })), o);
      const t0 = performance.now();
      const c0 = cpuMs();
      let res;
      try {
        try {
          res = call(oldStyle);
        } catch (e) {
          if (e?.option !== 'seed') throw e;
          res = call(newStyle);
        }
      } catch (e) {
        if (v.optional) {
          log(`quality: ${v.name} is not available in this build (${e.message}); column skipped`);
          v.unavailable = true;
          break;
        }
        throw e;
      }
      const ms = performance.now() - t0;
      const cpu = cpuMs() - c0;
      // Rows come back in canonical id order; map them back to the input order. Rows without terms are one extra group.
      const pred = new Int32Array(docs.length);
      for (let i = 0; i < docs.length; i++) {
        const g = res.partition.assignments[res.inputOrder[i]];
        pred[i] = g < 0 ? k : g;
      }
      const s = externalScores(truth, pred);
      runs.push({ seed, nmi: s.nmi, ari: s.ari, ms, cpuMs: cpu, terms: res.vocabulary.terms.length, empty: res.emptyRows.length });
    }
    if (v.unavailable) continue;
    row.ours.set(v.name, runs);
    log(`quality: ${c.name} ${v.name}: NMI ${summary(runs, 'nmi')}, ARI ${summary(runs, 'ari')}, ${(mean(runs.map((r) => r.ms)) / 1000).toFixed(2)} s/run, ${runs[0].terms} terms`);
  }
  if (refOk) {
    const out = path.join(QUALITY_DIR, `${c.name}.reference.json`);
    const env = { ...process.env };
    delete env.OPENBLAS_CORETYPE;
    delete env.OPENBLAS_L2_SIZE;
    const r = spawnSync(PYTHON, [path.join(here, 'reference.py'), '--input', c.file, '--seeds', SEEDS.join(','), '--out-json', out], { encoding: 'utf8', env, maxBuffer: 1 << 26 });
    if (r.status !== 0) log(`quality: reference on ${c.name} failed: ${r.stderr.trim().split('\n').pop()}`);
    else {
      row.reference = JSON.parse(readFileSync(out, 'utf8'));
      for (const [m, runs] of Object.entries(row.reference.methods)) log(`quality: ${c.name} scikit-learn ${m}: NMI ${summary(runs, 'nmi')}, ARI ${summary(runs, 'ari')}`);
    }
  }
  loads.push(os.loadavg()[0]);
  results.push(row);
}

function mean(xs) {
  return xs.reduce((a, b) => a + b, 0) / xs.length;
}
function summary(runs, key) {
  return `${mean(runs.map((r) => r[key])).toFixed(3)} (worst ${Math.min(...runs.map((r) => r[key])).toFixed(3)})`;
}

// ---------- report ----------

const f3 = (x) => (x == null || !Number.isFinite(x) ? '–' : x.toFixed(3).replace(/^0\./, '.').replace(/^-0\./, '-.'));
const cell = (runs, key) => (runs ? `${f3(mean(runs.map((r) => r[key])))} (${f3(Math.min(...runs.map((r) => r[key]))) })` : '–');
const secs = (runs, key) => {
  if (!runs) return '–';
  const [w, c, d] = key === 'ms' ? ['ms', 'cpuMs', 1000] : ['seconds', 'cpuSeconds', 1];
  return `${(mean(runs.map((r) => r[w])) / d).toFixed(2)} / ${(mean(runs.map((r) => r[c])) / d).toFixed(2)}`;
};
const table = (head, rows) => [`| ${head.join(' | ')} |`, `| ${head.map(() => '---').join(' | ')} |`, ...rows.map((r) => `| ${r.join(' | ')} |`)].join('\n');

const shown = variants.filter((v) => !v.unavailable);
const refMethods = refOk ? ['tfidf', 'lsa50'] : [];
const refName = { tfidf: 'scikit-learn', lsa50: 'scikit-learn + LSA 50' };
const columns = [...shown.map((v) => ({ name: v.name, get: (row) => row.ours.get(v.name), time: 'ms' })), ...refMethods.map((m) => ({ name: refName[m], get: (row) => row.reference?.methods[m], time: 'seconds' }))];

const lines = [];
const say = (s = '') => lines.push(s);
say('<!-- quality:start -->');
say('## Grouping quality on labelled corpora');
say();
say(`Written by \`npm run bench -- --quality${argv.length ? ' ' + argv.map((a) => (/[\s{}"]/.test(a) ? `'${a}'` : a)).join(' ') : ''}\` on ${started}.`);
say();
const py = refOk ? spawnSync(PYTHON, ['-c', 'import sys, sklearn, scipy, numpy; print(sys.version.split()[0], sklearn.__version__, scipy.__version__, numpy.__version__)'], { encoding: 'utf8' }).stdout.trim().split(' ') : null;
say(`- Machine: ${os.cpus()[0]?.model ?? 'unknown CPU'}, ${os.cpus().length} cores; Node ${process.version}; load average (1 min) ${Math.min(...loads).toFixed(2)}–${Math.max(...loads).toFixed(2)} during the run (shared machine: times are indicative).`);
say(`- sheaf: ${[...new Set(shown.map((v) => `${v.commit}${v.ref ? ` (${v.ref})` : ''}`))].join(', ')}${py ? `; reference: Python ${py[0]}, scikit-learn ${py[1]}, scipy ${py[2]}, numpy ${py[3]}` : ''}.`);
say(`- Each cell: mean over seeds ${SEEDS.join(', ')} (worst seed in brackets), at k = the number of classes. NMI uses the arithmetic-mean normaliser on both sides; documents left without terms count as one extra group.`);
say(`- sheaf columns: \`groupDocuments(docs, { groups: k, seed, ...variant })\` on the texts as given (no ticket cleaning). ${shown.map((v) => `**${v.name}**: ${JSON.stringify(v.options) === '{}' ? 'library defaults' : `\`${JSON.stringify(v.options)}\``}`).join('; ')}.`);
if (refOk) say('- scikit-learn: `TfidfVectorizer(stop_words="english", sublinear_tf=True, min_df=2, max_df=0.5)` + `KMeans(n_clusters=k, n_init=4, random_state=seed)`; **+ LSA 50**: the same TF-IDF, then `TruncatedSVD(50, random_state=seed)` and `Normalizer()` before KMeans (bench/quality/reference.py).');
say();
say(table(['corpus', 'what', 'docs', 'k'], results.map((r) => [r.corpus.name, `${r.corpus.kind} — ${r.corpus.source}`, String(r.corpus.docs), String(r.k)])));
say();
for (const [key, title] of [['nmi', 'NMI'], ['ari', 'ARI']]) {
  say(`### ${title}, mean (worst seed)`);
  say();
  const rows = results.map((r) => [r.corpus.name, ...columns.map((c) => cell(c.get(r), key))]);
  const avg = (c, pick) => {
    const xs = results.map((r) => c.get(r)).filter(Boolean);
    return xs.length === results.length ? f3(mean(xs.map((runs) => pick(runs.map((x) => x[key]))))) : '–';
  };
  rows.push(['**mean over corpora**', ...columns.map((c) => `**${avg(c, mean)}** (${avg(c, (xs) => Math.min(...xs))})`)]);
  say(table(['corpus', ...columns.map((c) => c.name)], rows));
  say();
}
say('### Seconds per run, wall / CPU (mean over seeds)');
say();
say(table(['corpus', ...columns.map((c) => c.name), ...shown.map((v) => `terms: ${v.name}`), ...(refOk ? ['terms: scikit-learn'] : [])], results.map((r) => [
  r.corpus.name,
  ...columns.map((c) => secs(c.get(r), c.time)),
  ...shown.map((v) => String(r.ours.get(v.name)?.[0]?.terms ?? '–')),
  ...(refOk ? [String(r.reference?.terms ?? '–')] : []),
])));
say();
say('sheaf runs the whole `groupDocuments` (analysis, TF-IDF, k-means, tree, quality, names) on one thread; the reference runs TF-IDF and KMeans only (KMeans on up to all cores; its CPU time adds up its threads). On a loaded machine CPU time is the steadier figure.');
if (missing.length) {
  say();
  say('Corpora not available on this machine: ' + missing.map((m) => `${m.name} (${m.how})`).join('; ') + '.');
}
say('<!-- quality:end -->');

const section = lines.join('\n');
let text = existsSync(resultsFile) ? readFileSync(resultsFile, 'utf8') : '';
const re = /<!-- quality:start -->[\s\S]*?<!-- quality:end -->/;
text = re.test(text) ? text.replace(re, section) : `${text.replace(/\n*$/, '')}\n\n${section}\n`;
writeFileSync(resultsFile, text);
process.stdout.write(section + '\n');
log(`quality: wrote ${path.relative(process.cwd(), resultsFile)}`);
