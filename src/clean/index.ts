/**
 * Cleaning ticket and e-mail texts before analysis: the reply history,
 * signatures and greetings each message repeats, the boilerplate lines a
 * help desk adds to every ticket, and identifiers (URLs, addresses, ids,
 * long numbers) folded into placeholder words. What was removed is
 * reported, per rule. Titles, ids, sources and fields are never touched.
 *
 * Pure: no file system, clock, terminal or `process`.
 *
 * ```ts
 * const { docs, report } = cleanDocuments(read.docs, { mode: 'tickets' });
 * ```
 *
 * @module
 */
import type { Doc } from '../types.js';
import { dropLines, findBoilerplate, keySet, type BoilerplateLine } from './boilerplate.js';
import { resolveCleanOptions, type CleanMode, type CleanOptions } from './options.js';
import { foldIdentifiers, type PlaceholderCounts } from './placeholders.js';
import { joinLines, stripEnds, stripHistory, type ReplyCounts } from './replies.js';

export { CLEAN_MODES, DEFAULT_CLEAN_OPTIONS, resolveCleanOptions, type CleanMode, type CleanOptions } from './options.js';
export { PLACEHOLDERS, foldIdentifiers, type PlaceholderCounts } from './placeholders.js';
export { stripReplies, stripHistory, stripEnds, stripSignature, isGreeting, isSignOff, SIGN_OFFS, type ReplyCounts, type ReplyRules } from './replies.js';
export { findBoilerplate, lineKey, BOILERPLATE_MIN_KEY, type BoilerplateLine } from './boilerplate.js';

/** Most boilerplate lines listed in a {@link CleanReport} (the count of all is in `boilerplate.found`). */
export const REPORT_LINES_MAX = 50;

/** What cleaning did, for `run.json`. */
export interface CleanReport {
  readonly mode: CleanMode;
  /** The options used (resolved). */
  readonly options: CleanOptions;
  readonly documents: number;
  /** Documents whose text changed. */
  readonly changed: number;
  /** Documents where ticket clutter was found: quoted replies or history, a signature or a greeting (not boilerplate or placeholders). */
  readonly withClutter: number;
  /**
   * With the cleaning stage's `auto` mode: the share of export rows holding ticket clutter, the share at which
   * cleaning is applied, and whether it was (when not, the rows are kept as written and the counts are of what
   * was found, not removed).
   */
  readonly detected?: { readonly share: number; readonly threshold: number; readonly applied: boolean };
  /** Documents cleaning would have emptied; they keep their text as it was (and count in nothing else). */
  readonly keptWhole: number;
  /** Total text length before and after, in UTF-16 code units (JavaScript string length). */
  readonly charsBefore: number;
  readonly charsAfter: number;
  /** Non-blank lines removed, by rule. */
  readonly linesRemoved: ReplyCounts & { boilerplate: number };
  /** Identifiers folded into placeholders, by kind. */
  readonly placeholders: PlaceholderCounts;
  readonly boilerplate: {
    /** A line is boilerplate in at least `docs` documents: `max(minDocs, ceil(share × documents))`. */
    readonly threshold: { readonly share: number; readonly minDocs: number; readonly docs: number };
    /** How many lines were found. */
    readonly found: number;
    /** The lines found (up to {@link REPORT_LINES_MAX}), most frequent first: first form seen and document count. */
    readonly lines: readonly { readonly line: string; readonly docs: number }[];
  };
}

function zeroReplies(): ReplyCounts {
  return { quoted: 0, history: 0, signature: 0, greeting: 0 };
}

function zeroPlaceholders(): PlaceholderCounts {
  return { url: 0, email: 0, id: 0, number: 0 };
}

/** The boilerplate threshold in documents for `n` documents. */
export function boilerplateThreshold(n: number, share: number, minDocs: number): number {
  return Math.max(minDocs, Math.ceil(share * n - 1e-9));
}

/**
 * Cleans the texts of `docs` ({@link CleanOptions}; resolved and validated
 * once with {@link resolveCleanOptions}). In `tickets` mode: per document,
 * reply headers with the history under them and `>` lines go
 * ({@link stripHistory}); across all documents, boilerplate lines go
 * ({@link findBoilerplate}); per document, the signature and the opening
 * greeting go ({@link stripEnds}); then identifiers are folded into
 * placeholder words ({@link foldIdentifiers}).
 * A document that would be left empty keeps its original text. In `none`
 * mode the documents are returned as they are. Same input, same output;
 * the input is not modified.
 *
 * `only`, when given, holds one entry per document: documents with 0 pass
 * through untouched and take no part (in the boilerplate counts or the
 * report) — e.g. `IngestResult.exportRows`, to clean the rows of ticket
 * exports and leave document files alone.
 */
export function cleanDocuments(
  docs: readonly Doc[],
  options: Partial<CleanOptions> = {},
  only?: ArrayLike<number>,
): { docs: Doc[]; report: CleanReport } {
  const opts = resolveCleanOptions(options);
  if (only !== undefined) {
    if (only.length !== docs.length) {
      throw new RangeError(`cleanDocuments: only has ${only.length} entries for ${docs.length} documents`);
    }
    const picked: Doc[] = [];
    for (let i = 0; i < docs.length; i++) if (only[i]) picked.push(docs[i] as Doc);
    const inner = cleanDocuments(picked, opts);
    const out = docs.slice();
    let j = 0;
    for (let i = 0; i < docs.length; i++) if (only[i]) out[i] = inner.docs[j++] as Doc;
    return { docs: out, report: inner.report };
  }
  const n = docs.length;
  let charsBefore = 0;
  for (const d of docs) charsBefore += d.text.length;
  const threshold = boilerplateThreshold(n, opts.boilerplateShare, opts.boilerplateMinDocs);
  const base = {
    mode: opts.mode,
    options: opts,
    documents: n,
    charsBefore,
  };
  if (opts.mode === 'none') {
    return {
      docs: docs.slice(),
      report: {
        ...base,
        changed: 0,
        withClutter: 0,
        keptWhole: 0,
        charsAfter: charsBefore,
        linesRemoved: { ...zeroReplies(), boilerplate: 0 },
        placeholders: zeroPlaceholders(),
        boilerplate: { threshold: { share: opts.boilerplateShare, minDocs: opts.boilerplateMinDocs, docs: threshold }, found: 0, lines: [] },
      },
    };
  }

  // 1. Per document: reply history and quotes. Counts per document, so an emptied one can be undone.
  const rules = { quotes: opts.quotes, signatures: opts.signatures, greetings: opts.greetings };
  const perDoc = {
    quoted: new Int32Array(n),
    history: new Int32Array(n),
    signature: new Int32Array(n),
    greeting: new Int32Array(n),
    boilerplate: new Int32Array(n),
    url: new Int32Array(n),
    email: new Int32Array(n),
    id: new Int32Array(n),
    number: new Int32Array(n),
  };
  const texts: string[] = new Array<string>(n);
  const rc = zeroReplies();
  for (let i = 0; i < n; i++) {
    rc.quoted = rc.history = 0;
    const t = (docs[i] as Doc).text;
    const lines = (t.indexOf('\r') === -1 ? t : t.replace(/\r\n?/g, '\n')).split('\n');
    texts[i] = joinLines(opts.quotes ? stripHistory(lines, rc) : lines);
    perDoc.quoted[i] = rc.quoted;
    perDoc.history[i] = rc.history;
  }

  // 2. Across documents: boilerplate lines (before signatures, as footers often sit under them).
  const found: BoilerplateLine[] = opts.boilerplate ? findBoilerplate(texts, threshold) : [];
  const keys = keySet(found.map((b) => b.key));
  const removed = { count: 0 };
  for (let i = 0; i < n; i++) {
    removed.count = 0;
    let lines = (texts[i] as string).split('\n');
    if (keys.keys.size > 0) lines = dropLines(lines, keys, removed);
    perDoc.boilerplate[i] = removed.count;
    // Then the signature and the greeting.
    rc.signature = rc.greeting = 0;
    texts[i] = joinLines(stripEnds(lines, rules, rc));
    perDoc.signature[i] = rc.signature;
    perDoc.greeting[i] = rc.greeting;
  }

  // 3. Identifiers to placeholders.
  if (opts.placeholders) {
    const pc = zeroPlaceholders();
    for (let i = 0; i < n; i++) {
      pc.url = pc.email = pc.id = pc.number = 0;
      texts[i] = foldIdentifiers(texts[i] as string, pc);
      perDoc.url[i] = pc.url;
      perDoc.email[i] = pc.email;
      perDoc.id[i] = pc.id;
      perDoc.number[i] = pc.number;
    }
  }

  // 4. Assemble; undo what would leave a document empty.
  const out: Doc[] = new Array<Doc>(n);
  const lines = { ...zeroReplies(), boilerplate: 0 };
  const placeholders = zeroPlaceholders();
  let changed = 0;
  let withClutter = 0;
  let keptWhole = 0;
  let charsAfter = 0;
  for (let i = 0; i < n; i++) {
    const d = docs[i] as Doc;
    let text = texts[i] as string;
    if (text.trim() === '' && d.text.trim() !== '') {
      keptWhole++;
      text = d.text;
    } else {
      if ((perDoc.quoted[i] as number) + (perDoc.history[i] as number) + (perDoc.signature[i] as number) + (perDoc.greeting[i] as number) > 0) withClutter++;
      lines.quoted += perDoc.quoted[i] as number;
      lines.history += perDoc.history[i] as number;
      lines.signature += perDoc.signature[i] as number;
      lines.greeting += perDoc.greeting[i] as number;
      lines.boilerplate += perDoc.boilerplate[i] as number;
      placeholders.url += perDoc.url[i] as number;
      placeholders.email += perDoc.email[i] as number;
      placeholders.id += perDoc.id[i] as number;
      placeholders.number += perDoc.number[i] as number;
    }
    charsAfter += text.length;
    if (text === d.text) out[i] = d;
    else {
      changed++;
      out[i] = { id: d.id, source: d.source, title: d.title, text, fields: d.fields };
    }
  }
  return {
    docs: out,
    report: {
      ...base,
      changed,
      withClutter,
      keptWhole,
      charsAfter,
      linesRemoved: lines,
      placeholders,
      boilerplate: {
        threshold: { share: opts.boilerplateShare, minDocs: opts.boilerplateMinDocs, docs: threshold },
        found: found.length,
        lines: found.slice(0, REPORT_LINES_MAX).map((b) => ({ line: b.line, docs: b.docs })),
      },
    },
  };
}
