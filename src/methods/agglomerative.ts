/**
 * Grouping method `agglomerative`: the exact document-level average-link tree
 * (within a memory limit), cut at a number of groups, at a similarity, or at
 * the knee of the objective over its cuts.
 *
 * @module
 */
import type { Csr } from '../types.js';
import { cutToGroups, documentAverageLink, type Dendrogram } from '../cluster/tree.js';
import { canonicalGroups, partitionFromAssignments } from '../cluster/partition.js';
import { toNewick } from '../cluster/newick.js';
import { rowsWithEntries, selectRows } from '../util/csr.js';
import { checkGroupsFit, countGroups, cutTree, type GroupChoice, type MethodSettings } from './choose.js';
import type { Formed, GroupingMethod } from './method.js';

/** The fields method `agglomerative` adds to the result. */
export interface AgglomerativeOutcome {
  /** The document-level tree; leaf i is row `treeRows[i]`. */
  readonly documentTree: Dendrogram;
  /** The rows with terms, in the tree's leaf order. */
  readonly treeRows: Int32Array;
}

/** Average-link (UPGMA) over the documents, cut into groups. */
export const agglomerativeMethod: GroupingMethod<'agglomerative', AgglomerativeOutcome> = {
  name: 'agglomerative',
  title: 'average-link over documents',
  stage: 'agglomerative',
  leaves: { short: 'documents', long: 'documents' },
  checkData: checkGroupsFit,
  // eslint-disable-next-line require-yield
  *form({ matrix, nonEmpty, settings }) {
    return formByDocumentTree(matrix, nonEmpty, settings);
  },
  runRecord() {
    return {};
  },
  outputs({ documentTree, treeRows }, docs) {
    // `documents.nwk`: the document-level tree in Newick, leaves named by document id.
    return new Map([['documents.nwk', toNewick(documentTree, Array.from(treeRows, (r) => docs[r]!.id)) + '\n']]);
  },
};

function formByDocumentTree(matrix: Csr, nonEmpty: number, settings: MethodSettings): Formed<AgglomerativeOutcome> {
  const rows = rowsWithEntries(matrix);
  const sub = selectRows(matrix, rows);
  const docTree = documentAverageLink(sub, settings.tree);
  let leafClusters: Int32Array;
  let choice: GroupChoice | null = null;
  if (typeof settings.groups === 'number') {
    leafClusters = cutToGroups(docTree, settings.groups);
  } else {
    const identity = Int32Array.from({ length: nonEmpty }, (_, i) => i);
    ({ leafClusters, choice } = cutTree(sub, identity, docTree, nonEmpty, settings));
  }
  const k = countGroups(leafClusters);
  const raw = new Int32Array(matrix.rows).fill(-1);
  for (let i = 0; i < nonEmpty; i++) raw[rows[i]!] = leafClusters[i]!;
  const partition = partitionFromAssignments(matrix, canonicalGroups(raw, k), k);
  return { partition, choice, outcome: { documentTree: docTree, treeRows: rows } };
}
