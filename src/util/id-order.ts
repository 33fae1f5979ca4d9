/**
 * The canonical order of documents: by id, runs of digits compared as
 * numbers. Every stage that must not depend on the order inputs were given in
 * (grouping, near-copies) sorts with it.
 *
 * @module
 */
import type { Doc } from '../types.js';

/**
 * Compares ids with runs of digits taken as numbers ("row 2" before "row 10"),
 * then by code units, so the order is total and locale-free.
 */
export function compareIds(a: string, b: string): number {
  const ra = a.match(/\d+|\D+/g) ?? [];
  const rb = b.match(/\d+|\D+/g) ?? [];
  const n = Math.min(ra.length, rb.length);
  for (let i = 0; i < n; i++) {
    const x = ra[i];
    const y = rb[i];
    if (x === y) continue;
    const dx = x.charCodeAt(0) >= 48 && x.charCodeAt(0) <= 57;
    const dy = y.charCodeAt(0) >= 48 && y.charCodeAt(0) <= 57;
    if (dx && dy) {
      const nx = x.replace(/^0+/, '');
      const ny = y.replace(/^0+/, '');
      if (nx.length !== ny.length) return nx.length - ny.length;
      if (nx !== ny) return nx < ny ? -1 : 1;
      continue;
    }
    return x < y ? -1 : 1;
  }
  if (ra.length !== rb.length) return ra.length - rb.length;
  return a < b ? -1 : a > b ? 1 : 0;
}

/**
 * Puts documents in id order so the result does not depend on the order the
 * inputs were given in (ids are unique after ingest; equal ids keep their order).
 */
export function canonicalOrder(input: readonly Doc[]): { docs: Doc[]; inputOrder: Int32Array } {
  const order = Array.from(input.keys()).sort((i, j) => compareIds(input[i].id, input[j].id) || i - j);
  const inputOrder = new Int32Array(input.length);
  order.forEach((original, row) => {
    inputOrder[original] = row;
  });
  return { docs: order.map((i) => input[i]), inputOrder };
}
