// Seeded generator of invented ticket-sized documents for the benchmarks.
//
// Nothing here comes from a real dataset: every content word is a pseudo-word
// built from syllables. The model of a document:
//
// - length 20..120 words, skewed towards short (20 + floor(101 * u^1.6), mean ~59);
// - a planted topic (TOPICS of them, sizes proportional to 1/(rank + 20)), and
//   for a quarter of the documents a secondary topic contributing a few words;
// - each word is, in turn: an English function word (30%, Zipf over a list that
//   both our stop words and scikit-learn's remove), a topic word (share alpha,
//   per document uniform in [0.35, 0.65], Zipf s = 0.9 over the topic's 300 words
//   drawn from a 20k-word content pool, so topics overlap a little), or a
//   background word (Zipf-Mandelbrot 1/(rank + 11) over 40k pseudo-words, so
//   the most common one is in about a fifth of the documents, like "please" in
//   support tickets);
// - 30% of documents carry one misspelt word (one letter changed), the long
//   tail of singleton terms real exports have;
// - near-copies: 3% of documents re-emit one of the previous 2048 documents
//   with 1-3 small edits (word replaced, dropped or inserted). Their (copy,
//   source) id pairs go to a side file `<name>.pairs.csv`.
//
// Output: CSV `id,topic,text` (ids 1..n, topic `t0`..`t99`, text always quoted,
// no quotes inside), streamed, with a `<name>.meta.json` beside it saying how it
// was made (a file with matching meta is not generated again).
//
// Usage: node bench/generate.mjs [--sizes 10k,100k,1m] [--seed 7] [--out bench/out]
// Import: generateCorpus({ n, seed, file }) -> Promise<meta>

import { createWriteStream, existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/** Bump when the output for a given seed and size changes. */
export const GENERATOR_VERSION = 1;
export const TOPICS = 100;
const TOPIC_WORDS = 300;
const CONTENT_POOL = 20_000;
const BACKGROUND_WORDS = 40_000;
const BACKGROUND_OFFSET = 10;
const COPY_SHARE = 0.03;
const COPY_WINDOW = 2048;
const TYPO_SHARE = 0.3;
const FUNCTION_SHARE = 0.3;
const SECONDARY_SHARE = 0.25;
const SECONDARY_WEIGHT = 0.15;

// English function words removed by both stop-word lists (checked once against
// ours and scikit-learn's ENGLISH_STOP_WORDS), most frequent first.
const FUNCTION_WORDS = (
  'the to and of a i it is in my for on this that with we was have be but are at from can ' +
  'you your our they there as if or me an by would could after all any about what which'
).split(' ');

/** splitmix32: small, fast, seeded; returns a float in [0, 1). */
export function rng32(seed) {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x9e3779b9) | 0;
    let z = s;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
    z ^= z >>> 16;
    return (z >>> 0) / 4294967296;
  };
}

/** Cumulative Zipf(-Mandelbrot) weights 1/(r+1+q)^s over `n` ranks, normalised to end at 1. */
function zipfCdf(n, s, q = 0) {
  const cdf = new Float64Array(n);
  let acc = 0;
  for (let r = 0; r < n; r++) {
    acc += 1 / Math.pow(r + 1 + q, s);
    cdf[r] = acc;
  }
  for (let r = 0; r < n; r++) cdf[r] /= acc;
  return cdf;
}

/** First index whose cumulative weight exceeds u. */
function draw(cdf, u) {
  let lo = 0;
  let hi = cdf.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (cdf[mid] > u) hi = mid;
    else lo = mid + 1;
  }
  return lo;
}

const ONSETS = ['b', 'd', 'f', 'g', 'k', 'l', 'm', 'n', 'p', 'r', 's', 't', 'v', 'z', 'br', 'dr', 'gl', 'kr', 'pl', 'st', 'tr', 'sk'];
const VOWELS = ['a', 'e', 'i', 'o', 'u', 'a', 'e', 'i', 'o', 'u', 'ai', 'ou'];
const CODAS = ['', '', '', 'n', 'r', 'l', 'x', 'm'];
const LETTERS = 'abcdefghiklmnoprstuvz';

/** `count` distinct pseudo-words of 2-3 syllables (at least 4 letters), none in `avoid`. */
function pseudoWords(count, rand, avoid) {
  const out = [];
  const seen = new Set(avoid);
  while (out.length < count) {
    const syllables = rand() < 0.7 ? 2 : 3;
    let w = '';
    for (let i = 0; i < syllables; i++) {
      w += ONSETS[Math.floor(rand() * ONSETS.length)];
      w += VOWELS[Math.floor(rand() * VOWELS.length)];
      if (i === syllables - 1 || rand() < 0.15) w += CODAS[Math.floor(rand() * CODAS.length)];
    }
    if (w.length < 4 || seen.has(w)) continue;
    seen.add(w);
    out.push(w);
  }
  return out;
}

/** The invented language for one seed: vocabularies and the topic word lists. */
export function buildLanguage(seed) {
  const rand = rng32(seed ^ 0x5eed);
  const words = pseudoWords(CONTENT_POOL + BACKGROUND_WORDS, rand, FUNCTION_WORDS);
  const content = words.slice(0, CONTENT_POOL);
  const background = words.slice(CONTENT_POOL);
  const topics = [];
  for (let t = 0; t < TOPICS; t++) {
    const picked = new Set();
    const list = [];
    while (list.length < TOPIC_WORDS) {
      const w = content[Math.floor(rand() * CONTENT_POOL)];
      if (picked.has(w)) continue;
      picked.add(w);
      list.push(w);
    }
    topics.push(list);
  }
  const topicWeights = new Float64Array(TOPICS);
  let acc = 0;
  for (let t = 0; t < TOPICS; t++) {
    acc += 1 / (t + 20);
    topicWeights[t] = acc;
  }
  for (let t = 0; t < TOPICS; t++) topicWeights[t] /= acc;
  return {
    content,
    background,
    topics,
    topicCdf: topicWeights,
    functionCdf: zipfCdf(FUNCTION_WORDS.length, 1),
    backgroundCdf: zipfCdf(BACKGROUND_WORDS, 1, BACKGROUND_OFFSET),
    topicWordCdf: zipfCdf(TOPIC_WORDS, 0.9),
  };
}

/** Words of one fresh document. */
function freshWords(lang, rand, topic) {
  const n = 20 + Math.floor(101 * Math.pow(rand(), 1.6));
  const second = rand() < SECONDARY_SHARE ? draw(lang.topicCdf, rand()) : -1;
  const alpha = 0.35 + 0.3 * rand();
  const words = new Array(n);
  for (let i = 0; i < n; i++) {
    const u = rand();
    if (u < FUNCTION_SHARE) {
      words[i] = FUNCTION_WORDS[draw(lang.functionCdf, rand())];
    } else if (u < FUNCTION_SHARE + (1 - FUNCTION_SHARE) * alpha) {
      const t = second >= 0 && rand() < SECONDARY_WEIGHT ? second : topic;
      words[i] = lang.topics[t][draw(lang.topicWordCdf, rand())];
    } else {
      words[i] = lang.background[draw(lang.backgroundCdf, rand())];
    }
  }
  if (rand() < TYPO_SHARE) {
    const at = Math.floor(rand() * n);
    const w = words[at];
    const p = Math.floor(rand() * w.length);
    words[at] = w.slice(0, p) + LETTERS[Math.floor(rand() * LETTERS.length)] + w.slice(p + 1) + (w.length < 6 ? 'q' : '');
  }
  return words;
}

/** 1-3 small edits: replace a word, drop one, or insert one. */
function editWords(lang, rand, source, topic) {
  const words = source.slice();
  const edits = 1 + Math.floor(rand() * 3);
  for (let e = 0; e < edits; e++) {
    const op = rand();
    const at = Math.floor(rand() * words.length);
    const fresh = rand() < 0.5 ? lang.topics[topic][draw(lang.topicWordCdf, rand())] : lang.background[draw(lang.backgroundCdf, rand())];
    if (op < 0.4) words[at] = fresh;
    else if (op < 0.7 && words.length > 10) words.splice(at, 1);
    else words.splice(at, 0, fresh);
  }
  return words;
}

/** Sentence case, a full stop every 6-14 words, an occasional comma. */
function formatText(words, rand) {
  let s = '';
  let sentence = 0;
  let next = 6 + Math.floor(rand() * 9);
  for (let i = 0; i < words.length; i++) {
    let w = words[i];
    if (sentence === 0) w = w[0].toUpperCase() + w.slice(1);
    s += w;
    sentence++;
    if (i === words.length - 1) s += '.';
    else if (sentence >= next) {
      s += '. ';
      sentence = 0;
      next = 6 + Math.floor(rand() * 9);
    } else s += rand() < 0.06 ? ', ' : ' ';
  }
  return s;
}

/**
 * Writes `n` documents to `file` (CSV `id,topic,text`) and the planted near-copy
 * pairs to `<file without .csv>.pairs.csv`; returns the meta data (also written as
 * `<file without .csv>.meta.json`). Skips the work when a matching meta file exists,
 * unless `force`.
 */
export async function generateCorpus({ n, seed = 7, file, force = false }) {
  const stem = file.replace(/\.csv$/, '');
  const metaFile = `${stem}.meta.json`;
  const pairsFile = `${stem}.pairs.csv`;
  const want = { generator: GENERATOR_VERSION, n, seed, topics: TOPICS };
  if (!force && existsSync(metaFile) && existsSync(file) && existsSync(pairsFile)) {
    try {
      const meta = JSON.parse(readFileSync(metaFile, 'utf8'));
      if (meta.generator === want.generator && meta.n === n && meta.seed === seed) return meta;
    } catch {
      // regenerate
    }
  }
  mkdirSync(path.dirname(file), { recursive: true });
  const lang = buildLanguage(seed);
  const rand = rng32(seed);
  const ringWords = new Array(COPY_WINDOW);
  const ringId = new Int32Array(COPY_WINDOW);
  const ringTopic = new Int32Array(COPY_WINDOW);
  const out = createWriteStream(file);
  const pairs = createWriteStream(pairsFile);
  const write = (stream, s) => (stream.write(s) ? null : new Promise((r) => stream.once('drain', r)));
  await write(out, 'id,topic,text\n');
  await write(pairs, 'copy,source\n');
  let bytes = 'id,topic,text\n'.length;
  let copies = 0;
  let words = 0;
  let chunk = '';
  let pairChunk = '';
  for (let i = 0; i < n; i++) {
    const id = i + 1;
    let topic;
    let w;
    const filled = Math.min(i, COPY_WINDOW);
    if (filled > 0 && rand() < COPY_SHARE) {
      const slot = Math.floor(rand() * filled);
      topic = ringTopic[slot];
      w = editWords(lang, rand, ringWords[slot], topic);
      pairChunk += `${id},${ringId[slot]}\n`;
      copies++;
    } else {
      topic = draw(lang.topicCdf, rand());
      w = freshWords(lang, rand, topic);
    }
    const slot = i % COPY_WINDOW;
    ringWords[slot] = w;
    ringId[slot] = id;
    ringTopic[slot] = topic;
    words += w.length;
    chunk += `${id},t${topic},"${formatText(w, rand)}"\n`;
    if (chunk.length > 1 << 20) {
      bytes += Buffer.byteLength(chunk);
      const p = write(out, chunk);
      chunk = '';
      if (p) await p;
    }
    if (pairChunk.length > 1 << 16) {
      const p = write(pairs, pairChunk);
      pairChunk = '';
      if (p) await p;
    }
  }
  bytes += Buffer.byteLength(chunk);
  await write(out, chunk);
  await write(pairs, pairChunk);
  await Promise.all([new Promise((r) => out.end(r)), new Promise((r) => pairs.end(r))]);
  const meta = { ...want, bytes, copies, meanWords: words / n, file: path.basename(file), pairs: path.basename(pairsFile) };
  writeFileSync(metaFile, JSON.stringify(meta, null, 2) + '\n');
  return meta;
}

/** "10k" -> 10000, "1m" -> 1000000, "2500" -> 2500. */
export function parseSize(text) {
  const m = /^(\d+(?:\.\d+)?)([km]?)$/i.exec(String(text).trim());
  if (!m) throw new Error(`size must look like 10k, 100k, 1m or 2500; got ${JSON.stringify(text)}`);
  const mult = { '': 1, k: 1e3, m: 1e6 }[m[2].toLowerCase()];
  return Math.round(Number(m[1]) * mult);
}

/** 10000 -> "10k", 1000000 -> "1m". */
export function sizeName(n) {
  if (n % 1e6 === 0) return `${n / 1e6}m`;
  if (n % 1e3 === 0) return `${n / 1e3}k`;
  return String(n);
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const args = process.argv.slice(2);
  const opt = (name, dflt) => {
    const i = args.indexOf(name);
    return i >= 0 ? args[i + 1] : dflt;
  };
  const sizes = opt('--sizes', '10k,100k').split(',').map(parseSize);
  const seed = Number(opt('--seed', '7'));
  const outDir = opt('--out', path.join(path.dirname(fileURLToPath(import.meta.url)), 'out'));
  for (const n of sizes) {
    const t0 = performance.now();
    const meta = await generateCorpus({ n, seed, file: path.join(outDir, `synth-${sizeName(n)}.csv`), force: args.includes('--force') });
    console.log(`${meta.file}: ${meta.n} docs, ${(meta.bytes / 1e6).toFixed(1)} MB, ${meta.copies} near-copies, ${meta.meanWords.toFixed(1)} words/doc (${((performance.now() - t0) / 1000).toFixed(1)} s)`);
  }
}
