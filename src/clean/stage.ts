/**
 * Cleaning as a stage of the grouping pipeline and of the saved model: which
 * documents are cleaned (`auto`: the rows of exports, not document files;
 * `tickets`: all; `none`: none), with which rules, and titles taken from a
 * first line recomputed from the first line that survives. Pure.
 *
 * @module
 */
import type { Doc } from '../types.js';
import { firstLine } from '../util/title.js';
import { UsageError, show } from '../util/errors.js';
import { cleanDocuments, type CleanReport } from './index.js';
import { PLACEHOLDERS } from './placeholders.js';
import { DEFAULT_CLEAN_OPTIONS, resolveCleanOptions, type CleanOptions } from './options.js';
import { noClutterPossible } from './one-line.js';

/** Which documents the stage cleans: `auto` (export rows only), `tickets` (all) or `none`. */
export type CleanChoice = 'auto' | 'tickets' | 'none';

/** The choices of {@link CleanStageOptions.mode}, in the order messages list them. */
export const CLEAN_CHOICES: readonly CleanChoice[] = Object.freeze(['auto', 'tickets', 'none']);

/** Options of the cleaning stage: the {@link CleanOptions} rules, with `mode` also accepting `auto` (the default). */
export type CleanStageOptions = Partial<Omit<CleanOptions, 'mode'>> & {
  readonly mode?: CleanChoice;
  /** With `auto`: clean the export rows only when enough of them hold ticket clutter ({@link AUTO_CLUTTER_SHARE}); default true. False cleans them whatever they hold. */
  readonly detect?: boolean;
};

/** The resolved cleaning stage: the choice and the rules (`rules.mode` is `tickets`). */
export interface CleanSettings {
  readonly mode: CleanChoice;
  readonly rules: CleanOptions;
  /** With `auto`: decide per pile whether the export rows hold enough ticket clutter to clean. */
  readonly detect: boolean;
}

/** Defaults: `auto`, every rule as in {@link DEFAULT_CLEAN_OPTIONS} (what `sheaf group` has always done without `--clean`). */
export const DEFAULT_CLEAN_STAGE: CleanSettings = Object.freeze({ mode: 'auto', rules: DEFAULT_CLEAN_OPTIONS, detect: true });

/** Merges defaults and validates once (unknown keys are refused by {@link resolveCleanOptions}). */
export function resolveCleanStage(partial: CleanStageOptions = {}): CleanSettings {
  if (partial === null || typeof partial !== 'object' || Array.isArray(partial)) {
    throw new UsageError(`clean options must be an object; got ${show(partial)}`, 'clean');
  }
  const { detect = true, ...rest } = partial;
  if (typeof detect !== 'boolean') throw new UsageError(`detect must be true or false; got ${show(detect)}`, 'detect');
  partial = rest;
  const mode = partial.mode ?? 'auto';
  if (!CLEAN_CHOICES.includes(mode)) {
    throw new UsageError(`clean must be one of ${CLEAN_CHOICES.join(', ')}; got ${show(mode)}`, 'clean');
  }
  const rules = resolveCleanOptions({ ...partial, mode: 'tickets' });
  return Object.freeze({ mode, rules, detect });
}

/** Documents and, optionally, which of them are rows of an export (as `IngestResult` gives them). */
export interface DocumentInput {
  readonly docs: readonly Doc[];
  /** 1 for a row of an export (CSV, JSON…), 0 for a document file; missing = all files. */
  readonly exportRows?: ArrayLike<number>;
}

/**
 * Share of documents (export rows and files alike) that must hold ticket
 * clutter (quoted replies or history, signatures, greetings) before `auto`
 * cleans the pile. Our rule, set in the gap measured on the bench's corpora:
 * the demo tickets 32% of rows, SpamAssassin mail 52%; quotations 0.3%,
 * package descriptions 0%, manual pages 1.1%, news stories 0%. Mail and
 * tickets gain from cleaning; cleaning other text only removes content (lines
 * starting with `>` in code samples, repeated lines that carry the theme).
 */
export const AUTO_CLUTTER_SHARE = 0.2;

/**
 * Runs the cleaning stage. `auto` cleans the pile with the rules when at least
 * {@link AUTO_CLUTTER_SHARE} of its documents hold ticket clutter, and keeps it
 * as written otherwise; the report says what was found (`detected`). (`auto`
 * without `detect`, as models of version 1 load, cleans the export rows only,
 * as sheaf did then.) `tickets` cleans all; `none` none. A cleaned document
 * whose title was its first line (`titleFromText`) gets the first line that
 * survives as title.
 */
export function cleanStage(input: DocumentInput, settings: CleanSettings): { docs: Doc[]; report: CleanReport } {
  const { docs } = input;
  if (settings.mode === 'auto' && settings.detect && docs.length > 0 && noClutterPossible(docs)) {
    // One-line documents: no clutter can be counted (see one-line.ts), so the pile is kept as written without a cleaning pass.
    const none = cleanDocuments(docs, { ...settings.rules, mode: 'none' }).report;
    return { docs: docs.slice(), report: { ...none, withClutter: 0, detected: { share: 0, threshold: AUTO_CLUTTER_SHARE, applied: false } } };
  }
  let out =
    settings.mode === 'none'
      ? cleanDocuments(docs, { ...settings.rules, mode: 'none' })
      : settings.mode === 'tickets'
        ? cleanDocuments(docs, settings.rules)
        : settings.detect
          ? cleanDocuments(docs, settings.rules)
          : cleanDocuments(docs, settings.rules, input.exportRows ?? new Uint8Array(docs.length));
  if (settings.mode === 'auto' && settings.detect && out.report.documents > 0) {
    const share = out.report.withClutter / out.report.documents;
    const applied = share >= AUTO_CLUTTER_SHARE;
    const detected = { share, threshold: AUTO_CLUTTER_SHARE, applied };
    out = applied
      ? { docs: out.docs, report: { ...out.report, detected } }
      : { docs: docs.slice(), report: { ...cleanDocuments(docs, { ...settings.rules, mode: 'none' }).report, withClutter: out.report.withClutter, detected } };
  }
  for (let i = 0; i < out.docs.length; i++) {
    const before = docs[i]!;
    const after = out.docs[i]!;
    if (after !== before && before.titleFromText && after.text !== before.text) {
      out.docs[i] = { ...after, title: titleLine(firstLine(after.text), before.text) || after.id };
    }
  }
  return out;
}

const PLACEHOLDER_PATTERN = new RegExp(`(?:${Object.values(PLACEHOLDERS).join('|')})`, 'g');

/**
 * The title a person recognises for a cleaned first line: when cleaning folded
 * links, addresses or numbers in it into placeholder words, the original line
 * it came from (the first line of `original` that matches it with each
 * placeholder standing for some text); otherwise the cleaned line as it is.
 */
export function titleLine(cleaned: string, original: string): string {
  if (cleaned.search(PLACEHOLDER_PATTERN) < 0) return cleaned;
  const parts = cleaned.replace(/…$/u, '').split(PLACEHOLDER_PATTERN).map((p) => p.replace(/[.*+?^${}()|[\]\\]/g, '\\$&'));
  const pattern = new RegExp(`^${parts.join('.+?')}`, 'u');
  for (const line of original.split(/\r?\n/)) {
    const trimmed = line.trim();
    if (pattern.test(trimmed)) return firstLine(trimmed);
  }
  return cleaned;
}
