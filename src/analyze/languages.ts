/**
 * The languages the analyzer knows: which `stopword` list and which
 * `natural` stemmer each ISO 639-1 code uses, and the few
 * apostrophe rules that depend on the language.
 *
 * @module
 */

import stopwordLists from 'stopword';
import { ENGLISH_STOPWORDS } from './stopwords-en.js';
import porterEn from 'natural/lib/natural/stemmers/porter_stemmer.js';
import stemmerDe from 'natural/lib/natural/stemmers/porter_stemmer_de.js';
import stemmerEs from 'natural/lib/natural/stemmers/porter_stemmer_es.js';
import stemmerFr from 'natural/lib/natural/stemmers/porter_stemmer_fr.js';
import stemmerIt from 'natural/lib/natural/stemmers/porter_stemmer_it.js';
import stemmerNl from 'natural/lib/natural/stemmers/porter_stemmer_nl.js';
import stemmerNo from 'natural/lib/natural/stemmers/porter_stemmer_no.js';
import stemmerPt from 'natural/lib/natural/stemmers/porter_stemmer_pt.js';
import stemmerRu from 'natural/lib/natural/stemmers/porter_stemmer_ru.js';
import stemmerSv from 'natural/lib/natural/stemmers/porter_stemmer_sv.js';
import stemmerUk from 'natural/lib/natural/stemmers/porter_stemmer_uk.js';
import stemmerId from 'natural/lib/natural/stemmers/indonesian/stemmer_id.js';

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

/** ISO 639-1 code -> natural's stemmer for that language. */
const STEMMERS: ReadonlyMap<string, { stem(token: string): string }> = new Map([
  ['en', porterEn], ['de', stemmerDe], ['es', stemmerEs], ['fr', stemmerFr], ['it', stemmerIt],
  ['nl', stemmerNl], ['nb', stemmerNo], ['no', stemmerNo], ['pt', stemmerPt], ['ru', stemmerRu],
  ['sv', stemmerSv], ['uk', stemmerUk], ['id', stemmerId],
]);

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
export const STEMMING_LANGUAGES: readonly string[] = Object.freeze([...STEMMERS.keys()].sort());

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
  const stemmer = STEMMERS.get(lang);
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
