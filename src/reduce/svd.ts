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
 * Threads: the work on the big blocks (products, Gram rows, solves, V = Q̂W,
 * the projection) is done by the row kernels of `svd-kernels.ts`, each over a
 * range of output rows; {@link svdSteps} yields each such step to a driver.
 * {@link truncatedSvd} runs every step over the whole range on the calling
 * thread; `truncatedSvdParallel` (src/parallel) splits the ranges over
 * threads, which gives the same bits because each output entry is computed by
 * the same operations whichever range holds it.
 *
 * @module
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import type { Csr } from '../types.js';
import type { Rng } from '../util/random.js';
import { resolveReduceOptions, type ReduceOptions } from './options.js';
import {
  gramUpperRange,
  multiplyCsrDenseRange,
  projectRange,
  runSvdBlock,
  solveUpperRange,
  svdWorkRows,
  SVD_WORK_A,
  SVD_WORK_AT,
  SVD_WORK_COMBINE,
  SVD_WORK_GRAM_OMEGA,
  SVD_WORK_GRAM_Y,
  SVD_WORK_PROJECT,
  SVD_WORK_SOLVE_OMEGA,
  SVD_WORK_SOLVE_Y,
  type SvdArrays,
} from './svd-kernels.js';

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
 * out (n × l) = A (n × m, CSR) · X (m × l), row-major: every row of A
 * ({@link multiplyCsrDenseRange}); bit-identical to the plain loop.
 */
export function multiplyCsrDense(a: Csr, x: Float64Array, l: number, out: Float64Array): void {
  multiplyCsrDenseRange(a, x, l, out, 0, a.rows);
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

/** How the decomposition allocates the arrays that threads share (plain typed arrays, or on SharedArrayBuffers). */
export interface SvdAllocator {
  float64(length: number): Float64Array;
  float32(length: number): Float32Array;
}

/** Plain typed arrays: the single-thread path. */
export const PLAIN_SVD_ALLOCATOR: SvdAllocator = Object.freeze({
  float64: (length: number) => new Float64Array(length),
  float32: (length: number) => new Float32Array(length),
});

/** Work space of {@link orthonormalize} for blocks l columns wide, allocated once per decomposition. */
export interface OrthWorkspace {
  readonly l: number;
  /** The triangular factor of the last call (l × l, row-major, upper). */
  readonly r: Float64Array;
  readonly dots: Float64Array;
  readonly gram: Float64Array;
  readonly first: Float64Array;
  /** The Gram matrix's upper triangle, as the row kernels leave it (l × l; shared with threads on the parallel path). */
  readonly g: Float64Array;
  /** Rᵀ of the Cholesky step being applied, read by the row solves (l × l; shared with threads on the parallel path). */
  readonly rt: Float64Array;
}

/** Allocates an {@link OrthWorkspace}; `g` and `rt` through `alloc` (plain arrays by default). */
export function createOrthWorkspace(l: number, alloc: SvdAllocator = PLAIN_SVD_ALLOCATOR): OrthWorkspace {
  return {
    l,
    r: new Float64Array(l * l),
    dots: new Float64Array(l),
    gram: new Float64Array(l * l),
    first: new Float64Array(l * l),
    g: alloc.float64(l * l),
    rt: alloc.float64(l * l),
  };
}

/** Step of {@link orthonormalizeSteps}: the upper Gram matrix of the block into `ws.g` ({@link gramUpperRange} over rows 0..l of G). */
export const ORTH_GRAM = 0;
/** Step of {@link orthonormalizeSteps}: the block's rows solved against `ws.rt` ({@link solveUpperRange} over all rows). */
export const ORTH_SOLVE = 1;

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
  const steps = orthonormalizeSteps(q, rows, ws, rng);
  for (let step = steps.next(); !step.done; step = steps.next()) {
    if (step.value === ORTH_GRAM) gramUpperRange(q, rows, ws.l, ws.g, 0, ws.l);
    else solveUpperRange(q, ws.l, ws.rt, 0, rows);
  }
}

/**
 * {@link orthonormalize} as steps: yields {@link ORTH_GRAM} or
 * {@link ORTH_SOLVE} when the block's rows must go through a row kernel (the
 * driver runs it, on one thread or split by rows), and does the small l × l
 * work (Cholesky, the fallback) itself between them.
 */
export function* orthonormalizeSteps(q: Float64Array, rows: number, ws: OrthWorkspace, rng: Rng): Generator<number, void, void> {
  const { l, r, dots, gram, first, g, rt } = ws;
  yield ORTH_GRAM;
  if (!choleskyUpper(g, l, first)) {
    gramSchmidtTwice(q, rows, l, r, dots, rng);
    return;
  }
  transposeInto(first, l, rt);
  yield ORTH_SOLVE;
  // Second step on the nearly orthonormal block; R = R₂R₁.
  yield ORTH_GRAM;
  if (choleskyUpper(g, l, gram)) {
    transposeInto(gram, l, rt);
    yield ORTH_SOLVE;
  } else {
    gramSchmidtTwice(q, rows, l, gram, dots, rng);
  }
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

function transposeInto(r: Float64Array, l: number, rt: Float64Array): void {
  for (let k = 0; k < l; k++) for (let c = 0; c < l; c++) rt[c * l + k] = r[k * l + c]!;
}

/**
 * Cholesky G = RᵀR (G's upper triangle read from `g`), R upper into `r`.
 * Returns false when a pivot says the block is too ill-conditioned (a ratio
 * of pivots beyond {@link CHOLESKY_QR_CONDITION}, or a pivot not positive).
 */
function choleskyUpper(g: Float64Array, l: number, r: Float64Array): boolean {
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
  return true;
}

/**
 * The upper triangle of G = QᵀQ (l × l, row-major) of a row-major `rows × l`
 * block, into `g` ({@link gramUpperRange} over all of G's rows): the bits of
 * the plain row-by-row loop.
 */
export function gramUpper(q: Float64Array, rows: number, l: number, g: Float64Array): void {
  g.fill(0, 0, l * l);
  gramUpperRange(q, rows, l, g, 0, l);
}

/**
 * Q ← QR⁻¹ for an upper triangular R (l × l, row-major) with a non-zero
 * diagonal: each row x solves xR = q by forward substitution over the
 * columns. `rt` (l × l) receives Rᵀ so the inner loop reads contiguously
 * ({@link solveUpperRange}); the arithmetic per row is that of the plain
 * loop, bit for bit.
 */
export function solveUpperRows(q: Float64Array, rows: number, l: number, r: Float64Array, rt: Float64Array): void {
  transposeInto(r, l, rt);
  solveUpperRange(q, l, rt, 0, rows);
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
 * Allocates the arrays of a decomposition of `a` (with its transpose `at`)
 * into l = d + p columns, through `alloc`; `ws` supplies `g` and `rt`.
 */
export function createSvdArrays(a: Csr, at: Csr, l: number, d: number, ws: OrthWorkspace, alloc: SvdAllocator): SvdArrays {
  const n = a.rows;
  const m = a.cols;
  return {
    a,
    at,
    l,
    d,
    omega: alloc.float64(m * l),
    y: alloc.float64(n * l),
    g: ws.g,
    rt: ws.rt,
    wd: alloc.float64(l * d),
    compT: alloc.float64(m * d),
    byTerm: alloc.float32(m * d),
    rows: alloc.float32(n * d),
  };
}

/** What {@link svdSteps} returns besides the arrays it filled (`byTerm`, `rows`). */
export interface SvdStepsResult {
  readonly components: Float32Array;
  readonly singularValues: Float64Array;
}

/**
 * The decomposition (see the module notes) as steps: yields a row work
 * (`SVD_WORK_*`) whenever the big blocks must go through a row kernel — the
 * driver runs {@link runSvdBlock} over all {@link svdWorkRows} output rows, on
 * one thread or split — and does everything else itself (the Gaussian draw,
 * the l × l factorisations, the sign fix), in a fixed order. `ws` must be the
 * workspace whose `g` and `rt` the arrays hold.
 */
export function* svdSteps(s: SvdArrays, ws: OrthWorkspace, o: ReduceOptions, rng: Rng): Generator<number, SvdStepsResult, void> {
  const { a, l, d } = s;
  const n = a.rows;
  const m = a.cols;
  const orth = function* (onY: boolean): Generator<number, void, void> {
    const steps = orthonormalizeSteps(onY ? s.y : s.omega, onY ? n : m, ws, rng);
    for (let step = steps.next(); !step.done; step = steps.next()) {
      if (step.value === ORTH_GRAM) yield onY ? SVD_WORK_GRAM_Y : SVD_WORK_GRAM_OMEGA;
      else yield onY ? SVD_WORK_SOLVE_Y : SVD_WORK_SOLVE_OMEGA;
    }
  };

  // Stage A: Algorithm 4.4, orthonormalising once per power step, on the side with fewer rows.
  fillGaussian(s.omega, rng);
  if (n <= m) {
    yield SVD_WORK_A;
    yield* orth(true);
    for (let it = 0; it < o.powerIterations; it++) {
      yield SVD_WORK_AT;
      yield SVD_WORK_A;
      yield* orth(true);
    }
  } else {
    for (let it = 0; it < o.powerIterations; it++) {
      yield SVD_WORK_A;
      yield SVD_WORK_AT;
      yield* orth(false);
    }
    yield SVD_WORK_A;
    yield* orth(true);
  }

  // Stage B: Algorithm 5.1 on Bᵀ = AᵀQ = Q̂R̂, so B = R̂ᵀQ̂ᵀ.
  yield SVD_WORK_AT;
  yield* orth(false);
  const rt = new Matrix(l, l);
  for (let i = 0; i < l; i++) for (let j = 0; j < l; j++) rt.set(j, i, ws.r[i * l + j]!);
  const svd = new SingularValueDecomposition(rt, { computeLeftSingularVectors: false, computeRightSingularVectors: true, autoTranspose: false });
  const sigma = svd.diagonal;
  const w = svd.rightSingularVectors; // l × l, column j is Ŵ's j-th right singular vector
  // ml-matrix returns singular values in descending order; sort defensively (ties by index) all the same.
  const order = Array.from({ length: l }, (_, i) => i).sort((x, y) => sigma[y]! - sigma[x]! || x - y);

  // V = Q̂Ŵ, term-major: component j, term t = Σᵢ Q̂[t, i] Ŵ[i, order[j]].
  for (let i = 0; i < l; i++) for (let j = 0; j < d; j++) s.wd[i * d + j] = w.get(i, order[j]!);
  yield SVD_WORK_COMBINE;

  // Sign: the largest entry by magnitude of each component is positive (ties to the lowest term); one pass over the terms.
  const { compT, byTerm } = s;
  const bestAbs = new Float64Array(d).fill(-1);
  const sign = new Float64Array(d);
  for (let t = 0; t < m; t++) {
    const o2 = t * d;
    for (let j = 0; j < d; j++) {
      const v = compT[o2 + j]!;
      const x = Math.abs(v);
      if (x > bestAbs[j]!) {
        bestAbs[j] = x;
        sign[j] = v < 0 ? -1 : 1;
      }
    }
  }
  const components = new Float32Array(d * m);
  for (let t = 0; t < m; t++) {
    const o2 = t * d;
    for (let j = 0; j < d; j++) {
      const v = Math.fround(sign[j]! * compT[o2 + j]!);
      byTerm[o2 + j] = v;
      components[j * m + t] = v;
    }
  }
  const singularValues = Float64Array.from({ length: d }, (_, j) => sigma[order[j]!]!);
  yield SVD_WORK_PROJECT;
  return { components, singularValues };
}

/** Term-major copies of component arrays (d × terms → terms × d), made once per array and reused by every projection. */
const TERM_MAJOR = new WeakMap<Float32Array, { readonly dims: number; readonly byTerm: Float32Array }>();

/**
 * The term-major copy (`byTerm[t · dims + j]`) of `components` (d × terms,
 * row-major, as in {@link TruncatedSvd}), made on the first call for an
 * array and returned from then on (the components are treated as read-only,
 * as a model holds them). Throws a RangeError when `dims` does not divide the
 * length.
 */
export function termMajorComponents(components: Float32Array, dims: number): Float32Array {
  const known = TERM_MAJOR.get(components);
  if (known && known.dims === dims) return known.byTerm;
  if (!Number.isInteger(dims) || dims < 1 || components.length % dims !== 0) {
    throw new RangeError(`components hold ${components.length} values, not a multiple of ${dims} dims`);
  }
  const m = components.length / dims;
  const byTerm = new Float32Array(m * dims);
  for (let j = 0; j < dims; j++) for (let t = 0; t < m; t++) byTerm[t * dims + j] = components[j * m + t]!;
  TERM_MAJOR.set(components, { dims, byTerm });
  return byTerm;
}

/**
 * The {@link TruncatedSvd} once {@link svdSteps} has finished: the rows and
 * term-major components are taken from `s` (copied off shared memory when
 * `copy`), and the term-major copy is remembered for later projections.
 */
export function finishSvd(o: ReduceOptions, s: SvdArrays, done: SvdStepsResult, copy: boolean): TruncatedSvd {
  const byTerm = copy ? s.byTerm.slice() : s.byTerm;
  TERM_MAJOR.set(done.components, { dims: s.d, byTerm });
  return {
    options: o,
    dims: s.d,
    terms: s.a.cols,
    components: done.components,
    singularValues: done.singularValues,
    rows: copy ? s.rows.slice() : s.rows,
  };
}

/** The block width l = d + p, bounded by the rows and the terms. */
export function svdBlockWidth(o: ReduceOptions, n: number, m: number): number {
  return Math.min(o.dims + o.oversampling, n, m);
}

/**
 * Truncated SVD of `matrix` (n × m CSR; not modified) with `dims` components,
 * by Halko, Martinsson & Tropp (2011) Algorithms 4.4 and 5.1 (see the module
 * notes), on the calling thread. `rng` draws the test matrix Ω (and any
 * replacement direction). The same matrix, options and generator state give
 * bit-identical output (the thread runner `truncatedSvdParallel` of
 * `src/parallel` gives the same bits). Throws {@link UsageError} for
 * unusable options (dims above the smaller of rows and terms, among others).
 */
export function truncatedSvd(matrix: Csr, options: Partial<ReduceOptions>, rng: Rng): TruncatedSvd {
  const o = resolveReduceOptions(options, Math.min(matrix.rows, matrix.cols));
  const l = svdBlockWidth(o, matrix.rows, matrix.cols);
  const ws = createOrthWorkspace(l);
  // Term-major, built once: Aᵀ products write contiguous rows.
  const s = createSvdArrays(matrix, transposeCsr(matrix), l, o.dims, ws, PLAIN_SVD_ALLOCATOR);
  const acc = new Float64Array(o.dims);
  const steps = svdSteps(s, ws, o, rng);
  for (;;) {
    const step = steps.next();
    if (step.done) return finishSvd(o, s, step.value, false);
    runSvdBlock(s, step.value, 0, svdWorkRows(s, step.value), acc);
  }
}

/**
 * Projects the rows of `matrix` (n × terms) on `components` (d × terms,
 * row-major, as in {@link TruncatedSvd}) and re-normalises each projected
 * row to unit length; rows that project to zero stay zero. Returns n × d
 * Float32, row-major (into `out` when given). Used for the training rows and
 * for new documents filed with a saved model, so both see the same numbers;
 * the term-major copy of the components is made once per array
 * ({@link termMajorComponents}), not per call.
 * Throws a RangeError when the shapes disagree.
 */
export function projectRows(matrix: Csr, components: Float32Array, dims: number, out?: Float32Array): Float32Array {
  const { rows: n, cols: m } = matrix;
  if (!Number.isInteger(dims) || dims < 1 || components.length !== dims * m) {
    throw new RangeError(`components hold ${components.length} values; ${dims} dims × ${m} terms needs ${dims * m}`);
  }
  const result = out ?? new Float32Array(n * dims);
  if (result.length !== n * dims) throw new RangeError(`out must hold ${n * dims} values; got ${result.length}`);
  projectRange(matrix, termMajorComponents(components, dims), dims, result, new Float64Array(dims), 0, n);
  return result;
}
