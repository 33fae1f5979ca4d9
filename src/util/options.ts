/**
 * Small helpers for merging an options object with its defaults once.
 *
 * @module
 */

/** Returns a copy of `partial` without keys whose value is `undefined`, so they do not hide defaults when spread. */
export function stripUndefined<T extends object>(partial: T): Partial<T> {
  const out: Partial<T> = {};
  for (const key of Object.keys(partial) as (keyof T)[]) {
    if (partial[key] !== undefined) out[key] = partial[key];
  }
  return out;
}
