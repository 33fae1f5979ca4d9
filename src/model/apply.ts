/**
 * Filing new documents with a saved model: the model's own analyzer and
 * vocabulary make the vectors (exactly as when it was fitted), k-means'
 * scoring kernel finds the nearest group, and the fit threshold marks what
 * looks new. Pure.
 *
 * @module
 */
import type { Doc } from '../types.js';
import { createAnalyzer } from '../analyze/index.js';
import { transformTfidf } from '../vectorize/index.js';
import { assignToCentroids } from '../cluster/kmeans.js';
import { assignWithModel, type Assignment, type Model } from './index.js';

/** The documents, their vectors' fate, and counts per group. */
export interface ModelApplication extends Assignment {
  readonly docs: readonly Doc[];
  /** Documents filed into each group (fit at or above its threshold). */
  readonly matched: Int32Array;
  /** Documents whose nearest group is this one but whose fit is below the threshold. */
  readonly nearButNew: Int32Array;
  /** Documents with no term the model knows. */
  readonly noKnownTerms: number;
}

/** Files `docs` (in the order given) into the model's groups; `minFit` overrides the per-group thresholds. */
export function applyModel(model: Model, docs: readonly Doc[], minFit?: number): ModelApplication {
  const analyzer = createAnalyzer(model.analyzer);
  const matrix = transformTfidf(
    (function* () {
      for (const d of docs) yield analyzer.analyze(d.text);
    })(),
    model.vocabulary,
  );
  const a = assignWithModel(model, matrix, (m, c, k) => assignToCentroids(m, c, k), minFit);
  const matched = new Int32Array(model.groups);
  const nearButNew = new Int32Array(model.groups);
  let noKnownTerms = 0;
  for (let i = 0; i < docs.length; i++) {
    const g = a.assignments[i];
    if (g < 0) noKnownTerms++;
    else if (a.unmatched[i]) nearButNew[g]++;
    else matched[g]++;
  }
  return { ...a, docs, matched, nearButNew, noKnownTerms };
}
