/**
 * Choosing a character encoding for bytes: byte order marks, a forced
 * encoding, a declared one (HTML `<meta charset>`, a MIME `charset`),
 * UTF-16 without a byte order mark (the pattern of NUL bytes), valid or
 * damaged UTF-8, and legacy encodings (detected with chardet, decoded with
 * iconv-lite).
 *
 * The order of evidence, strongest first:
 *
 * 1. a byte order mark (UTF-8 `EF BB BF`, UTF-16LE `FF FE`, UTF-16BE `FE FF`)
 *    — it wins even over a forced encoding, as in web browsers;
 * 2. the forced encoding (the `encoding` ingest option);
 * 3. a declaration in the content — unless the bytes are valid UTF-8 holding
 *    multi-byte sequences, which legacy text practically never is;
 * 4. NUL bytes at every other position (≥ 40% of the odd or even bytes NUL,
 *    ≤ 5% of the others): UTF-16 without a byte order mark;
 * 5. ISO-2022-JP, when 7-bit bytes hold its escape to JIS X 0208
 *    ({@link looksLikeIso2022Jp}; decoded by the platform's `TextDecoder`,
 *    as are other encodings iconv-lite lacks);
 * 6. UTF-8, when the bytes are valid UTF-8, or when its well-formed multi-byte
 *    sequences are at least as many as its invalid ones (damaged UTF-8:
 *    invalid sequences become U+FFFD and are counted);
 * 7. otherwise a legacy encoding: chardet's best guess among the encodings
 *    iconv-lite knows — among Latin-script guesses and Windows-1252, the one
 *    whose reading is most plausible ({@link detectLegacy}) — else
 *    Windows-1252.
 *
 * Following the WHATWG Encoding Standard, the labels ISO-8859-1, Latin-1 and
 * US-ASCII are read as Windows-1252 (its superset for printable text).
 * Windows-1252 leaves 0x81, 0x8D, 0x8F, 0x90 and 0x9D undefined; iconv-lite
 * decodes them as U+FFFD, and they are counted as replaced.
 *
 * @module
 */
import { isUtf8 } from 'node:buffer';
import { TextDecoder } from 'node:util';
import chardet from 'chardet';
import iconv from 'iconv-lite';

/** Why an encoding was chosen; see the module comment for the order. */
export type EncodingBasis = 'bom' | 'option' | 'declared' | 'nul-pattern' | 'utf-8' | 'detected' | 'fallback';

/** An encoding choice. `encoding` is a lower-case name iconv-lite (or, for UTF-8/16, the platform) decodes. */
export interface EncodingChoice {
  readonly encoding: string;
  readonly basis: EncodingBasis;
  /** A declared encoding that was overridden because the bytes are valid UTF-8. */
  readonly ignoredDeclaration?: string;
}

/** Bytes given to chardet at most (a window starting shortly before the first non-ASCII byte). */
export const DETECT_BYTES = 65536;

/** Labels read as Windows-1252 (WHATWG Encoding Standard, "windows-1252" labels; from memory). */
const AS_WINDOWS_1252 = new Set([
  'windows-1252', 'cp1252', 'x-cp1252', 'iso-8859-1', 'iso8859-1', 'iso_8859-1', 'iso-ir-100', 'latin1', 'l1',
  'cp819', 'ibm819', 'csisolatin1', 'us-ascii', 'ascii', 'ansi_x3.4-1968', 'iso-8859-1:1987', 'x-user-defined',
]);

/** Latin-script single-byte encodings (besides Windows-1252) that chardet mixes up on short text. */
const LATIN_RIVALS = new Set([
  'iso-8859-2', 'iso-8859-3', 'iso-8859-4', 'iso-8859-9', 'iso-8859-10', 'iso-8859-13', 'iso-8859-14', 'iso-8859-15',
  'iso-8859-16', 'windows-1250', 'windows-1254', 'windows-1257', 'windows-1258',
]);

/**
 * The platform's (WHATWG) name for an encoding label its `TextDecoder`
 * decodes, or `null`: the fallback for encodings iconv-lite lacks, such as
 * ISO-2022-JP. The WHATWG "replacement" decoder (labels such as
 * ISO-2022-KR, which it turns into one U+FFFD) counts as unknown.
 */
export function platformEncoding(label: string): string | null {
  try {
    const name = new TextDecoder(label).encoding;
    return name === 'replacement' ? null : name;
  } catch {
    return null;
  }
}

/** True when iconv-lite decodes `encoding` (a canonical name); else the platform's `TextDecoder` does (see {@link canonicalEncoding}). */
export function iconvDecodes(encoding: string): boolean {
  return iconv.encodingExists(encoding);
}

/** Decodes `bytes` whole in a canonical encoding: iconv-lite, or the platform's `TextDecoder` for what iconv-lite lacks. */
export function decodeWith(bytes: Uint8Array, encoding: string): string {
  if (encoding === 'utf-8' || encoding === 'utf-16le' || encoding === 'utf-16be' || !iconv.encodingExists(encoding)) {
    return new TextDecoder(encoding).decode(bytes);
  }
  return iconv.decode(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength), encoding);
}

/**
 * True when `bytes` look like ISO-2022-JP (RFC 1468, from memory): 7-bit
 * bytes only, with an escape sequence switching to JIS X 0208 (`ESC $ B`,
 * or the 1978 set `ESC $ @`). Such text is valid ASCII, so it would be read
 * as UTF-8 with its escape sequences left in.
 */
export function looksLikeIso2022Jp(bytes: Uint8Array): boolean {
  let esc = false;
  for (let i = 0; i < bytes.length; i++) {
    const b = bytes[i] as number;
    if (b >= 0x80) return false;
    if (b === 0x1b && bytes[i + 1] === 0x24 && (bytes[i + 2] === 0x42 || bytes[i + 2] === 0x40)) esc = true;
  }
  return esc;
}

/**
 * A canonical lower-case name for an encoding label, or `null` when neither
 * iconv-lite nor the platform's `TextDecoder` knows it ({@link platformEncoding}).
 * `utf8` → `utf-8`; Latin-1 and ASCII labels → `windows-1252`;
 * `utf-16`/`ucs-2` → `utf-16le` (its default without a byte order mark);
 * `utf-16le`/`utf-16be` as they are.
 */
export function canonicalEncoding(label: string): string | null {
  const l = label.trim().replace(/^["']|["']$/g, '').toLowerCase();
  if (l === '') return null;
  if (l === 'utf8' || l === 'utf-8' || l === 'unicode-1-1-utf-8') return 'utf-8';
  if (AS_WINDOWS_1252.has(l)) return 'windows-1252';
  if (l === 'utf-16' || l === 'utf16' || l === 'ucs-2' || l === 'ucs2' || l === 'unicode') return 'utf-16le';
  if (l === 'utf-16le' || l === 'utf16le') return 'utf-16le';
  if (l === 'utf-16be' || l === 'utf16be') return 'utf-16be';
  if (!iconv.encodingExists(l)) return platformEncoding(l);
  return l;
}

/** Length of a byte order mark at the start of `b` and what it says, or `null`. */
export function byteOrderMark(b: Uint8Array): { encoding: 'utf-8' | 'utf-16le' | 'utf-16be'; length: number } | null {
  if (b.length >= 3 && b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf) return { encoding: 'utf-8', length: 3 };
  if (b.length >= 2 && b[0] === 0xff && b[1] === 0xfe) return { encoding: 'utf-16le', length: 2 };
  if (b.length >= 2 && b[0] === 0xfe && b[1] === 0xff) return { encoding: 'utf-16be', length: 2 };
  return null;
}

/**
 * UTF-16 without a byte order mark, judged by where the NUL bytes are:
 * text mostly in the first 256 code points has a NUL in every second
 * byte. Needs at least 8 bytes.
 */
export function utf16ByNulPattern(sample: Uint8Array): 'utf-16le' | 'utf-16be' | null {
  const pairs = sample.length >> 1;
  if (pairs < 4) return null;
  let evenNul = 0;
  let oddNul = 0;
  for (let i = 0; i < pairs * 2; i += 2) {
    if (sample[i] === 0) evenNul++;
    if (sample[i + 1] === 0) oddNul++;
  }
  if (oddNul >= 0.4 * pairs && evenNul <= 0.05 * pairs) return 'utf-16le';
  if (evenNul >= 0.4 * pairs && oddNul <= 0.05 * pairs) return 'utf-16be';
  return null;
}

/** Counts in a UTF-8 reading of some bytes. */
export interface Utf8Census {
  /** Invalid sequences (each becomes one U+FFFD), genuine U+FFFD characters not counted. */
  readonly invalid: number;
  /** Well-formed multi-byte sequences (characters from U+0080 up, U+FFFD excluded). */
  readonly multiByte: number;
  /** Characters decoded. */
  readonly chars: number;
}

const GENUINE_FFFD = Buffer.from([0xef, 0xbf, 0xbd]);

/**
 * Reads `bytes` as UTF-8 and counts invalid and multi-byte sequences.
 * `complete: false` treats a sequence cut at the end as unfinished, not invalid.
 */
export function utf8Census(bytes: Uint8Array, complete: boolean): Utf8Census {
  const text = new TextDecoder('utf-8').decode(bytes, { stream: !complete });
  let fffd = 0;
  let multi = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 0x80) continue;
    if (c === 0xfffd) fffd++;
    else if (c < 0xdc00 || c > 0xdfff) multi++; // a surrogate pair counts once, by its high half
  }
  const buf = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let genuine = 0;
  for (let i = buf.indexOf(GENUINE_FFFD); i !== -1; i = buf.indexOf(GENUINE_FFFD, i + 3)) genuine++;
  return { invalid: Math.max(0, fffd - genuine), multiByte: multi + genuine, chars: text.length };
}

/** The window of `bytes` handed to chardet: from a little before the first byte ≥ 0x80. */
function detectWindow(bytes: Uint8Array): Uint8Array {
  if (bytes.length <= DETECT_BYTES) return bytes;
  let first = 0;
  while (first < bytes.length && (bytes[first] as number) < 0x80) first++;
  if (first >= bytes.length) first = 0;
  const start = Math.max(0, Math.min(first - 1024, bytes.length - DETECT_BYTES));
  return bytes.subarray(start, start + DETECT_BYTES);
}

/**
 * The letters beyond ASCII of the main Latin-script languages of Europe
 * (alphabets from memory; lower case, upper case added below).
 */
const ALPHABETS: readonly string[] = [
  'áéíóúüñ', // Spanish
  'àâæçéèêëîïôœùûüÿ', // French
  'äöüß', // German
  'áâãàçéêíóôõú', // Portuguese
  'àèéìíîòóùú', // Italian
  'áéëïóöü', // Dutch
  'àçèéíïòóúü', // Catalan
  'åäöé', // Swedish, Finnish
  'æøåé', // Danish, Norwegian
  'áðéíóúýþæö', // Icelandic
  'ąćęłńóśźż', // Polish
  'áčďéěíňóřšťúůýž', // Czech
  'áäčďéíĺľňóôŕšťúýž', // Slovak
  'áéíóöőúüű', // Hungarian
  'ăâîșțşţ', // Romanian
  'çğıöşü', // Turkish
  'čćđšž', // Croatian, Slovene, Bosnian
  'ąčęėįšųūž', // Lithuanian
  'āčēģīķļņšūž', // Latvian
  'äõöüšž', // Estonian
];

const ALPHABET_SETS: readonly ReadonlySet<string>[] = ALPHABETS.map(
  (a) => new Set(Array.from(a).flatMap((c) => [c, c.toUpperCase()])),
);

/** Punctuation that is ordinary in Latin-script text, whatever the language. */
const TYPOGRAPHIC = new Set(Array.from('\u00a0‘’‚“”„–—…•€£«»°§©®·¿¡'));

/**
 * How plausible a Latin-script reading of legacy bytes is: the number of
 * its non-ASCII characters that one language's alphabet (the best fitting
 * of {@link ALPHABETS}) or ordinary punctuation accounts for, minus two for
 * each U+FFFD or C1 control. A wrong reading scatters letters of several
 * alphabets, or symbols, where a right one stays within one.
 */
export function plausibility(text: string): number {
  const counts = new Map<string, number>();
  let common = 0;
  let bad = 0;
  for (const ch of text) {
    const c = ch.codePointAt(0) as number;
    if (c < 0x80) continue;
    if (c === 0xfffd || c <= 0x9f) bad++;
    else if (TYPOGRAPHIC.has(ch)) common++;
    else counts.set(ch, (counts.get(ch) ?? 0) + 1);
  }
  let best = 0;
  for (const set of ALPHABET_SETS) {
    let n = 0;
    for (const [ch, k] of counts) if (set.has(ch)) n += k;
    if (n > best) best = n;
  }
  return best + common - 2 * bad;
}

/**
 * The legacy encoding of non-UTF-8 text. chardet ranks the candidates;
 * when its best guess is a Latin-script encoding, Windows-1252 and
 * chardet's Latin-script guesses are compared by the {@link plausibility}
 * of what they decode to, because chardet confuses them on short text.
 * Ties go to Windows-1252 (the most common legacy encoding; WHATWG's
 * fallback for most locales), then to chardet's order. A non-Latin best
 * guess (Cyrillic, Greek, CJK…) is taken as it is. `null` when chardet has
 * no guess iconv-lite can decode.
 */
export function detectLegacy(bytes: Uint8Array): string | null {
  const window = detectWindow(bytes);
  let guesses: { name: string; confidence: number }[];
  try {
    guesses = chardet.analyse(window) as { name: string; confidence: number }[];
  } catch {
    return null;
  }
  const ranked: { enc: string; confidence: number }[] = [];
  for (const g of guesses) {
    const lower = g.name.toLowerCase();
    if (/^(utf|ascii|iso-2022)/.test(lower)) continue;
    const enc = canonicalEncoding(lower);
    if (enc === null || enc === 'utf-8' || enc.startsWith('utf-16')) continue;
    if (!ranked.some((r) => r.enc === enc)) ranked.push({ enc, confidence: g.confidence });
  }
  ranked.sort((a, b) => b.confidence - a.confidence);
  const top = ranked[0];
  if (top === undefined || top.confidence <= 0) return null;
  if (top.enc !== 'windows-1252' && !LATIN_RIVALS.has(top.enc)) return top.enc;
  const candidates = ranked.filter((r) => r.enc === 'windows-1252' || LATIN_RIVALS.has(r.enc)).slice(0, 4);
  if (!candidates.some((c) => c.enc === 'windows-1252')) candidates.push({ enc: 'windows-1252', confidence: 0 });
  let best: { enc: string; score: number; confidence: number } | null = null;
  const buf = Buffer.from(window.buffer, window.byteOffset, window.byteLength);
  for (const c of candidates) {
    const score = plausibility(iconv.decode(buf, c.enc));
    const rank = c.enc === 'windows-1252' ? Infinity : c.confidence;
    if (best === null || score > best.score || (score === best.score && rank > best.confidence)) best = { enc: c.enc, score, confidence: rank };
  }
  return (best as { enc: string }).enc;
}

/**
 * Chooses the encoding of `bytes` (see the module comment). `bytes` is the
 * whole input when `complete`, else its first part (a sequence cut at the
 * end is then not invalid). `forced` and `declared` must be canonical
 * ({@link canonicalEncoding}) or `null`.
 */
export function chooseEncoding(
  bytes: Uint8Array,
  options: { readonly forced?: string | null; readonly declared?: string | null; readonly complete: boolean },
): EncodingChoice {
  const bom = byteOrderMark(bytes);
  if (bom) return { encoding: bom.encoding, basis: 'bom' };
  if (options.forced) return { encoding: options.forced, basis: 'option' };
  const declared = options.declared ?? null;
  let census: Utf8Census | null = null;
  if (declared !== null) {
    if (declared === 'utf-8' || declared.startsWith('utf-16')) return { encoding: declared, basis: 'declared' };
    census = utf8Census(bytes, options.complete);
    if (census.invalid === 0 && census.multiByte > 0) return { encoding: 'utf-8', basis: 'utf-8', ignoredDeclaration: declared };
    return { encoding: declared, basis: 'declared' };
  }
  const sixteen = utf16ByNulPattern(bytes.subarray(0, 8192));
  if (sixteen) return { encoding: sixteen, basis: 'nul-pattern' };
  if (looksLikeIso2022Jp(bytes.subarray(0, DETECT_BYTES))) return { encoding: 'iso-2022-jp', basis: 'detected' };
  if (census === null) {
    if (options.complete && isUtf8(bytes)) return { encoding: 'utf-8', basis: 'utf-8' };
    census = utf8Census(bytes, options.complete);
  }
  if (census.invalid === 0 || census.multiByte >= census.invalid) return { encoding: 'utf-8', basis: 'utf-8' };
  const legacy = detectLegacy(bytes);
  return legacy === null ? { encoding: 'windows-1252', basis: 'fallback' } : { encoding: legacy, basis: 'detected' };
}

/**
 * The encoding an HTML or XML document declares in its first 1024 bytes
 * (`<meta charset=…>`, `<meta http-equiv="Content-Type" content="…; charset=…">`,
 * `<?xml … encoding="…"?>`), canonical, or `null`. As in the WHATWG
 * prescan, a declared UTF-16 means UTF-8 (bytes read as ASCII cannot be UTF-16).
 */
export function declaredHtmlCharset(bytes: Uint8Array): string | null {
  const head = Buffer.from(bytes.buffer, bytes.byteOffset, Math.min(bytes.byteLength, 1024)).toString('latin1');
  const m =
    /<meta\b[^>]*?\bcharset\s*=\s*["']?\s*([A-Za-z0-9._:-]+)/i.exec(head) ??
    /^\s*<\?xml\b[^>]*?\bencoding\s*=\s*["']([A-Za-z0-9._:-]+)/i.exec(head);
  if (!m) return null;
  const enc = canonicalEncoding(m[1] as string);
  if (enc === null) return null;
  return enc.startsWith('utf-16') ? 'utf-8' : enc;
}
