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

/** Which documents the stage cleans: `auto` (export rows only), `tickets` (all) or `none`. */
export type CleanChoice = 'auto' | 'tickets' | 'none';

/** The choices of {@link CleanStageOptions.mode}, in the order messages list them. */
export const CLEAN_CHOICES: readonly CleanChoice[] = Object.freeze(['auto', 'tickets', 'none']);

/** Options of the cleaning stage: the {@link CleanOptions} rules, with `mode` also accepting `auto` (the default). */
export type CleanStageOptions = Partial<Omit<CleanOptions, 'mode'>> & { readonly mode?: CleanChoice };

/** The resolved cleaning stage: the choice and the rules (`rules.mode` is `tickets`). */
export interface CleanSettings {
  readonly mode: CleanChoice;
  readonly rules: CleanOptions;
}

/** Defaults: `auto`, every rule as in {@link DEFAULT_CLEAN_OPTIONS} (what `sheaf group` has always done without `--clean`). */
export const DEFAULT_CLEAN_STAGE: CleanSettings = Object.freeze({ mode: 'auto', rules: DEFAULT_CLEAN_OPTIONS });

/** Merges defaults and validates once (unknown keys are refused by {@link resolveCleanOptions}). */
export function resolveCleanStage(partial: CleanStageOptions = {}): CleanSettings {
  if (partial === null || typeof partial !== 'object' || Array.isArray(partial)) {
    throw new UsageError(`clean options must be an object; got ${show(partial)}`, 'clean');
  }
  const mode = partial.mode ?? 'auto';
  if (!CLEAN_CHOICES.includes(mode)) {
    throw new UsageError(`clean must be one of ${CLEAN_CHOICES.join(', ')}; got ${show(mode)}`, 'clean');
  }
  const rules = resolveCleanOptions({ ...partial, mode: 'tickets' });
  return Object.freeze({ mode, rules });
}

/** Documents and, optionally, which of them are rows of an export (as `IngestResult` gives them). */
export interface DocumentInput {
  readonly docs: readonly Doc[];
  /** 1 for a row of an export (CSV, JSON…), 0 for a document file; missing = all files. */
  readonly exportRows?: ArrayLike<number>;
}

/**
 * Runs the cleaning stage. `auto` cleans the export rows with the rules and
 * leaves files as they are (a bare list of documents counts as files);
 * `tickets` cleans all; `none` none. A cleaned document whose title was its
 * first line (`titleFromText`) gets the first line that survives as title.
 */
export function cleanStage(input: DocumentInput, settings: CleanSettings): { docs: Doc[]; report: CleanReport } {
  const { docs } = input;
  const out =
    settings.mode === 'none'
      ? cleanDocuments(docs, { ...settings.rules, mode: 'none' })
      : settings.mode === 'tickets'
        ? cleanDocuments(docs, settings.rules)
        : cleanDocuments(docs, settings.rules, input.exportRows ?? new Uint8Array(docs.length));
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
