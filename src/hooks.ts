/**
 * The hooks the edges pass to the grouping pipeline: a clock, progress, and a
 * person's steering (a previous run to continue, edits, a guide). Kept apart
 * from types.ts, which stays a leaf that every stage can import.
 *
 * @module
 */
import type { ContinuityOptions, PreviousGroups } from './continuity/match.js';
import type { GroupEdits } from './edits/index.js';
import type { Guide } from './edits/guide.js';

/** Hooks the edges pass in; all optional. */
export interface PipelineHooks {
  /** Milliseconds from some fixed point (for stage timings). Without it, timings are 0. */
  readonly now?: () => number;
  /** Called as a stage makes progress. */
  readonly progress?: (stage: string, done: number, total: number) => void;
  /** A previous run's groups to continue: numbers and names carried where a group matches one closely (src/continuity). */
  readonly previous?: { readonly groups: PreviousGroups; readonly options: ContinuityOptions };
  /** A person's edits to apply to the final groups (src/edits). */
  readonly edits?: GroupEdits;
  /** Named groups with seed terms or example ids that k-means starts from (src/edits/guide.ts). */
  readonly guide?: Guide;
}
