/**
 * The registry of grouping methods. Adding a method: write a module that
 * exports a {@link GroupingMethod} (see `./kmeans.ts`) and add it to
 * {@link METHODS}; its name, its result fields and its outputs follow from
 * here.
 *
 * @module
 */
import type { GroupingMethod } from './method.js';
import { kmeansMethod } from './kmeans.js';
import { agglomerativeMethod } from './agglomerative.js';

/** Every grouping method, the default first. */
export const METHODS = [kmeansMethod, agglomerativeMethod] as const;

/** A registered method. */
export type RegisteredMethod = (typeof METHODS)[number];

/** The name of a registered method (the `method` option). */
export type GroupMethod = RegisteredMethod['name'];

/** The result fields of each method, tagged by `method`: a discriminated union over the registry. */
export type MethodOutcome = RegisteredMethod extends infer M
  ? M extends GroupingMethod<infer N, infer O>
    ? { readonly method: N } & O
    : never
  : never;

/** The names of the registered methods, in registry order. */
export const METHOD_NAMES: readonly GroupMethod[] = METHODS.map((m) => m.name);

/** The method registered under `name`, or undefined. */
export function findMethod(name: string): RegisteredMethod | undefined {
  return METHODS.find((m) => m.name === name);
}

/** The method of a result (its `method` field names a registered one). */
export function methodOf(result: { readonly method: GroupMethod }): GroupingMethod<string, object> {
  return findMethod(result.method) as GroupingMethod<string, object>;
}

export type { GroupingMethod, MethodInput, Formed } from './method.js';
export { DEFAULT_CHOOSE_OPTIONS, type ChooseOptions, type GroupChoice, type MethodSettings } from './choose.js';
