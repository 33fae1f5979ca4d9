/**
 * The row kernels of the truncated SVD (`svd.ts`), each working on a range of
 * output rows, so one thread or several (`src/parallel/svd-parallel.ts`) run
 * the very same code: every output entry is computed by the same sequence of
 * floating-point operations whichever range holds it, so a split never
 * changes a bit.
 *
 * - {@link multiplyCsrDenseRange}: out = A·X on rows `from..to` of A (also
 *   Aᵀ·Y, with A's transpose as the CSR matrix);
 * - {@link gramUpperRange}: rows `from..to` of the upper triangle of G = QᵀQ
 *   (each entry sums over all rows of Q, in row order);
 * - {@link solveUpperRange}: Q ← QR⁻¹ on rows `from..to` of Q;
 * - {@link combineRange}: V = Q̂W for terms `from..to`;
 * - {@link projectRange}: re-normalised A·Vᵀ on rows `from..to` of A.
 *
 * Pure: typed arrays in, typed arrays out; no allocation.
 *
 * @module
 */
import type { Csr } from '../types.js';

/**
 * out (rows × l) = A (CSR) · X (cols × l), row-major, on output rows
 * `from..to` only. Eight (then four) stored values of a row are taken per
 * sweep over the output row (fewer loads and stores of it, more independent
 * reads of X in flight); each output entry still adds its terms one by one,
 * left to right, in storage order, so the result is bit-identical to the plain
 * loop `out[r, c] += v · x[t, c]`.
 */
export function multiplyCsrDenseRange(a: Csr, x: Float64Array, l: number, out: Float64Array, from: number, to: number): void {
  const { indptr, indices, values } = a;
  out.fill(0, from * l, to * l);
  for (let r = from; r < to; r++) {
    const o = r * l;
    const end = indptr[r + 1]!;
    let p = indptr[r]!;
    for (; p + 7 < end; p += 8) {
      const v0 = values[p]!;
      const v1 = values[p + 1]!;
      const v2 = values[p + 2]!;
      const v3 = values[p + 3]!;
      const v4 = values[p + 4]!;
      const v5 = values[p + 5]!;
      const v6 = values[p + 6]!;
      const v7 = values[p + 7]!;
      const b0 = indices[p]! * l;
      const b1 = indices[p + 1]! * l;
      const b2 = indices[p + 2]! * l;
      const b3 = indices[p + 3]! * l;
      const b4 = indices[p + 4]! * l;
      const b5 = indices[p + 5]! * l;
      const b6 = indices[p + 6]! * l;
      const b7 = indices[p + 7]! * l;
      for (let c = 0; c < l; c++) {
        out[o + c] =
          out[o + c]! + v0 * x[b0 + c]! + v1 * x[b1 + c]! + v2 * x[b2 + c]! + v3 * x[b3 + c]! + v4 * x[b4 + c]! + v5 * x[b5 + c]! + v6 * x[b6 + c]! + v7 * x[b7 + c]!;
      }
    }
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
 * Rows `from..to` of the upper triangle of G = QᵀQ (l × l, row-major) of a
 * row-major `rows × l` block, into `g` (the entries b ≥ a of those rows; the
 * rest of `g` is not touched). Eight rows of Q per sweep over G's row; every
 * entry still adds its row products one by one in row order (a zero entry in
 * the tail adds nothing: its products are ±0, and a sum that starts at +0
 * never becomes −0), so the bits are those of the plain row-by-row loop and
 * do not depend on the range.
 */
export function gramUpperRange(q: Float64Array, rows: number, l: number, g: Float64Array, from: number, to: number): void {
  for (let a = from; a < to; a++) g.fill(0, a * l + a, a * l + l);
  let i = 0;
  for (; i + 7 < rows; i += 8) {
    const o0 = i * l;
    const o1 = o0 + l;
    const o2 = o1 + l;
    const o3 = o2 + l;
    const o4 = o3 + l;
    const o5 = o4 + l;
    const o6 = o5 + l;
    const o7 = o6 + l;
    for (let a = from; a < to; a++) {
      const x0 = q[o0 + a]!;
      const x1 = q[o1 + a]!;
      const x2 = q[o2 + a]!;
      const x3 = q[o3 + a]!;
      const x4 = q[o4 + a]!;
      const x5 = q[o5 + a]!;
      const x6 = q[o6 + a]!;
      const x7 = q[o7 + a]!;
      const ga = a * l;
      for (let b = a; b < l; b++) {
        g[ga + b] =
          g[ga + b]! + x0 * q[o0 + b]! + x1 * q[o1 + b]! + x2 * q[o2 + b]! + x3 * q[o3 + b]! + x4 * q[o4 + b]! + x5 * q[o5 + b]! + x6 * q[o6 + b]! + x7 * q[o7 + b]!;
      }
    }
  }
  for (; i < rows; i++) {
    const o = i * l;
    for (let a = from; a < to; a++) {
      const x = q[o + a]!;
      if (x === 0) continue;
      const ga = a * l;
      for (let b = a; b < l; b++) g[ga + b]! += x * q[o + b]!;
    }
  }
}

/**
 * Q ← QR⁻¹ on rows `from..to` of a row-major block, for an upper triangular R
 * given transposed (`rt` = Rᵀ, l × l row-major, non-zero diagonal): each row
 * x solves xR = q by forward substitution over the columns, four rows per
 * sweep; the arithmetic per row is that of the plain loop, bit for bit.
 */
export function solveUpperRange(q: Float64Array, l: number, rt: Float64Array, from: number, to: number): void {
  let i = from;
  for (; i + 3 < to; i += 4) {
    const o0 = i * l;
    const o1 = o0 + l;
    const o2 = o1 + l;
    const o3 = o2 + l;
    for (let c = 0; c < l; c++) {
      const rc = c * l;
      let t0 = q[o0 + c]!;
      let t1 = q[o1 + c]!;
      let t2 = q[o2 + c]!;
      let t3 = q[o3 + c]!;
      for (let k = 0; k < c; k++) {
        const w = rt[rc + k]!;
        t0 -= q[o0 + k]! * w;
        t1 -= q[o1 + k]! * w;
        t2 -= q[o2 + k]! * w;
        t3 -= q[o3 + k]! * w;
      }
      const d = rt[rc + c]!;
      q[o0 + c] = t0 / d;
      q[o1 + c] = t1 / d;
      q[o2 + c] = t2 / d;
      q[o3 + c] = t3 / d;
    }
  }
  for (; i < to; i++) {
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
 * Term-major V = Q̂·W on terms `from..to`: `out[t·d + j] = Σᵢ q[t·l + i] · w[i·d + j]`
 * (q: terms × l, w: l × d, both row-major), summed over i in order, zero
 * entries of q skipped (they add ±0).
 */
export function combineRange(q: Float64Array, l: number, w: Float64Array, d: number, out: Float64Array, from: number, to: number): void {
  out.fill(0, from * d, to * d);
  for (let t = from; t < to; t++) {
    const qo = t * l;
    const oo = t * d;
    for (let i = 0; i < l; i++) {
      const x = q[qo + i]!;
      if (x === 0) continue;
      const wo = i * d;
      for (let j = 0; j < d; j++) out[oo + j]! += x * w[wo + j]!;
    }
  }
}

/**
 * Rows `from..to` of A (terms-wide CSR) projected on term-major components
 * (`byTerm[t·d + j]`, Float32), each re-normalised to unit length (rows that
 * project to zero stay zero), into `out` (rows × d, Float32). `acc` (length
 * d) is scratch. Eight stored values per sweep, each entry summed left to
 * right in storage order (the plain loop's bits).
 */
export function projectRange(a: Csr, byTerm: Float32Array, d: number, out: Float32Array, acc: Float64Array, from: number, to: number): void {
  const { indptr, indices, values } = a;
  for (let i = from; i < to; i++) {
    acc.fill(0, 0, d);
    const end = indptr[i + 1]!;
    let p = indptr[i]!;
    for (; p + 7 < end; p += 8) {
      const v0 = values[p]!;
      const v1 = values[p + 1]!;
      const v2 = values[p + 2]!;
      const v3 = values[p + 3]!;
      const v4 = values[p + 4]!;
      const v5 = values[p + 5]!;
      const v6 = values[p + 6]!;
      const v7 = values[p + 7]!;
      const b0 = indices[p]! * d;
      const b1 = indices[p + 1]! * d;
      const b2 = indices[p + 2]! * d;
      const b3 = indices[p + 3]! * d;
      const b4 = indices[p + 4]! * d;
      const b5 = indices[p + 5]! * d;
      const b6 = indices[p + 6]! * d;
      const b7 = indices[p + 7]! * d;
      for (let j = 0; j < d; j++) {
        acc[j] =
          acc[j]! +
          v0 * byTerm[b0 + j]! +
          v1 * byTerm[b1 + j]! +
          v2 * byTerm[b2 + j]! +
          v3 * byTerm[b3 + j]! +
          v4 * byTerm[b4 + j]! +
          v5 * byTerm[b5 + j]! +
          v6 * byTerm[b6 + j]! +
          v7 * byTerm[b7 + j]!;
      }
    }
    for (; p < end; p++) {
      const v = values[p]!;
      const base = indices[p]! * d;
      for (let j = 0; j < d; j++) acc[j]! += v * byTerm[base + j]!;
    }
    let s = 0;
    for (let j = 0; j < d; j++) s += acc[j]! * acc[j]!;
    const o = i * d;
    if (s > 0) {
      const inv = 1 / Math.sqrt(s);
      for (let j = 0; j < d; j++) out[o + j] = acc[j]! * inv;
    } else {
      out.fill(0, o, o + d);
    }
  }
}

/** Row work of the decomposition: y = A·Ω, split by rows of A. */
export const SVD_WORK_A = 1;
/** Row work: Ω = Aᵀ·y, split by terms (rows of Aᵀ). */
export const SVD_WORK_AT = 2;
/** Row work: the upper Gram matrix of y, split by rows of G. */
export const SVD_WORK_GRAM_Y = 3;
/** Row work: the upper Gram matrix of Ω, split by rows of G. */
export const SVD_WORK_GRAM_OMEGA = 4;
/** Row work: y ← yR⁻¹, split by rows of y. */
export const SVD_WORK_SOLVE_Y = 5;
/** Row work: Ω ← ΩR⁻¹, split by rows of Ω. */
export const SVD_WORK_SOLVE_OMEGA = 6;
/** Row work: term-major V = Q̂W, split by terms. */
export const SVD_WORK_COMBINE = 7;
/** Row work: the re-normalised rows A·Vᵀ, split by rows of A. */
export const SVD_WORK_PROJECT = 8;

/**
 * Every array the row kernels of one decomposition read or write (shared with
 * the worker threads on the parallel path). Sizes: n rows, m terms, l = d + p.
 */
export interface SvdArrays {
  /** A, n × m. */
  readonly a: Csr;
  /** Aᵀ, m × n ({@link transposeCsr}). */
  readonly at: Csr;
  readonly l: number;
  readonly d: number;
  /** Ω, then Q̃ⱼ, then Bᵀ and Q̂ (m × l). */
  readonly omega: Float64Array;
  /** Yⱼ, then Qⱼ (n × l). */
  readonly y: Float64Array;
  /** Upper Gram matrix (l × l). */
  readonly g: Float64Array;
  /** Rᵀ of the solve (l × l). */
  readonly rt: Float64Array;
  /** W, the right singular vectors of R̂ᵀ kept, in order (l × d). */
  readonly wd: Float64Array;
  /** V = Q̂W term-major, before the sign fix (m × d). */
  readonly compT: Float64Array;
  /** The Float32 components term-major (m × d). */
  readonly byTerm: Float32Array;
  /** The re-normalised rows (n × d). */
  readonly rows: Float32Array;
}

/** The number of output rows a row work covers (what a driver splits into ranges). */
export function svdWorkRows(s: SvdArrays, work: number): number {
  switch (work) {
    case SVD_WORK_A:
    case SVD_WORK_SOLVE_Y:
    case SVD_WORK_PROJECT:
      return s.a.rows;
    case SVD_WORK_AT:
    case SVD_WORK_SOLVE_OMEGA:
    case SVD_WORK_COMBINE:
      return s.a.cols;
    case SVD_WORK_GRAM_Y:
    case SVD_WORK_GRAM_OMEGA:
      return s.l;
    default:
      throw new RangeError(`unknown decomposition work ${work}`);
  }
}

/**
 * Runs output rows `from..to` of a row work; the one kernel call that one
 * thread (the whole range) and several (a range each) make. `acc` is scratch
 * of length d.
 */
export function runSvdBlock(s: SvdArrays, work: number, from: number, to: number, acc: Float64Array): void {
  const { a, at, l, d } = s;
  switch (work) {
    case SVD_WORK_A:
      return multiplyCsrDenseRange(a, s.omega, l, s.y, from, to);
    case SVD_WORK_AT:
      return multiplyCsrDenseRange(at, s.y, l, s.omega, from, to);
    case SVD_WORK_GRAM_Y:
      return gramUpperRange(s.y, a.rows, l, s.g, from, to);
    case SVD_WORK_GRAM_OMEGA:
      return gramUpperRange(s.omega, a.cols, l, s.g, from, to);
    case SVD_WORK_SOLVE_Y:
      return solveUpperRange(s.y, l, s.rt, from, to);
    case SVD_WORK_SOLVE_OMEGA:
      return solveUpperRange(s.omega, l, s.rt, from, to);
    case SVD_WORK_COMBINE:
      return combineRange(s.omega, l, s.wd, d, s.compT, from, to);
    case SVD_WORK_PROJECT:
      return projectRange(a, s.byTerm, d, s.rows, acc, from, to);
    default:
      throw new RangeError(`unknown decomposition work ${work}`);
  }
}

