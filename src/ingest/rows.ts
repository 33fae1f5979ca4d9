/**
 * Rows already split into cells (a spreadsheet's sheet, a reference
 * manager's records) to documents, the way a CSV export's rows become
 * documents: the first row is the header, the text, id and title columns are
 * chosen by name (or guessed), and every column but the id goes into
 * `fields` so the rows join back.
 *
 * @module
 */
import { show } from '../util/errors.js';
import type { ExportRead } from './csv.js';
import { chooseColumns, listNumbers, RowCollector, tableHeader } from './table.js';

/** The column options a table of rows is read with. */
export interface RowTableOptions {
  readonly text: readonly string[] | null;
  readonly id: string | null;
  readonly title: string | null;
}


/**
 * Reads a header and rows of cells as documents. `rows[i]` is row `i + 1`
 * (ids default to that number); `lines[i]`, when given, is where the row
 * stands in its file for messages (a sheet's row number). Missing cells are
 * empty; cells past the header are dropped (with a warning).
 * `defaultText`: the text columns used when `options.text` is null and they
 * exist (else the usual guess). Throws `UsageError` for a named column the
 * header lacks.
 */
export function readRowTable(
  name: string,
  header: readonly string[],
  rows: readonly (readonly string[])[],
  options: RowTableOptions,
  extra: { readonly lines?: readonly number[]; readonly defaultText?: readonly string[] } = {},
): ExportRead {
  const warnings: string[] = [];
  const { names, renamed } = tableHeader(header);
  for (const r of renamed) warnings.push(`${name}: ${r}`);
  const width = names.length;
  let text = options.text;
  if (text === null && extra.defaultText !== undefined) {
    const present = extra.defaultText.filter((c) => names.includes(c));
    if (present.length > 0) text = present;
  }
  const chosen = chooseColumns(name, { accepted: names, listed: names, top: names }, { ...options, text });
  const textIdx = chosen.text.map((c) => names.indexOf(c));
  const idIdx = chosen.id === null ? -1 : names.indexOf(chosen.id);
  const titleIdx = chosen.title === null ? -1 : names.indexOf(chosen.title);
  const collector = new RowCollector(name, idIdx === -1);
  const long: number[] = [];
  rows.forEach((record, i) => {
    if (record.length > width) long.push(extra.lines?.[i] ?? i + 1);
    const fields = new Map<string, string>();
    for (let c = 0; c < width; c++) if (c !== idIdx) fields.set(names[c] as string, record[c] ?? '');
    collector.add(
      i + 1,
      idIdx === -1 ? undefined : record[idIdx],
      textIdx.map((c) => record[c] ?? ''),
      titleIdx === -1 ? undefined : record[titleIdx],
      fields,
    );
  });
  if (rows.length === 0) warnings.push(`${name} has a header but no rows`);
  if (long.length > 0) {
    warnings.push(`${name}: ${long.length} row(s) have more cells than the header's ${width}; the extra ones are dropped (rows ${listNumbers(long)})`);
  }
  warnings.push(...collector.warnings());
  const titleColumn = chosen.titleGuessed && chosen.title !== null ? chosen.title : undefined;
  return { docs: collector.docs, warnings, rowsSeen: rows.length, ...(titleColumn === undefined ? {} : { titleColumn }) };
}
