/**
 * Guided groups: a person names some groups and gives a few seed terms or
 * example documents for each. k-means starts those groups' centres from them
 * (the other groups start from the rest of a seeded k-means), through its
 * existing start-from-a-partition hook (`initialAssignments`): every document
 * starts in, and ends in, the group whose centre it is closest to, so none is
 * forced into a guided group it does not fit (it goes to another group, or to
 * unsorted with `--unsorted`). After k-means the guided groups are found again
 * by an optimal one-to-one matching of the final centres to the guide's
 * (Hungarian method), numbered 0, 1, … in the guide's order and named as the
 * guide names them. Pure.
 *
 * @module
 */
import { z } from 'zod';
import type { Csr } from '../types.js';
import type { Partition } from '../cluster/partition.js';
import type { KMeansOptions } from '../cluster/kmeans-types.js';
import type { Vocabulary } from '../vectorize/index.js';
import type { GroupLabel } from '../label/index.js';
import { transformTfidf } from '../vectorize/index.js';
import { sphericalKMeans } from '../cluster/kmeans.js';
import { UsageError } from '../util/errors.js';
import { bestTwoGroups } from '../model/filing.js';
import { optimalAssignment } from '../continuity/assignment.js';
import { renumberPartition } from '../continuity/match.js';

/** A guide file, checked. */
export interface Guide {
  readonly source: string;
  readonly groups: readonly { readonly name: string; readonly terms: readonly string[]; readonly examples: readonly string[] }[];
}

const guideSchema = z.strictObject({
  format: z.literal('sheaf-guide'),
  groups: z
    .array(
      z.strictObject({
        name: z.string().trim().min(1).max(200),
        terms: z.array(z.string().trim().min(1).max(200)).max(100).optional(),
        examples: z.array(z.string().min(1).max(1000)).max(1000).optional(),
      }),
    )
    .min(1)
    .max(1000),
});

/** Parses a guide file's text; one `UsageError` line naming the file and the problem. */
export function parseGuide(text: string, source: string): Guide {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    throw new UsageError(`${source} is not valid JSON (${(err as Error).message})`, 'guide');
  }
  const parsed = guideSchema.safeParse(raw);
  if (!parsed.success) {
    throw new UsageError(`${source} is not a sheaf guide: { "format": "sheaf-guide", "groups": [ { "name": "…", "terms": ["…"], "examples": ["id", …] }, … ] }`, 'guide');
  }
  const groups = parsed.data.groups.map((g, i) => {
    const terms = g.terms ?? [];
    const examples = g.examples ?? [];
    if (terms.length + examples.length === 0) throw new UsageError(`${source}: group ${i + 1} (${g.name}) gives no terms and no examples`, 'guide');
    return { name: g.name, terms, examples };
  });
  return { source, groups };
}

/**
 * Checks, before any document is read, that a run with these settings can
 * take `guide`: method kmeans, a number of groups (at least as many as the
 * guide names), and no previous run to continue. Throws `UsageError`.
 */
export function checkGuideRun(guide: Guide, settings: { readonly method: string; readonly groups: number | 'auto' | null }, withPrevious: boolean): void {
  if (settings.method !== 'kmeans' || typeof settings.groups !== 'number') {
    throw new UsageError(`a guide needs method kmeans and a number of groups; got method ${settings.method} and groups ${String(settings.groups ?? 'from minSimilarity')}`, 'guide');
  }
  if (withPrevious) throw new UsageError('give a guide or a previous run, not both (a guide starts the groups afresh; a previous run carries its own names)', 'guide');
  const g = guide.groups.length;
  if (g > settings.groups) throw new UsageError(`${guide.source} names ${g} groups; groups is ${settings.groups}: ask for at least as many groups as the guide names`, 'guide');
}

/**
 * The rows of each guided group's example documents, given the documents' ids
 * in row order; checked before the analysis. Throws `UsageError` for an id no
 * document has.
 */
export function guideExampleRows(guide: Guide, ids: readonly string[]): Int32Array[] {
  const rowOf = new Map<string, number>();
  ids.forEach((id, r) => rowOf.set(id, r));
  return guide.groups.map((grp, h) =>
    Int32Array.from(grp.examples, (id) => {
      const r = rowOf.get(id);
      if (r === undefined) throw new UsageError(`${guide.source}: group ${h + 1} (${grp.name}): no document has the id ${JSON.stringify(id)}`, 'guide');
      return r;
    }),
  );
}

/** The guide's centres in the space groups are formed in, and the settings that start k-means from them. */
export interface GuidedStart {
  /** Unit centres of the guided groups in the grouping space, term-major `[dim * guided + h]`. */
  readonly centres: Float32Array;
  readonly guided: number;
  /** The start partition (one group per row, -1 for empty rows) to hand to k-means as `initialAssignments`. */
  readonly initialAssignments: Int32Array;
}

/**
 * Builds the guided centres (seed terms analysed as a tiny document and
 * weighted by the pile's idf, plus the mean TF-IDF row of the examples,
 * summed; then, for reduced vectors, projected with `project`) and the start
 * partition: each row in the group of the nearest start centre. The
 * non-guided start centres come from a seeded spherical k-means of all rows
 * with all k groups, less the k-means centres the guide's centres match best.
 * The run's settings and the example ids are checked before
 * ({@link checkGuideRun}, {@link guideExampleRows}). Throws `UsageError` for
 * seed terms the pile does not know, or a guided group no row is nearest to.
 */
export function guidedStart(
  guide: Guide,
  input: {
    readonly matrix: Csr;
    readonly grouping: Csr;
    readonly vocabulary: Vocabulary;
    /** Per guided group, the rows of its example documents ({@link guideExampleRows}). */
    readonly examples: readonly Int32Array[];
    readonly analyze: (text: string) => string[];
    readonly project: ((rows: Csr) => Csr) | null;
    readonly groups: number;
  },
  kmeans: Partial<KMeansOptions> & { seed: number },
): GuidedStart {
  const g = guide.groups.length;
  const k = input.groups;
  const V = input.vocabulary.terms.length;
  const dense = new Float64Array(g * V);
  guide.groups.forEach((grp, h) => {
    if (grp.terms.length) {
      const m = transformTfidf([input.analyze(grp.terms.join(' '))], input.vocabulary);
      if (m.indptr[1] === 0 && grp.examples.length === 0) {
        throw new UsageError(`${guide.source}: group ${h + 1} (${grp.name}): none of its terms (${grp.terms.join(', ')}) is a term of this pile`, 'guide');
      }
      for (let j = m.indptr[0]!; j < m.indptr[1]!; j++) dense[h * V + m.indices[j]!]! += m.values[j]!;
    }
    for (const r of input.examples[h]!) {
      for (let j = input.matrix.indptr[r]!; j < input.matrix.indptr[r + 1]!; j++) dense[h * V + input.matrix.indices[j]!]! += input.matrix.values[j]! / grp.examples.length;
    }
  });
  // As CSR rows in term space, unit length.
  const indptr = new Int32Array(g + 1);
  const indices: number[] = [];
  const values: number[] = [];
  for (let h = 0; h < g; h++) {
    let norm = 0;
    for (let t = 0; t < V; t++) norm += dense[h * V + t]! ** 2;
    norm = Math.sqrt(norm);
    for (let t = 0; t < V; t++) {
      const v = dense[h * V + t]!;
      if (v !== 0) (indices.push(t), values.push(v / norm));
    }
    indptr[h + 1] = indices.length;
  }
  const termRows: Csr = { rows: g, cols: V, indptr, indices: Int32Array.from(indices), values: Float32Array.from(values) };
  const rows = input.project ? input.project(termRows) : termRows;
  const d = rows.cols;
  const centres = new Float32Array(d * g);
  for (let h = 0; h < g; h++) for (let j = rows.indptr[h]!; j < rows.indptr[h + 1]!; j++) centres[rows.indices[j]! * g + h] = rows.values[j]!;
  // Start centres: a seeded k-means of all rows with k groups; the guide's centres replace the k-means centres they
  // match best (optimal one-to-one matching of centres), the other k − g k-means centres start the free groups.
  const all = new Float32Array(d * k);
  for (let t = 0; t < d; t++) for (let h = 0; h < g; h++) all[t * k + h] = centres[t * g + h]!;
  if (k > g) {
    const free = sphericalKMeans(input.grouping, { ...kmeans, groups: k });
    const cost = new Float64Array(g * k);
    for (let t = 0; t < d; t++) for (let h = 0; h < g; h++) for (let f = 0; f < k; f++) cost[h * k + f]! -= centres[t * g + h]! * free.centroids[t * k + f]!;
    const replaced = new Uint8Array(k);
    const pairs = optimalAssignment(cost, g, k);
    for (const f of pairs.cols) replaced[f] = 1;
    let slot = g;
    for (let f = 0; f < k; f++) {
      if (replaced[f]) continue;
      for (let t = 0; t < d; t++) all[t * k + slot] = free.centroids[t * k + f]!;
      slot++;
    }
  }
  const scored = bestTwoGroups(input.grouping, all, k);
  const start = scored.best;
  const fits = scored.bestFit; // the fits of the start assignment (moving a row below does not change them)
  const sizes = new Int32Array(k);
  for (const s of start) if (s >= 0) sizes[s]!++;
  for (let h = 0; h < g; h++) {
    if (sizes[h] === 0) throw new UsageError(`${guide.source}: group ${h + 1} (${guide.groups[h]!.name}): no document is closer to it than to the other groups`, 'guide');
  }
  // A free start centre nobody is closest to: start it from the row that fits its own start group least.
  for (let f = g; f < k; f++) {
    if (sizes[f]! > 0) continue;
    let worst = -1;
    let worstFit = Infinity;
    for (let r = 0; r < start.length; r++) if (start[r]! >= 0 && sizes[start[r]!]! > 1 && fits[r]! < worstFit) (worst = r, (worstFit = fits[r]!));
    if (worst >= 0) {
      sizes[start[worst]!]!--;
      start[worst] = f;
      sizes[f] = 1;
    }
  }
  return { centres, guided: g, initialAssignments: start };
}

/** Guided groups found again after k-means: their numbers 0…g−1 and how close each final centre stayed to its guide. */
export interface GuidedGroups {
  readonly partition: Partition;
  /** For guided group h (= its number): cosine between its final centre and the guide's start centre. */
  readonly similarity: Float64Array;
}

/** Renumbers a formed partition (grouping-space centres) so guided group h is group h (optimal one-to-one matching of centres). */
export function numberGuided(start: GuidedStart, formed: Partition): GuidedGroups {
  const k = formed.groups;
  const g = start.guided;
  const d = formed.centroids.length / k;
  const cost = new Float64Array(k * g);
  for (let t = 0; t < d; t++) for (let f = 0; f < k; f++) for (let h = 0; h < g; h++) cost[f * g + h]! -= formed.centroids[t * k + f]! * start.centres[t * g + h]!;
  const pairs = optimalAssignment(cost, k, g);
  const renumber = new Int32Array(k).fill(-1);
  const similarity = new Float64Array(g);
  for (let i = 0; i < pairs.rows.length; i++) {
    renumber[pairs.rows[i]!] = pairs.cols[i]!;
    similarity[pairs.cols[i]!] = -cost[pairs.rows[i]! * g + pairs.cols[i]!]!;
  }
  let next = g;
  for (let f = 0; f < k; f++) if (renumber[f]! < 0) renumber[f] = next++;
  return { partition: renumberPartition(formed, renumber), similarity };
}

/** Guided groups named as the guide names them. */
export function guidedNames(labels: readonly GroupLabel[], guide: Guide): GroupLabel[] {
  return labels.map((l) => (l.id < guide.groups.length ? { ...l, label: guide.groups[l.id]!.name } : l));
}
