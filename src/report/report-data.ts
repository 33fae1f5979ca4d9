import type { Continuity } from '../continuity/match.js';

/**
 * The data the HTML report is drawn from: plain JSON-friendly values that the
 * command assembles from a run. Only what the views need is included.
 *
 * @module
 */

/** One piece of a word-level difference between a duplicate and its set's representative. */
export interface ReportDiffPiece {
  readonly kind: 'same' | 'added' | 'removed';
  readonly text: string;
}

/** Everything `renderReport` draws. */
export interface ReportData {
  /** `group` (default): a grouping run; `duplicates`: the near-copy part alone (`sheaf duplicates`). */
  readonly kind?: 'group' | 'duplicates';
  /** Page title, e.g. "sheaf — tickets.csv". */
  readonly title: string;
  /** ISO time the run finished (shown, not computed by the report). */
  readonly createdAt: string;
  /** sheaf version string. */
  readonly version: string;
  /** Settings to show in the overview, already flattened to display strings. */
  readonly settings: readonly { readonly name: string; readonly value: string }[];
  readonly counts: {
    readonly documents: number;
    readonly grouped: number;
    readonly withoutTerms: number;
    /** Documents set apart as unsorted (absent when that option was off). */
    readonly unsorted?: number;
    readonly skipped: number;
    readonly terms: number;
  };
  readonly groups: readonly {
    readonly id: number;
    readonly label: string;
    readonly size: number;
    /** Mean cosine of members to the centroid. */
    readonly cohesion: number;
    /** Highest cosine between this group's centroid and another's, when known. */
    readonly separation?: number;
    /** Terms that name it; `inGroup`/`outside`: share of the group's documents / of the other documents containing it. */
    readonly terms: readonly { readonly term: string; readonly weight: number; readonly inGroup?: number; readonly outside?: number }[];
    /** True when the group's cohesion is low relative to the others. */
    readonly mixed?: boolean;
    /** Exemplar document ids, closest first. */
    readonly exemplars: readonly string[];
  }[];
  /** How the number of groups was chosen automatically (knee of the objective over the tree's cuts), when it was. */
  readonly choice?: {
    readonly chosen: number;
    readonly treeLeaves: number;
    readonly warnings: readonly string[];
    readonly tried: readonly {
      readonly groups: number;
      readonly objective: number;
      readonly knee: number;
      readonly silhouette: number | null;
      readonly chosen: boolean;
    }[];
  };
  /** Tree over the groups (leaves 0..groups-1, node groups+i made by merge i), when built. */
  readonly tree?: {
    readonly merges: readonly { readonly left: number; readonly right: number; readonly similarity: number; readonly size: number }[];
  };
  /** Every document, in input order. `group` is -1 for documents in no group; `duplicateSet` -1 for none. */
  readonly documents: readonly ReportDocument[];
  /** The export's own columns, in order; each document's `fields` holds one value per column. */
  readonly columns?: readonly string[];
  /** Group × group cosine of the group centres, row-major (`similarity[a * groups + b]`), in group order. */
  readonly similarity?: readonly number[];
  /** Name of each merge of the tree (node `groups + i`), from the summed term weights of the groups below it. */
  readonly mergeNames?: readonly string[];
  /** Scores against known labels, and where each label went, when `--truth` was given. */
  readonly evaluation?: ReportEvaluation;
  /** Counts per group per period, when a date was given. */
  readonly trends?: ReportTrends;
  /** How the groups continue those of a previous run (`--previous`). */
  readonly continuity?: Continuity;
  /** Near-duplicate sets, strongest first, when searched for. */
  readonly duplicates?: {
    readonly threshold: number;
    readonly by: string;
    readonly sets: readonly {
      readonly id: number;
      readonly representative: string;
      readonly members: readonly { readonly id: string; readonly similarity: number; readonly diff?: readonly ReportDiffPiece[] }[];
    }[];
  };
}

/** One document of the report. Fields after `duplicateSet` are optional (a report made from less data leaves them out). */
export interface ReportDocument {
  readonly id: string;
  readonly title: string;
  readonly group: number;
  readonly fit: number;
  readonly duplicateSet: number;
  /** Closest group other than its own (-1 for none) and own cosine minus its cosine. */
  readonly next?: number;
  readonly margin?: number;
  /** One value per entry of {@link ReportData.columns}. */
  readonly fields?: readonly string[];
  /** The text as written (before cleaning). */
  readonly text?: string;
  /** The text as analysed, when cleaning changed it. */
  readonly cleaned?: string;
  /** Link to the file (relative to the report's folder, or a file:// URL), for documents read from files. */
  readonly link?: string;
  /** Period key of its date (see {@link ReportTrends}), absent when it has none. */
  readonly period?: string;
}

/** Scores of the groups against known labels (see `Evaluation` in outputs.ts). */
export interface ReportEvaluation {
  readonly field: string;
  readonly scored: number;
  readonly leftOut: number;
  readonly scores: readonly { readonly name: string; readonly value: number }[];
  /** One row per known label, largest first: its size and where its documents went (group id as text, or `unsorted`). */
  readonly contingency: readonly { readonly label: string; readonly size: number; readonly groups: readonly { readonly group: string; readonly count: number }[] }[];
}

/** Counts per group per period (see src/trends). */
export interface ReportTrends {
  readonly column: string;
  readonly granularity: 'day' | 'week' | 'month';
  /** How times were read (time zone). */
  readonly zone: string;
  /** Period keys, oldest first (`2029-03-17`, `2029-W11`, `2029-03`). */
  readonly periods: readonly string[];
  /** Per group (in group order), one count per period. */
  readonly counts: readonly (readonly number[])[];
  /** Groups that grew most in the last period. */
  readonly rising: readonly number[];
  readonly unparsed: number;
  readonly unparsedIds: readonly string[];
}
