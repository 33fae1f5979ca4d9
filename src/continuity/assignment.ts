/**
 * The optimal one-to-one assignment (linear sum assignment problem) on a
 * rectangular cost matrix: the Hungarian method (Kuhn 1955), in its
 * shortest-augmenting-path form with row and column potentials (a row is
 * added at a time; O(r²·c) for r ≤ c). Pure; typed arrays only.
 *
 * @module
 */

/** Pairs of an optimal assignment: `rows[i]` is matched with `cols[i]`, rows ascending. */
export interface OptimalAssignment {
  readonly rows: Int32Array;
  readonly cols: Int32Array;
  /** Sum of the matched costs. */
  readonly total: number;
}

/**
 * Matches min(rows, cols) rows with as many columns, one-to-one, so the sum of
 * `cost[row * cols + col]` over the pairs is least. Every cost must be finite.
 * Throws `RangeError` on a size mismatch or a non-finite cost.
 */
export function optimalAssignment(cost: Float64Array, rows: number, cols: number): OptimalAssignment {
  if (!Number.isInteger(rows) || !Number.isInteger(cols) || rows < 0 || cols < 0) throw new RangeError(`rows and cols must be whole numbers >= 0; got ${rows} × ${cols}`);
  if (cost.length !== rows * cols) throw new RangeError(`cost holds ${cost.length} values; ${rows} × ${cols} needs ${rows * cols}`);
  for (let i = 0; i < cost.length; i++) if (!Number.isFinite(cost[i]!)) throw new RangeError(`cost[${i}] is ${cost[i]}; every cost must be finite`);
  if (rows === 0 || cols === 0) return { rows: new Int32Array(0), cols: new Int32Array(0), total: 0 };
  const flip = rows > cols;
  const n = flip ? cols : rows;
  const m = flip ? rows : cols;
  const a = (i: number, j: number): number => (flip ? cost[j * cols + i]! : cost[i * cols + j]!);
  // 1-based potentials; p[j] = row (1-based) holding column j, 0 when free; column 0 is the start of each search.
  const u = new Float64Array(n + 1);
  const v = new Float64Array(m + 1);
  const p = new Int32Array(m + 1);
  const way = new Int32Array(m + 1);
  const minv = new Float64Array(m + 1);
  const used = new Uint8Array(m + 1);
  for (let i = 1; i <= n; i++) {
    p[0] = i;
    let j0 = 0;
    minv.fill(Infinity);
    used.fill(0);
    do {
      used[j0] = 1;
      const i0 = p[j0]!;
      let delta = Infinity;
      let j1 = 0;
      for (let j = 1; j <= m; j++) {
        if (used[j]) continue;
        const cur = a(i0 - 1, j - 1) - u[i0]! - v[j]!;
        if (cur < minv[j]!) {
          minv[j] = cur;
          way[j] = j0;
        }
        if (minv[j]! < delta) {
          delta = minv[j]!;
          j1 = j;
        }
      }
      for (let j = 0; j <= m; j++) {
        if (used[j]) {
          u[p[j]!]! += delta;
          v[j]! -= delta;
        } else minv[j]! -= delta;
      }
      j0 = j1;
    } while (p[j0] !== 0);
    do {
      const j1 = way[j0]!;
      p[j0] = p[j1]!;
      j0 = j1;
    } while (j0 !== 0);
  }
  // Pairs as (original row, original col), rows ascending.
  const pairRow = new Int32Array(n);
  const pairCol = new Int32Array(n);
  let k = 0;
  for (let j = 1; j <= m; j++) {
    if (p[j] === 0) continue;
    const r = p[j]! - 1;
    const c = j - 1;
    pairRow[k] = flip ? c : r;
    pairCol[k] = flip ? r : c;
    k++;
  }
  const order = Array.from({ length: n }, (_, i) => i).sort((x, y) => pairRow[x]! - pairRow[y]!);
  const outRows = new Int32Array(n);
  const outCols = new Int32Array(n);
  let total = 0;
  order.forEach((o, i) => {
    outRows[i] = pairRow[o]!;
    outCols[i] = pairCol[o]!;
    total += cost[outRows[i]! * cols + outCols[i]!]!;
  });
  return { rows: outRows, cols: outCols, total };
}
