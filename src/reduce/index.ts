/**
 * Reduced vectors (latent semantic analysis): truncated SVD of the TF-IDF
 * rows by the randomized range finder (Halko, Martinsson & Tropp 2011), rows
 * re-normalised, and the helpers that group in that space while naming from
 * TF-IDF terms. Pure.
 *
 * @module
 */
export * from './options.js';
export * from './svd.js';
export * from './space.js';
