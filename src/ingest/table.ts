/**
 * Rows of an export (CSV, TSV, JSON Lines, JSON array) to documents: which
 * columns give the text, id and title, and what goes into `fields`.
 *
 * `fields` keeps every column except the id column (its value is the
 * document's `id`), text and title columns included, so an output with
 * `id` followed by `fields` joins back to the user's full row.
 *
 * @module
 */
import { UsageError, show } from '../util/errors.js';
import { capTitle, firstLine, normalizeNewlines } from './text.js';

/** Column names taken as the text when none is named, in order of preference (matched case-insensitively). */
export const TEXT_COLUMN_GUESSES: readonly string[] = Object.freeze([
  'text', 'body', 'content', 'description', 'message', 'comment', 'summary', 'abstract',
]);

/**
 * Column names taken as the title when none is named, in order of preference
 * (matched case-insensitively, top-level columns only, never a text column).
 */
export const TITLE_COLUMN_GUESSES: readonly string[] = Object.freeze(['subject', 'title', 'headline', 'topic', 'summary']);

/** A document before ids are made unique across all inputs. */
export interface DraftDoc {
  id: string;
  readonly source: string;
  readonly title: string;
  readonly text: string;
  readonly fields: ReadonlyMap<string, string>;
  /** The title is the text's first line (see `Doc.titleFromText`). */
  readonly titleFromText?: boolean;
}

/** Which names an export offers for text, id and title. */
export interface ExportColumns {
  /** Every name accepted (CSV: the header; JSON: every key path, dotted), in first-seen order. */
  readonly accepted: readonly string[];
  /** The names shown in messages (CSV: the header; JSON: top-level keys and the leaf paths under objects). */
  readonly listed: readonly string[];
  /** The top-level columns (CSV: the header; JSON: top-level keys). */
  readonly top: readonly string[];
}

/** The columns chosen, as canonical names from {@link ExportColumns.accepted}. */
export interface ChosenColumns {
  readonly text: readonly string[];
  readonly id: string | null;
  readonly title: string | null;
  /** True when `title` was guessed from {@link TITLE_COLUMN_GUESSES}, not named. */
  readonly titleGuessed: boolean;
}

const LIST_CAP = 40;

/** `a, b, c`, at most {@link LIST_CAP} names, then `… (N more)`. */
export function listNames(names: readonly string[]): string {
  if (names.length <= LIST_CAP) return names.join(', ');
  return names.slice(0, LIST_CAP).join(', ') + `, … (${names.length - LIST_CAP} more)`;
}

/** `4, 8, 9`, at most `cap` numbers, then `… (N in all)`. */
export function listNumbers(nums: readonly number[], cap = 10): string {
  if (nums.length <= cap) return nums.join(', ');
  return nums.slice(0, cap).join(', ') + `, … (${nums.length} in all)`;
}

function findName(wanted: string, accepted: readonly string[]): string | null {
  if (accepted.includes(wanted)) return wanted;
  const lower = wanted.toLowerCase();
  return accepted.find((n) => n.toLowerCase() === lower) ?? null;
}

function lastSegment(p: string): string {
  const i = p.lastIndexOf('.');
  return i === -1 ? p : p.slice(i + 1);
}

/**
 * Resolves the text, id and title options against an export's columns:
 * exact names first, then a case-insensitive match. With `text` null the
 * first of {@link TEXT_COLUMN_GUESSES} found among the top-level columns is
 * used, else (JSON) the first path whose last segment is one of them.
 * With `title` null, the first of {@link TITLE_COLUMN_GUESSES} among the
 * top-level columns (not a text or id column) is the title column, and
 * `titleGuessed` says so. Throws {@link UsageError} for a named column that
 * does not exist or when no text column can be guessed.
 */
export function chooseColumns(
  name: string,
  cols: ExportColumns,
  options: { readonly text: readonly string[] | null; readonly id: string | null; readonly title: string | null },
): ChosenColumns {
  const need = (wanted: string, option: 'text' | 'id' | 'title'): string => {
    const found = findName(wanted, cols.accepted);
    if (found === null) {
      // `comments.0.body` for `comments[].body`: say how to reach every element of an array.
      const each = wanted.replace(/\.\d+(?=\.|$)/g, '[]');
      if (each !== wanted && findName(each, cols.accepted) !== null) {
        throw new UsageError(
          `${name} has no column ${show(wanted)} for --${option}; to take every element of an array write [] after its name: ${show(each)}`,
          option,
        );
      }
      throw new UsageError(
        `${name} has no column ${show(wanted)} for --${option}; its columns are: ${listNames(cols.listed)}`,
        option,
      );
    }
    return found;
  };
  let text: string[];
  if (options.text !== null) {
    text = options.text.map((c) => need(c, 'text'));
  } else {
    let guess: string | undefined;
    for (const g of TEXT_COLUMN_GUESSES) {
      guess = cols.top.find((c) => c.toLowerCase() === g);
      if (guess !== undefined) break;
    }
    if (guess === undefined) {
      const nested = cols.accepted.filter((p) => p.includes('.') && !p.includes('[]') && !cols.top.includes(p));
      for (const g of TEXT_COLUMN_GUESSES) {
        guess = nested.find((p) => lastSegment(p).toLowerCase() === g);
        if (guess !== undefined) break;
      }
    }
    if (guess === undefined) {
      throw new UsageError(`${name} has no text column; name one with --text (columns: ${listNames(cols.listed)})`, 'text');
    }
    text = [guess];
  }
  const id = options.id === null ? null : need(options.id, 'id');
  if (options.title !== null) return { text, id, title: need(options.title, 'title'), titleGuessed: false };
  let title: string | null = null;
  for (const g of TITLE_COLUMN_GUESSES) {
    const found = cols.top.find((c) => c.toLowerCase() === g && !text.includes(c) && c !== id);
    if (found !== undefined) {
      title = found;
      break;
    }
  }
  return { text, id, title, titleGuessed: title !== null };
}

/**
 * Collects an export's rows as documents and the warnings about them
 * (empty ids replaced by row numbers, rows without text).
 */
export class RowCollector {
  /** The documents so far, in row order. */
  readonly docs: DraftDoc[] = [];
  private readonly emptyIds: number[] = [];
  private readonly emptyTexts: number[] = [];

  /** `name` appears in warnings and sources (`name#row`); `byRowNumber`: ids are row numbers. */
  constructor(
    private readonly name: string,
    private readonly byRowNumber: boolean,
  ) {}

  /**
   * Adds row `row` (1-based). Text: the non-blank `textParts` joined with a
   * blank line, line endings normalised. Title: `title` when not blank, else
   * the first line of the text, else the id.
   */
  add(row: number, idValue: string | undefined, textParts: readonly string[], title: string | undefined, fields: ReadonlyMap<string, string>): void {
    let id = String(row);
    if (!this.byRowNumber) {
      const v = (idValue ?? '').trim();
      if (v === '') this.emptyIds.push(row);
      else id = v;
    }
    // One text column (the usual case): the part itself, or '' when blank — what filter + join give, without the arrays.
    const only = textParts.length === 1 ? (textParts[0] as string) : null;
    const joined = only !== null ? (only.trim() !== '' ? only : '') : textParts.filter((p) => p.trim() !== '').join('\n\n');
    const text = normalizeNewlines(joined);
    if (text.trim() === '') this.emptyTexts.push(row);
    const fromText = !(title !== undefined && title.trim() !== '');
    const t = fromText ? firstLine(text) || id : capTitle(title);
    const source = `${this.name}#${row}`;
    // Two literals instead of a spread: the same keys in the same order, without a temporary object per row.
    this.docs.push(fromText ? { id, source, title: t, text, fields, titleFromText: true } : { id, source, title: t, text, fields });
  }

  /** One warning per kind of problem seen, naming the rows. */
  warnings(): string[] {
    const out: string[] = [];
    if (this.emptyIds.length > 0) {
      out.push(
        `${this.name}: ${this.emptyIds.length} row(s) have an empty id; their row numbers are used instead (rows ${listNumbers(this.emptyIds)})`,
      );
    }
    if (this.emptyTexts.length > 0) {
      out.push(`${this.name}: ${this.emptyTexts.length} row(s) have no text (rows ${listNumbers(this.emptyTexts)})`);
    }
    return out;
  }
}

/**
 * Header names made usable, as for CSV: an empty name becomes `column_N`
 * (1-based), a repeated one `name~2`, `name~3`…; each renaming is described.
 */
export function tableHeader(raw: readonly string[]): { names: string[]; renamed: string[] } {
  const names: string[] = [];
  const renamed: string[] = [];
  const seen = new Set<string>();
  raw.forEach((r, i) => {
    let n = r.trim() === '' ? `column_${i + 1}` : r;
    if (n !== r) renamed.push(`column ${i + 1} has no name; called ${show(n)}`);
    if (seen.has(n)) {
      let k = 2;
      while (seen.has(`${n}~${k}`) || raw.includes(`${n}~${k}`)) k++;
      renamed.push(`column ${i + 1} repeats the name ${show(n)}; called ${show(`${n}~${k}`)}`);
      n = `${n}~${k}`;
    }
    seen.add(n);
    names.push(n);
  });
  return { names, renamed };
}
