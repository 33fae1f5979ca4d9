/**
 * The model a grouping run saves: its source taken from the run's result.
 *
 * @module
 */
import type { GroupResult } from '../pipeline.js';
import { round } from '../util/round.js';
import { modelReduction, modelToJson, type ModelSource } from './index.js';

/** What {@link modelToJson} needs, from a grouping result; `tree` is the tree as groups.json writes it. */
export function modelSourceOf(result: GroupResult, createdBy: string, tree: unknown): ModelSource {
  return {
    createdBy,
    // The decision the cleaning stage made on this pile, kept so `assign` cleans new documents the same way.
    // (Under `auto` the pile was judged: cleaned as tickets, or kept as written.)
    cleaning: result.clean.detected
      ? { ...result.options.clean, mode: result.clean.detected.applied ? 'tickets' : 'none', detect: false }
      : result.options.clean,
    analyzer: result.options.analyzer,
    vocabulary: result.vocabulary,
    groups: result.partition.groups,
    centroids: result.partition.centroids,
    assignments: result.partition.assignments,
    fit: result.partition.fit,
    labels: result.groups.map((g) => ({ id: g.id, label: g.label, terms: g.terms.map((t) => ({ term: t.term, weight: round(t.weight, 6) })), size: g.size })),
    tree,
    ...(result.reduced ? { reduce: modelReduction(result.reduced) } : {}),
    ...(result.edits ? { edits: result.edits.applied } : {}),
  };
}

/** `model.json` text of a grouping run. */
export function modelJsonOf(result: GroupResult, createdBy: string, tree: unknown): string {
  return modelToJson(modelSourceOf(result, createdBy, tree));
}
