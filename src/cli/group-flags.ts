/**
 * The flags that decide how groups are formed (`group`, `tree`) and the
 * resolved library options they give.
 *
 * @module
 */
import type { Command } from 'commander';
import type { CliIo } from './io.js';
import { decimal, wholeNumber } from './parse.js';
import { analysisOptionsFromFlags, cleanModeFromFlags, ingestOptionsFromFlags, type GroupFlags } from './inputs.js';
import type { IngestOptions } from '../ingest/index.js';
import { withTermCounts } from './term-counts.js';
import { resolveGroupOptions, type GroupOptions, type ResolvedGroupOptions } from '../pipeline.js';
import { resolveFindDuplicatesOptions } from '../near-copies.js';
import { UsageError } from '../util/errors.js';
import type { Doc } from '../types.js';

/** Adds the flags that decide how groups are formed. */
export function addGroupingFlags(cmd: Command, groupsHelp: string): Command {
  return cmd
    .option('--groups <k>', groupsHelp)
    .option('--range <a..b>', 'with --groups auto: the numbers of groups tried (default 2..20)')
    .option('--min-similarity <s>', 'instead of --groups: cut the tree where average similarity falls below s')
    .option('--method <m>', 'kmeans (any size) or agglomerative (document-level average-link, smaller piles)', 'kmeans')
    .option('--sample <n>', 'documents sampled for silhouette scores (default 2000)')
    .option('--restarts <n>', 'seeded k-means runs; the best is kept')
    .option('--max-iterations <n>', 'cap on k-means iterations per run')
    .option('--seed <n>', 'random seed; the same seed and input give the same output')
    .option('--terms <n>', 'terms listed per group')
    .option('--truth <field>', 'compare the groups with a column of known labels')
    .option('--threads <n>', 'threads for k-means on large inputs (default: up to 2, the cores there are)')
    .option('--reduce <dims>', 'group in reduced vectors: a truncated SVD (latent semantic analysis) of the TF-IDF rows kept to this many dimensions, or auto (the default: 50 for piles of up to 100,000 documents); names still come from the terms')
    .option('--no-reduce', 'group on the TF-IDF rows themselves')
    .option('--unsorted', 'set apart documents that fit no group well (fit below a threshold learned from the pile) as unsorted')
    .option('--split-mixed', 'split each group flagged as mixed (low cohesion) in two by bisecting k-means')
    .option('--memory <size>', 'refuse to start what would need more memory than this, like 8G (default: 60% of the machine)');
}

/** `4..40` → [4, 40]. */
function parseRange(value: string | undefined): [number, number] | undefined {
  if (value === undefined) return undefined;
  const m = /^\s*(\d+)\s*(?:\.\.|-|:)\s*(\d+)\s*$/.exec(value);
  if (!m) throw new UsageError(`range must look like 4..40 (two whole numbers); got ${JSON.stringify(value)}`, 'range');
  return [Number(m[1]), Number(m[2])];
}

/**
 * Turns flags into the library's option objects, resolved here once, before
 * any reading (the pipeline takes the resolved object as it is).
 * `memoryLimitBytes` bounds a document-level tree's distance matrix.
 */
export async function groupOptionsFromFlags(
  flags: GroupFlags,
  io: CliIo,
  memoryLimitBytes?: number,
): Promise<{ ingest: IngestOptions; group: ResolvedGroupOptions }> {
  const ingestOptions = ingestOptionsFromFlags(flags);
  const groups = flags.groups === undefined ? undefined : flags.groups.trim().toLowerCase() === 'auto' ? 'auto' : wholeNumber(flags.groups, 'groups');
  const group: GroupOptions = {
    groups,
    minSimilarity: decimal(flags.minSimilarity, 'minSimilarity'),
    method: flags.method as GroupOptions['method'],
    choose: { range: parseRange(flags.range), sampleSize: wholeNumber(flags.sample, 'sample') },
    ...(await withTermCounts(await analysisOptionsFromFlags(flags, io), flags.termCounts, io.cwd)),
    kmeans: {
      restarts: wholeNumber(flags.restarts, 'restarts'),
      maxIterations: wholeNumber(flags.maxIterations, 'maxIterations'),
    },
    seed: wholeNumber(flags.seed, 'seed'),
    clean: { mode: cleanModeFromFlags(flags) ?? 'auto' },
    label: { terms: wholeNumber(flags.terms, 'terms') },
    refine: { unsorted: flags.unsorted, splitMixed: flags.splitMixed },
    ...(flags.reduce !== undefined ? { reduce: flags.reduce === false ? false : flags.reduce.trim().toLowerCase() === 'auto' ? 'auto' : { dims: wholeNumber(flags.reduce, 'reduce') } } : {}),
    ...(memoryLimitBytes !== undefined ? { tree: { memoryLimitBytes } } : {}),
  };
  return { ingest: ingestOptions, group: resolveGroupOptions(group) };
}

/** Options of the near-copy search a grouping run adds with `--duplicates t` (the flag names the threshold). */
export function groupDuplicateOptions(value: string, group: ResolvedGroupOptions): ReturnType<typeof resolveFindDuplicatesOptions> {
  // Diffs for the strongest sets feed the report. (The flag of `threshold` here is --duplicates: see flag-names.ts.)
  return resolveFindDuplicatesOptions({ threshold: decimal(value, 'duplicates'), show: 50, analyzer: group.analyzer, vectorize: group.vectorize });
}


