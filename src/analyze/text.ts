/**
 * Character-level stages: Unicode normalisation, case folding and the
 * tokeniser.
 *
 * Tokenisation policy (sheaf's own choice):
 * - A token is a maximal run of letters, marks and numbers
 *   (`[\p{L}\p{M}\p{N}]+`), so punctuation, symbols, spaces, `_`, `.`,
 *   `/`, `@` and hyphens all separate tokens: `lighthouse-keeper` gives
 *   `lighthouse`, `keeper`; `v2.3` gives `v2`, `3`.
 * - An apostrophe (`'` or `’`) between two such characters stays inside the
 *   token and is written `'`: `don't`, `o'neill`, `м'ясо`. The analyzer
 *   then applies the language's apostrophe rules (English drops a trailing
 *   possessive `'s`; French, Italian and Catalan drop a leading elided
 *   article such as `l'`).
 * - Runs of scripts written without spaces between words (Han, Hiragana,
 *   Katakana, Thai, Lao, Khmer, Myanmar) are split into words by
 *   `Intl.Segmenter` (ICU's dictionaries, so results may change with the
 *   Node/ICU version). The segmenter is only ever given those runs.
 *
 * @module
 */

const FOLD_RE = /[ßς]/;
const FOLD_RE_G = /[ßς]/g;
const FOLDS: ReadonlyMap<string, string> = new Map([
  ['ß', 'ss'],
  ['ς', 'σ'],
]);

/**
 * Unicode NFKC (compatibility composition: `ﬁ` -> `fi`, full-width
 * `Ａ` -> `A`), then lower case, then the two full case foldings that
 * lower-casing misses for common text: `ß` -> `ss` and final `ς` -> `σ`.
 */
export function normalizeText(text: string): string {
  let s = text.normalize('NFKC').toLowerCase();
  if (FOLD_RE.test(s)) s = s.replace(FOLD_RE_G, (ch) => FOLDS.get(ch) ?? ch);
  return s;
}

/**
 * Normalises one word the way the analyzer normalises tokens before
 * comparing them with stop words: {@link normalizeText}, apostrophe `’`
 * written `'`, surrounding white space trimmed.
 */
export function normalizeTerm(word: string): string {
  let s = normalizeText(word).trim();
  if (s.includes('’')) s = s.replaceAll('’', "'");
  return s;
}

/**
 * Reference definition of a token (the scanner below is the fast
 * equivalent; the tests compare the two).
 */
export const TOKEN_RE = /[\p{L}\p{M}\p{N}]+(?:['’][\p{L}\p{M}\p{N}]+)*/gu;

const WORD_CHAR_RE = /^[\p{L}\p{M}\p{N}]$/u;

const NO_SPACE_CLASS =
  '\\p{scx=Han}\\p{scx=Hiragana}\\p{scx=Katakana}\\p{scx=Thai}\\p{scx=Lao}\\p{scx=Khmer}\\p{scx=Myanmar}';

/** Any character of a script written without spaces between words. */
export const NO_SPACE_RE = new RegExp(`[${NO_SPACE_CLASS}]`, 'u');

/** Runs of such characters, for splitting a token (global: reset `lastIndex` before use). */
const NO_SPACE_RUN_RE = new RegExp(`[${NO_SPACE_CLASS}]+`, 'gu');

/** Token flag: some character is a letter, mark or number (always set). */
export const WORD = 1;
/** Token flag: some character belongs to a no-space script. */
export const NO_SPACE = 2;
/** Character class bit: the character is a number (`\p{N}`). */
export const NUMERIC = 4;
/** Token flag: the token contains an apostrophe. */
export const APOSTROPHE = 8;

/** Class bits of each BMP code unit (0 = separator). Built on first use. */
let bmpClass: Uint8Array | null = null;
/** Class bits of astral code points seen so far. */
const astralClass = new Map<number, number>();

const NUMERIC_CHAR_RE = /^\p{N}$/u;

function classify(ch: string): number {
  if (!WORD_CHAR_RE.test(ch)) return 0;
  let k = WORD;
  if (NO_SPACE_RE.test(ch)) k |= NO_SPACE;
  if (NUMERIC_CHAR_RE.test(ch)) k |= NUMERIC;
  return k;
}

function buildBmpClass(): Uint8Array {
  const table = new Uint8Array(0x10000);
  for (let c = 0; c < 0x10000; c++) {
    if (c >= 0xd800 && c <= 0xdfff) continue;
    table[c] = c < 0x80 ? classifyAscii(c) : classify(String.fromCharCode(c));
  }
  return table;
}

function classifyAscii(c: number): number {
  if (c >= 0x30 && c <= 0x39) return WORD | NUMERIC;
  if ((c >= 0x41 && c <= 0x5a) || (c >= 0x61 && c <= 0x7a)) return WORD;
  return 0;
}

function astral(cp: number): number {
  let k = astralClass.get(cp);
  if (k === undefined) {
    k = classify(String.fromCodePoint(cp));
    if (astralClass.size < 65536) astralClass.set(cp, k);
  }
  return k;
}

/**
 * Receives one token from {@link scanTokens}: the token, the OR of its
 * characters' class bits (plus {@link APOSTROPHE}), the AND of its
 * letter/number characters' bits, and its length in code points.
 */
export type TokenSink = (token: string, anyBits: number, allBits: number, codePoints: number) => void;

/**
 * Calls `emit` for every token of `s` in order: exactly the matches of
 * {@link TOKEN_RE}. A hand-written scanner over a code-unit class table,
 * several times faster than the Unicode regex; it also reports whether the
 * token needs the segmenter, is all digits, or holds an apostrophe, so the
 * later stages need not look at its characters again.
 */
export function scanTokens(s: string, emit: TokenSink): void {
  const table = (bmpClass ??= buildBmpClass());
  const n = s.length;
  let i = 0;
  while (i < n) {
    let c = s.charCodeAt(i);
    let k: number;
    let w = 1;
    if (c >= 0xd800 && c <= 0xdbff && i + 1 < n && isLow(s.charCodeAt(i + 1))) {
      k = astral(toCodePoint(c, s.charCodeAt(i + 1)));
      w = 2;
    } else {
      k = table[c]!;
    }
    if (k === 0) {
      i += w;
      continue;
    }
    const start = i;
    let any = k;
    let all = k;
    let count = 1;
    i += w;
    for (;;) {
      while (i < n) {
        c = s.charCodeAt(i);
        if (c >= 0xd800 && c <= 0xdbff && i + 1 < n && isLow(s.charCodeAt(i + 1))) {
          k = astral(toCodePoint(c, s.charCodeAt(i + 1)));
          if (k === 0) break;
          i += 2;
        } else {
          k = table[c]!;
          if (k === 0) break;
          i++;
        }
        any |= k;
        all &= k;
        count++;
      }
      // An apostrophe continues the token only when a letter/mark/number follows.
      if (i + 1 < n && (c === 0x27 || c === 0x2019)) {
        const d = s.charCodeAt(i + 1);
        if (d >= 0xd800 && d <= 0xdbff && i + 2 < n && isLow(s.charCodeAt(i + 2))) {
          k = astral(toCodePoint(d, s.charCodeAt(i + 2)));
          w = 2;
        } else {
          k = table[d]!;
          w = 1;
        }
        if (k !== 0) {
          any |= k | APOSTROPHE;
          all &= k;
          count += 2;
          i += 1 + w;
          continue;
        }
      }
      break;
    }
    emit(s.slice(start, i), any, all, count);
  }
}

function isLow(d: number): boolean {
  return d >= 0xdc00 && d <= 0xdfff;
}

function toCodePoint(hi: number, lo: number): number {
  return ((hi - 0xd800) << 10) + (lo - 0xdc00) + 0x10000;
}

/** Languages whose locale is passed to the segmenter; for any other language the segmenter uses the root locale. */
const SEGMENTER_LOCALES: ReadonlySet<string> = new Set(['zh', 'ja', 'th', 'lo', 'km', 'my']);

/**
 * Splits tokens that contain runs of no-space scripts. The segmenter is
 * created on first use: most text never needs it.
 */
export class RunSplitter {
  private segmenter: Intl.Segmenter | null = null;
  constructor(private readonly lang: string) {}

  /**
   * Splits `token`: the parts in other scripts go to `plain` as tokens (as
   * {@link scanTokens} would report them), the words the segmenter finds
   * inside no-space runs go to `word`.
   */
  split(token: string, plain: TokenSink, word: (w: string) => void): void {
    const re = NO_SPACE_RUN_RE;
    re.lastIndex = 0;
    let last = 0;
    let m: RegExpExecArray | null;
    while ((m = re.exec(token)) !== null) {
      if (m.index > last) scanTokens(token.slice(last, m.index), plain);
      for (const seg of this.get().segment(m[0])) {
        if (seg.isWordLike === true) word(seg.segment);
      }
      last = m.index + m[0].length;
      re.lastIndex = last;
    }
    if (last < token.length) scanTokens(token.slice(last), plain);
  }

  private get(): Intl.Segmenter {
    if (this.segmenter === null) {
      const locale = SEGMENTER_LOCALES.has(this.lang) ? this.lang : 'und';
      this.segmenter = new Intl.Segmenter(locale, { granularity: 'word' });
    }
    return this.segmenter;
  }
}

/** The number of code points in `s`. */
export function codePointLength(s: string): number {
  let count = 0;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c < 0xdc00 || c > 0xdfff) count++; // every code unit except low surrogates
  }
  return count;
}

const ALL_NUMERIC_RE = /^\p{N}+$/u;

/** True when every code point of `token` is a number character (`\p{N}`). */
export function isAllNumeric(token: string): boolean {
  const n = token.length;
  if (n === 0) return false;
  for (let i = 0; i < n; i++) {
    const c = token.charCodeAt(i);
    if (c >= 0x80) return ALL_NUMERIC_RE.test(token);
    if (c < 0x30 || c > 0x39) return false;
  }
  return true;
}
