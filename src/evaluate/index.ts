/**
 * External scores: how well a grouping agrees with known labels.
 *
 * Everything works from a {@link Contingency} table (truth × predicted counts),
 * so the table is built once and every score reads it. The definitions follow
 * Manning, Raghavan & Schütze, *Introduction to Information Retrieval* (2008),
 * §16.3 (purity, NMI, Rand index), Hubert & Arabie (1985) for the adjusted Rand
 * index and Rosenberg & Hirschberg (2007) for homogeneity, completeness and
 * V-measure. Logarithms are natural; NMI uses the arithmetic mean of the two
 * entropies as its normaliser (scikit-learn's default, and equal to V-measure
 * with beta = 1).
 *
 * Degenerate inputs follow scikit-learn's conventions, so values can be checked
 * against it:
 * - n = 0 (no usable pairs): every score is 1 (nothing is misplaced).
 * - both labelings a single group: every score is 1.
 * - one labeling a single group and the other not: NMI 0, ARI 0, V-measure 0;
 *   homogeneity is 1 when the truth is a single class, completeness is 1 when
 *   the prediction is a single group.
 * - all singletons on both sides: every score is 1.
 * Entries where either code is negative (unassigned, unlabelled) are left out
 * of the table and of n.
 *
 * @module
 */

/**
 * Maps string labels to dense integer codes. `names` is sorted by UTF-16 code
 * unit order (plain `<`), so the coding does not depend on input order:
 * `codes[i]` is the index of `labels[i]` in `names`.
 */
export function encodeLabels(labels: readonly string[]): { codes: Int32Array; names: string[] } {
  const distinct = new Set<string>(labels);
  const names = [...distinct].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  const index = new Map<string, number>();
  for (let i = 0; i < names.length; i++) index.set(names[i]!, i);
  const codes = new Int32Array(labels.length);
  for (let i = 0; i < labels.length; i++) codes[i] = index.get(labels[i]!)!;
  return { codes, names };
}

/**
 * Truth × predicted count table. `counts[t * cols + p]` is the number of
 * items with true class `t` and predicted group `p` (truth-major). `rows` is
 * one more than the largest true code seen, `cols` one more than the largest
 * predicted code seen (among pairs kept), so absent codes give empty rows or
 * columns, which no score is affected by.
 */
export interface Contingency {
  readonly rows: number;
  readonly cols: number;
  readonly counts: Int32Array;
  readonly rowTotals: Int32Array;
  readonly colTotals: Int32Array;
  readonly n: number;
}

/**
 * Builds the contingency table of two labelings of the same items. Pairs where
 * either code is negative are ignored. Throws a RangeError when the arrays
 * differ in length.
 */
export function contingency(truth: Int32Array, predicted: Int32Array): Contingency {
  if (truth.length !== predicted.length) {
    throw new RangeError(`truth and predicted labelings differ in length: ${truth.length} vs ${predicted.length}`);
  }
  let rows = 0;
  let cols = 0;
  for (let i = 0; i < truth.length; i++) {
    const t = truth[i]!;
    const p = predicted[i]!;
    if (t < 0 || p < 0) continue;
    if (t + 1 > rows) rows = t + 1;
    if (p + 1 > cols) cols = p + 1;
  }
  const counts = new Int32Array(rows * cols);
  const rowTotals = new Int32Array(rows);
  const colTotals = new Int32Array(cols);
  let n = 0;
  for (let i = 0; i < truth.length; i++) {
    const t = truth[i]!;
    const p = predicted[i]!;
    if (t < 0 || p < 0) continue;
    counts[t * cols + p]! += 1;
    rowTotals[t]! += 1;
    colTotals[p]! += 1;
    n++;
  }
  return { rows, cols, counts, rowTotals, colTotals, n };
}

/**
 * Purity (IIR §16.3): the share of items that belong to the majority true
 * class of their predicted group, `(1/n) Σ_groups max_class count`. 1 when n = 0.
 */
export function purity(c: Contingency): number {
  if (c.n === 0) return 1;
  let total = 0;
  for (let p = 0; p < c.cols; p++) {
    let best = 0;
    for (let t = 0; t < c.rows; t++) {
      const v = c.counts[t * c.cols + p]!;
      if (v > best) best = v;
    }
    total += best;
  }
  return total / c.n;
}

/** Number of non-zero entries in a totals vector (labels actually present). */
function present(totals: Int32Array): number {
  let k = 0;
  for (let i = 0; i < totals.length; i++) if (totals[i]! > 0) k++;
  return k;
}

/** Shannon entropy (nats) of a totals vector summing to n. */
function entropy(totals: Int32Array, n: number): number {
  if (n === 0) return 0;
  const logN = Math.log(n);
  let h = 0;
  for (let i = 0; i < totals.length; i++) {
    const v = totals[i]!;
    if (v > 0) h -= (v / n) * (Math.log(v) - logN);
  }
  return h > 0 ? h : 0;
}

/** Mutual information (nats) between the two labelings of the table. */
function mutualInformation(c: Contingency): number {
  const n = c.n;
  if (n === 0) return 0;
  if (present(c.rowTotals) <= 1 || present(c.colTotals) <= 1) return 0;
  const logN = Math.log(n);
  let mi = 0;
  for (let t = 0; t < c.rows; t++) {
    const a = c.rowTotals[t]!;
    if (a === 0) continue;
    for (let p = 0; p < c.cols; p++) {
      const v = c.counts[t * c.cols + p]!;
      if (v === 0) continue;
      const b = c.colTotals[p]!;
      // log(n·v / (a·b)), written as differences of logs to keep precision
      mi += (v / n) * (Math.log(v) + logN - Math.log(a) - Math.log(b));
    }
  }
  return mi > 0 ? mi : 0;
}

/**
 * Normalised mutual information, `I(truth; predicted) / ((H(truth) + H(predicted)) / 2)`
 * (arithmetic-mean normaliser). 1 when both labelings have at most one group
 * (including n = 0); 0 when the mutual information is 0 otherwise.
 */
export function nmi(c: Contingency): number {
  const classes = present(c.rowTotals);
  const groups = present(c.colTotals);
  if (classes <= 1 && groups <= 1 && classes === groups) return 1;
  const mi = mutualInformation(c);
  if (mi === 0) return 0;
  const norm = (entropy(c.rowTotals, c.n) + entropy(c.colTotals, c.n)) / 2;
  return mi / norm;
}

/** Sum over a vector of C(v, 2) = v(v-1)/2; exact in doubles while n stays below about 10^8. */
function pairSum(values: Int32Array): number {
  let s = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    s += (v * (v - 1)) / 2;
  }
  return s;
}

/**
 * Pair counts over unordered item pairs: `together` = same class and same
 * group (TP), `sameGroup` = pairs in one group, `sameClass` = pairs in one class,
 * `all` = C(n, 2).
 */
function pairCounts(c: Contingency): { together: number; sameGroup: number; sameClass: number; all: number } {
  return {
    together: pairSum(c.counts),
    sameGroup: pairSum(c.colTotals),
    sameClass: pairSum(c.rowTotals),
    all: (c.n * (c.n - 1)) / 2,
  };
}

/**
 * Rand index (IIR §16.3): the share of item pairs on which the two labelings
 * agree (both together or both apart), `(TP + TN) / C(n, 2)`. 1 when there are
 * fewer than two items.
 */
export function randIndex(c: Contingency): number {
  const { together, sameGroup, sameClass, all } = pairCounts(c);
  if (all === 0) return 1;
  const tn = all - sameGroup - sameClass + together;
  return (together + tn) / all;
}

/**
 * Adjusted Rand index (Hubert & Arabie 1985): the Rand index corrected for
 * chance, 0 for independent labelings and 1 for identical ones (may be
 * negative). 1 when the labelings are identical as partitions, including
 * n < 2.
 */
export function adjustedRand(c: Contingency): number {
  const { together, sameGroup, sameClass, all } = pairCounts(c);
  const fp = sameGroup - together;
  const fn = sameClass - together;
  if (fp === 0 && fn === 0) return 1;
  const expected = (sameGroup * sameClass) / all;
  const maxIndex = (sameGroup + sameClass) / 2;
  return (together - expected) / (maxIndex - expected);
}

/**
 * Homogeneity (each group holds one class), completeness (each class sits in
 * one group) and their weighted harmonic mean, V-measure (Rosenberg &
 * Hirschberg 2007): `(1 + beta) h c / (beta h + c)`. beta > 1 weights
 * completeness more. Homogeneity is 1 when the truth has zero entropy,
 * completeness is 1 when the prediction has zero entropy, and all three are 1
 * when n = 0.
 */
export function vMeasure(c: Contingency, beta = 1): { homogeneity: number; completeness: number; vMeasure: number } {
  if (c.n === 0) return { homogeneity: 1, completeness: 1, vMeasure: 1 };
  const hTruth = entropy(c.rowTotals, c.n);
  const hPred = entropy(c.colTotals, c.n);
  const mi = mutualInformation(c);
  const homogeneity = hTruth > 0 ? mi / hTruth : 1;
  const completeness = hPred > 0 ? mi / hPred : 1;
  const v =
    homogeneity + completeness === 0 ? 0 : ((1 + beta) * homogeneity * completeness) / (beta * homogeneity + completeness);
  return { homogeneity, completeness, vMeasure: v };
}

/** Every external score at once, with the table they were computed from. */
export interface ExternalScores {
  readonly purity: number;
  readonly nmi: number;
  readonly ari: number;
  readonly randIndex: number;
  readonly homogeneity: number;
  readonly completeness: number;
  readonly vMeasure: number;
  readonly contingency: Contingency;
}

/**
 * Builds the contingency table of `truth` against `predicted` (negative codes
 * left out) and computes purity, NMI, ARI, Rand index, homogeneity,
 * completeness and V-measure (beta = 1).
 */
export function externalScores(truth: Int32Array, predicted: Int32Array): ExternalScores {
  const c = contingency(truth, predicted);
  const v = vMeasure(c);
  return {
    purity: purity(c),
    nmi: nmi(c),
    ari: adjustedRand(c),
    randIndex: randIndex(c),
    homogeneity: v.homogeneity,
    completeness: v.completeness,
    vMeasure: v.vMeasure,
    contingency: c,
  };
}
