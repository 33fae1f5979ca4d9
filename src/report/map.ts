/**
 * A 2-D map of the groups for the report: classical (Torgerson) multidimensional
 * scaling of the group centroids.
 *
 * For unit centroids `c_a`, `c_b` the squared straight-line distance is
 * `|c_a - c_b|² = 2 - 2·cos(c_a, c_b) = 2 · (cosine distance)`, so scaling those
 * distances needs only the k×k Gram matrix `G = CᵀC` of centroid dot products:
 * the double-centred matrix `B = -½·J·D²·J` equals `J·G·J` with `J = I - 11ᵀ/k`.
 * The coordinates are the top two eigenvectors of `B`, each scaled by the square
 * root of its eigenvalue (Torgerson 1952, "Multidimensional scaling: I. Theory
 * and method", Psychometrika 17). When the centred centroids span at most two
 * dimensions the map reproduces the distances exactly; otherwise it is the best
 * rank-2 fit of `B` in the least-squares sense.
 *
 * @module
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';

/** Coordinates of each group on the map; `x[g]`, `y[g]` for group `g`. */
export interface GroupMap {
  readonly x: Float64Array;
  readonly y: Float64Array;
}

/**
 * Places `groups` centroids on a plane so that straight-line distances between
 * points approximate the distances `sqrt(2 - 2·cos)` between the unit centroids
 * (a monotone function of cosine distance).
 *
 * `centroids` is term-major: `centroids[t * groups + g]` is term `t` of group `g`.
 * Deterministic: the same input gives the same output; each axis is oriented so
 * that its coordinate of largest magnitude is positive (the first such group
 * when several tie). An axis with no spread (for example the second axis when
 * `groups` is 2) is all zeros.
 *
 * @throws RangeError when `terms` or `groups` is not a whole number >= 0, or the
 *   length of `centroids` is not `terms * groups`.
 */
export function groupMap(centroids: Float32Array, terms: number, groups: number): GroupMap {
  if (!Number.isSafeInteger(terms) || terms < 0) {
    throw new RangeError(`terms must be a whole number >= 0; got ${String(terms)}`);
  }
  if (!Number.isSafeInteger(groups) || groups < 0) {
    throw new RangeError(`groups must be a whole number >= 0; got ${String(groups)}`);
  }
  if (centroids.length !== terms * groups) {
    throw new RangeError(
      `centroids must hold terms * groups = ${terms * groups} values; got ${centroids.length}`,
    );
  }
  const k = groups;
  const x = new Float64Array(k);
  const y = new Float64Array(k);
  if (k < 2) return { x, y };

  const gram = gramMatrix(centroids, terms, k);
  const b = doubleCentre(gram, k);
  const evd = new EigenvalueDecomposition(b, { assumeSymmetric: true });
  const values = evd.realEigenvalues;
  const vectors = evd.eigenvectorMatrix;

  // Indices of eigenvalues, largest first (stable on ties: lower index first).
  const order = values.map((_, i) => i).sort((i, j) => values[j] - values[i] || i - j);
  // Eigenvalues below this are rounding noise of a rank-deficient B.
  const scale = Math.max(Math.abs(values[order[0]]), 1e-300);
  const noise = scale * 1e-12 * k;
  fillAxis(x, vectors, order[0], values[order[0]], noise);
  fillAxis(y, vectors, order[1], values[order[1]], noise);
  return { x, y };
}

/** `G[a][b] = Σ_t c[t,a]·c[t,b]` in double precision, skipping zero weights (centroids are sparse in practice). */
function gramMatrix(centroids: Float32Array, terms: number, k: number): Float64Array {
  const gram = new Float64Array(k * k);
  const nz = new Int32Array(k);
  for (let t = 0; t < terms; t++) {
    const base = t * k;
    let count = 0;
    for (let g = 0; g < k; g++) if (centroids[base + g] !== 0) nz[count++] = g;
    for (let i = 0; i < count; i++) {
      const a = nz[i];
      const va = centroids[base + a];
      const row = a * k;
      for (let j = i; j < count; j++) {
        const bIdx = nz[j];
        gram[row + bIdx] += va * centroids[base + bIdx];
      }
    }
  }
  // Mirror the upper triangle.
  for (let a = 0; a < k; a++) for (let c = a + 1; c < k; c++) gram[c * k + a] = gram[a * k + c];
  return gram;
}

/** `B = J·G·J`: subtract row and column means, add back the grand mean. Exactly symmetric. */
function doubleCentre(gram: Float64Array, k: number): Matrix {
  const rowMean = new Float64Array(k);
  let grand = 0;
  for (let a = 0; a < k; a++) {
    let s = 0;
    for (let c = 0; c < k; c++) s += gram[a * k + c];
    rowMean[a] = s / k;
    grand += s;
  }
  grand /= k * k;
  const b = new Matrix(k, k);
  for (let a = 0; a < k; a++) {
    for (let c = a; c < k; c++) {
      const v = gram[a * k + c] - rowMean[a] - rowMean[c] + grand;
      b.set(a, c, v);
      b.set(c, a, v);
    }
  }
  return b;
}

/** Writes `sqrt(λ)·v` into `out`, oriented so its largest-magnitude entry is positive; zeros when λ is noise. */
function fillAxis(out: Float64Array, vectors: Matrix, column: number, value: number, noise: number): void {
  const k = out.length;
  if (!(value > noise)) {
    out.fill(0);
    return;
  }
  const s = Math.sqrt(value);
  let best = 0;
  let bestAbs = -1;
  for (let g = 0; g < k; g++) {
    const v = vectors.get(g, column);
    // A margin so that entries equal up to rounding resolve to the lowest index.
    if (Math.abs(v) > bestAbs * (1 + 1e-9)) {
      bestAbs = Math.abs(v);
      best = g;
    }
  }
  const sign = vectors.get(best, column) < 0 ? -1 : 1;
  for (let g = 0; g < k; g++) {
    const v = sign * s * vectors.get(g, column);
    out[g] = v === 0 ? 0 : v; // no negative zero
  }
}
