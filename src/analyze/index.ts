/**
 * analyze: text -> terms. Normalise (NFKC, case folding), tokenise, drop
 * stop words, stem, optionally add word bigrams. See `analyzer.ts` for the
 * chain and `text.ts` for the tokenisation policy.
 *
 * @module
 */

export { createAnalyzer, type Analyzer } from './analyzer.js';
export {
  DEFAULT_ANALYZER_OPTIONS,
  resolveAnalyzerOptions,
  type AnalyzerOptions,
  type AnalyzerSettings,
} from './options.js';
export { SUPPORTED_LANGUAGES, STEMMING_LANGUAGES, builtInStopwords } from './languages.js';
export { normalizeText, normalizeTerm } from './text.js';
export { isJunkToken, JUNK_WORDS, MARKUP_WORDS } from './junk.js';
export { ENGLISH_STOPWORDS } from './stopwords-en.js';
