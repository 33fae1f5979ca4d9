/**
 * vectorize: term lists -> vocabulary and TF-IDF rows (sublinear tf,
 * smoothed idf, L2-normalised) in a CSR matrix on typed arrays.
 *
 * @module
 */

export {
  ADAPTIVE_DF_MIN_DOCS,
  DEFAULT_VECTORIZE_OPTIONS,
  adaptiveDocumentFrequency,
  effectiveMinDf,
  resolveVectorizeOptions,
  type VectorizeOptions,
} from './options.js';
export {
  createVocabulary,
  fitTfidf,
  transformTfidf,
  type TfidfFit,
  type Vocabulary,
} from './tfidf.js';
export { rowDot } from '../util/csr.js';
export { smoothIdf, weightRow } from './weight.js';
export { MATRIX_MARKET_HEADER, formatFloat32, matrixMarketChunks, toMatrixMarket } from './matrix-market.js';
