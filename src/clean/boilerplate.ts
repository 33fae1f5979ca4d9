/**
 * Boilerplate: lines repeated across a large share of the documents (help
 * desk footers, legal notices, form labels), found by line frequency.
 *
 * Counting every distinct line of a million tickets exactly would hold
 * millions of strings, so candidates are found first with the frequent
 * items summary of Misra & Gries ("Finding repeated elements", Science of
 * Computer Programming 2, 1982): with k counters over a stream of m items,
 * every item occurring more than m/(k+1) times survives. Choosing
 * k = ⌊m/T⌋ + 1 for the threshold T makes every line in T or more
 * documents a candidate; a second pass counts the candidates exactly. The
 * result equals exact counting (checked against it in the tests), in
 * memory proportional to m/T.
 *
 * Pure: no I/O.
 *
 * @module
 */

/** Shortest line key (after {@link lineKey}) considered; shorter lines ("Thanks", "OK") are never boilerplate. */
export const BOILERPLATE_MIN_KEY = 10;

/**
 * The key lines are compared by: lower case, every run of digits as `0`,
 * every run of other characters that are not letters or marks as one
 * space, trimmed (one pass; {@link lineKeyReference} says the same with
 * regular expressions). So
 * "Ticket #4411 – reply above this line" and "Ticket #98 - reply above
 * this line" are the same line.
 */
export function lineKey(line: string): string {
  const n = scanKey(line, true);
  let out = '';
  for (let i = 0; i < n; i += 4096) out += String.fromCharCode.apply(null, keyUnits.subarray(i, Math.min(n, i + 4096)) as unknown as number[]);
  return out;
}

/** Code units of the last key scanned with `write` (grown as needed). */
let keyUnits = new Uint16Array(1024);
/** FNV-1a hash (32 bits) of the last key scanned. */
let keyHash = 0;

const LETTER = /^[\p{L}\p{M}]$/u;
const DIGIT = /^\p{N}$/u;

/**
 * Runs {@link lineKey}'s one pass over `line`: sets {@link keyHash} to the
 * FNV-1a hash of the key's code units and, when `write`, puts them in
 * {@link keyUnits}. Returns the key's length (code units).
 */
function scanKey(line: string, write: boolean): number {
  const lower = line.toLowerCase();
  if (write && keyUnits.length < lower.length * 2 + 2) keyUnits = new Uint16Array(lower.length * 2 + 2);
  let n = 0;
  let h = 0x811c9dc5;
  let sep = false;
  let inDigits = false;
  const emit = (u: number): void => {
    if (write) keyUnits[n] = u;
    n++;
    h = Math.imul(h ^ u, 0x01000193);
  };
  for (let i = 0; i < lower.length; i++) {
    const c = lower.charCodeAt(i);
    let kind: number; // 0 letter or mark, 1 digit, 2 other
    let units = 1;
    if (c < 0x80) kind = (c >= 0x61 && c <= 0x7a) || (c >= 0x41 && c <= 0x5a) ? 0 : c >= 0x30 && c <= 0x39 ? 1 : 2;
    else {
      const cp = lower.codePointAt(i) as number;
      const ch = String.fromCodePoint(cp);
      if (cp > 0xffff) units = 2;
      kind = LETTER.test(ch) ? 0 : DIGIT.test(ch) ? 1 : 2;
    }
    if (kind === 2) {
      sep = true;
      inDigits = false;
      i += units - 1;
      continue;
    }
    if (sep && n > 0) emit(0x20);
    sep = false;
    if (kind === 1) {
      if (!inDigits) emit(0x30);
      inDigits = true;
      i += units - 1;
      continue;
    }
    inDigits = false;
    emit(c);
    if (units === 2) emit(lower.charCodeAt(++i));
  }
  keyHash = h >>> 0;
  return n;
}

/** {@link lineKey} written with regular expressions: the reference the fast one is tested against. */
export function lineKeyReference(line: string): string {
  return line
    .toLowerCase()
    .replace(/\p{N}+/gu, '0')
    .replace(/[^\p{L}\p{M}\p{N}]+/gu, ' ')
    .trim();
}

/** A boilerplate line: its key, the first form seen, and how many documents have it. */
export interface BoilerplateLine {
  readonly key: string;
  /** The line as first seen (trimmed). */
  readonly line: string;
  /** Documents holding it at least once. */
  readonly docs: number;
}

/** Calls `visit` once per distinct eligible key hash of `text` (the keys themselves are not built). */
function eachHash(text: string, seen: Set<number>, visit: (hash: number) => void): void {
  seen.clear();
  let start = 0;
  while (start <= text.length) {
    let end = text.indexOf('\n', start);
    if (end === -1) end = text.length;
    if (end - start >= BOILERPLATE_MIN_KEY && scanKey(text.slice(start, end), false) >= BOILERPLATE_MIN_KEY && !seen.has(keyHash)) {
      seen.add(keyHash);
      visit(keyHash);
    }
    start = end + 1;
  }
}

function countLines(text: string): number {
  let n = 1;
  for (let i = text.indexOf('\n'); i !== -1; i = text.indexOf('\n', i + 1)) n++;
  return n;
}

/**
 * The lines found in at least `minDocs` of `texts` (each document counted
 * once per line), most frequent first, ties by key. The summary runs over
 * 32-bit hashes of the keys (a collision only adds a candidate); the
 * second pass counts the candidates' lines by their true keys. Memory:
 * about (lines in all) / `minDocs` counters.
 */
export function findBoilerplate(texts: readonly string[], minDocs: number): BoilerplateLine[] {
  if (texts.length < minDocs) return [];
  let m = 0;
  for (const t of texts) m += countLines(t); // an upper bound on the items the summary sees
  const k = Math.floor(m / minDocs) + 1;
  const counters = new Map<number, number>();
  const seen = new Set<number>();
  for (const t of texts) {
    eachHash(t, seen, (hash) => {
      const c = counters.get(hash);
      if (c !== undefined) counters.set(hash, c + 1);
      else if (counters.size < k) counters.set(hash, 1);
      else {
        for (const [y, v] of counters) {
          if (v <= 1) counters.delete(y);
          else counters.set(y, v - 1);
        }
      }
    });
  }
  const candidates = new Set(counters.keys());
  const exact = new Map<string, { line: string; docs: number }>();
  const seenKeys = new Set<string>();
  for (const t of texts) {
    seenKeys.clear();
    let start = 0;
    while (start <= t.length) {
      let end = t.indexOf('\n', start);
      if (end === -1) end = t.length;
      if (end - start >= BOILERPLATE_MIN_KEY) {
        const line = t.slice(start, end);
        if (scanKey(line, false) >= BOILERPLATE_MIN_KEY && candidates.has(keyHash)) {
          const key = lineKey(line);
          if (!seenKeys.has(key)) {
            seenKeys.add(key);
            const e = exact.get(key);
            if (e === undefined) exact.set(key, { line: line.trim(), docs: 1 });
            else e.docs++;
          }
        }
      }
      start = end + 1;
    }
  }
  const found: BoilerplateLine[] = [];
  for (const [key, e] of exact) if (e.docs >= minDocs) found.push({ key, line: e.line, docs: e.docs });
  found.sort((a, b) => b.docs - a.docs || (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
  return found;
}

/** A set of boilerplate keys, checked by hash first. */
export interface KeySet {
  readonly keys: ReadonlySet<string>;
  readonly hashes: ReadonlySet<number>;
}

/** The {@link KeySet} of some keys. */
export function keySet(keys: Iterable<string>): KeySet {
  const k = new Set(keys);
  const hashes = new Set<number>();
  for (const key of k) {
    scanKey(key, false);
    hashes.add(keyHash);
  }
  return { keys: k, hashes };
}

/** `lines` without those whose key is in `set`; `removed.count` grows by the number dropped. */
export function dropLines(lines: readonly string[], set: KeySet, removed: { count: number }): string[] {
  const out: string[] = [];
  for (const line of lines) {
    if (line.length >= BOILERPLATE_MIN_KEY && scanKey(line, false) >= BOILERPLATE_MIN_KEY && set.hashes.has(keyHash) && set.keys.has(lineKey(line))) {
      removed.count++;
    } else out.push(line);
  }
  return out;
}
