/**
 * The seam every grouping method plugs into. A method is one module that
 * exports a {@link GroupingMethod} and one line in `./index.ts`'s registry;
 * the pipeline, the outputs, the report and run.json reach it only through
 * this interface.
 *
 * @module
 */
import type { Csr, Doc } from '../types.js';
import type { PipelineHooks } from '../hooks.js';
import type { Partition } from '../cluster/partition.js';
import type { PipelineStep, StepReply } from '../runners.js';
import type { GroupChoice, MethodSettings } from './choose.js';

/** What a method is given: the TF-IDF rows (empty rows included) and the settings. */
export interface MethodInput {
  readonly matrix: Csr;
  /** Rows with at least one term; only they are grouped. */
  readonly nonEmpty: number;
  readonly settings: MethodSettings;
  readonly hooks: PipelineHooks;
}

/** What a method hands back: the final groups, how their number was chosen, and its own extras. */
export interface Formed<Outcome extends object> {
  readonly partition: Partition;
  readonly choice: GroupChoice | null;
  /** The method's own results; they become fields of the run's result beside `method`. */
  readonly outcome: Outcome;
}

/** A way of forming groups. `Name` is its `method` value; `Outcome` its own fields of the result. */
export interface GroupingMethod<Name extends string, Outcome extends object> {
  readonly name: Name;
  /** One line for the report's settings (e.g. "spherical k-means"). */
  readonly title: string;
  /** Stage name in the timings. */
  readonly stage: string;
  /** What the leaves of a tree this method cuts are: short and long words for messages. */
  readonly leaves: { readonly short: string; readonly long: string };
  /**
   * Option checks that need the data (called once the vectors exist, before
   * any grouping); throws `UsageError`. The data-free options are resolved by
   * `resolveGroupOptions` at the boundary.
   */
  checkData?(settings: MethodSettings, nonEmpty: number): void;
  /** Forms the groups; yields the k-means runs it needs (see `runners.ts`) and receives their results. */
  form(input: MethodInput): Generator<PipelineStep, Formed<Outcome>, StepReply>;
  /** The method's own part of run.json (keys merged into it), or an empty object. */
  runRecord(outcome: Outcome): Record<string, unknown>;
  /** The method's own output files (name → content), from the outcome and the documents in row order. */
  outputs(outcome: Outcome, docs: readonly Doc[]): ReadonlyMap<string, string>;
}
