/**
 * Document-frequency counts that merge: how many documents of a shard hold
 * each term, with the shard's document count and the analyzer and cleaning
 * settings that made the terms. Two count sets merge by adding documents and
 * adding each term's count (a sorted union), so the merge is associative and
 * commutative: any split of a collection into shards, counted and merged in
 * any order, gives exactly the counts of the whole collection. Sets made with
 * different analyzer or cleaning settings refuse to merge, since their terms
 * are not the same words. Pure (JSON text in and out; files are the caller's).
 *
 * File format `sheaf-term-counts`, version 1 (one JSON object, described in
 * docs/model-format.md): `format`, `version`, `analyzer` (as in model.json),
 * `cleaning` (`tickets` or `none`), `documents`, `terms` (code-unit order,
 * unique), `df` (one whole number per term, 1 … documents).
 *
 * @module
 */
import { zodIssueLine } from '../util/zod-issue.js';
import { z } from 'zod';
import type { AnalyzerSettings } from '../analyze/index.js';
import { UsageError } from '../util/errors.js';

/** The format name written in every counts file. */
export const TERM_COUNTS_FORMAT = 'sheaf-term-counts';

/** Current counts format version. */
export const TERM_COUNTS_VERSION = 1;

/** The cleaning a count set was made with (no pile-wide rule: boilerplate is judged per pile, so it is off). */
export type CountsCleaning = 'tickets' | 'none';

/** Document frequencies of one shard or of several merged. */
export interface TermCounts {
  /** The analyzer settings that made the terms. */
  readonly analyzer: AnalyzerSettings;
  /** The cleaning applied before analysis. */
  readonly cleaning: CountsCleaning;
  /** Documents counted. */
  readonly documents: number;
  /** Terms in code-unit (`<`) order, unique. */
  readonly terms: readonly string[];
  /** Documents holding each term (whole numbers stored in float64, exact to 2^53). */
  readonly df: Float64Array;
}

/**
 * Freezes a count set, giving it a `toJSON` (not enumerable) that writes a
 * summary, so a run's settings in run.json say which counts gave the idf
 * without copying every term.
 */
function sealCounts(c: TermCounts): TermCounts {
  Object.defineProperty(c, 'toJSON', { value: () => ({ documents: c.documents, terms: c.terms.length, cleaning: c.cleaning }), enumerable: false });
  return Object.freeze(c);
}

/** Code-unit order, as the vocabulary sorts its terms. */
function compare(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/** Settings in a canonical form: every key in a fixed order, stop words sorted. */
function analyzerKey(a: AnalyzerSettings): string {
  return JSON.stringify({
    lang: a.lang,
    stem: a.stem,
    minLength: a.minLength,
    numbers: a.numbers,
    phrases: a.phrases,
    junk: a.junk ?? false,
    stopwords: [...a.stopwords].sort(compare),
  });
}

/** The first analyzer setting in which `a` and `b` differ, or null when they make the same terms. */
export function analyzerDifference(a: AnalyzerSettings, b: AnalyzerSettings): string | null {
  if (analyzerKey(a) === analyzerKey(b)) return null;
  for (const k of ['lang', 'stem', 'minLength', 'numbers', 'phrases', 'junk'] as const) {
    const x = k === 'junk' ? (a.junk ?? false) : a[k];
    const y = k === 'junk' ? (b.junk ?? false) : b[k];
    if (x !== y) return `${k} ${JSON.stringify(x)} vs ${JSON.stringify(y)}`;
  }
  return 'stopwords differ';
}

/** Counts documents per term one document at a time (memory: one entry per distinct term). */
export class TermCounter {
  private readonly df = new Map<string, number>();
  private readonly seen = new Set<string>();
  private documents = 0;

  constructor(
    private readonly analyzer: AnalyzerSettings,
    private readonly cleaning: CountsCleaning,
  ) {}

  /** Adds one document's terms (repeats within it count once). */
  add(terms: readonly string[]): void {
    this.documents++;
    this.seen.clear();
    for (const t of terms) {
      if (this.seen.has(t)) continue;
      this.seen.add(t);
      this.df.set(t, (this.df.get(t) ?? 0) + 1);
    }
  }

  /** The counts so far, terms sorted. */
  result(): TermCounts {
    const terms = [...this.df.keys()].sort(compare);
    const out = new Float64Array(terms.length);
    for (let j = 0; j < terms.length; j++) out[j] = this.df.get(terms[j]) as number;
    return sealCounts({ analyzer: this.analyzer, cleaning: this.cleaning, documents: this.documents, terms: Object.freeze(terms), df: out });
  }
}

/** Counts the documents holding each term: `termLists` gives one document's terms at a time. */
export function countTerms(termLists: Iterable<readonly string[]>, analyzer: AnalyzerSettings, cleaning: CountsCleaning): TermCounts {
  const counter = new TermCounter(analyzer, cleaning);
  for (const terms of termLists) counter.add(terms);
  return counter.result();
}

/**
 * Adds two count sets: documents added, each term's count added over the
 * sorted union of terms. Refuses (a {@link UsageError}) sets made with other
 * analyzer or cleaning settings. `names` say which sets in the message.
 */
export function mergeTermCounts(a: TermCounts, b: TermCounts, names: readonly [string, string] = ['the first counts', 'the second']): TermCounts {
  const diff = analyzerDifference(a.analyzer, b.analyzer);
  if (diff !== null) throw new UsageError(`${names[0]} and ${names[1]} were counted with different analyzer settings (${diff}); they cannot be merged`);
  if (a.cleaning !== b.cleaning) {
    throw new UsageError(`${names[0]} and ${names[1]} were counted with different cleaning (${a.cleaning} vs ${b.cleaning}); they cannot be merged`);
  }
  const terms: string[] = [];
  const df = new Float64Array(a.terms.length + b.terms.length);
  let i = 0;
  let j = 0;
  while (i < a.terms.length || j < b.terms.length) {
    const c = i === a.terms.length ? 1 : j === b.terms.length ? -1 : compare(a.terms[i], b.terms[j]);
    if (c < 0) {
      df[terms.length] = a.df[i];
      terms.push(a.terms[i++]);
    } else if (c > 0) {
      df[terms.length] = b.df[j];
      terms.push(b.terms[j++]);
    } else {
      df[terms.length] = a.df[i] + b.df[j];
      terms.push(a.terms[i]);
      i++;
      j++;
    }
  }
  return sealCounts({ analyzer: a.analyzer, cleaning: a.cleaning, documents: a.documents + b.documents, terms: Object.freeze(terms), df: df.slice(0, terms.length) });
}

/** The counts as file text (deterministic: the same counts give the same bytes). */
export function termCountsToJson(c: TermCounts): string {
  const doc = {
    format: TERM_COUNTS_FORMAT,
    version: TERM_COUNTS_VERSION,
    analyzer: {
      lang: c.analyzer.lang,
      stem: c.analyzer.stem,
      minLength: c.analyzer.minLength,
      numbers: c.analyzer.numbers,
      phrases: c.analyzer.phrases,
      stopwords: [...c.analyzer.stopwords],
      junk: c.analyzer.junk ?? false,
    },
    cleaning: c.cleaning,
    documents: c.documents,
    terms: c.terms,
    df: Array.from(c.df),
  };
  return JSON.stringify(doc) + '\n';
}

const countsSchema = z.strictObject({
  format: z.literal(TERM_COUNTS_FORMAT),
  version: z.literal(TERM_COUNTS_VERSION),
  analyzer: z.strictObject({
    lang: z.string().min(1).max(20),
    stem: z.boolean(),
    minLength: z.number().int().min(1).max(1000),
    numbers: z.boolean(),
    phrases: z.boolean(),
    stopwords: z.array(z.string().max(200)).max(100_000),
    junk: z.boolean(),
  }),
  cleaning: z.enum(['tickets', 'none']),
  documents: z.number().int().min(0).max(Number.MAX_SAFE_INTEGER),
  terms: z.array(z.string().min(1).max(1000)),
  df: z.array(z.number().int().min(1)),
});

/**
 * Parses and checks a counts file: anything malformed, foreign, of another
 * version or inconsistent (terms out of order or repeated, a count above the
 * documents) is refused with one {@link UsageError} line naming the problem.
 */
export function termCountsFromJson(text: string, shownPath = 'counts'): TermCounts {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    throw new UsageError(`${shownPath} is not valid JSON (${(err as Error).message})`, 'termCounts');
  }
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw) || (raw as { format?: unknown }).format !== TERM_COUNTS_FORMAT) {
    throw new UsageError(`${shownPath} is not a sheaf term-counts file (no "format": "${TERM_COUNTS_FORMAT}")`, 'termCounts');
  }
  const parsed = countsSchema.safeParse(raw);
  if (!parsed.success) {
    throw new UsageError(`${shownPath} is damaged: ${zodIssueLine(parsed.error)}`, 'termCounts');
  }
  const m = parsed.data;
  const fail = (why: string): never => {
    throw new UsageError(`${shownPath} is damaged: ${why}`, 'termCounts');
  };
  if (m.df.length !== m.terms.length) fail(`df has ${m.df.length} entries for ${m.terms.length} terms`);
  for (let j = 1; j < m.terms.length; j++) {
    if (!(m.terms[j - 1] < m.terms[j])) fail(`terms are not unique and in order at ${JSON.stringify(m.terms[j])} (position ${j + 1})`);
  }
  for (let j = 0; j < m.df.length; j++) if (m.df[j] > m.documents) fail(`df of ${JSON.stringify(m.terms[j])} is ${m.df[j]}, above the ${m.documents} documents`);
  const analyzer: AnalyzerSettings = Object.freeze({ ...m.analyzer, stopwords: Object.freeze([...m.analyzer.stopwords]) });
  return sealCounts({ analyzer, cleaning: m.cleaning, documents: m.documents, terms: Object.freeze(m.terms), df: Float64Array.from(m.df) });
}


/**
 * Checks counts meant to give a run's idf: made with the run's analyzer
 * settings and over at least as many documents as the run groups.
 */
export function checkCountsFit(c: TermCounts, analyzer: AnalyzerSettings): void {
  const diff = analyzerDifference(c.analyzer, analyzer);
  if (diff !== null) throw new UsageError(`termCounts were counted with other analyzer settings than this run's (${diff}); count again with the same settings`, 'termCounts');
}
