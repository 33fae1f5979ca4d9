/**
 * The languages the analyzer knows: which `stopword` list and which
 * `natural` stemmer each ISO 639-1 code uses, and the few
 * apostrophe rules that depend on the language.
 *
 * @module
 */

import stopwordLists from 'stopword';
import { ENGLISH_STOPWORDS } from './stopwords-en.js';
import { createRequire } from 'node:module';
import porterEn from 'natural/lib/natural/stemmers/porter_stemmer.js';

// The other languages' stemmers are loaded the first time an analyzer asks for one: loading them all
// (the Indonesian one reads a dictionary) cost about 0.3 s of CPU in every thread that analyses English.
const requireStemmer = createRequire(import.meta.url);

/** A function from one normalised token to its stem. */
export type StemFunction = (token: string) => string;

/** ISO 639-1 code -> key of the word list in the `stopword` package. */
const STOPWORD_KEYS: ReadonlyMap<string, string> = new Map([
  ['af', 'afr'], ['ar', 'ara'], ['bg', 'bul'], ['bn', 'ben'], ['br', 'bre'], ['ca', 'cat'],
  ['cs', 'ces'], ['da', 'dan'], ['de', 'deu'], ['el', 'ell'], ['en', 'eng'], ['eo', 'epo'],
  ['es', 'spa'], ['et', 'est'], ['eu', 'eus'], ['fa', 'fas'], ['fi', 'fin'], ['fr', 'fra'],
  ['ga', 'gle'], ['gl', 'glg'], ['gu', 'guj'], ['ha', 'hau'], ['he', 'heb'], ['hi', 'hin'],
  ['hr', 'hrv'], ['hu', 'hun'], ['hy', 'hye'], ['id', 'ind'], ['it', 'ita'], ['ja', 'jpn'],
  ['ko', 'kor'], ['ku', 'kur'], ['la', 'lat'], ['lt', 'lit'], ['lv', 'lav'], ['mr', 'mar'],
  ['ms', 'msa'], ['my', 'mya'], ['nb', 'nob'], ['nl', 'nld'], ['no', 'nob'], ['pa', 'panGu'],
  ['pl', 'pol'], ['pt', 'por'], ['ro', 'ron'], ['ru', 'rus'], ['sk', 'slk'], ['sl', 'slv'],
  ['so', 'som'], ['st', 'sot'], ['sv', 'swe'], ['sw', 'swa'], ['th', 'tha'], ['tl', 'tgl'],
  ['tr', 'tur'], ['uk', 'ukr'], ['ur', 'urd'], ['vi', 'vie'], ['yo', 'yor'], ['zh', 'zho'],
  ['zu', 'zul'],
]);

/** ISO 639-1 code -> natural's stemmer module for that language (English is loaded at once). */
const STEMMER_MODULES: ReadonlyMap<string, string> = new Map([
  ['de', 'porter_stemmer_de.js'], ['es', 'porter_stemmer_es.js'], ['fr', 'porter_stemmer_fr.js'], ['it', 'porter_stemmer_it.js'],
  ['nl', 'porter_stemmer_nl.js'], ['nb', 'porter_stemmer_no.js'], ['no', 'porter_stemmer_no.js'], ['pt', 'porter_stemmer_pt.js'],
  ['ru', 'porter_stemmer_ru.js'], ['sv', 'porter_stemmer_sv.js'], ['uk', 'porter_stemmer_uk.js'], ['id', 'indonesian/stemmer_id.js'],
]);

/** natural's stemmer for a language (loaded on first use), or undefined when it has none. */
function loadStemmer(lang: string): { stem(token: string): string } | undefined {
  if (lang === 'en') return porterEn;
  const file = STEMMER_MODULES.get(lang);
  if (file === undefined) return undefined;
  return requireStemmer(`natural/lib/natural/stemmers/${file}`) as { stem(token: string): string };
}

/**
 * Elided words dropped in front of an apostrophe (`l'eau` -> `eau`), per
 * language. These are the usual article/pronoun elisions of French,
 * Italian and Catalan (common practice in search-engine analysis chains).
 */
const ELISIONS: ReadonlyMap<string, ReadonlySet<string>> = new Map([
  ['fr', new Set(['l', 'm', 't', 'qu', 'n', 's', 'j', 'd', 'c', 'jusqu', 'quoiqu', 'lorsqu', 'puisqu'])],
  ['it', new Set(['c', 'l', 'all', 'dall', 'dell', 'nell', 'sull', 'coll', 'pell', 'gl', 'agl', 'dagl',
    'degl', 'negl', 'sugl', 'un', 'm', 't', 's', 'v', 'd', 'quell', 'quest', 'nessun', 'tutt'])],
  ['ca', new Set(['d', 'l', 'm', 'n', 's', 't'])],
]);

/** Languages whose trailing possessive `'s` is dropped (`keeper's` -> `keeper`). */
const POSSESSIVE_S: ReadonlySet<string> = new Set(['en']);

/**
 * ISO 639-1 codes the analyzer supports: every language with a stop-word
 * list in the `stopword` package. `no` and `nb` both mean Norwegian Bokmål.
 */
export const SUPPORTED_LANGUAGES: readonly string[] = Object.freeze([...STOPWORD_KEYS.keys()].sort());

/**
 * The subset of {@link SUPPORTED_LANGUAGES} for which `natural` has a
 * stemmer. For any other language `stem: true` resolves to `false`.
 */
export const STEMMING_LANGUAGES: readonly string[] = Object.freeze(['en', ...STEMMER_MODULES.keys()].sort());

/** Languages with a stop list of sheaf's own, used together with the `stopword` package's. */
const OWN_STOPWORDS: ReadonlyMap<string, readonly string[]> = new Map([['en', ENGLISH_STOPWORDS]]);

/**
 * The stop words of a supported language (not yet normalised): the
 * `stopword` package's list, and for English also sheaf's own fuller list
 * (`stopwords-en.ts`: negations, question words, contractions, ...).
 */
export function builtInStopwords(lang: string): readonly string[] {
  const key = STOPWORD_KEYS.get(lang);
  if (key === undefined) return [];
  const list: unknown = stopwordLists[key];
  const words = Array.isArray(list) ? list.filter((w): w is string => typeof w === 'string') : [];
  const own = OWN_STOPWORDS.get(lang);
  return own ? [...new Set([...own, ...words])] : words;
}

/** natural's stemmer for a language, or `null` when it has none. */
export function stemmerFor(lang: string): StemFunction | null {
  const stemmer = loadStemmer(lang);
  if (stemmer === undefined) return null;
  return (token) => stemmer.stem(token);
}

/** The elided words dropped before an apostrophe in this language (empty set when none). */
export function elisionsFor(lang: string): ReadonlySet<string> {
  return ELISIONS.get(lang) ?? EMPTY_SET;
}

/** Whether a trailing possessive `'s` is dropped in this language. */
export function dropsPossessiveS(lang: string): boolean {
  return POSSESSIVE_S.has(lang);
}

const EMPTY_SET: ReadonlySet<string> = new Set();
