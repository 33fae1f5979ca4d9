/**
 * Spreadsheet workbooks (Office Open XML SpreadsheetML: `.xlsx`, `.xlsm`,
 * `.xltx`, `.xltm`) read as row exports, straight from the zip archive with
 * `zip.ts` and htmlparser2 in XML mode (no spreadsheet library).
 *
 * What is read (ECMA-376 Part 1, from memory: §18.2 workbook, §18.3
 * worksheets, §18.4 shared strings, §18.8.30/31 number formats):
 * - `xl/workbook.xml` lists the sheets in order (`<sheet name r:id>`), and
 *   its relationships (`xl/_rels/workbook.xml.rels`) name each sheet's part;
 * - a sheet's `<row>`s of `<c r="B2" t="…">` cells: shared strings (`t="s"`,
 *   an index into `xl/sharedStrings.xml`, rich-text runs joined, phonetic
 *   runs left out), inline strings (`t="inlineStr"`), formula strings
 *   (`t="str"`), booleans (`TRUE`/`FALSE`), errors (`#N/A`…) and numbers;
 *   a number whose cell format is a date or time format becomes
 *   `YYYY-MM-DD`, `HH:MM:SS` or `YYYY-MM-DD HH:MM:SS` (1900 or 1904 date
 *   system, as the workbook says); other numbers are written as JavaScript
 *   writes them (`0.25`, `1234`).
 *
 * The first row with a non-empty cell is the header; rows with no non-empty
 * cell are left out. Old binary workbooks (`.xls`, BIFF; `.xlsb`) and
 * password-protected ones (an OLE compound file) are refused with a reason.
 *
 * @module
 */
import { Parser } from 'htmlparser2';
import { UsageError, show } from '../util/errors.js';
import { InputSkip } from './decode.js';
import { oneLine } from './io-errors.js';
import { looksLikeOle } from './docx.js';
import { looksLikeZip, zipEntries, zipRead, type ZipEntry } from './zip.js';
import { readRowTable, type RowTableOptions } from './rows.js';
import { listNames } from './table.js';
import type { ExportRead } from './csv.js';

/** Extensions read as SpreadsheetML workbooks. */
export const SHEET_EXTENSIONS: ReadonlySet<string> = new Set(['.xlsx', '.xlsm', '.xltx', '.xltm']);

/** Extensions of binary workbooks that are refused with a reason (see {@link OLD_WORKBOOK}). */
export const OLD_SHEET_EXTENSIONS: ReadonlySet<string> = new Set(['.xls', '.xlt', '.xlsb']);

/** The reason an old binary workbook is skipped with. */
export const OLD_WORKBOOK =
  'an old binary workbook (.xls BIFF or .xlsb) is not read: save it as .xlsx or CSV (no well-kept library for that format was found)';

/** Largest XML part of a workbook unpacked, in bytes. */
export const SHEET_XML_MAX = 512 * 1024 * 1024;

/** The options a workbook is read with. */
export interface SheetReadOptions extends RowTableOptions {
  /** The sheet to read by name (exact, else case-insensitive); `null`: the first. */
  readonly sheet: string | null;
}

/** True when `b` is a ZIP archive naming `xl/workbook.xml` (a workbook, by the names in its headers). */
export function looksLikeXlsx(b: Uint8Array): boolean {
  if (!looksLikeZip(b)) return false;
  return Buffer.from(b.buffer, b.byteOffset, b.byteLength).includes('xl/workbook.xml', 0, 'latin1');
}

function localName(tag: string): string {
  const i = tag.indexOf(':');
  return i === -1 ? tag : tag.slice(i + 1);
}

function attr(attrs: Record<string, string>, name: string): string | undefined {
  if (attrs[name] !== undefined) return attrs[name];
  for (const k of Object.keys(attrs)) if (localName(k) === name) return attrs[k];
  return undefined;
}

/** Calls `open`, `text`, `close` for each element of an XML document (names without their prefix). */
function walkXml(
  xml: string,
  on: { open?(name: string, attrs: Record<string, string>): void; text?(t: string): void; close?(name: string): void },
): void {
  const p = new Parser(
    {
      onopentag: (n, a) => on.open?.(localName(n), a),
      ontext: (t) => on.text?.(t),
      onclosetag: (n) => on.close?.(localName(n)),
    },
    { xmlMode: true, decodeEntities: true },
  );
  p.write(xml);
  p.end();
}

/** The part a relationship target names, relative to `base` (a folder inside the archive, with a trailing slash). */
function resolveTarget(base: string, target: string): string {
  if (target.startsWith('/')) return target.slice(1);
  const parts = (base + target).split('/');
  const out: string[] = [];
  for (const s of parts) {
    if (s === '..') out.pop();
    else if (s !== '.' && s !== '') out.push(s);
  }
  return out.join('/');
}

/** Column index (0-based) of a cell reference such as `AB12`, or -1. */
export function columnOf(ref: string): number {
  let n = 0;
  let i = 0;
  for (; i < ref.length; i++) {
    const c = ref.charCodeAt(i);
    if (c >= 65 && c <= 90) n = n * 26 + (c - 64);
    else if (c >= 97 && c <= 122) n = n * 26 + (c - 96);
    else break;
  }
  return i === 0 ? -1 : n - 1;
}

/** Built-in number formats that show dates or times (ECMA-376 §18.8.30, from memory; 27–36 and 50–58 are East Asian date formats). */
const DATE_FORMAT_IDS = new Set([14, 15, 16, 17, 18, 19, 20, 21, 22, 27, 28, 29, 30, 31, 32, 33, 34, 35, 36, 45, 46, 47, 50, 51, 52, 53, 54, 55, 56, 57, 58]);

/** True when a custom format code shows a date or time: it has y, m, d, h or s outside quotes, escapes and brackets (colour/condition). */
export function isDateFormatCode(code: string): boolean {
  const bare = code.replace(/"[^"]*"/g, '').replace(/\\./g, '').replace(/\[[^\]]*\]/g, '');
  return /[ymdhs]/i.test(bare) && !/^[#0.,%\s]*$/.test(bare);
}

function pad(n: number, w = 2): string {
  return String(n).padStart(w, '0');
}

/**
 * A date serial number as text: whole days as `YYYY-MM-DD`, a fraction
 * below one day as `HH:MM:SS`, both as `YYYY-MM-DD HH:MM:SS` (rounded to the
 * second). The 1900 system counts 1900-02-29 (serial 60) as spreadsheets
 * have always done (common practice): serials from 61 on are days after
 * 1899-12-30, those below after 1899-12-31.
 */
export function serialToText(serial: number, date1904: boolean): string {
  const secondsAll = Math.round(serial * 86400);
  let days = Math.floor(secondsAll / 86400);
  const secs = secondsAll - days * 86400;
  const time = `${pad(Math.floor(secs / 3600))}:${pad(Math.floor((secs % 3600) / 60))}:${pad(secs % 60)}`;
  if (days === 0 && !date1904) return time;
  let epoch: number;
  if (date1904) epoch = Date.UTC(1904, 0, 1);
  else if (days >= 61) epoch = Date.UTC(1899, 11, 30);
  else {
    epoch = Date.UTC(1899, 11, 31);
    if (days === 60) days = 59; // 1900-02-29 does not exist; shown as 1900-02-28
  }
  const d = new Date(epoch + days * 86400000);
  const date = `${pad(d.getUTCFullYear(), 4)}-${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())}`;
  return secs === 0 ? date : `${date} ${time}`;
}

class Workbook {
  private readonly byName = new Map<string, ZipEntry>();

  constructor(private readonly buf: Buffer) {
    let entries: ZipEntry[];
    try {
      entries = zipEntries(buf);
    } catch (err) {
      throw new InputSkip(`not a workbook: damaged zip archive (${oneLine(err)})`);
    }
    for (const e of entries) this.byName.set(e.name, e);
  }

  has(name: string): boolean {
    return this.byName.has(name);
  }

  /** The part's text, or `null` when the archive has no such part. */
  part(name: string): string | null {
    const e = this.byName.get(name);
    if (e === undefined) return null;
    if (e.encrypted) throw new InputSkip('encrypted workbook (password needed)');
    if (e.size > SHEET_XML_MAX) throw new InputSkip(`workbook too large: ${name} unpacks to ${e.size} bytes (limit ${SHEET_XML_MAX})`);
    try {
      return zipRead(this.buf, e, SHEET_XML_MAX).toString('utf8');
    } catch (err) {
      throw new InputSkip(`broken workbook: ${oneLine(err)}`);
    }
  }
}

interface SheetRef {
  readonly name: string;
  readonly part: string;
}

function sheetsOf(book: Workbook): { sheets: SheetRef[]; date1904: boolean; strings: string | null; styles: string | null } {
  const wb = book.part('xl/workbook.xml');
  if (wb === null) throw new InputSkip('not a workbook: a zip archive without xl/workbook.xml');
  const rels = new Map<string, { target: string; type: string }>();
  walkXml(book.part('xl/_rels/workbook.xml.rels') ?? '', {
    open(n, a) {
      if (n === 'Relationship' && a.Id !== undefined && a.Target !== undefined) rels.set(a.Id, { target: resolveTarget('xl/', a.Target), type: a.Type ?? '' });
    },
  });
  const listed: { name: string; rid: string }[] = [];
  let date1904 = false;
  walkXml(wb, {
    open(n, a) {
      if (n === 'sheet') listed.push({ name: attr(a, 'name') ?? '', rid: a['r:id'] ?? attr(a, 'id') ?? '' });
      if (n === 'workbookPr') {
        const v = attr(a, 'date1904');
        date1904 = v === '1' || v === 'true';
      }
    },
  });
  const sheets: SheetRef[] = [];
  for (const s of listed) {
    const r = rels.get(s.rid);
    if (r !== undefined && /\/worksheet$/.test(r.type)) sheets.push({ name: s.name, part: r.target });
  }
  let strings: string | null = null;
  let styles: string | null = null;
  for (const r of rels.values()) {
    if (/\/sharedStrings$/.test(r.type)) strings = r.target;
    if (/\/styles$/.test(r.type)) styles = r.target;
  }
  strings ??= book.has('xl/sharedStrings.xml') ? 'xl/sharedStrings.xml' : null;
  styles ??= book.has('xl/styles.xml') ? 'xl/styles.xml' : null;
  return { sheets, date1904, strings, styles };
}

/** The shared string table: each `<si>`'s text (its `<t>` runs joined; phonetic `<rPh>` runs left out). */
export function sharedStrings(xml: string): string[] {
  const out: string[] = [];
  let cur: string[] | null = null;
  let inT = 0;
  let inPh = 0;
  walkXml(xml, {
    open(n) {
      if (n === 'si') cur = [];
      else if (n === 't') inT++;
      else if (n === 'rPh') inPh++;
    },
    text(t) {
      if (cur !== null && inT > 0 && inPh === 0) cur.push(t);
    },
    close(n) {
      if (n === 'si') {
        out.push((cur ?? []).join(''));
        cur = null;
      } else if (n === 't') inT--;
      else if (n === 'rPh') inPh--;
    },
  });
  return out;
}

/** For each cell format (`cellXfs` index), whether it shows a date or time. */
function dateStyles(xml: string): boolean[] {
  const custom = new Map<number, string>();
  const out: boolean[] = [];
  let inXfs = 0;
  walkXml(xml, {
    open(n, a) {
      if (n === 'numFmt' && a.numFmtId !== undefined) custom.set(Number(a.numFmtId), a.formatCode ?? '');
      else if (n === 'cellXfs') inXfs++;
      else if (n === 'xf' && inXfs > 0) {
        const id = Number(a.numFmtId ?? '0');
        const code = custom.get(id);
        out.push(code !== undefined ? isDateFormatCode(code) : DATE_FORMAT_IDS.has(id));
      }
    },
    close(n) {
      if (n === 'cellXfs') inXfs--;
    },
  });
  return out;
}

/** A number cell's value as text: a date or time when its format shows one, else the number as JavaScript writes it. */
function numberText(v: string, isDate: boolean, date1904: boolean): string {
  const x = Number(v);
  if (v.trim() === '' || !Number.isFinite(x)) return v;
  return isDate && x >= 0 ? serialToText(x, date1904) : String(x);
}

/** A sheet's rows: each row's cells (by column), with its row number; rows with no non-empty cell left out. */
function sheetRows(
  xml: string,
  strings: readonly string[],
  dates: readonly boolean[],
  date1904: boolean,
): { rows: string[][]; numbers: number[] } {
  const rows: string[][] = [];
  const numbers: number[] = [];
  let row: string[] | null = null;
  let rowNo = 0;
  let col = -1;
  let type = 'n';
  let style = 0;
  let value: string[] = [];
  let inV = 0;
  let inIs = 0;
  let inT = 0;
  let inPh = 0;
  walkXml(xml, {
    open(n, a) {
      if (n === 'row') {
        row = [];
        const r = Number(a.r);
        rowNo = Number.isSafeInteger(r) && r > 0 ? r : rowNo + 1;
        col = -1;
      } else if (n === 'c' && row !== null) {
        const ref = a.r;
        const c = ref === undefined ? -1 : columnOf(ref);
        col = c >= 0 ? c : col + 1;
        type = a.t ?? 'n';
        style = Number(a.s ?? '0');
        value = [];
      } else if (n === 'v') inV++;
      else if (n === 'is') inIs++;
      else if (n === 't') inT++;
      else if (n === 'rPh') inPh++;
    },
    text(t) {
      if (inV > 0 || (inIs > 0 && inT > 0 && inPh === 0)) value.push(t);
    },
    close(n) {
      if (n === 'v') inV--;
      else if (n === 'is') inIs--;
      else if (n === 't') inT--;
      else if (n === 'rPh') inPh--;
      else if (n === 'c' && row !== null) {
        const raw = value.join('');
        let cell: string;
        if (type === 's') cell = strings[Number(raw)] ?? '';
        else if (type === 'b') cell = raw === '1' ? 'TRUE' : raw === '0' ? 'FALSE' : raw;
        else if (type === 'n') cell = numberText(raw, dates[style] ?? false, date1904);
        else cell = raw; // inlineStr, str, e (an error such as #N/A), d (an ISO 8601 date)
        while (row.length < col) row.push('');
        row[col] = cell;
      } else if (n === 'row' && row !== null) {
        if (row.some((c) => c.trim() !== '')) {
          rows.push(row);
          numbers.push(rowNo);
        }
        row = null;
      }
    },
  });
  return { rows, numbers };
}

/**
 * Reads a workbook's sheet (`options.sheet`, else the first) as a row
 * export named `name`. Throws {@link InputSkip} for what is not a readable
 * workbook (old binary, encrypted, damaged, no sheet) and `UsageError` for a
 * sheet name the workbook lacks or a named column the header lacks.
 */
export function readXlsx(buf: Buffer, name: string, options: SheetReadOptions): ExportRead {
  if (looksLikeOle(buf)) {
    throw new InputSkip('an old binary workbook (.xls BIFF) or a password-protected one (an OLE compound file): save it as .xlsx without a password, or as CSV');
  }
  if (!looksLikeZip(buf)) throw new InputSkip('not a workbook: not a zip archive');
  const book = new Workbook(buf);
  const { sheets, date1904, strings, styles } = sheetsOf(book);
  if (sheets.length === 0) throw new InputSkip('not a workbook: xl/workbook.xml lists no worksheet');
  let sheet = sheets[0] as SheetRef;
  const warnings: string[] = [];
  if (options.sheet !== null) {
    const wanted = options.sheet;
    const found = sheets.find((s) => s.name === wanted) ?? sheets.find((s) => s.name.toLowerCase() === wanted.toLowerCase());
    if (found === undefined) {
      throw new UsageError(`${name} has no sheet ${show(wanted)} for --sheet; its sheets are: ${listNames(sheets.map((s) => s.name))}`, 'sheet');
    }
    sheet = found;
  } else if (sheets.length > 1) {
    warnings.push(`${name}: read its first sheet ${show(sheet.name)} of ${sheets.length} (the others: ${listNames(sheets.slice(1).map((s) => s.name))}; pick one with --sheet)`);
  }
  const xml = book.part(sheet.part);
  if (xml === null) throw new InputSkip(`broken workbook: the sheet ${show(sheet.name)} (${sheet.part}) is missing`);
  const stringsXml = strings === null ? null : book.part(strings);
  const stylesXml = styles === null ? null : book.part(styles);
  const table = sheetRows(xml, stringsXml === null ? [] : sharedStrings(stringsXml), stylesXml === null ? [] : dateStyles(stylesXml), date1904);
  const label = options.sheet !== null || sheets.length > 1 ? `${name} (sheet ${show(sheet.name)})` : name;
  if (table.rows.length === 0) return { docs: [], warnings: [...warnings, `${label} has no rows`] };
  let width = 0;
  for (const r of table.rows) width = Math.max(width, r.length);
  const header = table.rows[0] as string[];
  while (header.length < width) header.push('');
  const read = readRowTable(name, header, table.rows.slice(1), options, { lines: table.numbers.slice(1) });
  return { ...read, warnings: [...warnings, ...read.warnings] };
}
