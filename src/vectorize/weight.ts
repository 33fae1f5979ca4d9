/**
 * The TF-IDF arithmetic, in one place for fitting, transforming and the
 * exported single-row helper: sublinear tf `1 + log(tf)`, smoothed idf
 * `ln((1 + n) / (1 + df)) + 1`, rows scaled to unit L2 length. All in
 * float64; callers round to float32 once when storing.
 *
 * @module
 */

/**
 * Smoothed inverse document frequency `ln((1 + n) / (1 + df)) + 1`: as if
 * one extra document contained every term once, so no idf is zero or
 * infinite.
 */
export function smoothIdf(df: number, docCount: number): number {
  return Math.log((1 + docCount) / (1 + df)) + 1;
}

/**
 * Turns `len` raw counts in `w[0 .. len)` into weights in place: each count
 * `tf > 0` becomes `(1 + ln(tf) * logScale) * idf[col]` (`col` is
 * `cols[colStart + k]`, or `k` itself when `cols` is null; no idf factor
 * when `idf` is null), counts <= 0 become 0, then the entries are divided
 * by their L2 norm. An all-zero row stays all-zero.
 */
export function weightInPlace(
  w: Float64Array,
  len: number,
  cols: Int32Array | null,
  colStart: number,
  idf: ArrayLike<number> | null,
  logScale: number,
): void {
  let sum = 0;
  for (let k = 0; k < len; k++) {
    const tf = w[k]!;
    let x = tf > 0 ? 1 + Math.log(tf) * logScale : 0;
    if (idf !== null) x *= idf[cols === null ? k : cols[colStart + k]!]!;
    w[k] = x;
    sum += x * x;
  }
  if (sum > 0) {
    const norm = Math.sqrt(sum);
    for (let k = 0; k < len; k++) w[k] = w[k]! / norm;
  }
}

/**
 * Weights one dense row of term counts: sublinear tf `1 + log_base(tf)`
 * (zero counts stay zero), times `idf[i]` when `idf` is given, then L2
 * normalised. The same routine the vectorizer applies to every row (there
 * with `base` e and the fitted idf); exposed so the arithmetic can be
 * checked on its own, e.g. against the `1 + log10 tf`, no-idf,
 * cosine-normalised weighting of textbook examples.
 *
 * @param counts term counts of one document, one entry per term
 * @param idf    per-term factor aligned with `counts`, or null for none
 * @param base   logarithm base for the tf damping (default e)
 * @returns a new Float64Array of weights, unit length unless all zero
 * @throws RangeError when `idf` and `counts` differ in length or `base` is not > 1
 */
export function weightRow(counts: ArrayLike<number>, idf: ArrayLike<number> | null = null, base: number = Math.E): Float64Array {
  if (idf !== null && idf.length !== counts.length) {
    throw new RangeError(`idf has ${idf.length} entries but counts has ${counts.length}`);
  }
  if (!(base > 1) || !Number.isFinite(base)) throw new RangeError(`base must be a finite number > 1; got ${base}`);
  const w = Float64Array.from(counts);
  weightInPlace(w, w.length, null, 0, idf, base === Math.E ? 1 : 1 / Math.log(base));
  return w;
}
