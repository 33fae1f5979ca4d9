/**
 * What `--truth` names (in `group` and `evaluate`), resolved the way `--text`
 * and `--id` are: an exact column name first, then the one column whose name
 * matches when case is ignored; two or more such columns are refused with a
 * message naming them. For documents read from folders, `--truth folder`
 * (when no column is called that) takes each file's first folder below the
 * input folder as its label: `billing/2024/a.txt` read from `tickets/` is
 * labelled `billing`; a file directly in the input folder, or given by
 * itself, has no label and is left out of the scores.
 *
 * @module
 */
import path from 'node:path';
import type { Doc } from '../types.js';
import { UsageError } from '../util/errors.js';

/** The `--truth` name that labels folder documents by their first folder. */
export const FOLDER_TRUTH = 'folder';

/**
 * The column among `columns` that `wanted` names: itself when present, else
 * the only one equal to it when case is ignored, else null. Throws
 * {@link UsageError} (option `option`) when two or more differ from it only
 * in case.
 */
export function matchColumn(columns: readonly string[], wanted: string, option: string): string | null {
  if (columns.includes(wanted)) return wanted;
  const lower = wanted.toLowerCase();
  const found = [...new Set(columns.filter((c) => c.toLowerCase() === lower))];
  if (found.length === 1) return found[0] as string;
  if (found.length > 1) {
    throw new UsageError(`--${option} ${JSON.stringify(wanted)} matches ${found.length} columns when case is ignored (${found.join(', ')}); give one exactly`, option);
  }
  return null;
}

/** How the known labels of a run are found. */
export interface TruthSource {
  /** The column (or {@link FOLDER_TRUTH}) the labels come from, for the scores' heading. */
  readonly field: string;
  /** A document's known label, '' for none. */
  labelOf(doc: Doc): string;
}

/**
 * Resolves `--truth` against the documents read (before the heavy work):
 * a column of the export (see {@link matchColumn}), or, for documents read
 * from the folders `folders` (as given), {@link FOLDER_TRUTH}. Throws
 * {@link UsageError} when it names neither.
 */
export function resolveTruth(docs: readonly Doc[], wanted: string, folders: readonly string[]): TruthSource {
  const columns = [...new Set(docs.flatMap((d) => [...d.fields.keys()]))];
  const column = matchColumn(columns, wanted, 'truth');
  if (column !== null) return { field: column, labelOf: (d) => d.fields.get(column) ?? '' };
  if (wanted.toLowerCase() === FOLDER_TRUTH && folders.length > 0) {
    // Longest first, so a folder inside another given folder is its own root.
    const roots = folders
      .map((f) => {
        const n = path.posix.normalize(f.replace(/\\/g, '/')).replace(/\/+$/, '');
        return n === '.' || n === '' ? '' : `${n}/`;
      })
      .sort((a, b) => b.length - a.length);
    const labelOf = (d: Doc): string => firstFolder(d.source, roots);
    if (docs.some((d) => labelOf(d) !== '')) return { field: FOLDER_TRUTH, labelOf };
    throw new UsageError(`--truth ${FOLDER_TRUTH}: no file was read from a folder below ${folders.join(', ')}, so there are no folder labels`, 'truth');
  }
  throw new UsageError(
    `--truth column ${JSON.stringify(wanted)} is not in the input; ${columns.length ? `its columns are: ${columns.join(', ')}` : 'it has no columns besides the text'}` +
      (folders.length > 0 && columns.length === 0 ? ` (--truth ${FOLDER_TRUTH} labels files by their first folder)` : ''),
    'truth',
  );
}

/** The first folder of `source` below the first root it is under, '' when it is directly in one or under none. */
function firstFolder(source: string, roots: readonly string[]): string {
  const p = source.replace(/\\/g, '/');
  for (const root of roots) {
    if (root !== '' && !p.startsWith(root)) continue;
    const rest = p.slice(root.length);
    const slash = rest.indexOf('/');
    if (slash > 0) return rest.slice(0, slash);
    if (root !== '') return '';
  }
  return '';
}
