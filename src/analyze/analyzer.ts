/**
 * The analysis chain, composed once from resolved settings and then used
 * the same way for fitting and for applying a saved model:
 *
 * 1. {@link normalizeText}: NFKC, lower case, `ß`/`ς` folding;
 * 2. tokenise (`[\p{L}\p{M}\p{N}]+` with internal apostrophes; no-space
 *    scripts through `Intl.Segmenter`);
 * 3. apostrophe rules of the language (English possessive `'s`,
 *    French/Italian/Catalan elisions);
 * 4. drop tokens shorter than `minLength` code points (segmenter words
 *    exempt), unless `numbers`, tokens made only of digits, and with
 *    `junk`, machine-made tokens with digits ({@link isJunkToken});
 * 5. drop stop words (the language's built-in list plus the user's, and
 *    with `junk` the markup words and placeholders of {@link JUNK_WORDS}),
 *    compared on the normalised surface form;
 * 6. stem with natural's stemmer for the language (cached per analyzer);
 *    tokens holding a number character (`mp3`, `1990s`) and words from the
 *    segmenter are left as they are;
 * 7. if `phrases`, append the bigrams `"a b"` of adjacent kept terms.
 *
 * @module
 */

import { isJunkToken, JUNK_WORDS } from './junk.js';
import { builtInStopwords, dropsPossessiveS, elisionsFor, stemmerFor, type StemFunction } from './languages.js';
import { resolveAnalyzerOptions, type AnalyzerOptions, type AnalyzerSettings } from './options.js';
import {
  APOSTROPHE,
  NO_SPACE,
  NUMERIC,
  RunSplitter,
  codePointLength,
  isAllNumeric,
  normalizeTerm,
  normalizeText,
  scanTokens,
  type TokenSink,
} from './text.js';

/** Turns text into terms. Built by {@link createAnalyzer}; holds no state that changes results. */
export interface Analyzer {
  /** The resolved settings this analyzer was built from (save these with a model). */
  readonly settings: AnalyzerSettings;
  /** The terms of `text`, in text order (bigrams, when on, after all unigrams). Never throws. */
  analyze(text: string): string[];
  /**
   * Like {@link Analyzer.analyze}, and also the surface form (the word as it
   * stood, normalised but not stemmed) behind each term, index for index;
   * used to show readable names for stemmed terms.
   */
  analyzeWithSurfaces(text: string): { terms: string[]; surfaces: string[] };
}

/** A token with a number character is a code, size or version (`mp3`, `1990s`, `x86`): not stemmed. */
const HAS_DIGIT_RE = /\p{N}/u;

/** Most stems remembered per analyzer; the cache is emptied when it fills. */
const STEM_CACHE_LIMIT = 200_000;

/**
 * Builds an analyzer. `options` are resolved with `resolveAnalyzerOptions`
 * (so saved {@link AnalyzerSettings} give back the same analyzer).
 *
 * @throws UsageError for invalid options.
 */
export function createAnalyzer(options?: Partial<AnalyzerOptions>): Analyzer {
  const settings = resolveAnalyzerOptions(options);
  const { lang, minLength, numbers, phrases, junk } = settings;

  const stop = new Set<string>(settings.stopwords);
  for (const w of builtInStopwords(lang)) {
    const n = normalizeTerm(w);
    if (n !== '') stop.add(n);
  }
  if (junk) for (const w of JUNK_WORDS) stop.add(w);
  const elisions = elisionsFor(lang);
  const possessive = dropsPossessiveS(lang);
  const stemmer: StemFunction | null = settings.stem ? stemmerFor(lang) : null;
  const cache = new Map<string, string>();
  const splitter = new RunSplitter(lang);

  const stem = (token: string): string => {
    let s = cache.get(token);
    if (s !== undefined) return s;
    try {
      s = stemmer === null ? token : stemmer(token);
    } catch {
      s = token;
    }
    if (typeof s !== 'string' || s === '') s = token;
    if (cache.size >= STEM_CACHE_LIMIT) cache.clear();
    cache.set(token, s);
    return s;
  };

  let out: string[] = [];
  let surfaces: string[] | null = null;
  const keep = (t: string, stemIt: boolean): void => {
    if (stop.has(t)) return;
    out.push(stemIt && stemmer !== null ? stem(t) : t);
    if (surfaces !== null) surfaces.push(t);
  };
  /** A token from the scanner (never one needing the segmenter). */
  const accept: TokenSink = (raw, any, all, codePoints) => {
    let t = raw;
    let numeric = (all & NUMERIC) !== 0 && (any & APOSTROPHE) === 0;
    if ((any & APOSTROPHE) !== 0) {
      t = t.replaceAll('’', "'");
      const at = t.indexOf("'");
      if (at > 0 && elisions.has(t.slice(0, at))) t = t.slice(at + 1);
      if (possessive && t.endsWith("'s")) t = t.slice(0, -2);
      if (t.length !== raw.length) {
        codePoints = codePointLength(t);
        numeric = isAllNumeric(t);
      }
    }
    if (codePoints < minLength) return;
    if (numeric && !numbers) return;
    if (junk && !numeric && (any & NUMERIC) !== 0 && isJunkToken(t)) return;
    keep(t, (any & NUMERIC) === 0 || !HAS_DIGIT_RE.test(t));
  };
  /** A word found by the segmenter: exempt from `minLength`. */
  const acceptWord = (w: string): void => {
    if (!numbers && isAllNumeric(w)) return;
    keep(w, false);
  };
  const onToken: TokenSink = (token, any, all, codePoints) => {
    if ((any & NO_SPACE) !== 0) splitter.split(token, accept, acceptWord);
    else accept(token, any, all, codePoints);
  };

  const analyze = (text: string): string[] => {
    out = [];
    if (typeof text !== 'string' || text.length === 0) return out;
    scanTokens(normalizeText(text), onToken);
    const terms = out;
    out = [];
    if (phrases) {
      const n = terms.length;
      for (let i = 0; i + 1 < n; i++) terms.push(`${terms[i]} ${terms[i + 1]}`);
    }
    return terms;
  };

  const analyzeWithSurfaces = (text: string): { terms: string[]; surfaces: string[] } => {
    const seen: string[] = [];
    surfaces = seen;
    try {
      const terms = analyze(text);
      const n = seen.length;
      if (phrases) for (let i = 0; i + 1 < n; i++) seen.push(`${seen[i]} ${seen[i + 1]}`);
      return { terms, surfaces: seen };
    } finally {
      surfaces = null;
    }
  };

  return Object.freeze({ settings, analyze, analyzeWithSurfaces });
}
