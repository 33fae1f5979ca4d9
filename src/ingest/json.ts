/**
 * JSON Lines and JSON array exports. Nested objects are reached with dotted
 * paths (`ticket.body`), every element of an array with `[]` after its name
 * (`ticket.comments[].body`: the body of every comment, joined with blank
 * lines; `tags[]`: every tag); `fields` holds the top-level keys, every value that
 * is not a string written as JSON (`null` and missing values as `''`).
 * Object keys are read as own properties only, so keys such as `__proto__`
 * or `constructor` are ordinary columns.
 *
 * @module
 */
import type { Skipped } from '../types.js';
import { UsageError, show } from '../util/errors.js';
import { InputSkip } from './decode.js';
import { chooseColumns, RowCollector, type ExportColumns } from './table.js';
import type { CsvReadOptions, ExportRead } from './csv.js';
import { cslReferences, looksLikeCslJson, referenceRows } from './references.js';

/** The column options the JSON readers use (those of CSV minus the delimiter). */
export type JsonReadOptions = Omit<CsvReadOptions, 'delimiter'>;

/** Documents, warnings and the rows that were not objects or not JSON. */
export interface JsonRead extends ExportRead {
  readonly skipped: Skipped[];
}

/** A JSON object as parsed. */
export type JsonObject = Record<string, unknown>;

interface JsonRow {
  readonly obj: JsonObject;
  readonly row: number;
}

/** How deep nested objects are searched for dotted paths. */
const MAX_DEPTH = 8;

/**
 * Rows nested deeper than this (objects and arrays counted alike) are
 * skipped: writing their cells back as JSON (`JSON.stringify`) would
 * overflow the call stack. Real exports nest a handful of levels.
 */
export const MAX_NESTING = 256;

/** Reason a row nested past {@link MAX_NESTING} is skipped with. */
export const TOO_DEEP = `nested deeper than ${MAX_NESTING} levels`;

/** True when `v` nests objects or arrays deeper than `limit` levels (checked without recursion). */
export function nestedDeeper(v: unknown, limit: number = MAX_NESTING): boolean {
  const stack: unknown[] = [v];
  const depths: number[] = [1];
  while (stack.length > 0) {
    const x = stack.pop();
    const d = depths.pop() as number;
    if (typeof x !== 'object' || x === null) continue;
    if (d > limit) return true;
    const children = Array.isArray(x) ? x : Object.values(x as JsonObject);
    for (const c of children) {
      if (typeof c === 'object' && c !== null) {
        stack.push(c);
        depths.push(d + 1);
      }
    }
  }
  return false;
}

/** True for a JSON object (not null, not an array). */
export function isObject(v: unknown): v is JsonObject {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function own(obj: JsonObject, key: string): unknown {
  return Object.prototype.hasOwnProperty.call(obj, key) ? obj[key] : undefined;
}

/** A JSON value as a cell: strings as they are, `null`/missing as `''`, anything else as JSON. */
export function jsonCell(v: unknown): string {
  if (v === undefined || v === null) return '';
  if (typeof v === 'string') return v;
  return JSON.stringify(v) ?? '';
}

/** A step of a key path: an own key, or `null` for "every element of an array" (`[]` in the path). */
export type Step = string | null;

/**
 * Every key path of the rows added, in first-seen order, with the steps it
 * stands for: dotted paths into nested objects, `[]` for every element of an
 * array. The columns {@link chooseColumns} picks from.
 */
export class PathIndex {
  /** Each key path and its steps (an own key, or `null` for every element of an array). */
  readonly keys = new Map<string, readonly Step[]>();
  /** The top-level keys, in first-seen order (the `fields` of a row). */
  readonly top: string[] = [];
  private readonly topSeen = new Set<string>();
  private readonly leaves = new Set<string>();

  /** Adds one row's key paths. */
  add(obj: JsonObject): void {
    for (const k of Object.keys(obj)) {
      if (!this.topSeen.has(k)) {
        this.topSeen.add(k);
        this.top.push(k);
      }
    }
    this.walk(obj, '', [], 0);
  }

  private path(p: string, steps: readonly Step[]): readonly Step[] {
    let ks = this.keys.get(p);
    if (ks === undefined) {
      // First seen wins when two key paths read the same dotted ({"a.b": 1} and {"a": {"b": 1}}).
      ks = steps;
      this.keys.set(p, ks);
    }
    return ks;
  }

  private walk(obj: JsonObject, prefix: string, steps: readonly Step[], depth: number): void {
    for (const k of Object.keys(obj)) {
      const p = prefix === '' ? k : `${prefix}.${k}`;
      const ks = this.path(p, [...steps, k]);
      this.value(obj[k], p, ks, depth);
    }
  }

  private value(v: unknown, p: string, ks: readonly Step[], depth: number): void {
    if (isObject(v)) {
      if (depth + 1 < MAX_DEPTH) this.walk(v, p, ks, depth + 1);
      return;
    }
    this.leaves.add(p);
    if (Array.isArray(v) && v.length > 0 && depth + 1 < MAX_DEPTH) {
      // `p[]`: every element; its objects' keys are reached as `p[].key`.
      const each = `${p}[]`;
      const eks = this.path(each, [...ks, null]);
      let primitive = false;
      for (const el of v) {
        // Only objects and arrays are walked: an array of a million numbers costs a type check each.
        if (typeof el === 'object' && el !== null) this.value(el, each, eks, depth + 1);
        else primitive = true;
      }
      if (primitive) this.leaves.add(each);
    }
  }

  /** The names offered for text, id and title. */
  columns(): ExportColumns {
    const accepted = [...this.keys.keys()];
    return { accepted, listed: accepted.filter((p) => this.leaves.has(p)), top: this.top };
  }
}

/** The value at `steps`: one value, or (a path with `[]`) the list of every value reached (missing ones left out). */
function lookup(obj: JsonObject, steps: readonly Step[]): unknown {
  if (steps.includes(null)) {
    const out: unknown[] = [];
    gather(obj, steps, 0, out);
    return out;
  }
  let v: unknown = obj;
  for (const k of steps) {
    if (!isObject(v)) return undefined;
    v = own(v, k as string);
  }
  return v;
}

/** Pushes onto `out` every value reached from `v` by `steps[i…]` (recursion depth at most the path's length). */
function gather(v: unknown, steps: readonly Step[], i: number, out: unknown[]): void {
  if (i === steps.length) {
    if (v !== undefined) out.push(v);
    return;
  }
  const k = steps[i] as Step;
  if (k === null) {
    if (Array.isArray(v)) for (const el of v) gather(el, steps, i + 1, out);
  } else if (isObject(v)) {
    gather(own(v, k), steps, i + 1, out);
  }
}

/** A value as text parts: every element's cell for a path with `[]`, else the one cell. */
function cells(v: unknown, many: boolean): string[] {
  return many ? (v as unknown[]).map(jsonCell) : [jsonCell(v)];
}

/** The columns chosen from a {@link PathIndex}, as steps, and what `fields` holds: see {@link jsonColumns}. */
export interface JsonColumns {
  readonly textKeys: readonly (readonly Step[])[];
  readonly idKeys: readonly Step[] | null;
  readonly titleKeys: readonly Step[] | null;
  /** The top-level keys a row's `fields` hold. */
  readonly top: readonly string[];
  /** The id's key when it is a top-level key (left out of `fields`). */
  readonly idTop: string | null;
  /** The title column when it was guessed. */
  readonly titleColumn?: string;
}

/**
 * The text, id and title columns of a JSON export chosen from the key paths
 * of its rows ({@link chooseColumns}; throws its `UsageError` for a named
 * column no row has, and one for an id path with `[]`). Shared by the
 * whole-export readers and the streamed rows of `assign --stream`.
 */
export function jsonColumns(index: PathIndex, name: string, options: JsonReadOptions): JsonColumns {
  const chosen = chooseColumns(name, index.columns(), options);
  const keysOf = (p: string): readonly Step[] => index.keys.get(p) as readonly Step[];
  const idKeys = chosen.id === null ? null : keysOf(chosen.id);
  if (idKeys !== null && idKeys.includes(null)) {
    throw new UsageError(`--id takes one value per row; ${show(chosen.id)} names every element of an array`, 'id');
  }
  return {
    textKeys: chosen.text.map(keysOf),
    idKeys,
    titleKeys: chosen.title === null ? null : keysOf(chosen.title),
    top: index.top,
    idTop: idKeys !== null && idKeys.length === 1 ? (idKeys[0] as string) : null,
    ...(chosen.titleGuessed && chosen.title !== null ? { titleColumn: chosen.title } : {}),
  };
}

/**
 * Adds one JSON row (row `row`, 1-based) to `collector`: id, text parts and
 * title from the chosen paths, the top-level keys but the id's in `fields`.
 * The per-row step of the JSON readers and of `assign --stream`.
 */
export function addJsonRow(collector: RowCollector, cols: JsonColumns, obj: JsonObject, row: number): void {
  const { textKeys, idKeys, titleKeys, idTop } = cols;
  const fields = new Map<string, string>();
  for (const k of cols.top) if (k !== idTop) fields.set(k, jsonCell(own(obj, k)));
  const idValue = idKeys === null ? undefined : lookup(obj, idKeys);
  // A path with [] joins every element's value (blank lines between, as for several text columns); a title takes the first non-blank one.
  const title = titleKeys === null ? undefined : cells(lookup(obj, titleKeys), titleKeys.includes(null)).find((t) => t.trim() !== '') ?? '';
  collector.add(
    row,
    idValue === undefined || idValue === null ? undefined : jsonCell(idValue),
    textKeys.flatMap((ks) => cells(lookup(obj, ks), ks.includes(null))),
    title,
    fields,
  );
}

function buildDocs(rows: readonly JsonRow[], name: string, options: JsonReadOptions): { docs: ExportRead['docs']; warnings: string[]; titleColumn?: string } {
  const index = new PathIndex();
  for (const r of rows) index.add(r.obj);
  const cols = jsonColumns(index, name, options);
  const collector = new RowCollector(name, cols.idKeys === null);
  for (const { obj, row } of rows) addJsonRow(collector, cols, obj, row);
  const out = { docs: collector.docs, warnings: collector.warnings() };
  return cols.titleColumn !== undefined ? { ...out, titleColumn: cols.titleColumn } : out;
}

/**
 * Reads JSON Lines: one object per line; blank lines are ignored. A line
 * that is not valid JSON, or not an object, is skipped (source `name:line`)
 * and still takes its row number, so fixing it later does not renumber the
 * rows after it.
 */
export async function readJsonLines(chunks: AsyncIterable<string>, name: string, options: JsonReadOptions): Promise<JsonRead> {
  const rows: JsonRow[] = [];
  const skipped: Skipped[] = [];
  let carry = '';
  let lineNo = 0;
  let row = 0;
  const line = (raw: string): void => {
    lineNo++;
    const s = raw.endsWith('\r') ? raw.slice(0, -1) : raw;
    if (s.trim() === '') return;
    row++;
    let v: unknown;
    try {
      v = JSON.parse(s);
    } catch {
      skipped.push({ source: `${name}:${lineNo}`, reason: 'not valid JSON' });
      return;
    }
    if (!isObject(v)) {
      skipped.push({ source: `${name}:${lineNo}`, reason: `not a JSON object (${describe(v)})` });
      return;
    }
    if (nestedDeeper(v)) {
      skipped.push({ source: `${name}:${lineNo}`, reason: TOO_DEEP });
      return;
    }
    rows.push({ obj: v, row });
  };
  for await (const chunk of chunks) {
    const s = carry + chunk;
    let start = 0;
    for (let nl = s.indexOf('\n'); nl !== -1; nl = s.indexOf('\n', start)) {
      line(s.slice(start, nl));
      start = nl + 1;
    }
    carry = s.slice(start);
  }
  if (carry !== '') line(carry);
  const warnings: string[] = [];
  if (row === 0) {
    warnings.push(`${name} has no rows`);
    return { docs: [], warnings, skipped };
  }
  if (rows.length === 0) return { docs: [], warnings, skipped, rowsSeen: row };
  const built = buildDocs(rows, name, options);
  return { ...built, warnings: [...warnings, ...built.warnings], skipped, rowsSeen: row };
}

function describe(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'an array';
  if (typeof v === 'object') return 'an object';
  if (typeof v === 'boolean') return 'a boolean';
  return `a ${typeof v}`;
}

async function* once(s: string): AsyncGenerator<string, void, undefined> {
  yield s;
}

/**
 * Reads a JSON array of objects (rows numbered from 1; a CSL-JSON
 * reference list is read as references, see `references.ts`; an element that is
 * not an object is skipped as `name#row`). A file that starts with `{` and
 * is not one JSON value is read as JSON Lines, with a warning. Throws
 * {@link InputSkip} when the text is not JSON, not an array, or too large
 * for one string.
 */
export async function readJsonArray(chunks: AsyncIterable<string>, name: string, options: JsonReadOptions): Promise<JsonRead> {
  let text = '';
  try {
    for await (const chunk of chunks) text += chunk;
  } catch (err) {
    if (err instanceof RangeError) {
      throw new InputSkip('too large to read as one JSON array; write it as JSON Lines (one object per line)');
    }
    throw err;
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (err) {
    if (/^[\s\uFEFF]*\{/.test(text)) {
      const read = await readJsonLines(once(text), name, options);
      return { ...read, warnings: [`${name} is not one JSON value; read as JSON Lines (one object per line)`, ...read.warnings] };
    }
    const m = /at position (\d+)/.exec((err as Error).message);
    let where = '';
    if (m) {
      const before = text.slice(0, Number(m[1]));
      const lineStart = before.lastIndexOf('\n') + 1;
      where = ` (line ${before.split('\n').length}, column ${before.length - lineStart + 1})`;
    }
    throw new InputSkip(`not valid JSON${where}`);
  }
  if (!Array.isArray(value)) {
    throw new InputSkip(`not a JSON array of objects: it holds ${describe(value)}`);
  }
  // A CSL-JSON reference list (every item with type and id, some with author, issued or container-title).
  if (looksLikeCslJson(value)) return { ...referenceRows(name, cslReferences(value), [], options), skipped: [] };
  const rows: JsonRow[] = [];
  const skipped: Skipped[] = [];
  value.forEach((v: unknown, i) => {
    if (isObject(v) && nestedDeeper(v)) skipped.push({ source: `${name}#${i + 1}`, reason: TOO_DEEP });
    else if (isObject(v)) rows.push({ obj: v, row: i + 1 });
    else skipped.push({ source: `${name}#${i + 1}`, reason: `not a JSON object (${describe(v)})` });
  });
  if (value.length === 0) return { docs: [], warnings: [`${name} has no rows`], skipped };
  if (rows.length === 0) return { docs: [], warnings: [], skipped, rowsSeen: value.length };
  const built = buildDocs(rows, name, options);
  return { ...built, skipped, rowsSeen: value.length };
}
