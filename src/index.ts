/**
 * sheaf's public library API. The CLI is one client of it; everything here
 * except `ingest` and `writeOutputFolder` is pure (no file system, clock,
 * terminal or process).
 *
 * @example
 * ```ts
 * import { ingest, groupDocuments } from 'sheaf';
 * const read = await ingest(['tickets.csv'], { text: ['body'] }, { cwd: process.cwd() });
 * const result = groupDocuments(read, { groups: 8 });
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
export { assignBatchText, assignedRowsHeader, assignedRowsText, assignedRowValues, streamCleaning, ASSIGNED_ROW_COLUMNS, ASSIGNED_ROW_FORMATS, type AssignedRowFormat } from './report/assigned-rows.js';
export {
  TermCounter, countTerms, mergeTermCounts, termCountsToJson, termCountsFromJson, analyzerDifference, checkCountsFit,
  TERM_COUNTS_FORMAT, TERM_COUNTS_VERSION, type TermCounts, type CountsCleaning,
} from './vectorize/df-counts.js';
export { countsFor } from './vectorize/counts-for.js';
export { kmeansRunner, vectorizeRunner, PARALLEL_MIN_ROWS, PARALLEL_ANALYZE_MIN_CHARS } from './parallel/runners.js';
export { reduceRunner, PARALLEL_REDUCE_MIN_ROWS, type ReduceRunnerOptions } from './parallel/runners.js';
export type { ReduceRequest, ReduceRunner } from './runners.js';
export { truncatedSvdParallel } from './parallel/svd-parallel.js';
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
  type GroupResultCommon,
  type GroupInput,
  type PipelineRunners,
} from './pipeline.js';
export { METHODS, METHOD_NAMES, findMethod, methodOf, DEFAULT_CHOOSE_OPTIONS, type GroupMethod, type GroupingMethod, type MethodOutcome, type MethodInput, type Formed, type ChooseOptions, type GroupChoice, type MethodSettings } from './methods/index.js';
export type { KMeansOutcome } from './methods/kmeans.js';
export type { AgglomerativeOutcome } from './methods/agglomerative.js';
export { ingest, resolveIngestOptions, DEFAULT_INGEST_OPTIONS, type IngestOptions, type IngestResult, type IngestIo, type InputDigest } from './ingest/index.js';
export { cleanStage, resolveCleanStage, DEFAULT_CLEAN_STAGE, CLEAN_CHOICES, type CleanChoice, type CleanSettings, type CleanStageOptions, type DocumentInput } from './clean/stage.js';
export { cleanDocuments, resolveCleanOptions, DEFAULT_CLEAN_OPTIONS, PLACEHOLDERS, type CleanOptions, type CleanReport, type CleanMode } from './clean/index.js';
export { findDuplicates, findDuplicatesAsync, nearCopiesOfVectors, resolveFindDuplicatesOptions, type FindDuplicatesOptions, type DuplicateRun, type CompareBy } from './near-copies.js';
export { documentsCsv, groupsJson, treeNewick, evaluateLabels, type Evaluation } from './report/outputs.js';
export { duplicatesCsv, duplicatesJson, duplicatesJsonChunks, nearCopyPairsCsvChunks, listedPairs, PAIRS_FILE, OTHER_PAIRS_PER_SET } from './report/duplicates.js';
export { groupOutputs, groupSummaryJson, vectorFiles, type GroupOutputOptions, type GroupNearCopies } from './report/group-outputs.js';
export { groupRunJson, duplicatesRunJson, assignRunJson, assignCounts, readingRecord, timingRecord, type RunContext, type GroupRunInput } from './report/run-record.js';
export { assignedCsv } from './report/assigned.js';
export { modelSourceOf, modelJsonOf } from './model/source.js';
export { renderReport } from './report/html.js';
export { reportFromRun } from './report/report-from-run.js';
export { duplicatesReportData } from './report/report-duplicates.js';
export { groupTrends, trendRows, parseDateValue, isoWeek, type GroupTrends, type Granularity } from './trends/index.js';
export type { ReportData } from './report/report-data.js';
export { csvText, guardCell, withCsvBom, UTF8_BOM, type CsvLayout } from './report/csv.js';
export type { ReadProgress } from './ingest/progress.js';
export type { KMeansProgress } from './cluster/kmeans.js';
export { writeOutputFolder, writeOutput, MARKER, removeLiveStagingSync, removeStaleStaging, type OutputWrite, type OutputManifest } from './report/folder.js';
export { runCli } from './cli/program.js';
