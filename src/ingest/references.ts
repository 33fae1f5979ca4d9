/**
 * Reference lists from reference managers read as row exports: BibTeX
 * (`.bib`), RIS (`.ris`) and CSL-JSON (a `.json` array of CSL items). Each
 * reference becomes a row with the columns {@link REFERENCE_COLUMNS}; the
 * text is the title, abstract and keywords by default, the id the citation
 * key (BibTeX), `ID` (RIS) or `id` (CSL-JSON), the title the title.
 *
 * Formats as their published descriptions give them (from memory):
 * - BibTeX: Lamport, *LaTeX: A Document Preparation System* (2nd ed.),
 *   Appendix B, and Patashnik, *BibTeXing* (btxdoc): `@type{key, field =
 *   value, …}` (or parentheses), values in braces, in double quotes, a
 *   number, or a `@string` abbreviation, joined with `#`; names joined with
 *   `and`; `@comment` and `@preamble` carry no reference.
 * - RIS: the RIS format specification (Research Information Systems): one
 *   tag a line, `XY  - value` (two characters, two spaces, a hyphen, a
 *   space), a reference from `TY` to `ER`; repeatable tags (`AU`, `KW`).
 * - CSL-JSON: the CSL data schema (csl-data.json): items with `id`, `type`,
 *   `title`, `abstract`, `keyword`, `author` (`family`, `given` or
 *   `literal`), `issued` (`date-parts`, `raw` or `literal`),
 *   `container-title`, `DOI`.
 *
 * @module
 */
import type { ExportRead } from './csv.js';
import { readRowTable, type RowTableOptions } from './rows.js';

/** The columns of a reference row, in order. */
export const REFERENCE_COLUMNS: readonly string[] = Object.freeze(['key', 'type', 'title', 'authors', 'year', 'container', 'doi', 'abstract', 'keywords']);

/** The text columns used when `text` is not given: title, abstract and keywords. */
export const REFERENCE_TEXT: readonly string[] = Object.freeze(['title', 'abstract', 'keywords']);

/** One reference, as the row's cells. */
export interface Reference {
  key: string;
  type: string;
  title: string;
  /** Names joined with `; `. */
  authors: string;
  year: string;
  /** Journal, book or proceedings it appeared in. */
  container: string;
  doi: string;
  abstract: string;
  /** Keywords joined with `; `. */
  keywords: string;
}

function emptyReference(): Reference {
  return { key: '', type: '', title: '', authors: '', year: '', container: '', doi: '', abstract: '', keywords: '' };
}

/** Reads references as a row export named `name` (see {@link REFERENCE_COLUMNS}); `problems` become warnings. */
export function referenceRows(name: string, refs: readonly Reference[], problems: readonly string[], options: RowTableOptions): ExportRead {
  const rows = refs.map((r) => REFERENCE_COLUMNS.map((c) => r[c as keyof Reference]));
  const read = readRowTable(name, REFERENCE_COLUMNS, rows, { text: options.text, id: options.id ?? (refs.some((r) => r.key !== '') ? 'key' : null), title: options.title ?? 'title' }, { defaultText: REFERENCE_TEXT });
  const warnings = problems.map((p) => `${name}: ${p}`);
  if (refs.length === 0) return { docs: [], warnings: [...warnings, `${name} has no references`] };
  return { ...read, warnings: [...warnings, ...read.warnings] };
}

function squash(s: string): string {
  return s.replace(/\s+/g, ' ').trim();
}

// ---------------------------------------------------------------- BibTeX

const MONTHS = ['jan', 'feb', 'mar', 'apr', 'may', 'jun', 'jul', 'aug', 'sep', 'oct', 'nov', 'dec'];
const MONTH_NAMES = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

/** Combining marks for the accent commands of plain TeX (`\'e` é, `\"o` ö…). */
const ACCENTS: Readonly<Record<string, string>> = {
  "'": '\u0301', '`': '\u0300', '^': '\u0302', '"': '\u0308', '~': '\u0303', '=': '\u0304', '.': '\u0307',
  u: '\u0306', v: '\u030c', H: '\u030b', c: '\u0327', k: '\u0328', r: '\u030a',
};
/** Letters written as commands (`\ss` ß, `\o` ø…). */
const LETTERS: Readonly<Record<string, string>> = {
  ss: 'ß', o: 'ø', O: 'Ø', ae: 'æ', AE: 'Æ', oe: 'œ', OE: 'Œ', aa: 'å', AA: 'Å', l: 'ł', L: 'Ł', i: 'ı', j: 'ȷ',
  '&': '&', '%': '%', $: '$', '#': '#', _: '_', '{': '{', '}': '}',
};

/** A BibTeX value as plain text: accent and letter commands to characters, braces dropped, `~` a space, `--` a dash, white space squashed. */
export function bibtexText(v: string): string {
  let s = v.replace(/\\([`'^"~=.])\s*(?:\{\s*(\\?[A-Za-z])\s*\}|(\\?[A-Za-z]))/g, (_m, acc: string, a?: string, b?: string) => {
    const letter = (a ?? b ?? '').replace(/^\\([ij])$/, '$1');
    return (letter + (ACCENTS[acc] ?? '')).normalize('NFC');
  });
  s = s.replace(/\\([uvHckr])\s*(?:\{\s*(\\?[A-Za-z])\s*\}|\s([A-Za-z]))/g, (_m, acc: string, a?: string, b?: string) => {
    const letter = (a ?? b ?? '').replace(/^\\([ij])$/, '$1');
    return (letter + (ACCENTS[acc] ?? '')).normalize('NFC');
  });
  s = s.replace(/\\(ss|ae|AE|oe|OE|aa|AA|[oOlLij])(?![A-Za-z])\s?|\\([&%$#_{}])/g, (m, w?: string, p?: string) => LETTERS[(w ?? p) as string] ?? m);
  s = s.replace(/(?<!\\)[{}]/g, '').replace(/(?<!\\)~/g, ' ').replace(/---/g, '—').replace(/--/g, '–');
  return squash(s);
}

/** Names joined with `and` (at brace depth 0), each as written, joined with `; `. */
export function bibtexNames(v: string): string {
  const parts: string[] = [];
  let depth = 0;
  let start = 0;
  for (let i = 0; i < v.length; i++) {
    const c = v[i];
    if (c === '{') depth++;
    else if (c === '}') depth--;
    else if (depth === 0 && /\s/.test(c as string)) {
      const m = /^\s+and\s+/i.exec(v.slice(i));
      if (m) {
        parts.push(v.slice(start, i));
        i += m[0].length - 1;
        start = i + 1;
      }
    }
  }
  parts.push(v.slice(start));
  return parts.map(bibtexText).filter((p) => p !== '').join('; ');
}

class BibScanner {
  i = 0;
  constructor(readonly s: string) {}

  private counted = 0;
  private lines = 1;

  /** The line (1-based) the scanner is on; counted onwards from the last call, as the scanner only moves forward. */
  line(): number {
    const to = Math.min(this.i, this.s.length);
    for (let k = this.counted; k < to; k++) if (this.s.charCodeAt(k) === 10) this.lines++;
    this.counted = Math.max(this.counted, to);
    return this.lines;
  }

  space(): void {
    while (this.i < this.s.length && /\s/.test(this.s[this.i] as string)) this.i++;
  }

  word(): string {
    this.space();
    const m = /^[^\s"#%'(),={}]+/.exec(this.s.slice(this.i, this.i + 256));
    if (!m) return '';
    this.i += m[0].length;
    return m[0];
  }

  /** A braced group's inside (the scanner on its opening brace); throws when it never closes. */
  braced(): string {
    let depth = 0;
    const start = this.i + 1;
    for (; this.i < this.s.length; this.i++) {
      const c = this.s[this.i];
      if (c === '\\') this.i++;
      else if (c === '{') depth++;
      else if (c === '}' && --depth === 0) {
        this.i++;
        return this.s.slice(start, this.i - 1);
      }
    }
    throw new Error('a brace is never closed');
  }

  /** A quoted value's inside (braces inside may hold quotes). */
  quoted(): string {
    let depth = 0;
    const start = ++this.i;
    for (; this.i < this.s.length; this.i++) {
      const c = this.s[this.i];
      if (c === '\\') this.i++;
      else if (c === '{') depth++;
      else if (c === '}') depth--;
      else if (c === '"' && depth === 0) {
        this.i++;
        return this.s.slice(start, this.i - 1);
      }
    }
    throw new Error('a quote is never closed');
  }

  /** A field value: pieces joined with `#`; abbreviations looked up in `strings` (lower case). */
  value(strings: ReadonlyMap<string, string>): string {
    let out = '';
    for (;;) {
      this.space();
      const c = this.s[this.i];
      if (c === '{') out += this.braced();
      else if (c === '"') out += this.quoted();
      else {
        const w = this.word();
        if (w === '') throw new Error('a field has no value');
        out += /^\d+$/.test(w) ? w : (strings.get(w.toLowerCase()) ?? w);
      }
      this.space();
      if (this.s[this.i] !== '#') return out;
      this.i++;
    }
  }
}

/**
 * Parses BibTeX. Entries with a damaged body are left out and named in
 * `problems` (with their line); text outside entries is a comment.
 */
export function parseBibtex(text: string): { refs: Reference[]; problems: string[] } {
  const refs: Reference[] = [];
  const problems: string[] = [];
  const strings = new Map<string, string>(MONTHS.map((m, k) => [m, MONTH_NAMES[k] as string]));
  const sc = new BibScanner(text);
  for (;;) {
    const at = text.indexOf('@', sc.i);
    if (at === -1) break;
    sc.i = at + 1;
    const type = sc.word().toLowerCase();
    sc.space();
    const open = text[sc.i];
    if (type === '' || (open !== '{' && open !== '(')) continue;
    const close = open === '{' ? '}' : ')';
    const startLine = sc.line();
    if (type === 'comment') {
      if (open === '{') {
        try {
          sc.braced();
        } catch {
          break;
        }
      }
      continue;
    }
    sc.i++;
    try {
      if (type === 'preamble') {
        sc.value(strings);
        sc.space();
        if (text[sc.i] === close) sc.i++;
        continue;
      }
      if (type === 'string') {
        const name = sc.word().toLowerCase();
        sc.space();
        if (text[sc.i] !== '=') throw new Error('@string without =');
        sc.i++;
        strings.set(name, sc.value(strings));
        sc.space();
        if (text[sc.i] === close) sc.i++;
        continue;
      }
      const ref = emptyReference();
      ref.type = type;
      sc.space();
      const keyMatch = /^[^,\s}]*/.exec(text.slice(sc.i, sc.i + 1024)) as RegExpExecArray;
      ref.key = keyMatch[0];
      sc.i += keyMatch[0].length;
      const fields = new Map<string, string>();
      for (;;) {
        sc.space();
        if (text[sc.i] === ',') sc.i++;
        sc.space();
        if (text[sc.i] === close) {
          sc.i++;
          break;
        }
        if (sc.i >= text.length) throw new Error('the entry never closes');
        const field = sc.word().toLowerCase();
        sc.space();
        if (field === '' || text[sc.i] !== '=') throw new Error(`expected "field = value" near ${JSON.stringify(text.slice(sc.i, sc.i + 20))}`);
        sc.i++;
        fields.set(field, sc.value(strings));
      }
      ref.title = bibtexText(fields.get('title') ?? '');
      ref.authors = bibtexNames(fields.get('author') ?? fields.get('editor') ?? '');
      ref.year = bibtexText(fields.get('year') ?? (/^\s*(\d{4})/.exec(fields.get('date') ?? '')?.[1] ?? ''));
      ref.container = bibtexText(fields.get('journal') ?? fields.get('journaltitle') ?? fields.get('booktitle') ?? fields.get('publisher') ?? '');
      ref.doi = bibtexText(fields.get('doi') ?? '');
      ref.abstract = bibtexText(fields.get('abstract') ?? '');
      ref.keywords = (fields.get('keywords') ?? '')
        .split(/[;,]/)
        .map(bibtexText)
        .filter((k) => k !== '')
        .join('; ');
      refs.push(ref);
    } catch (err) {
      problems.push(`the @${type} entry on line ${startLine} cannot be read (${(err as Error).message}); left out`);
    }
  }
  return { refs, problems };
}

// ---------------------------------------------------------------- RIS

const RIS_LINE = /^([A-Z][A-Z0-9])  -(?: (.*))?$/;

/**
 * Parses RIS. A line without a tag continues the value before it; a `TY`
 * opens a reference, `ER` closes it; a reference still open at the end is
 * kept (with a problem noted).
 */
export function parseRis(text: string): { refs: Reference[]; problems: string[] } {
  const refs: Reference[] = [];
  const problems: string[] = [];
  let tags: Map<string, string[]> | null = null;
  let last: string[] | null = null;
  let openedOn = 0;
  const finish = (): void => {
    if (tags === null) return;
    const one = (...names: string[]): string => {
      for (const n of names) {
        const v = tags?.get(n)?.find((x) => x.trim() !== '');
        if (v !== undefined) return squash(v);
      }
      return '';
    };
    const all = (...names: string[]): string[] => names.flatMap((n) => tags?.get(n) ?? []).map(squash).filter((x) => x !== '');
    const ref = emptyReference();
    ref.type = one('TY');
    ref.key = one('ID');
    ref.title = one('TI', 'T1', 'CT');
    ref.authors = all('AU', 'A1').join('; ');
    ref.year = /^\s*(\d{4})/.exec(one('PY', 'Y1', 'DA'))?.[1] ?? '';
    ref.container = one('T2', 'JO', 'JF', 'JA', 'BT');
    ref.doi = one('DO');
    ref.abstract = one('AB', 'N2');
    ref.keywords = all('KW').flatMap((k) => k.split(/;/)).map(squash).filter((k) => k !== '').join('; ');
    refs.push(ref);
    tags = null;
    last = null;
  };
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  lines.forEach((raw, k) => {
    const line = raw.replace(/\s+$/, '');
    const m = RIS_LINE.exec(line);
    if (m) {
      const tag = m[1] as string;
      const value = m[2] ?? '';
      if (tag === 'TY') {
        if (tags !== null) problems.push(`the reference opened on line ${openedOn} has no ER line before the next TY`);
        finish();
        tags = new Map();
        openedOn = k + 1;
      }
      if (tag === 'ER') {
        finish();
        return;
      }
      if (tags === null) {
        problems.push(`line ${k + 1} (${tag}) is outside a reference (no TY before it); left out`);
        return;
      }
      const list = tags.get(tag) ?? [];
      list.push(value);
      tags.set(tag, list);
      last = list;
    } else if (line.trim() !== '' && last !== null) {
      const l = last as string[];
      l[l.length - 1] += ' ' + line.trim();
    }
  });
  if (tags !== null) {
    problems.push(`the reference opened on line ${openedOn} has no ER line at the end`);
    finish();
  }
  return { refs, problems };
}

// ---------------------------------------------------------------- CSL-JSON

type Obj = Record<string, unknown>;

function isObj(v: unknown): v is Obj {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function ownValue(o: Obj, k: string): unknown {
  return Object.prototype.hasOwnProperty.call(o, k) ? o[k] : undefined;
}

function str(v: unknown): string {
  return typeof v === 'string' ? squash(v) : typeof v === 'number' ? String(v) : '';
}

/**
 * True when a parsed JSON array is a CSL-JSON item list: every element an
 * object with a string `type` and a string or number `id`, and some element
 * with `author`, `issued` or `container-title`.
 */
export function looksLikeCslJson(v: unknown): v is Obj[] {
  if (!Array.isArray(v) || v.length === 0) return false;
  let marked = false;
  for (const x of v) {
    if (!isObj(x)) return false;
    const id = ownValue(x, 'id');
    if (typeof ownValue(x, 'type') !== 'string' || (typeof id !== 'string' && typeof id !== 'number')) return false;
    if (ownValue(x, 'author') !== undefined || ownValue(x, 'issued') !== undefined || ownValue(x, 'container-title') !== undefined) marked = true;
  }
  return marked;
}

function cslName(n: unknown): string {
  if (!isObj(n)) return '';
  const literal = str(ownValue(n, 'literal'));
  if (literal !== '') return literal;
  const family = [str(ownValue(n, 'non-dropping-particle')), str(ownValue(n, 'family'))].filter((x) => x !== '').join(' ');
  const given = str(ownValue(n, 'given'));
  return family !== '' && given !== '' ? `${family}, ${given}` : family || given;
}

function cslYear(d: unknown): string {
  if (!isObj(d)) return '';
  const parts = ownValue(d, 'date-parts');
  if (Array.isArray(parts) && Array.isArray(parts[0]) && parts[0].length > 0) {
    const y = parts[0][0];
    if (typeof y === 'number' || (typeof y === 'string' && /^-?\d+$/.test(y))) return String(y);
  }
  return /(\d{4})/.exec(str(ownValue(d, 'raw')) || str(ownValue(d, 'literal')))?.[1] ?? '';
}

/** CSL-JSON items as references. */
export function cslReferences(items: readonly Obj[]): Reference[] {
  return items.map((x) => {
    const ref = emptyReference();
    ref.key = str(ownValue(x, 'id'));
    ref.type = str(ownValue(x, 'type'));
    ref.title = str(ownValue(x, 'title'));
    const authors = ownValue(x, 'author');
    ref.authors = Array.isArray(authors) ? authors.map(cslName).filter((a) => a !== '').join('; ') : '';
    ref.year = cslYear(ownValue(x, 'issued'));
    ref.container = str(ownValue(x, 'container-title'));
    ref.doi = str(ownValue(x, 'DOI'));
    ref.abstract = str(ownValue(x, 'abstract'));
    ref.keywords = str(ownValue(x, 'keyword'))
      .split(/[;,]/)
      .map(squash)
      .filter((k) => k !== '')
      .join('; ');
    return ref;
  });
}
