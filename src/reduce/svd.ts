/**
 * Truncated SVD of a sparse matrix by the randomized range finder with power
 * iterations: Halko, Martinsson & Tropp, "Finding structure with randomness:
 * probabilistic algorithms for constructing approximate matrix
 * decompositions", SIAM Review 53(2), 2011.
 *
 * For A (n rows × m terms, CSR) and l = d + p columns (§4.2, oversampling p):
 *
 * 1. Stage A, Algorithm 4.4 (randomized subspace iteration): draw a Gaussian
 *    Ω (m × l); Y₀ = AΩ, Q₀ = orth(Y₀); for j = 1..q: Yⱼ = A(AᵀQⱼ₋₁),
 *    Qⱼ = orth(Yⱼ). Algorithm 4.4 orthonormalises after each of A and Aᵀ
 *    (§4.5: without it, directions with σⱼ/σ₁ below ε^(1/(2q+1)) drown in
 *    rounding); we orthonormalise once per power step, on the side with fewer
 *    rows (n ≤ m: as written; n > m: Q̃ⱼ = orth(AᵀAQ̃ⱼ₋₁) from Q̃₀ = Ω, then
 *    Q = orth(AQ̃_q)). The block is then at most (σ₁/σₗ)²-conditioned before
 *    each orthonormalisation, so only directions with σⱼ/σ₁ below √ε ≈ 1e-8
 *    are lost — far below any component kept for grouping — at half the
 *    orthonormalisations, which dominate the cost (2·rows·l² each against
 *    2·nnz·l per product).
 * 2. Stage B, Algorithm 5.1 (direct SVD): B = QᵀA (l × m), B = ŨΣVᵀ. B is
 *    wide, so we take its transpose Bᵀ = AᵀQ (m × l), factor it as Q̂R̂ on the
 *    typed arrays, and take the SVD of the small R̂ᵀ = ŨΣŴᵀ with ml-matrix;
 *    then B = ŨΣ(Q̂Ŵ)ᵀ, so V = Q̂Ŵ. U is not needed: the reduced rows are
 *    computed as AVᵀ with the very (Float32) components that a saved model
 *    holds, so filing the training documents again gives the same rows.
 *
 * orth(·) is classical Gram–Schmidt applied twice per column ("twice is
 * enough": Giraud, Langou & Rozložník, Computers & Mathematics with
 * Applications 50, 2005), which walks the row-major blocks row by row. A
 * column that vanishes (rank deficiency) is replaced by a seeded random
 * direction orthogonal to the others, so Q stays orthonormal.
 *
 * Signs are fixed so that the largest entry (by magnitude) of each component
 * is positive (ties to the lowest term); with the seed this makes the output
 * a pure function of the input.
 *
 * Buffers: the n × l and m × l blocks are Float64Array, row-major, allocated
 * once and reused across iterations; nothing else grows with n or m inside
 * the loop.
 *
 * @module
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import type { Csr } from '../types.js';
import type { Rng } from '../util/random.js';
import { resolveReduceOptions, type ReduceOptions } from './options.js';

/** Outcome of {@link truncatedSvd}. */
export interface TruncatedSvd {
  /** The options used (resolved). */
  readonly options: ReduceOptions;
  /** d, the number of components. */
  readonly dims: number;
  /** Number of terms m (columns of the matrix). */
  readonly terms: number;
  /** Right singular vectors, one per row: `components[j * terms + t]` (d × terms, orthonormal rows). */
  readonly components: Float32Array;
  /** Singular values, largest first (length d). */
  readonly singularValues: Float64Array;
  /** Rows projected on the components (A·Vᵀ), each re-normalised to unit length; all-zero rows stay zero. n × d, row-major. */
  readonly rows: Float32Array;
}

/** Fills `out` with independent standard normal values (Box–Muller on the seeded generator). */
export function fillGaussian(out: Float64Array, rng: Rng): void {
  for (let i = 0; i < out.length; i += 2) {
    const u1 = 1 - rng.next(); // (0, 1]: log is finite
    const u2 = rng.next();
    const r = Math.sqrt(-2 * Math.log(u1));
    out[i] = r * Math.cos(2 * Math.PI * u2);
    if (i + 1 < out.length) out[i + 1] = r * Math.sin(2 * Math.PI * u2);
  }
}

/**
 * out (n × l) = A (n × m, CSR) · X (m × l), row-major. Four stored values of a
 * row are taken per sweep over the output row (fewer loads and stores of it);
 * each output entry still adds its terms one by one in storage order, so the
 * result is bit-identical to the plain loop.
 */
export function multiplyCsrDense(a: Csr, x: Float64Array, l: number, out: Float64Array): void {
  const { rows, indptr, indices, values } = a;
  out.fill(0, 0, rows * l);
  for (let r = 0; r < rows; r++) {
    const o = r * l;
    const end = indptr[r + 1]!;
    let p = indptr[r]!;
    for (; p + 3 < end; p += 4) {
      const v0 = values[p]!;
      const v1 = values[p + 1]!;
      const v2 = values[p + 2]!;
      const v3 = values[p + 3]!;
      const b0 = indices[p]! * l;
      const b1 = indices[p + 1]! * l;
      const b2 = indices[p + 2]! * l;
      const b3 = indices[p + 3]! * l;
      for (let c = 0; c < l; c++) out[o + c] = out[o + c]! + v0 * x[b0 + c]! + v1 * x[b1 + c]! + v2 * x[b2 + c]! + v3 * x[b3 + c]!;
    }
    for (; p < end; p++) {
      const v = values[p]!;
      const base = indices[p]! * l;
      for (let c = 0; c < l; c++) out[o + c]! += v * x[base + c]!;
    }
  }
}

/**
 * out (m × l) = Aᵀ (m × n) · Y (n × l), row-major, A in CSR. Scatters into
 * the output rows of the terms; {@link transposeCsr} once and
 * {@link multiplyCsrDense} on the transpose gives the same bits with
 * contiguous writes.
 */
export function multiplyCsrTransposeDense(a: Csr, y: Float64Array, l: number, out: Float64Array): void {
  const { rows, cols, indptr, indices, values } = a;
  out.fill(0, 0, cols * l);
  for (let r = 0; r < rows; r++) {
    const o = r * l;
    for (let p = indptr[r]!; p < indptr[r + 1]!; p++) {
      const v = values[p]!;
      const base = indices[p]! * l;
      for (let c = 0; c < l; c++) out[base + c]! += v * y[o + c]!;
    }
  }
}

/**
 * The transpose of a CSR matrix (m × n, term-major), each of its rows holding
 * the documents in increasing order: a product with it adds each output
 * entry's terms in the very order {@link multiplyCsrTransposeDense} does.
 */
export function transposeCsr(a: Csr): Csr {
  const { rows, cols, indptr, indices, values } = a;
  const nnz = indptr[rows]!;
  const tIndptr = new Int32Array(cols + 1);
  for (let p = 0; p < nnz; p++) tIndptr[indices[p]! + 1]!++;
  for (let t = 0; t < cols; t++) tIndptr[t + 1]! += tIndptr[t]!;
  const next = tIndptr.slice(0, cols);
  const tIndices = new Int32Array(nnz);
  const tValues = new Float32Array(nnz);
  for (let r = 0; r < rows; r++) {
    for (let p = indptr[r]!; p < indptr[r + 1]!; p++) {
      const q = next[indices[p]!]!++;
      tIndices[q] = r;
      tValues[q] = values[p]!;
    }
  }
  return { rows: cols, cols: rows, indptr: tIndptr, indices: tIndices, values: tValues };
}

/** Work space of {@link orthonormalize} for blocks l columns wide, allocated once per decomposition. */
export interface OrthWorkspace {
  readonly l: number;
  /** The triangular factor of the last call (l × l, row-major, upper). */
  readonly r: Float64Array;
  readonly dots: Float64Array;
  readonly gram: Float64Array;
  readonly first: Float64Array;
}

/** Allocates an {@link OrthWorkspace}. */
export function createOrthWorkspace(l: number): OrthWorkspace {
  return { l, r: new Float64Array(l * l), dots: new Float64Array(l), gram: new Float64Array(l * l), first: new Float64Array(l * l) };
}

/**
 * Orthonormalises the columns of a row-major `rows × l` block in place and
 * leaves the triangular factor in `ws.r` (l × l, row-major, upper):
 * block_before = block_after · R. First tries Cholesky QR twice
 * (CholeskyQR2: Fukaya, Nakatsukasa, Yanagisawa & Yamamoto 2014), which walks
 * the block four times whatever l is and is accurate when the block is well
 * conditioned (a pivot-ratio estimate below {@link CHOLESKY_QR_CONDITION}) —
 * the usual case here, since every product is applied to an orthonormal
 * block; otherwise classical Gram–Schmidt twice ({@link gramSchmidtTwice}),
 * which also copes with rank deficiency.
 */
export function orthonormalize(q: Float64Array, rows: number, ws: OrthWorkspace, rng: Rng): void {
  const { l, r, dots, gram, first } = ws;
  if (!choleskyQrStep(q, rows, l, first, gram)) {
    gramSchmidtTwice(q, rows, l, r, dots, rng);
    return;
  }
  // Second step on the nearly orthonormal block; R = R₂R₁.
  if (!choleskyQrStep(q, rows, l, gram, r)) gramSchmidtTwice(q, rows, l, gram, dots, rng);
  multiplyUpper(gram, first, l, r);
}

/** Largest condition estimate (ratio of Cholesky pivots, squared root of the Gram's) accepted by Cholesky QR. */
export const CHOLESKY_QR_CONDITION = 1e5;

/** out = a · b for upper triangular l × l row-major matrices. */
function multiplyUpper(a: Float64Array, b: Float64Array, l: number, out: Float64Array): void {
  for (let i = 0; i < l; i++) {
    for (let j = 0; j < l; j++) {
      let s = 0;
      for (let k = i; k <= j; k++) s += a[i * l + k]! * b[k * l + j]!;
      out[i * l + j] = j >= i ? s : 0;
    }
  }
}

/**
 * One Cholesky QR step: G = QᵀQ, G = RᵀR, Q ← QR⁻¹. Returns false (block
 * untouched) when a pivot says the block is too ill-conditioned.
 */
function choleskyQrStep(q: Float64Array, rows: number, l: number, r: Float64Array, g: Float64Array): boolean {
  gramUpper(q, rows, l, g);
  // Cholesky G = RᵀR, R upper, into r.
  r.fill(0, 0, l * l);
  let maxPivot = 0;
  for (let j = 0; j < l; j++) {
    let s = g[j * l + j]!;
    for (let k = 0; k < j; k++) s -= r[k * l + j]! ** 2;
    if (!(s > 0)) return false;
    const p = Math.sqrt(s);
    if (p > maxPivot) maxPivot = p;
    if (p * CHOLESKY_QR_CONDITION < maxPivot) return false;
    r[j * l + j] = p;
    for (let c = j + 1; c < l; c++) {
      let t = g[j * l + c]!;
      for (let k = 0; k < j; k++) t -= r[k * l + j]! * r[k * l + c]!;
      r[j * l + c] = t / p;
    }
  }
  for (let j = 0; j < l; j++) if (r[j * l + j]! * CHOLESKY_QR_CONDITION < maxPivot) return false;
  solveUpperRows(q, rows, l, r, g);
  return true;
}

/**
 * The upper triangle of G = QᵀQ (l × l, row-major) of a row-major `rows × l`
 * block, into `g`. Four rows per sweep over G (a quarter of its loads and
 * stores); every entry still adds its row products one by one in row order
 * (a zero entry adds nothing: its products are ±0), so the bits are those of
 * the plain row-by-row loop.
 */
export function gramUpper(q: Float64Array, rows: number, l: number, g: Float64Array): void {
  g.fill(0, 0, l * l);
  let i = 0;
  for (; i + 3 < rows; i += 4) {
    const o0 = i * l;
    const o1 = o0 + l;
    const o2 = o1 + l;
    const o3 = o2 + l;
    for (let a = 0; a < l; a++) {
      const x0 = q[o0 + a]!;
      const x1 = q[o1 + a]!;
      const x2 = q[o2 + a]!;
      const x3 = q[o3 + a]!;
      const ga = a * l;
      for (let b = a; b < l; b++) g[ga + b] = g[ga + b]! + x0 * q[o0 + b]! + x1 * q[o1 + b]! + x2 * q[o2 + b]! + x3 * q[o3 + b]!;
    }
  }
  for (; i < rows; i++) {
    const o = i * l;
    for (let a = 0; a < l; a++) {
      const x = q[o + a]!;
      if (x === 0) continue;
      const ga = a * l;
      for (let b = a; b < l; b++) g[ga + b]! += x * q[o + b]!;
    }
  }
}

/**
 * Q ← QR⁻¹ for an upper triangular R (l × l, row-major) with a non-zero
 * diagonal: each row x solves xR = q by forward substitution over the
 * columns. `rt` (l × l) receives Rᵀ so the inner loop reads contiguously;
 * the arithmetic per row is that of the plain loop, bit for bit.
 */
export function solveUpperRows(q: Float64Array, rows: number, l: number, r: Float64Array, rt: Float64Array): void {
  for (let k = 0; k < l; k++) for (let c = 0; c < l; c++) rt[c * l + k] = r[k * l + c]!;
  let i = 0;
  for (; i + 1 < rows; i += 2) {
    const o0 = i * l;
    const o1 = o0 + l;
    for (let c = 0; c < l; c++) {
      const rc = c * l;
      let t0 = q[o0 + c]!;
      let t1 = q[o1 + c]!;
      for (let k = 0; k < c; k++) {
        const w = rt[rc + k]!;
        t0 -= q[o0 + k]! * w;
        t1 -= q[o1 + k]! * w;
      }
      const d = rt[rc + c]!;
      q[o0 + c] = t0 / d;
      q[o1 + c] = t1 / d;
    }
  }
  for (; i < rows; i++) {
    const o = i * l;
    for (let c = 0; c < l; c++) {
      const rc = c * l;
      let t = q[o + c]!;
      for (let k = 0; k < c; k++) t -= q[o + k]! * rt[rc + k]!;
      q[o + c] = t / rt[rc + c]!;
    }
  }
}

/**
 * Classical Gram–Schmidt applied twice per column ("twice is enough":
 * Giraud, Langou & Rozložník 2005), with R in `r`. A column left with
 * (relatively) no length is replaced by a random unit direction orthogonal to
 * the earlier ones, with R's diagonal entry set to the tiny length that was left.
 */
export function gramSchmidtTwice(q: Float64Array, rows: number, l: number, r: Float64Array, dots: Float64Array, rng: Rng): void {
  r.fill(0, 0, l * l);
  for (let j = 0; j < l; j++) {
    const before = columnNorm(q, rows, l, j);
    let norm = before;
    for (let pass = 0; pass < 2 && j > 0; pass++) norm = projectOut(q, rows, l, j, dots, r, true);
    if (!(norm > 1e-12 * before) || before === 0) {
      // Rank deficiency: R keeps the (tiny) length left; the column becomes a fresh direction.
      r[j * l + j] = before === 0 ? 0 : norm;
      freshDirection(q, rows, l, j, dots, r, rng);
      continue;
    }
    r[j * l + j] = norm;
    scaleColumn(q, rows, l, j, 1 / norm);
  }
}

function columnNorm(q: Float64Array, rows: number, l: number, j: number): number {
  let s = 0;
  for (let i = 0; i < rows; i++) s += q[i * l + j]! ** 2;
  return Math.sqrt(s);
}

/** Column j becomes a seeded random unit vector orthogonal to columns 0..j−1 (which are orthonormal, j < rows). */
function freshDirection(q: Float64Array, rows: number, l: number, j: number, dots: Float64Array, r: Float64Array, rng: Rng): void {
  for (;;) {
    for (let i = 0; i < rows; i++) q[i * l + j] = rng.next() - 0.5;
    const start = columnNorm(q, rows, l, j);
    let left = start;
    for (let pass = 0; pass < 2 && j > 0; pass++) left = projectOut(q, rows, l, j, dots, r, false);
    if (start > 0 && left > 1e-8 * start) {
      scaleColumn(q, rows, l, j, 1 / left);
      return;
    }
  }
}

function scaleColumn(q: Float64Array, rows: number, l: number, j: number, f: number): void {
  for (let i = 0; i < rows; i++) q[i * l + j]! *= f;
}

/**
 * One classical Gram–Schmidt pass on column j against columns 0..j−1 (walking
 * rows, so the reads are contiguous); adds the coefficients to R's column j
 * when `record`. Returns the norm left.
 */
function projectOut(q: Float64Array, rows: number, l: number, j: number, dots: Float64Array, r: Float64Array, record: boolean): number {
  dots.fill(0, 0, j);
  for (let i = 0; i < rows; i++) {
    const o = i * l;
    const x = q[o + j]!;
    if (x === 0) continue;
    for (let c = 0; c < j; c++) dots[c]! += q[o + c]! * x;
  }
  let norm = 0;
  for (let i = 0; i < rows; i++) {
    const o = i * l;
    let x = q[o + j]!;
    for (let c = 0; c < j; c++) x -= dots[c]! * q[o + c]!;
    q[o + j] = x;
    norm += x * x;
  }
  if (record) for (let c = 0; c < j; c++) r[c * l + j]! += dots[c]!;
  return Math.sqrt(norm);
}

/**
 * Truncated SVD of `matrix` (n × m CSR; not modified) with `dims` components,
 * by Halko, Martinsson & Tropp (2011) Algorithms 4.4 and 5.1 (see the module
 * notes). `rng` draws the test matrix Ω (and any replacement direction). The
 * same matrix, options and generator state give bit-identical output.
 * Throws {@link UsageError} for unusable options (dims above the smaller of
 * rows and terms, among others).
 */
export function truncatedSvd(matrix: Csr, options: Partial<ReduceOptions>, rng: Rng): TruncatedSvd {
  const n = matrix.rows;
  const m = matrix.cols;
  const o = resolveReduceOptions(options, Math.min(n, m));
  const d = o.dims;
  const l = Math.min(d + o.oversampling, n, m);
  const omega = new Float64Array(m * l); // Ω, then Q̃ⱼ, then Bᵀ and Q̂ (m × l)
  const y = new Float64Array(n * l); // Yⱼ, then Qⱼ (n × l)
  const ws = createOrthWorkspace(l);
  const at = transposeCsr(matrix); // term-major, built once: Aᵀ products write contiguous rows

  // Stage A: Algorithm 4.4, orthonormalising once per power step, on the side with fewer rows.
  fillGaussian(omega, rng);
  if (n <= m) {
    multiplyCsrDense(matrix, omega, l, y);
    orthonormalize(y, n, ws, rng);
    for (let it = 0; it < o.powerIterations; it++) {
      multiplyCsrDense(at, y, l, omega);
      multiplyCsrDense(matrix, omega, l, y);
      orthonormalize(y, n, ws, rng);
    }
  } else {
    for (let it = 0; it < o.powerIterations; it++) {
      multiplyCsrDense(matrix, omega, l, y);
      multiplyCsrDense(at, y, l, omega);
      orthonormalize(omega, m, ws, rng);
    }
    multiplyCsrDense(matrix, omega, l, y);
    orthonormalize(y, n, ws, rng);
  }

  // Stage B: Algorithm 5.1 on Bᵀ = AᵀQ = Q̂R̂, so B = R̂ᵀQ̂ᵀ.
  multiplyCsrDense(at, y, l, omega);
  orthonormalize(omega, m, ws, rng);
  const rt = new Matrix(l, l);
  for (let i = 0; i < l; i++) for (let j = 0; j < l; j++) rt.set(j, i, ws.r[i * l + j]!);
  const svd = new SingularValueDecomposition(rt, { computeLeftSingularVectors: false, computeRightSingularVectors: true, autoTranspose: false });
  const sigma = svd.diagonal;
  const w = svd.rightSingularVectors; // l × l, column j is Ŵ's j-th right singular vector
  // ml-matrix returns singular values in descending order; sort defensively (ties by index) all the same.
  const order = Array.from({ length: l }, (_, i) => i).sort((a, b) => sigma[b]! - sigma[a]! || a - b);

  // V = Q̂Ŵ: component j, term t = Σᵢ Q̂[t, i] Ŵ[i, order[j]].
  const wd = new Float64Array(l * d);
  for (let i = 0; i < l; i++) for (let j = 0; j < d; j++) wd[i * d + j] = w.get(i, order[j]!);
  const comp = new Float64Array(d * m);
  const acc = new Float64Array(d); // one term's d entries, summed in a contiguous buffer, then stored
  for (let t = 0; t < m; t++) {
    const qo = t * l;
    acc.fill(0);
    for (let i = 0; i < l; i++) {
      const x = omega[qo + i]!;
      if (x === 0) continue;
      const wo = i * d;
      for (let j = 0; j < d; j++) acc[j]! += x * wd[wo + j]!;
    }
    for (let j = 0; j < d; j++) comp[j * m + t] = acc[j]!;
  }
  const components = new Float32Array(d * m);
  for (let j = 0; j < d; j++) {
    // Sign: the largest entry by magnitude is positive (ties to the lowest term).
    let best = 0;
    let bestAbs = -1;
    for (let t = 0; t < m; t++) {
      const a = Math.abs(comp[j * m + t]!);
      if (a > bestAbs) {
        bestAbs = a;
        best = t;
      }
    }
    const sign = comp[j * m + best]! < 0 ? -1 : 1;
    for (let t = 0; t < m; t++) components[j * m + t] = sign * comp[j * m + t]!;
  }
  const singularValues = Float64Array.from({ length: d }, (_, j) => sigma[order[j]!]!);
  const rows = projectRows(matrix, components, d);
  return { options: o, dims: d, terms: m, components, singularValues, rows };
}

/**
 * Projects the rows of `matrix` (n × terms) on `components` (d × terms,
 * row-major, as in {@link TruncatedSvd}) and re-normalises each projected
 * row to unit length; rows that project to zero stay zero. Returns n × d
 * Float32, row-major (into `out` when given). Used for the training rows and
 * for new documents filed with a saved model, so both see the same numbers.
 * Throws a RangeError when the shapes disagree.
 */
export function projectRows(matrix: Csr, components: Float32Array, dims: number, out?: Float32Array): Float32Array {
  const { rows: n, cols: m, indptr, indices, values } = matrix;
  if (!Number.isInteger(dims) || dims < 1 || components.length !== dims * m) {
    throw new RangeError(`components hold ${components.length} values; ${dims} dims × ${m} terms needs ${dims * m}`);
  }
  const result = out ?? new Float32Array(n * dims);
  if (result.length !== n * dims) throw new RangeError(`out must hold ${n * dims} values; got ${result.length}`);
  // Term-major copy so each stored value meets a contiguous run of d numbers.
  const byTerm = new Float32Array(m * dims);
  for (let j = 0; j < dims; j++) for (let t = 0; t < m; t++) byTerm[t * dims + j] = components[j * m + t]!;
  const acc = new Float64Array(dims);
  for (let i = 0; i < n; i++) {
    acc.fill(0);
    for (let p = indptr[i]!; p < indptr[i + 1]!; p++) {
      const v = values[p]!;
      const base = indices[p]! * dims;
      for (let j = 0; j < dims; j++) acc[j]! += v * byTerm[base + j]!;
    }
    let s = 0;
    for (let j = 0; j < dims; j++) s += acc[j]! * acc[j]!;
    const o = i * dims;
    if (s > 0) {
      const inv = 1 / Math.sqrt(s);
      for (let j = 0; j < dims; j++) result[o + j] = acc[j]! * inv;
    } else {
      result.fill(0, o, o + dims);
    }
  }
  return result;
}
