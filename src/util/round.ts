/**
 * Rounding for JSON output.
 *
 * @module
 */

/** Rounds for JSON output so files stay readable and stable. */
export function round(value: number, digits: number): number {
  const f = 10 ** digits;
  const r = Math.round(value * f) / f;
  return Object.is(r, -0) ? 0 : r;
}
