/**
 * Grouping: spherical k-means, average-link trees, Newick, quality scores.
 *
 * @module
 */
export * from './kmeans.js';
export * from './tree.js';
export * from './newick.js';
export * from './quality.js';
export * from './partition.js';
export * from './second.js';
