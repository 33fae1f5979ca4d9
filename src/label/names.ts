/**
 * The last guard on group names: a name never holds a token with a digit
 * (codes, dates, versions such as `06t18` or `bk29`), a cleaning placeholder
 * (`xurlx`, `xnumx`, …, also when stemmed) or a stop word of the run's
 * language (built-in list plus the user's extra words). Earlier stages try to
 * keep such terms out of the vocabulary; this filter makes the promise hold
 * whatever reached the label stage. A group whose terms are all codes (a pile
 * of encoded mail, say) is named `(codes: 3e · 3c · 2ffont)` from its first
 * terms that are neither placeholders nor stop words, so it can still be told
 * apart; `(no terms)` when not even those exist. The rule is ours.
 *
 * @module
 */
import { SUPPORTED_LANGUAGES, builtInStopwords, normalizeTerm, type AnalyzerSettings } from '../analyze/index.js';
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
  }
  return isCode(term, stop);
}

/** Extra terms asked of the label stage so that a guarded name and terms list still have enough to take from. */
export const GUARD_SPARE_TERMS = 20;

/** True when `term` may stand in a `(codes: …)` name: no piece is a placeholder or a stop word (digits allowed). */
function isCode(term: string, stop: ReadonlySet<string>): boolean {
  for (const piece of term.split(/\s+/)) {
    if (piece === '') continue;
    const lower = piece.toLowerCase();
    if (PLACEHOLDER_STEM.test(lower) || PLACEHOLDER_WORDS.some((p) => lower.includes(p))) return false;
    if (stop.has(lower) || stop.has(normalizeTerm(piece))) return false;
  }
  return true;
}

/**
 * Rebuilds each group's name from its first `nameTerms` nameable terms (in the
 * terms' order); when none is nameable, `(codes: …)` from its first terms that
 * are neither placeholders nor stop words; `(no terms)` when none is left. The terms list drops the
 * group's stop words (those of a group in another language than the run's:
 * see {@link groupNameStopwords}) and is cut to `terms`; terms with digits stay
 * listed there, with their weights, as found.
 */
export function guardNames(
  labels: readonly GroupLabel[],
  stop: ReadonlySet<string> | readonly ReadonlySet<string>[],
  options: Pick<LabelOptions, 'nameTerms'> & Partial<Pick<LabelOptions, 'terms'>>,
): GroupLabel[] {
  return labels.map((g, i) => {
    const groupStop = stop instanceof Set ? stop : (stop as readonly ReadonlySet<string>[])[i]!;
    const named = g.terms.filter((t) => isNameable(t.term, groupStop)).slice(0, options.nameTerms);
    const listed = g.terms.filter((t) => !t.term.split(/\s+/).some((p) => groupStop.has(p.toLowerCase()))).slice(0, options.terms ?? g.terms.length);
    let label = named.map((t) => t.term).join(' · ');
    if (label === '') {
      const codes = g.terms.filter((t) => isCode(t.term, groupStop)).slice(0, options.nameTerms);
      label = codes.length ? `(codes: ${codes.map((t) => t.term).join(' · ')})` : '(no terms)';
    }
    return { ...g, terms: listed, label };
  });
}

/** Fewest stop-word hits that can tell a language (a word or two, such as Czech `proto`, tells nothing). */
export const MIN_LANGUAGE_HITS = 5;

/** Members read per group to tell its language. */
export const LANGUAGE_SAMPLE = 40;

/** The supported languages, and for each stop word the indices (in that list) of the languages whose list holds it. */
let stopIndex: { langs: readonly string[]; byWord: Map<string, Int32Array> } | null = null;

/** Every supported language's built-in stop words, lower-cased, as one word → languages map (built once). */
function languagesByStopword(): { langs: readonly string[]; byWord: Map<string, Int32Array> } {
  if (stopIndex === null) {
    const langs = [...SUPPORTED_LANGUAGES];
    const lists = new Map<string, number[]>();
    langs.forEach((lang, l) => {
      for (const w of new Set(builtInStopwords(lang).map((x) => x.toLowerCase()))) {
        const at = lists.get(w);
        if (at) at.push(l);
        else lists.set(w, [l]);
      }
    });
    stopIndex = { langs, byWord: new Map([...lists].map(([w, ls]) => [w, Int32Array.from(ls)])) };
  }
  return stopIndex;
}

/**
 * The languages other than the run's that each group is written in, told by
 * stop words: over the first {@link LANGUAGE_SAMPLE} members (in row order),
 * every language whose stop list covers at least 15% of the tokens (words of
 * two letters or more), at least {@link MIN_LANGUAGE_HITS} of them, and no
 * fewer than the run's language's list does. Counting stop words to
 * tell a language is common practice; the thresholds are ours. A pile of
 * English tickets with a few German and Dutch ones groups those together, and
 * their name must not be `die · der · wir` or `de · het · op`.
 */
export function groupLanguages(texts: readonly string[], assignments: Int32Array, groups: number, runLang: string): string[][] {
  const { langs, byWord } = languagesByStopword();
  const hits = new Float64Array(groups * langs.length);
  const tokens = new Float64Array(groups);
  const seen = new Int32Array(groups);
  for (let r = 0; r < assignments.length; r++) {
    const g = assignments[r]!;
    if (g < 0 || seen[g]! >= LANGUAGE_SAMPLE) continue;
    seen[g]!++;
    // Single letters are left out: several lists hold them, and markup and encoded mail are full of them.
    for (const m of texts[r]!.toLowerCase().matchAll(/[\p{L}']{2,}/gu)) {
      tokens[g]!++;
      // One lookup a token, not one per language.
      const ls = byWord.get(m[0]);
      if (ls) for (let i = 0; i < ls.length; i++) hits[g * langs.length + ls[i]!]!++;
    }
  }
  const run = langs.indexOf(runLang);
  const out: string[][] = [];
  for (let g = 0; g < groups; g++) {
    const runHits = run >= 0 ? hits[g * langs.length + run]! : 0;
    const found: string[] = [];
    for (let l = 0; l < langs.length; l++) {
      const h = hits[g * langs.length + l]!;
      if (l !== run && h >= MIN_LANGUAGE_HITS && h >= 0.15 * tokens[g]! && h >= runHits) found.push(langs[l]!);
    }
    out.push(found);
  }
  return out;
}

/**
 * Per group, the stop words its name must not hold: the run's ({@link nameStopwords}),
 * plus those of the other languages {@link groupLanguages} found the group written in.
 */
export function groupNameStopwords(
  settings: Pick<AnalyzerSettings, 'lang' | 'stopwords'>,
  texts: readonly string[],
  assignments: Int32Array,
  groups: number,
): Set<string>[] {
  const base = nameStopwords(settings);
  const byLang = new Map<string, Set<string>>([['', base]]);
  return groupLanguages(texts, assignments, groups, settings.lang).map((others) => {
    const key = others.join(',');
    let set = byLang.get(key);
    if (!set) {
      set = new Set(base);
      for (const lang of others) for (const w of nameStopwords({ lang, stopwords: [] })) set.add(w);
      byLang.set(key, set);
    }
    return set;
  });
}
