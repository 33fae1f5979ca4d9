/**
 * Output files of a near-duplicate search: `duplicates.csv` and
 * `duplicates.json`. Pure formatting.
 *
 * @module
 */
import type { Doc } from '../types.js';
import type { DuplicateSet, SimilarPairs } from '../duplicates/index.js';
import { csvChunks, csvText, fixed } from './csv.js';
import { round } from './outputs.js';

/** What the writers need of a search (a `DuplicateRun`, or a grouping run's own join). */
export interface DuplicateOutputSource {
  readonly docs: readonly Doc[];
  readonly by: string;
  readonly threshold: number;
  readonly sets: readonly DuplicateSet[];
  readonly pairs: SimilarPairs;
  readonly setOf: Int32Array;
}

/** `duplicates.csv`: `set, id, similarity, representative` — one row per member, sets strongest first, the representative first in each. */
export function duplicatesCsv(src: DuplicateOutputSource): string {
  function* rows(): Generator<string[]> {
    for (const s of src.sets) {
      const order = Array.from(s.members.keys()).sort((i, j) => {
        const ri = s.members[i] === s.representative ? 1 : 0;
        const rj = s.members[j] === s.representative ? 1 : 0;
        return rj - ri || s.similarityToRepresentative[j] - s.similarityToRepresentative[i] || s.members[i] - s.members[j];
      });
      for (const i of order) {
        const r = s.members[i];
        yield [String(s.id), src.docs[r].id, fixed(s.similarityToRepresentative[i]), src.docs[s.representative].id];
      }
    }
  }
  return csvText(['set', 'id', 'similarity', 'representative'], rows());
}

/** Name of the file that lists every near-copy pair (duplicates.json lists a bounded share per set). */
export const PAIRS_FILE = 'near-copy-pairs.csv';

/**
 * How many pairs between two non-representative members one set lists in
 * `duplicates.json`, the strongest first chosen (ties: join order). Every
 * pair with the representative is listed too. A set of m near-identical
 * members has m(m-1)/2 pairs; listing them all once made the file larger than
 * a string can hold. All pairs are in {@link PAIRS_FILE}.
 */
export const OTHER_PAIRS_PER_SET = 50;

/**
 * The pairs one set lists: indices into `src.pairs`, in join order — every
 * pair that has the set's representative in it, and the
 * {@link OTHER_PAIRS_PER_SET} strongest of the others — and how many pairs
 * the set has in all.
 */
export function listedPairs(src: DuplicateOutputSource): { listed: Int32Array[]; total: Int32Array } {
  const sets = src.sets.length;
  const slot = new Map<number, number>();
  src.sets.forEach((s, i) => slot.set(s.id, i));
  const total = new Int32Array(sets);
  const withRep: number[][] = Array.from({ length: sets }, () => []);
  const others: number[][] = Array.from({ length: sets }, () => []);
  const cap = OTHER_PAIRS_PER_SET;
  const sim = src.pairs.similarity;
  const stronger = (x: number, y: number): number => sim[y] - sim[x] || x - y;
  for (let p = 0; p < src.pairs.a.length; p++) {
    const a = src.pairs.a[p];
    const set = src.setOf[a];
    if (set < 0) continue;
    const i = slot.get(set);
    if (i === undefined) continue;
    total[i]++;
    const rep = src.sets[i].representative;
    if (a === rep || src.pairs.b[p] === rep) {
      withRep[i].push(p);
      continue;
    }
    const list = others[i];
    list.push(p);
    // Keep at most 2 × cap candidates: cut back to the cap strongest when full.
    if (list.length >= 2 * cap) {
      list.sort(stronger);
      list.length = cap;
    }
  }
  const listed = withRep.map((rep, i) => {
    const o = others[i].sort(stronger).slice(0, cap);
    return Int32Array.from([...rep, ...o]).sort();
  });
  return { listed, total };
}

/**
 * `duplicates.json`: `{ threshold, by, pairs, pairsFile, otherPairsPerSet, sets: [{ id, representative, size,
 * meanSimilarity, weakest, chained, members: [{ id, similarity }], pairCount, pairs: [{ a, b, similarity }] }] }`.
 * Each set lists its pairs with the representative and at most {@link OTHER_PAIRS_PER_SET} others;
 * `pairCount` says how many it has, and {@link PAIRS_FILE} holds them all.
 */
export function duplicatesJson(src: DuplicateOutputSource, extra: Record<string, unknown> = {}): unknown {
  const { head, sets, tail } = duplicatesJsonParts(src, extra);
  return { ...head, sets: [...sets()], ...tail };
}

function duplicatesJsonParts(src: DuplicateOutputSource, extra: Record<string, unknown>) {
  const { listed, total } = listedPairs(src);
  const head = { threshold: src.threshold, by: src.by, pairs: src.pairs.a.length, pairsFile: PAIRS_FILE, otherPairsPerSet: OTHER_PAIRS_PER_SET };
  function* sets(): Generator<unknown> {
    for (let i = 0; i < src.sets.length; i++) {
      const s = src.sets[i];
      yield {
        id: s.id,
        representative: src.docs[s.representative].id,
        size: s.members.length,
        meanSimilarity: round(s.meanSimilarity, 6),
        weakest: round(s.weakest, 6),
        chained: s.chained,
        members: Array.from(s.members, (r, k) => ({ id: src.docs[r].id, similarity: round(s.similarityToRepresentative[k], 6) })),
        pairCount: total[i],
        pairs: Array.from(listed[i], (p) => ({ a: src.docs[src.pairs.a[p]].id, b: src.docs[src.pairs.b[p]].id, similarity: round(src.pairs.similarity[p], 6) })),
      };
    }
  }
  return { head, sets, tail: extra };
}

/**
 * {@link duplicatesJson} as JSON text in pieces (one set per piece), the same
 * text `jsonText(duplicatesJson(src))` gives, never held as one string.
 */
export function* duplicatesJsonChunks(src: DuplicateOutputSource, extra: Record<string, unknown> = {}): Generator<string> {
  const { head, sets, tail } = duplicatesJsonParts(src, extra);
  const field = (key: string, value: unknown): string => `  ${JSON.stringify(key)}: ${JSON.stringify(value, null, 2).replace(/\n/g, '\n  ')}`;
  const headText = Object.entries(head).map(([k, v]) => field(k, v));
  yield `{\n${headText.join(',\n')},\n  "sets": [`;
  let first = true;
  for (const set of sets()) {
    yield `${first ? '\n' : ',\n'}    ${JSON.stringify(set, null, 2).replace(/\n/g, '\n    ')}`;
    first = false;
  }
  yield first ? ']' : '\n  ]';
  for (const [k, v] of Object.entries(tail)) yield `,\n${field(k, v)}`;
  yield '\n}\n';
}

/** `near-copy-pairs.csv`: `set, a, b, similarity` — every pair at or above the threshold, in join order, in pieces. */
export function nearCopyPairsCsvChunks(src: DuplicateOutputSource): Generator<string> {
  function* rows(): Generator<string[]> {
    for (let p = 0; p < src.pairs.a.length; p++) {
      const a = src.pairs.a[p];
      yield [src.setOf[a] >= 0 ? String(src.setOf[a]) : '', src.docs[a].id, src.docs[src.pairs.b[p]].id, fixed(src.pairs.similarity[p], 6)];
    }
  }
  return csvChunks(['set', 'a', 'b', 'similarity'], rows());
}
