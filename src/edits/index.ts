/**
 * Edits a person makes to the groups of a run: rename, merge, split into n
 * (re-grouping only the split group's documents with spherical k-means), and
 * pin terms that must or must not name a group. Read from our own JSON edits
 * file (see docs/edits.md), checked against the run's groups, applied before
 * the tree, the scores and the names are computed, so every output follows.
 * Pure.
 *
 * @module
 */
import { UnionFind } from '../util/union-find.js';
import { z } from 'zod';
import type { Csr } from '../types.js';
import { partitionFromAssignments, type Partition } from '../cluster/partition.js';
import type { KMeansOptions } from '../cluster/kmeans-types.js';
import type { GroupLabel } from '../label/index.js';
import { sphericalKMeans } from '../cluster/kmeans.js';
import { selectRows } from '../util/csr.js';
import { UsageError } from '../util/errors.js';

/** One edit, as the file gives it. */
export type GroupEdit =
  | { readonly rename: number; readonly name: string }
  | { readonly merge: readonly number[] }
  | { readonly split: number; readonly into: number }
  | { readonly pin: number; readonly use?: readonly string[]; readonly avoid?: readonly string[] };

/** A checked edits file. */
export interface GroupEdits {
  /** How the file is shown in messages. */
  readonly source: string;
  readonly edits: readonly GroupEdit[];
}

const groupNumber = z.number().int().min(0);
const words = z.array(z.string().trim().min(1).max(200)).max(50);
/** One edit's shape (zod), also used to check the `edits` a model records. */
export const editSchema = z.union([
  z.strictObject({ rename: groupNumber, name: z.string().trim().min(1).max(200) }),
  z.strictObject({ merge: z.array(groupNumber).min(2).max(1000) }),
  z.strictObject({ split: groupNumber, into: z.number().int().min(2).max(100) }),
  z.strictObject({ pin: groupNumber, use: words.optional(), avoid: words.optional() }),
]);
const fileSchema = z.strictObject({ format: z.literal('sheaf-edits'), edits: z.array(z.unknown()).max(10_000) });

/** Parses an edits file's text; one `UsageError` line naming the file, the edit and the problem. */
export function parseEdits(text: string, source: string): GroupEdits {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    throw new UsageError(`${source} is not valid JSON (${(err as Error).message})`, 'edits');
  }
  const file = fileSchema.safeParse(raw);
  if (!file.success) {
    throw new UsageError(`${source} is not a sheaf edits file: it is an object { "format": "sheaf-edits", "edits": [ … ] }`, 'edits');
  }
  const edits = file.data.edits.map((e, i) => {
    const parsed = editSchema.safeParse(e);
    if (!parsed.success) {
      throw new UsageError(
        `${source}: edit ${i + 1} is not one of { "rename": N, "name": "…" }, { "merge": [N, M, …] }, { "split": N, "into": 2+ }, { "pin": N, "use": ["…"], "avoid": ["…"] }`,
        'edits',
      );
    }
    return parsed.data as GroupEdit;
  });
  return { source, edits };
}

/** What applying the edits did to the group numbers, and the names and pins to put on the final groups. */
export interface EditOutcome {
  readonly groups: number;
  /** Group per row after the edits (-1 stays -1). */
  readonly assignments: Int32Array;
  /** For each group before the edits: its numbers after (a merged group the merged one's, a split group all its parts'). */
  readonly numbers: readonly (readonly number[])[];
  /** Names given, by final group. */
  readonly names: ReadonlyMap<number, string>;
  /** Pinned terms, by final group. */
  readonly pins: ReadonlyMap<number, { readonly use: readonly string[]; readonly avoid: readonly string[] }>;
  /** 1 for final groups that a merge or a split made (their old scores no longer apply). */
  readonly changed: Uint8Array;
}

/**
 * Checks the edits against a run's groups (numbers as this run shows them)
 * and applies them: merges, then splits (k-means on the split group's rows
 * only, seeded), then renumbering that keeps every untouched number: the
 * merged group takes the lowest of its numbers, a split group's largest part
 * keeps its number and the other parts take new ones at the end, and the
 * numbers freed by merges are filled by the highest ones. Throws
 * `UsageError` for an unknown group, a merge of a group with itself, a split
 * into more parts than the group has documents, or a group both merged and split.
 */
export function applyEdits(
  edits: GroupEdits,
  matrix: Csr,
  partition: Pick<Partition, 'groups' | 'assignments'>,
  kmeans: Partial<KMeansOptions> & { seed: number },
): EditOutcome {
  const k = partition.groups;
  const at = (i: number) => `${edits.source}: edit ${i + 1}`;
  const sizes = new Int32Array(k);
  for (const g of partition.assignments) if (g >= 0) sizes[g]!++;
  const known = (g: number, i: number): number => {
    if (g >= k) throw new UsageError(`${at(i)}: unknown group ${g} (this run has groups 0 to ${k - 1})`, 'edits');
    return g;
  };
  // Merges: union into the lowest number.
  const sets = new UnionFind(k);
  const find = (g: number): number => sets.find(g);
  const merged = new Uint8Array(k);
  const splitInto = new Int32Array(k);
  edits.edits.forEach((e, i) => {
    if ('merge' in e) {
      const seen = new Set<number>();
      for (const g of e.merge) {
        known(g, i);
        if (seen.has(g)) throw new UsageError(`${at(i)}: merge of group ${g} with itself`, 'edits');
        seen.add(g);
      }
      for (const g of e.merge) {
        merged[g] = 1;
        const a = find(g);
        const b = find(e.merge[0]!);
        if (a !== b) sets.attach(Math.max(a, b), Math.min(a, b));
      }
    } else if ('split' in e) {
      known(e.split, i);
      if (sizes[e.split]! < e.into) {
        throw new UsageError(`${at(i)}: cannot split group ${e.split} into ${e.into}: it has ${sizes[e.split]} document${sizes[e.split] === 1 ? '' : 's'}`, 'edits');
      }
      if (splitInto[e.split]) throw new UsageError(`${at(i)}: group ${e.split} is split twice`, 'edits');
      splitInto[e.split] = e.into;
    } else if ('rename' in e) known(e.rename, i);
    else known(e.pin, i);
  });
  edits.edits.forEach((e, i) => {
    if ('split' in e && merged[e.split]) throw new UsageError(`${at(i)}: group ${e.split} is both merged and split; give one of the two`, 'edits');
  });
  // Provisional numbers: merged groups → their root; split parts beyond the first → k, k+1, …
  const n = partition.assignments.length;
  const assignments = new Int32Array(n);
  for (let r = 0; r < n; r++) assignments[r] = partition.assignments[r]! >= 0 ? find(partition.assignments[r]!) : -1;
  let next = k;
  const parts: number[][] = Array.from({ length: k }, (_, g) => [g]);
  const changed = new Set<number>();
  for (let g = 0; g < k; g++) if (merged[g]) changed.add(find(g));
  for (let g = 0; g < k; g++) {
    const into = splitInto[g]!;
    if (!into) continue;
    let count = 0;
    for (let r = 0; r < n; r++) if (partition.assignments[r] === g) count++;
    const rows = new Int32Array(count);
    for (let r = 0, a = 0; r < n; r++) if (partition.assignments[r] === g) rows[a++] = r;
    const km = sphericalKMeans(selectRows(matrix, rows), { ...kmeans, groups: into });
    const ids = [g];
    for (let p = 1; p < into; p++) ids.push(next++);
    for (let i = 0; i < count; i++) if (km.assignments[i]! >= 0) assignments[rows[i]!] = ids[km.assignments[i]!]!;
    parts[g] = ids;
    for (const id of ids) changed.add(id);
  }
  // Compact: numbers below the final count stay; the higher ones fill the gaps, lowest first.
  const used = new Uint8Array(next);
  for (let g = 0; g < k; g++) used[find(g)] = 1;
  for (let id = k; id < next; id++) used[id] = 1;
  let groups = 0;
  for (const u of used) groups += u;
  const final = new Int32Array(next).fill(-1);
  const gaps: number[] = [];
  for (let id = 0; id < groups; id++) if (used[id]) final[id] = id;
  else gaps.push(id);
  for (let id = groups; id < next; id++) if (used[id]) final[id] = gaps.shift()!;
  for (let r = 0; r < n; r++) if (assignments[r]! >= 0) assignments[r] = final[assignments[r]!]!;
  const numbers = parts.map((ids, g) => (merged[g] ? [final[find(g)]!] : ids.map((id) => final[id]!)));
  const names = new Map<number, string>();
  const pins = new Map<number, { use: string[]; avoid: string[] }>();
  for (const e of edits.edits) {
    if ('rename' in e) names.set(numbers[e.rename]![0]!, e.name);
    else if ('pin' in e) {
      const id = numbers[e.pin]![0]!;
      const p = pins.get(id) ?? { use: [], avoid: [] };
      p.use.push(...(e.use ?? []));
      p.avoid.push(...(e.avoid ?? []));
      pins.set(id, p);
    }
  }
  const changedFinal = new Uint8Array(groups);
  for (const id of changed) changedFinal[final[id]!] = 1;
  return { groups, assignments, numbers, names, pins, changed: changedFinal };
}

/**
 * Names with the pins and the given names applied: a pinned `use` term leads
 * the name, an `avoid` term is left out of the name and the terms (compared
 * case-blind); a given name replaces the name (`nameTerms` terms make a name).
 */
export function pinnedNames(
  labels: readonly GroupLabel[],
  names: ReadonlyMap<number, string>,
  pins: ReadonlyMap<number, { readonly use: readonly string[]; readonly avoid: readonly string[] }>,
  nameTerms: number,
): GroupLabel[] {
  return labels.map((l) => {
    const pin = pins.get(l.id);
    let out = l;
    if (pin) {
      const avoid = new Set(pin.avoid.map((t) => t.toLowerCase()));
      const use = pin.use.filter((t) => !avoid.has(t.toLowerCase()));
      const useSet = new Set(use.map((t) => t.toLowerCase()));
      const terms = l.terms.filter((t) => !avoid.has(t.term.toLowerCase()));
      const rest = terms.filter((t) => !useSet.has(t.term.toLowerCase())).map((t) => t.term);
      out = { ...l, terms, label: [...use, ...rest].slice(0, nameTerms).join(' · ') || '(no terms)' };
    }
    const given = names.get(l.id);
    return given !== undefined ? { ...out, label: given } : out;
  });
}

/**
 * The edits applied to a run's final groups in the space they were formed in
 * (`grouping`: reduced rows or TF-IDF rows) and carried to the term space
 * (`matrix`); centres and fits are recomputed from the new assignments.
 */
export function editPartition(
  edits: GroupEdits,
  grouping: Csr,
  matrix: Csr,
  formed: Partition,
  mixed: Uint8Array,
  termSpace: ((p: Partition) => Partition) | null,
  kmeans: Partial<KMeansOptions> & { seed: number },
): { formed: Partition; partition: Partition; mixed: Uint8Array; outcome: EditOutcome } {
  const outcome = applyEdits(edits, grouping, formed, kmeans);
  const p = partitionFromAssignments(grouping, outcome.assignments, outcome.groups);
  const newMixed = new Uint8Array(outcome.groups);
  outcome.numbers.forEach((ids, g) => {
    if (ids.length === 1 && !outcome.changed[ids[0]!]) newMixed[ids[0]!] = mixed[g]!;
  });
  return { formed: p, partition: termSpace ? termSpace(p) : partitionFromAssignments(matrix, outcome.assignments, outcome.groups), mixed: newMixed, outcome };
}
