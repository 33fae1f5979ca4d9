/**
 * The saved model: everything needed to file new documents into the groups
 * of a run, or to flag them as new. Pure: turns a run into JSON text and JSON
 * text back into a checked model; reading and writing files is the caller's.
 *
 * Layout (`format: "sheaf-model"`, `version: 2`): the cleaning settings, the analyzer settings, the
 * vocabulary (terms in column order, document frequencies, idf), the unit
 * centroids as little-endian Float32 in base64 (term-major,
 * `[term * groups + g]`), each group's label and terms, the fit threshold per
 * group below which a new document counts as unmatched, and optionally the
 * tree. Every field is checked on load, lengths against each other; unknown
 * keys (including `__proto__`) are refused. Version 1 (no cleaning settings)
 * still loads, with the cleaning its `sheaf assign` applied: `auto` with the
 * default rules.
 *
 * Version 2 adds `cleaning` and, only when the groups were formed on reduced
 * vectors, `reduce`: the settings, the components (d × terms, Float32 base64,
 * row-major) that project a new document's TF-IDF row, the singular values,
 * and the groups' unit centres in the reduced space (Float32 base64,
 * `[dim * groups + g]`); `centroids` stay the term-space ones.
 *
 * Version 3 adds `novelty`: how `minFit` was calibrated from the training
 * fits (`{ method: "quantile", quantile, margin }`: each group's `quantile` of
 * its members' fits minus `margin`; see `./filing.ts`). Versions 1 and 2 still
 * load; their `minFit` (the 5% quantile, no margin) is used as stored.
 *
 * @module
 */
import { zodIssueLine } from '../util/zod-issue.js';
import { z } from 'zod';
import type { Csr } from '../types.js';
import type { AnalyzerSettings } from '../analyze/index.js';
import { createVocabulary, type Vocabulary } from '../vectorize/index.js';
import { UsageError } from '../util/errors.js';
import { DEFAULT_CLEAN_STAGE, resolveCleanStage, type CleanSettings } from '../clean/stage.js';
import { editSchema, type GroupEdit } from '../edits/index.js';
import { bestTwoGroups, calibrateThresholds, DEFAULT_NOVELTY_OPTIONS, type NoveltyOptions } from './filing.js';

/** Current model format version (2: cleaning settings recorded, and `reduce` when the groups were formed on reduced vectors; 3: `novelty`, the calibration of `minFit`). */
export const MODEL_VERSION = 3;

/** Versions this code reads. */
export const MODEL_VERSIONS_READ: readonly number[] = [1, 2, 3];
import { denseRowsAsCsr, projectRows, type ReducedGrouping } from '../reduce/index.js';

/** The part of a run's reduced space that a model keeps. */
export function modelReduction(reduced: ReducedGrouping): ModelReduction {
  const { svd } = reduced;
  return {
    dims: svd.dims,
    oversampling: svd.options.oversampling,
    powerIterations: svd.options.powerIterations,
    components: svd.components,
    singularValues: svd.singularValues,
    centroids: reduced.centroids,
  };
}

/** A new document's TF-IDF rows projected on the model's components, re-normalised, as full CSR rows (rows with no known term stay empty). */
export function projectForModel(reduce: ModelReduction, matrix: Csr): Csr {
  return denseRowsAsCsr(projectRows(matrix, reduce.components, reduce.dims), matrix.rows, reduce.dims);
}


/** The projection of a model whose groups were formed on reduced vectors. */
export interface ModelReduction {
  /** Dimensions d. */
  readonly dims: number;
  readonly oversampling: number;
  readonly powerIterations: number;
  /** d × terms, row-major. */
  readonly components: Float32Array;
  /** Largest first, length d. */
  readonly singularValues: Float64Array;
  /** Unit centres in the reduced space, `[dim * groups + g]`. */
  readonly centroids: Float32Array;
}

/** A model in memory, ready to apply. */
export interface Model {
  readonly createdBy: string;
  /** Cleaning applied before analysis (new documents get the same). */
  readonly cleaning: CleanSettings;
  readonly analyzer: AnalyzerSettings;
  readonly vocabulary: Vocabulary;
  readonly groups: number;
  /** Unit centroids, term-major. */
  readonly centroids: Float32Array;
  readonly labels: readonly { id: number; label: string; terms: readonly { term: string; weight: number }[]; size: number }[];
  /** Per group: a new document whose fit is below this is unmatched by default. */
  readonly minFit: Float32Array;
  /** How `minFit` was calibrated (version 3 on; absent in older models, whose thresholds were the 5% quantile). */
  readonly novelty?: ModelNovelty;
  /** The person's edits applied when the model was made (version 3, only when there were some). */
  readonly edits?: readonly GroupEdit[];
  /** Optional tree over the groups, as written to groups.json. */
  readonly tree?: unknown;
  /** Present when the groups were formed on reduced vectors: new documents are projected and compared with these centres. */
  readonly reduce?: ModelReduction;
}

/** The calibration of a model's `minFit`, as recorded in model.json (version 3). */
export interface ModelNovelty {
  readonly method: 'quantile';
  readonly quantile: number;
  readonly margin: number;
}


function encodeFloat32(a: Float32Array): string {
  const bytes = new Uint8Array(a.length * 4);
  const view = new DataView(bytes.buffer);
  for (let i = 0; i < a.length; i++) view.setFloat32(i * 4, a[i], true);
  return Buffer.from(bytes).toString('base64');
}

function encodeFloat64(a: Float64Array): string {
  const bytes = new Uint8Array(a.length * 8);
  const view = new DataView(bytes.buffer);
  for (let i = 0; i < a.length; i++) view.setFloat64(i * 8, a[i], true);
  return Buffer.from(bytes).toString('base64');
}

function decodeFloats(b64: string, width: 4 | 8, what: string): Float32Array | Float64Array {
  const bytes = Buffer.from(b64, 'base64');
  if (bytes.length % width !== 0) throw new UsageError(`model field ${what} is not a whole number of values`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const n = bytes.length / width;
  const out = width === 4 ? new Float32Array(n) : new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const v = width === 4 ? view.getFloat32(i * 4, true) : view.getFloat64(i * 8, true);
    if (!Number.isFinite(v)) throw new UsageError(`model field ${what} holds a value that is not a finite number`);
    out[i] = v;
  }
  return out;
}

const base64 = z.string().regex(/^[A-Za-z0-9+/]*={0,2}$/, 'not base64');

const analyzerSchema = z.strictObject({
  lang: z.string().min(1).max(20),
  stem: z.boolean(),
  minLength: z.number().int().min(1).max(1000),
  numbers: z.boolean(),
  phrases: z.boolean(),
  stopwords: z.array(z.string().max(200)).max(100_000),
  /** Absent in models written before junk tokens were dropped: read as false. */
  junk: z.boolean().optional(),
});

const termSchema = z.strictObject({ term: z.string(), weight: z.number() });

const cleaningSchema = z.strictObject({
  mode: z.enum(['auto', 'tickets', 'none']),
  rules: z.strictObject({
    mode: z.literal('tickets'),
    quotes: z.boolean(),
    signatures: z.boolean(),
    greetings: z.boolean(),
    boilerplate: z.boolean(),
    boilerplateShare: z.number().gt(0).max(1),
    boilerplateMinDocs: z.number().int().min(2),
    placeholders: z.boolean(),
  }),
  detect: z.boolean().optional(),
});

const modelSchema = z.strictObject({
  format: z.literal('sheaf-model'),
  version: z.number().int(),
  createdBy: z.string().max(200),
  cleaning: cleaningSchema.optional(),
  analyzer: analyzerSchema,
  vocabulary: z.strictObject({
    documents: z.number().int().min(1),
    terms: z.array(z.string().min(1).max(1000)).min(1),
    df: z.array(z.number().int().min(1)),
    idf: base64,
  }),
  groups: z.number().int().min(2).max(1_000_000),
  centroids: base64,
  minFit: z.array(z.number().min(-1).max(1)),
  edits: z.array(editSchema).max(10_000).optional(),
  novelty: z.strictObject({ method: z.literal('quantile'), quantile: z.number().min(0).max(0.5), margin: z.number().min(0).max(1) }).optional(),
  labels: z.array(
    z.strictObject({ id: z.number().int().min(0), label: z.string(), terms: z.array(termSchema), size: z.number().int().min(0) }),
  ),
  tree: z.unknown().optional(),
  reduce: z
    .strictObject({
      dims: z.number().int().min(1).max(100_000),
      oversampling: z.number().int().min(0),
      powerIterations: z.number().int().min(0),
      components: base64,
      singularValues: base64,
      centroids: base64,
    })
    .optional(),
});

/** What a fitted run hands over to become a model. */
export interface ModelSource {
  readonly createdBy: string;
  readonly cleaning: CleanSettings;
  readonly analyzer: AnalyzerSettings;
  readonly vocabulary: Vocabulary;
  readonly groups: number;
  readonly centroids: Float32Array;
  readonly assignments: Int32Array;
  readonly fit: Float32Array;
  readonly labels: Model['labels'];
  readonly tree?: unknown;
  readonly reduce?: ModelReduction;
  /** Calibration of the novelty thresholds (default {@link DEFAULT_NOVELTY_OPTIONS}). */
  readonly novelty?: NoveltyOptions;
  /** A person's edits applied to the groups of this run (recorded as given). */
  readonly edits?: readonly GroupEdit[];
}

/** Serialises a model as JSON text (deterministic for the same run). */
export function modelToJson(src: ModelSource): string {
  const novelty = src.novelty ?? DEFAULT_NOVELTY_OPTIONS;
  const minFit = calibrateThresholds(src.assignments, src.fit, src.groups, novelty);
  const doc = {
    format: 'sheaf-model',
    version: MODEL_VERSION,
    createdBy: src.createdBy,
    cleaning: { mode: src.cleaning.mode, rules: { ...src.cleaning.rules }, detect: src.cleaning.detect },
    analyzer: {
      lang: src.analyzer.lang,
      stem: src.analyzer.stem,
      minLength: src.analyzer.minLength,
      numbers: src.analyzer.numbers,
      phrases: src.analyzer.phrases,
      stopwords: [...src.analyzer.stopwords],
      junk: src.analyzer.junk,
    },
    vocabulary: {
      documents: src.vocabulary.docCount,
      terms: [...src.vocabulary.terms],
      df: Array.from(src.vocabulary.df),
      idf: encodeFloat64(src.vocabulary.idf),
    },
    groups: src.groups,
    centroids: encodeFloat32(src.centroids),
    minFit: Array.from(minFit, (v) => Math.round(v * 1e6) / 1e6),
    novelty: { method: 'quantile', quantile: novelty.quantile, margin: novelty.margin },
    ...(src.edits && src.edits.length ? { edits: src.edits } : {}),
    labels: src.labels.map((l) => ({
      id: l.id,
      label: l.label,
      terms: l.terms.map((t) => ({ term: t.term, weight: t.weight })),
      size: l.size,
    })),
    ...(src.tree !== undefined ? { tree: src.tree } : {}),
    ...(src.reduce
      ? {
          reduce: {
            dims: src.reduce.dims,
            oversampling: src.reduce.oversampling,
            powerIterations: src.reduce.powerIterations,
            components: encodeFloat32(src.reduce.components),
            singularValues: encodeFloat64(src.reduce.singularValues),
            centroids: encodeFloat32(src.reduce.centroids),
          },
        }
      : {}),
  };
  return JSON.stringify(doc) + '\n';
}

/**
 * Parses and checks a model. Anything malformed, foreign, of another version
 * or internally inconsistent is refused with one {@link UsageError} line
 * naming the first problem; nothing is ever written onto a prototype.
 */
export function modelFromJson(text: string, shownPath = 'model'): Model {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    throw new UsageError(`${shownPath} is not valid JSON (${(err as Error).message})`, 'model');
  }
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw) || (raw as { format?: unknown }).format !== 'sheaf-model') {
    throw new UsageError(`${shownPath} is not a sheaf model (no "format": "sheaf-model")`, 'model');
  }
  const version = (raw as { version?: unknown }).version;
  if (!MODEL_VERSIONS_READ.includes(version as number)) {
    throw new UsageError(`${shownPath} has model version ${JSON.stringify(version)}; this sheaf reads versions ${MODEL_VERSIONS_READ.slice(0, -1).join(', ')} and ${MODEL_VERSIONS_READ[MODEL_VERSIONS_READ.length - 1]}`, 'model');
  }
  if (version === 1 && 'cleaning' in (raw as object)) throw new UsageError(`${shownPath} is damaged: cleaning: not part of model version 1`, 'model');
  if (version !== 1 && !('cleaning' in (raw as object))) throw new UsageError(`${shownPath} is damaged: cleaning: missing`, 'model');
  const parsed = modelSchema.safeParse(raw);
  if (!parsed.success) {
    throw new UsageError(`${shownPath} is damaged: ${zodIssueLine(parsed.error)}`, 'model');
  }
  const m = parsed.data;
  const cols = m.vocabulary.terms.length;
  const fail = (why: string): never => {
    throw new UsageError(`${shownPath} is damaged: ${why}`, 'model');
  };
  if (m.vocabulary.df.length !== cols) fail(`vocabulary.df has ${m.vocabulary.df.length} entries for ${cols} terms`);
  const idf = decodeFloats(m.vocabulary.idf, 8, 'vocabulary.idf') as Float64Array;
  if (idf.length !== cols) fail(`vocabulary.idf has ${idf.length} entries for ${cols} terms`);
  const centroids = decodeFloats(m.centroids, 4, 'centroids') as Float32Array;
  if (centroids.length !== cols * m.groups) fail(`centroids hold ${centroids.length} values; ${cols} terms × ${m.groups} groups need ${cols * m.groups}`);
  if (m.minFit.length !== m.groups) fail(`minFit has ${m.minFit.length} entries for ${m.groups} groups`);
  if (m.labels.length !== m.groups) fail(`labels has ${m.labels.length} entries for ${m.groups} groups`);
  m.labels.forEach((l, i) => {
    if (l.id !== i) fail(`labels[${i}].id is ${l.id}; expected ${i}`);
  });
  const seen = new Set<string>();
  for (let i = 0; i < cols; i++) {
    const t = m.vocabulary.terms[i];
    if (seen.has(t)) fail(`vocabulary.terms lists ${JSON.stringify(t)} twice`);
    seen.add(t);
  }
  let reduce: ModelReduction | undefined;
  if (version === 1 && m.reduce) fail('reduce is a version 2 field (this file says version 1)');
  if (version !== 3 && m.novelty) fail(`novelty is a version 3 field (this file says version ${version})`);
  if (version === 3 && !m.novelty) fail('novelty: missing');
  if (version !== 3 && m.edits) fail(`edits is a version 3 field (this file says version ${version})`);
  if (m.reduce) {
    const d = m.reduce.dims;
    const components = decodeFloats(m.reduce.components, 4, 'reduce.components') as Float32Array;
    if (components.length !== d * cols) fail(`reduce.components hold ${components.length} values; ${d} dims × ${cols} terms need ${d * cols}`);
    const singularValues = decodeFloats(m.reduce.singularValues, 8, 'reduce.singularValues') as Float64Array;
    if (singularValues.length !== d) fail(`reduce.singularValues has ${singularValues.length} entries for ${d} dims`);
    const rc = decodeFloats(m.reduce.centroids, 4, 'reduce.centroids') as Float32Array;
    if (rc.length !== d * m.groups) fail(`reduce.centroids hold ${rc.length} values; ${d} dims × ${m.groups} groups need ${d * m.groups}`);
    reduce = { dims: d, oversampling: m.reduce.oversampling, powerIterations: m.reduce.powerIterations, components, singularValues, centroids: rc };
  }
  for (const d of m.vocabulary.df) if (d > m.vocabulary.documents) fail(`a document frequency exceeds the ${m.vocabulary.documents} documents`);
  let vocabulary: Vocabulary;
  try {
    vocabulary = createVocabulary(m.vocabulary.terms, m.vocabulary.df, m.vocabulary.documents);
  } catch (err) {
    return fail(`vocabulary: ${(err as Error).message}`);
  }
  // The stored idf must be the one the document frequencies give (a tampered weight would change every vector).
  for (let i = 0; i < cols; i++) {
    if (!(idf[i] > 0)) fail(`vocabulary.idf of ${JSON.stringify(m.vocabulary.terms[i])} is ${idf[i]}; an idf is above 0`);
    if (Math.abs(vocabulary.idf[i] - idf[i]) > 1e-9) fail(`vocabulary.idf of ${JSON.stringify(m.vocabulary.terms[i])} does not follow from its document frequency`);
  }
  checkUnitCentroids(centroids, m.groups, m.labels, fail);
  if (reduce) checkUnitCentroids(reduce.centroids, m.groups, m.labels, fail);
  return {
    createdBy: m.createdBy,
    // A model records the cleaning decision made when it was fitted, so new documents are cleaned the same way
    // (no detection again); version 1 models cleaned export rows whatever they held.
    cleaning: m.cleaning
      ? resolveCleanStage({ ...m.cleaning.rules, mode: m.cleaning.mode, detect: m.cleaning.detect ?? false })
      : { ...DEFAULT_CLEAN_STAGE, detect: false },
    analyzer: Object.freeze({ ...m.analyzer, junk: m.analyzer.junk ?? false, stopwords: Object.freeze([...m.analyzer.stopwords]) }),
    vocabulary,
    groups: m.groups,
    centroids,
    labels: m.labels,
    minFit: Float32Array.from(m.minFit),
    ...(m.novelty ? { novelty: m.novelty } : {}),
    ...(m.edits ? { edits: m.edits as GroupEdit[] } : {}),
    ...(m.tree !== undefined ? { tree: m.tree } : {}),
    ...(reduce ? { reduce } : {}),
  };
}

/** How far a stored centroid's length may be from 1 (Float32 storage rounds far less than this). */
export const CENTROID_NORM_TOLERANCE = 1e-3;

/**
 * Every centroid of a spherical k-means is a unit vector: its length (L2 norm,
 * over the term-major layout) must be 1 within {@link CENTROID_NORM_TOLERANCE}.
 * A tampered value (say 1e30) would otherwise turn every fit into nonsense.
 */
function checkUnitCentroids(centroids: Float32Array, groups: number, labels: readonly { label: string }[], fail: (why: string) => never): void {
  const norm2 = new Float64Array(groups);
  for (let i = 0; i < centroids.length; i++) {
    const v = centroids[i];
    norm2[i % groups] += v * v;
  }
  for (let g = 0; g < groups; g++) {
    const norm = Math.sqrt(norm2[g]);
    if (!(Math.abs(norm - 1) <= CENTROID_NORM_TOLERANCE)) {
      fail(`the centroid of group ${g} (${JSON.stringify(labels[g].label)}) has length ${norm.toPrecision(4)}; every centroid has length 1`);
    }
  }
}

/** Where each new document falls. */
export interface Assignment {
  /** Nearest group per row, -1 for rows with no known terms. */
  readonly assignments: Int32Array;
  /** Cosine to that group's centroid (in the reduced space when the model has a projection). */
  readonly fit: Float32Array;
  /** Second-nearest group per row, -1 when there is none (rows with no known terms). */
  readonly second: Int32Array;
  /** Cosine to the second group's centroid (0 when there is none). */
  readonly secondFit: Float32Array;
  /** 1 when the fit is below the threshold (or the row has no known terms): the document looks new. */
  readonly unmatched: Uint8Array;
}

/**
 * Files vectors (made with the model's analyzer and vocabulary) into the
 * model's groups: best and second group with their fits, and the rows that
 * look new (fit below the best group's threshold; `minFit` overrides the
 * per-group thresholds with one value). Works on any block of rows, so a
 * streaming caller files chunk by chunk with the same result.
 */
export function fileWithModel(model: Model, matrix: Csr, minFit?: number): Assignment {
  if (minFit !== undefined && (!Number.isFinite(minFit) || minFit < -1 || minFit > 1)) {
    throw new UsageError(`minFit must be a number from -1 to 1; got ${minFit}`, 'minFit');
  }
  const two = model.reduce
    ? bestTwoGroups(projectForModel(model.reduce, matrix), model.reduce.centroids, model.groups)
    : bestTwoGroups(matrix, model.centroids, model.groups);
  const unmatched = new Uint8Array(matrix.rows);
  for (let r = 0; r < matrix.rows; r++) {
    const g = two.best[r]!;
    if (g < 0) unmatched[r] = 1;
    else if (two.bestFit[r]! < (minFit ?? model.minFit[g]!)) unmatched[r] = 1;
  }
  return { assignments: two.best, fit: two.bestFit, second: two.second, secondFit: two.secondFit, unmatched };
}

