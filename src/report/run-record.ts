/**
 * `run.json` for every command from one skeleton: what ran and when, the
 * versions, the inputs and their digests, what reading and cleaning did, and
 * stage timings. Pure: the clock readings and versions come in as values.
 *
 * @module
 */
import { continuityRecord } from './continuity.js';
import path from 'node:path';
import type { Doc, StageTiming } from '../types.js';
import type { IngestResult, IngestOptions } from '../ingest/index.js';
import type { CleanReport } from '../clean/index.js';
import type { GroupResult } from '../pipeline.js';
import type { DuplicateRun } from '../near-copies.js';
import type { Model } from '../model/index.js';
import type { ModelApplication } from '../model/apply.js';
import { methodOf } from '../methods/index.js';
import { round } from '../util/round.js';
import { evaluationJson, jsonText, type Evaluation } from './outputs.js';
import { choiceTable } from './report-from-run.js';

/** When a command ran, with what, from where. */
export interface RunContext {
  readonly command: string;
  readonly startedAt: Date;
  readonly finishedAt: Date;
  /** Versions of sheaf, Node and the packages (as the CLI reads them). */
  readonly versions: unknown;
  /** The working folder inputs were given relative to. */
  readonly cwd: string;
  /** The output folder as given. */
  readonly out: string;
}

/** The head every run.json starts with. */
function head(ctx: RunContext, read: IngestResult): Record<string, unknown> {
  return {
    tool: 'sheaf',
    command: ctx.command,
    startedAt: ctx.startedAt.toISOString(),
    finishedAt: ctx.finishedAt.toISOString(),
    versions: ctx.versions,
    inputs: read.inputs,
  };
}

/** What reading and cleaning did, for run.json. */
export function readingRecord(read: IngestResult, clean: CleanReport | null): Record<string, unknown> {
  return {
    decoding: read.decoding,
    truncated: read.truncated,
    attachmentsNotRead: read.attachments,
    filesNotRead: read.filesNotRead,
    exportCounts: read.exportCounts,
    mergedRecords: read.mergedRecords,
    cleaning: clean,
  };
}

/** Stage timings for run.json: milliseconds to 0.1 and documents per second. */
export function timingRecord(timings: readonly StageTiming[]): unknown[] {
  return timings.map((t) => ({
    stage: t.stage,
    ms: round(t.ms, 1),
    documentsPerSecond: t.ms > 0 ? Math.round((t.items / t.ms) * 1000) : null,
  }));
}

/** The documents that are files of their own (not export rows), in the given order. */
function fileDocuments(docs: readonly Doc[], read: IngestResult): Doc[] {
  const files = new Set<string>();
  read.docs.forEach((d, i) => {
    if (!read.exportRows[i]) files.add(d.id);
  });
  return docs.filter((d) => files.has(d.id));
}

/** What a grouping run's run.json needs besides the result. */
export interface GroupRunInput {
  readonly context: RunContext;
  readonly ingestOptions: IngestOptions;
  readonly read: IngestResult;
  readonly threads: number;
  readonly evaluation: Evaluation | null;
  /** Every stage's timing, reading and writing included. */
  readonly timings: readonly StageTiming[];
}

/** `run.json` of `sheaf group`/`tree`: settings, versions, input digests, what was skipped and why, choices, scores, stage timings. */
export function groupRunJson(result: GroupResult, x: GroupRunInput): string {
  return jsonText(groupRunRecord(result, x));
}

/** The value behind {@link groupRunJson}, for an edge that adds to it (the CLI adds trends and the page's size) before writing. */
export function groupRunRecord(result: GroupResult, x: GroupRunInput): Record<string, unknown> {
  const { read } = x;
  const o = result.options;
  return {
    ...head(x.context, read),
    settings: {
      ingest: x.ingestOptions,
      analyzer: o.analyzer,
      vectorize: o.vectorize,
      grouping: { method: o.method, groups: o.groups, minSimilarity: o.minSimilarity, choose: o.choose, tree: o.tree, reduce: o.reduce },
      kmeans: o.kmeans,
      threads: x.threads,
      label: o.label,
      refine: o.refine,
      out: x.context.out,
    },
    counts: {
      documents: read.docs.length,
      skipped: read.skipped.length,
      grouped: read.docs.length - result.emptyRows.length - result.unsorted.rows.length,
      withoutTerms: result.emptyRows.length,
      unsorted: result.unsorted.rows.length,
      mixedGroups: result.mixed.reduce((a, b) => a + b, 0),
      groups: result.partition.groups,
      terms: result.vocabulary.terms.length,
      nonZeros: result.matrix.indptr[result.matrix.rows],
    },
    ...(result.continuity ? { continuity: continuityRecord(result.continuity) } : {}),
    ...(result.guide ? { guide: { file: result.guide.source, groups: Array.from(result.guide.similarity, (sim, id) => ({ id, label: result.groups[id]?.label, size: result.groups[id]?.size, similarity: round(sim, 6) })) } } : {}),
    ...(result.edits ? { edits: { file: result.edits.source, applied: result.edits.applied, numbers: result.edits.numbers } } : {}),
    choice: result.choice
      ? {
          by: result.choice.by,
          chosen: result.choice.chosen,
          treeLeaves: result.choice.treeLeaves,
          sampled: result.choice.sampled,
          rule: result.choice.rule ?? null,
          warnings: result.choice.warnings,
          tried: choiceTable(result.choice),
        }
      : null,
    // The space the groups were formed in: reduced vectors (dims kept) or null for the TF-IDF rows.
    reduced: result.reduced ? { dims: result.reduced.svd.dims } : null,
    quality: {
      silhouette: Number.isFinite(result.quality.silhouette.mean) ? round(result.quality.silhouette.mean, 6) : null,
      silhouetteSampled: result.quality.silhouette.sampled,
      objective: round(result.partition.objective, 6),
    },
    ...methodOf(result).runRecord(result),
    evaluation: x.evaluation ? evaluationJson(x.evaluation) : null,
    cwd: x.context.cwd,
    // Documents read from files of their own (not export rows), so `sheaf organize` can sort the files; with the
    // SHA-256 of the bytes read, so it copies only those very bytes.
    files: fileDocuments(result.docs, read).map((d) => {
      const sha256 = read.fileDigests.get(d.source);
      return { id: d.id, path: path.resolve(x.context.cwd, d.source), ...(sha256 !== undefined ? { sha256 } : {}) };
    }),
    skipped: read.skipped,
    warnings: read.warnings,
    ...readingRecord(read, result.clean),
    withoutTerms: Array.from(result.emptyRows, (r) => result.docs[r]!.id),
    timings: timingRecord(x.timings),
  };
}

/** `run.json` of `sheaf duplicates`. */
export function duplicatesRunJson(
  run: DuplicateRun,
  x: { readonly context: RunContext; readonly ingestOptions: IngestOptions; readonly read: IngestResult; readonly clean: CleanReport | null; readonly timings: readonly StageTiming[] },
): string {
  const { read } = x;
  const o = run.options;
  return jsonText({
    ...head(x.context, read),
    settings: { ingest: x.ingestOptions, by: o.by, threshold: o.threshold, shingle: o.shingle, analyzer: o.analyzer, vectorize: o.vectorize, duplicates: o.duplicates, out: x.context.out },
    counts: {
      documents: read.docs.length,
      skipped: read.skipped.length,
      sets: run.sets.length,
      inSets: run.sets.reduce((a, s) => a + s.members.length, 0),
      pairs: run.pairs.a.length,
      exactCopies: run.exactCopies,
      chained: run.sets.filter((s) => s.chained).length,
    },
    chained: run.sets.filter((s) => s.chained).map((s) => ({ set: s.id, weakest: round(s.weakest, 6) })),
    skipped: read.skipped,
    warnings: read.warnings,
    ...readingRecord(read, x.clean),
    timings: timingRecord(x.timings),
  });
}

/** Counts of an assignment run, per group: filed, near but new, and the threshold used. */
export function assignCounts(model: Model, a: ModelApplication, minFit: number | undefined) {
  const unmatched = a.unmatched.reduce((x, v) => x + v, 0);
  return {
    documents: a.docs.length,
    matched: a.docs.length - unmatched,
    new: unmatched,
    noKnownTerms: a.noKnownTerms,
    groups: model.labels.map((l) => ({ id: l.id, label: l.label, matched: a.matched[l.id]!, nearButNew: a.nearButNew[l.id]!, minFit: round(minFit ?? model.minFit[l.id]!, 6) })),
  };
}

/** `run.json` of `sheaf assign`. */
export function assignRunJson(
  model: Model,
  a: ModelApplication,
  x: { readonly context: RunContext; readonly modelFile: string; readonly minFit: number | undefined; readonly read: IngestResult },
): string {
  const { read } = x;
  return jsonText({
    ...head(x.context, read),
    model: { file: x.modelFile, createdBy: model.createdBy, groups: model.groups, terms: model.vocabulary.terms.length },
    minFit: x.minFit ?? 'per group, from the training fits',
    counts: assignCounts(model, a, x.minFit),
    skipped: read.skipped,
    warnings: read.warnings,
    ...readingRecord(read, a.clean),
  });
}
