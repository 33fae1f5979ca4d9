/**
 * sheaf's public library API. The CLI is one client of it; everything here
 * except `ingest` and `writeOutputFolder` is pure (no file system, clock,
 * terminal or process).
 *
 * @example
 * ```ts
 * import { ingest, groupDocuments } from 'sheaf';
 * const { docs } = await ingest(['tickets.csv'], { text: ['body'] }, { cwd: process.cwd() });
 * const result = groupDocuments(docs, { kmeans: { groups: 8 } });
 * for (const g of result.groups) console.log(g.id, g.size, g.label);
 * ```
 *
 * @packageDocumentation
 */
export type { Doc, Csr, Skipped } from './types.js';
export { UsageError } from './util/errors.js';
export { createRng, deriveSeed, type Rng } from './util/random.js';
export * from './analyze/index.js';
export * from './vectorize/index.js';
export * from './cluster/index.js';
export * from './reduce/index.js';
export {
  allPairsCosine,
  duplicateSets,
  exactCopies,
  wordShingles,
  shingleMatrix,
  allPairsResemblance,
  resemblance,
  containment,
  wordDiff,
  findNearDuplicates,
  DEFAULT_DUPLICATES_OPTIONS,
  resolveDuplicatesOptions,
  type SimilarPairs,
  type DuplicateSet,
  type DuplicateSets,
  type DuplicatesOptions,
  type DiffPiece,
  type NearDuplicates,
} from './duplicates/index.js';
export * from './label/index.js';
export * from './evaluate/index.js';
export * from './model/index.js';
export { applyModel, type ModelApplication } from './model/apply.js';
export { kmeansRunner, PARALLEL_MIN_ROWS } from './parallel/runner.js';
export { sphericalKMeansParallel, resolveParallelOptions, type ParallelOptions } from './parallel/kmeans-parallel.js';
export {
  groupDocuments,
  groupDocumentsAsync,
  type KMeansRunner,
  type KMeansRequest,
  resolveGroupOptions,
  canonicalOrder,
  compareIds,
  type GroupOptions,
  type GroupResult,
  type ResolvedGroupOptions,
  type PipelineHooks,
  type StageTiming,
} from './pipeline.js';
export { ingest, resolveIngestOptions, DEFAULT_INGEST_OPTIONS, type IngestOptions, type IngestResult, type IngestIo, type InputDigest } from './ingest/index.js';
export { cleanDocuments, resolveCleanOptions, DEFAULT_CLEAN_OPTIONS, PLACEHOLDERS, type CleanOptions, type CleanReport, type CleanMode } from './clean/index.js';
export { findDuplicates, nearCopiesOfVectors, resolveFindDuplicatesOptions, type FindDuplicatesOptions, type DuplicateRun, type CompareBy } from './near-copies.js';
export { documentsCsv, groupsJson, treeNewick, evaluateLabels, type Evaluation } from './report/outputs.js';
export { duplicatesCsv, duplicatesJson } from './report/duplicates.js';
export { renderReport } from './report/html.js';
export { reportFromRun } from './report/report-from-run.js';
export type { ReportData } from './report/report-data.js';
export { csvText, guardCell } from './report/csv.js';
export { writeOutputFolder } from './report/folder.js';
export { runCli } from './cli/program.js';
