/**
 * The last guard on group names: a name never holds a token with a digit
 * (codes, dates, versions such as `06t18` or `bk29`), a cleaning placeholder
 * (`xurlx`, `xnumx`, …, also when stemmed) or a stop word of the run's
 * language (built-in list plus the user's extra words). Earlier stages try to
 * keep such terms out of the vocabulary; this filter makes the promise hold
 * whatever reached the label stage. The rule is ours.
 *
 * @module
 */
import { builtInStopwords, normalizeTerm, type AnalyzerSettings } from '../analyze/index.js';
import { PLACEHOLDERS } from '../clean/index.js';
import type { GroupLabel, LabelOptions } from './index.js';

const DIGIT = /\p{N}/u;
const PLACEHOLDER_WORDS: readonly string[] = Object.values(PLACEHOLDERS);
/** A placeholder with its closing `x` stemmed away. */
const PLACEHOLDER_STEM = new RegExp(`^(?:${PLACEHOLDER_WORDS.map((p) => p.slice(0, -1)).join('|')})$`);

/** The stop words a name must not hold: the language's built-in list and the user's extra words, normalised. */
export function nameStopwords(settings: Pick<AnalyzerSettings, 'lang' | 'stopwords'>): Set<string> {
  const stop = new Set<string>();
  for (const w of [...builtInStopwords(settings.lang), ...settings.stopwords]) {
    const n = normalizeTerm(w);
    if (n !== '') stop.add(n);
  }
  return stop;
}

/**
 * True when `term` (a word, or words joined by spaces for a phrase) may stand
 * in a group's name: no piece has a digit, is a placeholder, or is a stop word.
 */
export function isNameable(term: string, stop: ReadonlySet<string>): boolean {
  for (const piece of term.split(/\s+/)) {
    if (piece === '') continue;
    if (DIGIT.test(piece)) return false;
    const lower = piece.toLowerCase();
    if (PLACEHOLDER_STEM.test(lower) || PLACEHOLDER_WORDS.some((p) => lower.includes(p))) return false;
    if (stop.has(lower) || stop.has(normalizeTerm(piece))) return false;
  }
  return true;
}

/**
 * Rebuilds each group's name from its first `nameTerms` nameable terms (in the
 * terms' order); `(no terms)` when none is left. The terms list itself is kept.
 */
export function guardNames(labels: readonly GroupLabel[], stop: ReadonlySet<string>, options: Pick<LabelOptions, 'nameTerms'>): GroupLabel[] {
  return labels.map((g) => {
    const named = g.terms.filter((t) => isNameable(t.term, stop)).slice(0, options.nameTerms);
    return { ...g, label: named.map((t) => t.term).join(' · ') || '(no terms)' };
  });
}
