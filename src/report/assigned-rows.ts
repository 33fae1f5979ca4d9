/**
 * The rows the streaming `sheaf assign` writes: one per document, in input
 * order, as JSON Lines or CSV. Pure. A batch's text depends only on its own
 * documents, so any split of the input into batches or shards, written in
 * order, gives the same bytes (the CSV header comes once, from
 * {@link assignedRowsHeader}).
 *
 * @module
 */
import type { Model } from '../model/index.js';
import { applyModel, type ModelApplication } from '../model/apply.js';
import type { Doc } from '../types.js';
import { resolveCleanStage, type CleanSettings } from '../clean/stage.js';
import { UsageError } from '../util/errors.js';
import { csvRecord, fixed } from './csv.js';

/** Output formats of the streaming assign. */
export type AssignedRowFormat = 'jsonl' | 'csv';

/** The formats, in the order messages list them. */
export const ASSIGNED_ROW_FORMATS: readonly AssignedRowFormat[] = Object.freeze(['jsonl', 'csv']);

/** The columns (and JSON keys) of a streamed row, in order. */
export const ASSIGNED_ROW_COLUMNS: readonly string[] = Object.freeze(['id', 'group', 'label', 'fit', 'status', 'second_group', 'second_label', 'second_fit']);

/** One streamed row's values, in {@link ASSIGNED_ROW_COLUMNS} order. */
export type AssignedRowValues = [string, number | null, string | null, number | null, 'matched' | 'new', number | null, string | null, number | null];

/**
 * One document's values: `id`; `group` (the nearest group's number, null when
 * the document shares no term with the model); `label` (that group's name);
 * `fit` (cosine to the group's centre, 4 decimals, as in assigned.csv);
 * `status` (`matched`, or `new` when the fit is below the group's threshold or
 * there is no group); `second_group`, `second_label`, `second_fit`: the next
 * nearest group, as in assigned.csv (null when there is none).
 */
export function assignedRowValues(model: Model, a: ModelApplication, i: number): AssignedRowValues {
  const g = a.assignments[i];
  const s = a.second[i];
  return [
    a.docs[i].id,
    g >= 0 ? g : null,
    g >= 0 ? model.labels[g].label : null,
    g >= 0 ? Number(fixed(a.fit[i])) : null,
    a.unmatched[i] ? 'new' : 'matched',
    s >= 0 ? s : null,
    s >= 0 ? model.labels[s].label : null,
    s >= 0 ? Number(fixed(a.secondFit[i])) : null,
  ];
}

/** One row's values as CSV cells (empty for null; fits with 4 decimals), as both assigned.csv and the stream write them. */
export function assignedRowCells(model: Model, a: ModelApplication, i: number): string[] {
  const [id, group, label, fit, status, secondGroup, secondLabel, secondFit] = assignedRowValues(model, a, i);
  const cell = (v: number | null): string => (v === null ? '' : String(v));
  const fitCell = (v: number | null): string => (v === null ? '' : fixed(v));
  return [id, cell(group), label ?? '', fitCell(fit), status, cell(secondGroup), secondLabel ?? '', fitCell(secondFit)];
}

/** The CSV header line (CRLF-ended); JSON Lines has none. No byte order mark: the rows go to a pipe. */
export function assignedRowsHeader(format: AssignedRowFormat): string {
  return format === 'csv' ? csvRecord(ASSIGNED_ROW_COLUMNS) + '\r\n' : '';
}

/** A batch's rows as text: JSON objects one a line (LF), or CSV records (CRLF, cells as in assigned.csv). */
export function assignedRowsText(model: Model, a: ModelApplication, format: AssignedRowFormat): string {
  const parts: string[] = [];
  for (let i = 0; i < a.docs.length; i++) {
    if (format === 'jsonl') {
      const [id, group, label, fit, status, second_group, second_label, second_fit] = assignedRowValues(model, a, i);
      parts.push(JSON.stringify({ id, group, label, fit, status, second_group, second_label, second_fit }) + '\n');
    } else {
      parts.push(csvRecord(assignedRowCells(model, a, i)) + '\r\n');
    }
  }
  return parts.join('');
}

/**
 * The cleaning a stream applies: the model's recorded decision (`tickets` or
 * `none`; a version 1 model's `auto`, which cleaned every export row, is
 * `tickets`) or `override`, with the boilerplate rule off, since a line counts
 * as boilerplate by how many documents of the whole pile repeat it and a
 * stream sees one batch at a time. Every other rule works on one document
 * alone. A recorded `auto` that still judges the pile (`detect`) cannot be
 * applied to a stream: a {@link UsageError} asks for `tickets` or `none`.
 */
export function streamCleaning(model: Model, override: 'tickets' | 'none' | null = null): CleanSettings {
  const recorded = model.cleaning;
  let mode = override ?? recorded.mode;
  if (mode === 'auto') {
    if (recorded.detect) {
      throw new UsageError('the model cleans by judging the whole pile (auto), which a stream cannot; choose tickets or none with --clean', 'clean');
    }
    mode = 'tickets';
  }
  return resolveCleanStage({ ...recorded.rules, boilerplate: false, mode, detect: false });
}

/**
 * Files one batch of documents (in order) and gives its rows as text. Each
 * row depends on its own document only (cleaning as {@link streamCleaning}
 * gives it, the model's analyzer and vocabulary, the nearest centre), so the
 * concatenated batches are the same bytes whatever the batch size.
 */
export function assignBatchText(model: Model, docs: readonly Doc[], cleaning: CleanSettings, format: AssignedRowFormat, minFit?: number): string {
  const a = applyModel(model, { docs, exportRows: new Uint8Array(docs.length).fill(1) }, minFit, cleaning);
  return assignedRowsText(model, a, format);
}
