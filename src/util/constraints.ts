/**
 * Declarative option checks: per key a spec (type, range, choices), checked
 * in one pass with one-line messages that name the option, the bad value and
 * what is allowed. Unknown keys are refused with the nearest known name.
 * (In the spirit of per-parameter constraint tables, common practice in
 * machine-learning libraries.)
 *
 * @module
 */
import { UsageError, show } from './errors.js';

/** What one option accepts. */
export type Constraint =
  | { readonly kind: 'whole'; readonly min?: number; readonly max?: number }
  | { readonly kind: 'number'; readonly min?: number; readonly max?: number; readonly above?: number; readonly below?: number }
  | { readonly kind: 'boolean' }
  | { readonly kind: 'choice'; readonly values: readonly (string | number | boolean | null)[] };

/** A spec per key of an options object. */
export type Constraints<T> = { readonly [K in keyof T]?: Constraint };

/** Edit distance of two short names (insertions, deletions, substitutions, adjacent swaps). */
function distance(a: string, b: string): number {
  const x = a.toLowerCase();
  const y = b.toLowerCase();
  const d: number[][] = Array.from({ length: x.length + 1 }, (_, i) => Array.from({ length: y.length + 1 }, (_, j) => (i === 0 ? j : j === 0 ? i : 0)));
  for (let i = 1; i <= x.length; i++) {
    for (let j = 1; j <= y.length; j++) {
      const cost = x[i - 1] === y[j - 1] ? 0 : 1;
      let v = Math.min(d[i - 1]![j]! + 1, d[i]![j - 1]! + 1, d[i - 1]![j - 1]! + cost);
      if (i > 1 && j > 1 && x[i - 1] === y[j - 2] && x[i - 2] === y[j - 1]) v = Math.min(v, d[i - 2]![j - 2]! + 1);
      d[i]![j] = v;
    }
  }
  return d[x.length]![y.length]!;
}

/** The known name nearest to `name` when it is close enough to be a slip (at most 2 edits, and under half its length). */
export function nearestName(name: string, known: readonly string[]): string | null {
  let best: string | null = null;
  let bestD = Infinity;
  for (const k of known) {
    const dd = distance(name, k);
    if (dd < bestD) {
      bestD = dd;
      best = k;
    }
  }
  return best !== null && bestD <= 2 && bestD < Math.max(2, name.length / 2) ? best : null;
}

/**
 * Throws unless `value` is a plain object whose keys are all in `known`.
 * `where` prefixes the names in the message (`kmeans` → `kmeans.restart`);
 * the error's option is the full dotted name. Messages:
 * `unknown option kmeans.restart; did you mean restarts?` or, with no near
 * name, `unknown option kmeans.x; known: restarts, maxIterations, …`.
 */
export function checkKeys(value: unknown, known: readonly string[], where = ''): void {
  const label = where ? `${where} options` : 'options';
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw new UsageError(`${label} must be an object; got ${show(value)}`, where || undefined);
  }
  for (const key of Object.keys(value)) {
    if (known.includes(key)) continue;
    const full = where ? `${where}.${key}` : key;
    const near = nearestName(key, known);
    throw new UsageError(`unknown option ${full}; ${near !== null ? `did you mean ${near}?` : `known: ${known.join(', ')}`}`, full);
  }
}

/** What a constraint allows, in words. */
export function allowed(c: Constraint): string {
  switch (c.kind) {
    case 'whole':
      return c.min !== undefined && c.max !== undefined
        ? `a whole number from ${c.min} to ${c.max}`
        : c.min !== undefined
          ? `a whole number >= ${c.min}`
          : c.max !== undefined
            ? `a whole number <= ${c.max}`
            : 'a whole number';
    case 'number': {
      const parts: string[] = [];
      if (c.min !== undefined) parts.push(`>= ${c.min}`);
      if (c.above !== undefined) parts.push(`> ${c.above}`);
      if (c.max !== undefined) parts.push(`<= ${c.max}`);
      if (c.below !== undefined) parts.push(`< ${c.below}`);
      return parts.length ? `a number ${parts.join(' and ')}` : 'a finite number';
    }
    case 'boolean':
      return 'true or false';
    case 'choice':
      return `one of ${c.values.map((v) => (typeof v === 'string' ? v : String(v))).join(', ')}`;
  }
}

/** True when `v` meets `c`. */
export function meets(v: unknown, c: Constraint): boolean {
  switch (c.kind) {
    case 'whole':
      return typeof v === 'number' && Number.isSafeInteger(v) && (c.min === undefined || v >= c.min) && (c.max === undefined || v <= c.max);
    case 'number':
      return (
        typeof v === 'number' &&
        Number.isFinite(v) &&
        (c.min === undefined || v >= c.min) &&
        (c.max === undefined || v <= c.max) &&
        (c.above === undefined || v > c.above) &&
        (c.below === undefined || v < c.below)
      );
    case 'boolean':
      return typeof v === 'boolean';
    case 'choice':
      return c.values.includes(v as string);
  }
}

/**
 * Checks every key of `values` that has a constraint; throws
 * `UsageError('<key> must be <allowed>; got <value>', key)` at the first that
 * fails.
 */
export function checkValues<T extends object>(values: T, constraints: Constraints<T>): void {
  for (const key of Object.keys(constraints) as (keyof T & string)[]) {
    const c = constraints[key]!;
    const v = values[key];
    if (!meets(v, c)) throw new UsageError(`${key} must be ${allowed(c)}; got ${show(v)}`, key);
  }
}
