/**
 * Output files of a near-duplicate search: `duplicates.csv` and
 * `duplicates.json`. Pure formatting.
 *
 * @module
 */
import type { Doc } from '../types.js';
import type { DuplicateSet, SimilarPairs } from '../duplicates/index.js';
import { csvText, fixed } from './csv.js';
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

/** `duplicates.json`: `{ threshold, by, sets: [{ id, representative, members: [{ id, similarity }], pairs: [{ a, b, similarity }] }] }`. */
export function duplicatesJson(src: DuplicateOutputSource, extra: Record<string, unknown> = {}): unknown {
  const pairsBySet = new Map<number, { a: string; b: string; similarity: number }[]>();
  for (let p = 0; p < src.pairs.a.length; p++) {
    const set = src.setOf[src.pairs.a[p]];
    if (set < 0) continue;
    let list = pairsBySet.get(set);
    if (!list) pairsBySet.set(set, (list = []));
    list.push({ a: src.docs[src.pairs.a[p]].id, b: src.docs[src.pairs.b[p]].id, similarity: round(src.pairs.similarity[p], 6) });
  }
  return {
    threshold: src.threshold,
    by: src.by,
    sets: src.sets.map((s) => ({
      id: s.id,
      representative: src.docs[s.representative].id,
      size: s.members.length,
      meanSimilarity: round(s.meanSimilarity, 6),
      weakest: round(s.weakest, 6),
      chained: s.chained,
      members: Array.from(s.members, (r, i) => ({ id: src.docs[r].id, similarity: round(s.similarityToRepresentative[i], 6) })),
      pairs: pairsBySet.get(s.id) ?? [],
    })),
    ...extra,
  };
}
