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
 * every run of other non-letters as one space, trimmed. So
 * "Ticket #4411 – reply above this line" and "Ticket #98 - reply above
 * this line" are the same line.
 */
export function lineKey(line: string): string {
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

/** Calls `visit` once per distinct eligible key of `text`, with the line it was first seen as. */
function eachKey(text: string, seen: Set<string>, visit: (key: string, line: string) => void): void {
  seen.clear();
  let start = 0;
  while (start <= text.length) {
    let end = text.indexOf('\n', start);
    if (end === -1) end = text.length;
    const line = text.slice(start, end);
    if (line.length >= BOILERPLATE_MIN_KEY) {
      const key = lineKey(line);
      if (key.length >= BOILERPLATE_MIN_KEY && !seen.has(key)) {
        seen.add(key);
        visit(key, line);
      }
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
 * once per line), most frequent first, ties by key. Two passes over the
 * texts; memory: about (lines in all) / `minDocs` counters.
 */
export function findBoilerplate(texts: readonly string[], minDocs: number): BoilerplateLine[] {
  if (texts.length < minDocs) return [];
  let m = 0;
  for (const t of texts) m += countLines(t); // an upper bound on the items the summary sees
  const k = Math.floor(m / minDocs) + 1;
  const counters = new Map<string, number>();
  const seen = new Set<string>();
  for (const t of texts) {
    eachKey(t, seen, (key) => {
      const c = counters.get(key);
      if (c !== undefined) counters.set(key, c + 1);
      else if (counters.size < k) counters.set(key, 1);
      else {
        for (const [y, v] of counters) {
          if (v <= 1) counters.delete(y);
          else counters.set(y, v - 1);
        }
      }
    });
  }
  const exact = new Map<string, { line: string; docs: number }>();
  for (const key of counters.keys()) exact.set(key, { line: '', docs: 0 });
  for (const t of texts) {
    eachKey(t, seen, (key, line) => {
      const e = exact.get(key);
      if (e === undefined) return;
      if (e.docs === 0) e.line = line.trim();
      e.docs++;
    });
  }
  const found: BoilerplateLine[] = [];
  for (const [key, e] of exact) if (e.docs >= minDocs) found.push({ key, line: e.line, docs: e.docs });
  found.sort((a, b) => b.docs - a.docs || (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
  return found;
}

/** `text` without the lines whose key is in `keys`; `removed` gets the number of lines dropped. */
export function dropLines(text: string, keys: ReadonlySet<string>, removed: { count: number }): string {
  if (keys.size === 0) return text;
  const out: string[] = [];
  for (const line of text.split('\n')) {
    if (line.length >= BOILERPLATE_MIN_KEY && keys.has(lineKey(line))) removed.count++;
    else out.push(line);
  }
  return out.join('\n');
}
