/**
 * Test helpers for the HTML report: a real Chromium (Debian's, never a
 * downloaded one), temp files, and report data built by hand from a tiny
 * grouping whose numbers are computed here from first principles (term counts,
 * unit vectors, centroids, cosines, average-link between groups).
 */
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type Browser } from 'playwright-core';
import { diffWords } from 'diff';
import type { ReportData, ReportDiffPiece } from '../../src/report/report-data.js';
import { ingest } from '../../src/ingest/index.js';
import { groupDocuments } from '../../src/pipeline.js';
import { groupAverageLink } from '../../src/cluster/tree.js';
import { groupSeparation } from '../../src/cluster/quality.js';
import { nearCopiesOfVectors, resolveFindDuplicatesOptions } from '../../src/near-copies.js';
import { reportFromRun } from '../../src/report/report-from-run.js';
import { mergeNames } from '../../src/report/report-extras.js';
import { groupTrends } from '../../src/trends/index.js';

export const CHROMIUM_PATH = '/usr/bin/chromium';

/** The repository root (for the demo corpus). */
export const REPO_ROOT = path.resolve(path.dirname(new URL(import.meta.url).pathname), '..', '..');

/** Launches Debian's Chromium headless; fails with a clear message when it is missing. */
export async function launchBrowser(executablePath = CHROMIUM_PATH): Promise<Browser> {
  if (!existsSync(executablePath)) {
    throw new Error(
      `Chromium is not installed at ${executablePath}; the report's browser tests need it (Debian: apt-get install -y chromium).`,
    );
  }
  // playwright's launch() gives the browser a fresh temporary user-data-dir of its own.
  return chromium.launch({
    executablePath,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
    timeout: 60_000,
  });
}

/** Writes `html` to a new temp folder and returns its path and file:// URL. */
export function writeTempHtml(html: string, name = 'report.html'): { dir: string; file: string; url: string } {
  const dir = mkdtempSync(path.join(tmpdir(), 'sheaf-report-'));
  const file = path.join(dir, name);
  writeFileSync(file, html, 'utf8');
  return { dir, file, url: pathToFileURL(file).href };
}

/** One hand-made document of the tiny corpus. */
export interface TinyDoc {
  id: string;
  title: string;
  text: string;
  group: number;
}

/** Strings that try to break out of HTML, attributes, scripts and URLs. */
export const HOSTILE = {
  script: '<script>window.__pwned = "script"</script>',
  img: '<img src=x onerror="window.__pwned = \'img\'">',
  close: '</script><script>window.__pwned = "close"</script>',
  comment: '<!-- <script>window.__pwned = "comment"</script>',
  url: 'javascript:window.__pwned = "url"',
  attr: '" autofocus onfocus="window.__pwned = \'attr\'" x="',
  svg: '<svg onload="window.__pwned = \'svg\'"></svg>',
  lineSep: 'line\u2028separator\u2029end',
};

/** Twelve support tickets in three groups; two of them are near-copies of each other, two more too. */
export function tinyCorpus(hostile = false): TinyDoc[] {
  const docs: TinyDoc[] = [
    { id: 'T-101', title: 'Cannot reset my password', text: 'password reset email never arrives password reset link', group: 0 },
    { id: 'T-102', title: 'Password reset email missing', text: 'password reset email never arrives password reset link today', group: 0 },
    { id: 'T-103', title: 'Locked out after password change', text: 'locked account password change login fails', group: 0 },
    { id: 'T-104', title: 'Login fails with new password', text: 'login fails password account locked', group: 0 },
    { id: 'T-105', title: 'Refund not received', text: 'refund invoice charged twice card refund', group: 1 },
    { id: 'T-106', title: 'Charged twice this month', text: 'charged twice card invoice refund please', group: 1 },
    { id: 'T-107', title: 'Invoice shows wrong amount', text: 'invoice amount wrong charged card', group: 1 },
    { id: 'T-108', title: 'Parcel is late', text: 'parcel delivery late tracking courier', group: 2 },
    { id: 'T-109', title: 'Tracking number does not work', text: 'tracking number courier parcel not found', group: 2 },
    { id: 'T-110', title: 'Delivery to wrong address', text: 'delivery wrong address parcel courier', group: 2 },
    { id: 'T-111', title: 'Where is my parcel', text: 'parcel delivery late tracking courier again', group: 2 },
    { id: 'T-112', title: 'Empty ticket', text: '', group: -1 },
  ];
  if (hostile) {
    docs[0].title = HOSTILE.script;
    docs[1].title = HOSTILE.close;
    docs[2].title = HOSTILE.img;
    docs[3].id = HOSTILE.attr;
    docs[4].title = HOSTILE.url;
    docs[5].title = HOSTILE.comment;
    docs[6].title = HOSTILE.svg;
    docs[7].title = HOSTILE.lineSep;
    docs[8].id = '<b>T-109</b>';
  }
  return docs;
}

/** Unit term-count vector of a text over `vocab` (terms split on spaces). */
function unitVector(text: string, vocab: Map<string, number>): Float64Array {
  const v = new Float64Array(vocab.size);
  for (const w of text.split(/\s+/).filter(Boolean)) v[vocab.get(w)!] += 1;
  const norm = Math.hypot(...v);
  if (norm > 0) for (let i = 0; i < v.length; i++) v[i] /= norm;
  return v;
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

/** Word diff of `text` against `representative`, as report pieces. */
export function wordDiff(representative: string, text: string): ReportDiffPiece[] {
  return diffWords(representative, text).map((c) => ({
    kind: c.added ? 'added' : c.removed ? 'removed' : 'same',
    text: c.value,
  }));
}

/**
 * Report data for {@link tinyCorpus}: real centroids, fits, cohesion, the map
 * from {@link groupMap}, the average-link tree between the three groups, and two
 * near-duplicate sets with word diffs.
 */
export function tinyReport(options: { hostile?: boolean; tree?: boolean; duplicates?: boolean; dated?: boolean } = {}): ReportData {
  const docs = tinyCorpus(options.hostile);
  const vocab = new Map<string, number>();
  for (const d of docs) for (const w of d.text.split(/\s+/).filter(Boolean)) if (!vocab.has(w)) vocab.set(w, vocab.size);
  const terms = [...vocab.keys()];
  const vectors = docs.map((d) => unitVector(d.text, vocab));
  const k = 3;
  const sums = Array.from({ length: k }, () => new Float64Array(vocab.size));
  const sizes = new Array<number>(k).fill(0);
  docs.forEach((d, i) => {
    if (d.group < 0) return;
    sizes[d.group]++;
    for (let t = 0; t < vocab.size; t++) sums[d.group][t] += vectors[i][t];
  });
  const centroids = sums.map((s) => {
    const norm = Math.hypot(...s);
    return s.map((v) => v / norm);
  });
  const fit = docs.map((d, i) => (d.group < 0 ? Number.NaN : dot(vectors[i], centroids[d.group])));
  const termMajor = new Float32Array(vocab.size * k);
  for (let t = 0; t < vocab.size; t++) for (let g = 0; g < k; g++) termMajor[t * k + g] = centroids[g][t];
  const labels = options.hostile
    ? [HOSTILE.close, HOSTILE.img, 'parcel / courier']
    : ['password / reset', 'refund / invoice', 'parcel / courier'];
  const groups = Array.from({ length: k }, (_, g) => {
    const members = docs.map((_, i) => i).filter((i) => docs[i].group === g);
    const byFit = members.slice().sort((a, b) => fit[b] - fit[a] || a - b);
    const top = centroids[g]
      .reduce<number[]>((acc, _, t) => (acc.push(t), acc), [])
      .sort((a, b) => centroids[g][b] - centroids[g][a] || a - b)
      .slice(0, 5);
    let separation = -Infinity;
    for (let h = 0; h < k; h++) if (h !== g) separation = Math.max(separation, dot(centroids[g], centroids[h]));
    return {
      id: g,
      label: labels[g],
      size: sizes[g],
      cohesion: members.reduce((s, i) => s + fit[i], 0) / members.length,
      separation,
      terms: top.map((t) => ({
        term: options.hostile && g === 0 && t === top[0] ? HOSTILE.svg : terms[t],
        weight: centroids[g][t],
        // Shares of documents containing the term, in the group and elsewhere (counted here from the texts).
        inGroup: members.filter((i) => docs[i].text.split(' ').includes(terms[t])).length / members.length,
        outside: docs.filter((d, i) => d.group !== g && d.text.split(' ').includes(terms[t]) && i >= 0).length / (docs.length - members.length),
      })),
      exemplars: byFit.slice(0, 2).map((i) => docs[i].id),
    };
  });
  // Average-link between groups: mean pairwise cosine = (ΣA·ΣB)/(|A||B|).
  const pair = (a: number[], b: number[]) => {
    const sa = new Float64Array(vocab.size);
    const sb = new Float64Array(vocab.size);
    for (const g of a) for (let t = 0; t < vocab.size; t++) sa[t] += sums[g][t];
    for (const g of b) for (let t = 0; t < vocab.size; t++) sb[t] += sums[g][t];
    const na = a.reduce((s, g) => s + sizes[g], 0);
    const nb = b.reduce((s, g) => s + sizes[g], 0);
    return dot(sa, sb) / (na * nb);
  };
  const pairs: [number, number, number][] = [
    [0, 1, pair([0], [1])],
    [0, 2, pair([0], [2])],
    [1, 2, pair([1], [2])],
  ];
  pairs.sort((a, b) => b[2] - a[2]);
  const [l, r] = pairs[0];
  const other = [0, 1, 2].find((g) => g !== l && g !== r)!;
  const merges = [
    { left: l, right: r, similarity: pairs[0][2], size: 2 },
    { left: other, right: 3, similarity: pair([other], [l, r]), size: 3 },
  ];
  const setOf = new Map<string, number>([
    [docs[0].id, 0],
    [docs[1].id, 0],
    [docs[7].id, 1],
    [docs[10].id, 1],
  ]);
  const duplicates = {
    threshold: 0.8,
    by: 'cosine of TF-IDF vectors',
    sets: [
      {
        id: 0,
        representative: docs[0].id,
        members: [
          { id: docs[0].id, similarity: 1 },
          { id: docs[1].id, similarity: dot(vectors[0], vectors[1]), diff: wordDiff(docs[0].text, docs[1].text) },
        ],
      },
      {
        id: 1,
        representative: docs[7].id,
        members: [
          { id: docs[7].id, similarity: 1 },
          { id: docs[10].id, similarity: dot(vectors[7], vectors[10]), diff: wordDiff(docs[7].text, docs[10].text) },
        ],
      },
    ],
  };
  // Export columns: a channel and a creation time (ISO 8601 UTC) per ticket, spread over three weeks of 2029.
  const columns = options.hostile ? [HOSTILE.img, 'created'] : ['channel', 'created'];
  const created = docs.map((_, i) => new Date(Date.UTC(2029, 0, 1 + ((i * 13) % 80), i % 10, 30)).toISOString());
  if (options.hostile) created[3] = HOSTILE.script;
  const channel = docs.map((_, i) => (options.hostile && i === 0 ? HOSTILE.comment : ['mail', 'chat', 'phone'][i % 3]));
  // Runner-up group of each grouped document and the margin, by the same cosines as the fits.
  const next = docs.map((d, i) => {
    if (d.group < 0) return { next: -1, margin: Number.NaN };
    let best = -1;
    let cos = -Infinity;
    for (let g = 0; g < k; g++) {
      if (g === d.group) continue;
      const c = dot(vectors[i], centroids[g]);
      if (c > cos) [best, cos] = [g, c];
    }
    return { next: best, margin: fit[i] - cos };
  });
  const similarity: number[] = [];
  for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) similarity.push(dot(centroids[a], centroids[b]));
  const trends = options.dated
    ? (() => {
        const t = groupTrends(created, Int32Array.from(docs, (d) => d.group), k);
        const p = t.periods.length;
        return {
          column: 'created',
          granularity: t.granularity,
          zone: 'UTC',
          periods: t.periods,
          counts: Array.from({ length: k }, (_, g) => Array.from(t.counts.subarray(g * p, g * p + p))),
          rising: Array.from(t.rising),
          unparsed: t.unparsed.length,
          unparsedIds: Array.from(t.unparsed, (i) => docs[i].id),
          periodOf: t.periodOf,
        };
      })()
    : null;
  return {
    title: options.hostile ? `sheaf — ${HOSTILE.close}` : 'sheaf — tiny tickets',
    createdAt: '2026-01-02T03:04:05.000Z',
    version: '0.1.0',
    settings: [
      { name: 'groups', value: '3' },
      { name: 'seed', value: '1' },
      ...(options.hostile ? [{ name: HOSTILE.attr, value: HOSTILE.script }] : []),
    ],
    counts: { documents: docs.length, grouped: docs.length - 1, withoutTerms: 1, skipped: 0, terms: vocab.size },
    groups,
    ...(options.tree === false ? {} : { tree: { merges } }),
    documents: docs.map((d, i) => ({
      id: d.id,
      title: d.title,
      group: d.group,
      fit: fit[i],
      duplicateSet: setOf.get(d.id) ?? -1,
      next: next[i].next,
      margin: next[i].margin,
      fields: [channel[i], created[i]],
      text: options.hostile && i === 2 ? `${HOSTILE.img} ${d.text}` : d.text,
      ...(i === 0 ? { cleaned: d.text.split(' ').slice(0, 4).join(' ') } : {}),
      ...(trends && trends.periodOf[i] >= 0 ? { period: trends.periods[trends.periodOf[i]] } : {}),
    })),
    columns,
    similarity,
    ...(options.tree === false ? {} : { mergeNames: mergeNames(groups, merges) }),
    ...(trends
      ? {
          trends: {
            column: trends.column,
            granularity: trends.granularity,
            zone: trends.zone,
            periods: trends.periods,
            counts: trends.counts,
            rising: trends.rising,
            unparsed: trends.unparsed,
            unparsedIds: trends.unparsedIds,
          },
        }
      : {}),
    ...(options.duplicates === false ? {} : { duplicates }),
  };
}

/**
 * A large synthetic report (no real grouping behind it) to check the page with
 * many documents: `n` documents spread over `k` groups, titles `Doc i about <word>`.
 */
export function largeReport(n: number, k: number): ReportData {
  const words = ['printer', 'invoice', 'login', 'parcel', 'refund', 'screen', 'update', 'account'];
  const documents = new Array(n);
  const sizes = new Array<number>(k).fill(0);
  for (let i = 0; i < n; i++) {
    const g = i % k;
    sizes[g]++;
    documents[i] = { id: `D${i}`, title: `Doc ${i} about ${words[i % words.length]}`, group: g, fit: ((i * 7919) % 1000) / 1000, duplicateSet: -1 };
  }
  return {
    title: 'sheaf — large',
    createdAt: '2026-01-02T03:04:05.000Z',
    version: '0.1.0',
    settings: [],
    counts: { documents: n, grouped: n, withoutTerms: 0, skipped: 0, terms: 1000 },
    groups: sizes.map((size, g) => ({
      id: g,
      label: `group ${g} ${words[g % words.length]}`,
      size,
      cohesion: 0.3,
      terms: [{ term: words[g % words.length], weight: 0.5 }],
      exemplars: [`D${g}`],
    })),
    documents,
  };
}

/**
 * Report data from a real run on the demo tickets (corpus-demo/tickets.csv,
 * subject + body, id ticket_id, title subject), assembled by the same
 * `reportFromRun` the CLI uses for report.html: k-means groups, the map, the
 * tree over the groups, and near-duplicate sets at cosine >= `threshold`
 * (default 0.8, low enough to catch the demo's planted near-copies as well as
 * its exact copies) with word diffs.
 */
export async function demoReport(groups = 8, threshold = 0.8): Promise<ReportData> {
  const { docs, skipped } = await ingest(
    ['corpus-demo/tickets.csv'],
    { text: ['subject', 'body'], id: 'ticket_id', title: 'subject' },
    { cwd: REPO_ROOT },
  );
  const result = groupDocuments(docs, { groups });
  const o = resolveFindDuplicatesOptions({ threshold, show: 50 });
  const near = nearCopiesOfVectors(result.docs, result.matrix, o);
  return reportFromRun(result, near, { threshold, by: 'cosine of TF-IDF vectors' }, {
    title: 'sheaf — tickets.csv',
    createdAt: '2029-11-01T09:00:00.000Z',
    version: '0.1.0',
    skipped: skipped.length,
  });
}
