/**
 * Filing new documents with a saved model: the model's own analyzer and
 * vocabulary make the vectors (exactly as when it was fitted), k-means'
 * scoring kernel finds the nearest group, and the fit threshold marks what
 * looks new. Pure.
 *
 * @module
 */
import type { Doc } from '../types.js';
import type { CleanReport } from '../clean/index.js';
import { cleanStage, type CleanSettings, type DocumentInput } from '../clean/stage.js';
import { createAnalyzer } from '../analyze/index.js';
import { transformTfidf } from '../vectorize/index.js';
import { fileWithModel, type Assignment, type Model } from './index.js';

/** The documents, their vectors' fate, and counts per group. */
export interface ModelApplication extends Assignment {
  /** The documents as cleaned (in the order given). */
  readonly docs: readonly Doc[];
  /** What cleaning did. */
  readonly clean: CleanReport;
  /** Documents filed into each group (fit at or above its threshold). */
  readonly matched: Int32Array;
  /** Documents whose nearest group is this one but whose fit is below the threshold. */
  readonly nearButNew: Int32Array;
  /** Documents with no term the model knows. */
  readonly noKnownTerms: number;
}

/**
 * Files documents (in the order given) into the model's groups, cleaned first
 * as the model's documents were (`cleaning` overrides that); `minFit`
 * overrides the per-group thresholds. Pass an `IngestResult` (or its docs and
 * exportRows) so `auto` cleaning knows the export rows.
 */
export function applyModel(
  model: Model,
  input: readonly Doc[] | DocumentInput,
  minFit?: number,
  cleaning: CleanSettings = model.cleaning,
  /** Documents analysed so far and in all, about every 1% (data for a progress bar). */
  onProgress?: (done: number, total: number) => void,
): ModelApplication {
  const cleaned = cleanStage(Array.isArray(input) ? { docs: input as readonly Doc[] } : (input as DocumentInput), cleaning);
  const docs = cleaned.docs;
  const analyzer = analyzerOf(model);
  const matrix = transformTfidf(
    (function* () {
      const step = Math.max(1, Math.floor(docs.length / 100));
      for (let i = 0; i < docs.length; i++) {
        if (i % step === 0) onProgress?.(i, docs.length);
        yield analyzer.analyze(docs[i]!.text);
      }
      onProgress?.(docs.length, docs.length);
    })(),
    model.vocabulary,
  );
  const a = fileWithModel(model, matrix, minFit);
  const matched = new Int32Array(model.groups);
  const nearButNew = new Int32Array(model.groups);
  let noKnownTerms = 0;
  for (let i = 0; i < docs.length; i++) {
    const g = a.assignments[i];
    if (g < 0) noKnownTerms++;
    else if (a.unmatched[i]) nearButNew[g]++;
    else matched[g]++;
  }
  return { ...a, docs, clean: cleaned.report, matched, nearButNew, noKnownTerms };
}

/** One analyzer per model (its stop words and stem cache built once), however many batches a stream files with it. */
const ANALYZERS = new WeakMap<Model, ReturnType<typeof createAnalyzer>>();
function analyzerOf(model: Model): ReturnType<typeof createAnalyzer> {
  let a = ANALYZERS.get(model);
  if (a === undefined) ANALYZERS.set(model, (a = createAnalyzer(model.analyzer)));
  return a;
}
