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
    readonly terms: readonly { readonly term: string; readonly weight: number }[];
    /** True when the group's cohesion is low relative to the others. */
    readonly mixed?: boolean;
    /** Exemplar document ids, closest first. */
    readonly exemplars: readonly string[];
    /** Position on the 2-D map of groups. */
    readonly x: number;
    readonly y: number;
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
  readonly documents: readonly {
    readonly id: string;
    readonly title: string;
    readonly group: number;
    readonly fit: number;
    readonly duplicateSet: number;
  }[];
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
