/**
 * Analyzer options: defaults, and the one place they are merged and
 * validated.
 *
 * @module
 */

import { UsageError, show } from '../util/errors.js';
import { SUPPORTED_LANGUAGES, STEMMING_LANGUAGES } from './languages.js';
import { normalizeTerm } from './text.js';

/** How text becomes terms. */
export interface AnalyzerOptions {
  /** ISO 639-1 code of the text's language (one of {@link SUPPORTED_LANGUAGES}); picks stop words and stemmer. */
  lang: string;
  /** Reduce words to stems with natural's stemmer for `lang`. Resolves to `false` where there is none. */
  stem: boolean;
  /** Shortest token kept, in code points (words found by the dictionary segmenter for Han, kana, Thai, ... are exempt). */
  minLength: number;
  /** Keep tokens made only of digits (`2024`, `٣`). Mixed tokens such as `mp3` are always kept. */
  numbers: boolean;
  /** Also emit word bigrams `"a b"` of adjacent kept terms, after stop-word removal and stemming. */
  phrases: boolean;
  /** Extra stop words, in addition to the language's built-in list. Normalised like the text. */
  stopwords: readonly string[];
  /**
   * Drop tokens that name nothing in any language: machine-made strings with
   * digits (hashes, ids, date fragments; see `isJunkToken`), markup and
   * navigation words (`nbsp`, `href`) and the cleaning placeholders.
   */
  junk: boolean;
}

/** The analyzer's defaults: English, stemming on, tokens of 2+ code points, digit-only tokens and junk tokens dropped, no bigrams, no extra stop words. */
export const DEFAULT_ANALYZER_OPTIONS: AnalyzerOptions = Object.freeze({
  lang: 'en',
  stem: true,
  minLength: 2,
  numbers: false,
  phrases: false,
  stopwords: Object.freeze([]) as readonly string[],
  junk: true,
});

/**
 * Resolved, validated analyzer options. Plain JSON-serialisable data: saved
 * in a model and fed back to `createAnalyzer` to analyse new text the same
 * way. `stem` is the effective value (false for a language without a
 * stemmer); `stopwords` are normalised, de-duplicated and sorted.
 */
export type AnalyzerSettings = Readonly<AnalyzerOptions>;

const KEYS: ReadonlySet<string> = new Set(Object.keys(DEFAULT_ANALYZER_OPTIONS));

/**
 * Merges `partial` over {@link DEFAULT_ANALYZER_OPTIONS} and validates the
 * result once. Keys whose value is `undefined` take the default.
 *
 * @throws UsageError naming the bad value and what is allowed, with `option` set to the key.
 */
export function resolveAnalyzerOptions(partial?: Partial<AnalyzerOptions>): AnalyzerSettings {
  if (partial === undefined) partial = {};
  if (partial === null || typeof partial !== 'object' || Array.isArray(partial)) {
    throw new UsageError(`analyzer options must be an object; got ${show(partial)}`);
  }
  for (const key of Object.keys(partial)) {
    if (!KEYS.has(key)) {
      throw new UsageError(`unknown analyzer option ${show(key)}; allowed: ${[...KEYS].join(', ')}`, key);
    }
  }
  const d = DEFAULT_ANALYZER_OPTIONS;
  const rawLang: unknown = pick(partial.lang, d.lang);
  const lang = typeof rawLang === 'string' ? rawLang.trim().toLowerCase() : undefined;
  if (lang === undefined || !SUPPORTED_LANGUAGES.includes(lang)) {
    throw new UsageError(`lang must be one of ${SUPPORTED_LANGUAGES.join(', ')}; got ${show(rawLang)}`, 'lang');
  }
  const stem = boolOption('stem', pick(partial.stem, d.stem));
  const numbers = boolOption('numbers', pick(partial.numbers, d.numbers));
  const phrases = boolOption('phrases', pick(partial.phrases, d.phrases));
  const junk = boolOption('junk', pick(partial.junk, d.junk));
  const minLength: unknown = pick(partial.minLength, d.minLength);
  if (typeof minLength !== 'number' || !Number.isInteger(minLength) || minLength < 1) {
    throw new UsageError(`minLength must be a whole number >= 1; got ${show(minLength)}`, 'minLength');
  }
  const rawStopwords: unknown = pick(partial.stopwords, d.stopwords);
  if (!Array.isArray(rawStopwords)) {
    throw new UsageError(`stopwords must be a list of words; got ${show(rawStopwords)}`, 'stopwords');
  }
  const stopwords = new Set<string>();
  for (let i = 0; i < rawStopwords.length; i++) {
    const word: unknown = rawStopwords[i];
    if (typeof word !== 'string') {
      throw new UsageError(`stopwords must be a list of words; got ${show(word)} at position ${i + 1}`, 'stopwords');
    }
    const normal = normalizeTerm(word);
    if (normal !== '') stopwords.add(normal);
  }
  return Object.freeze({
    lang,
    stem: stem && STEMMING_LANGUAGES.includes(lang),
    minLength,
    numbers,
    phrases,
    stopwords: Object.freeze([...stopwords].sort()),
    junk,
  });
}

/** The given value, or the default when it is `undefined` (null is a value, and is checked). */
function pick<T>(value: T | undefined, fallback: T): T {
  return value === undefined ? fallback : value;
}

function boolOption(name: string, value: unknown): boolean {
  if (typeof value !== 'boolean') {
    throw new UsageError(`${name} must be true or false; got ${show(value)}`, name);
  }
  return value;
}
