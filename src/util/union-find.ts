/**
 * Disjoint sets over the whole numbers 0 … n − 1 (union-find with path
 * compression), the one copy the tree builder and the duplicate sets share.
 * The caller decides which root joins which, so both ways of linking used in
 * this code base (a new tree node as the parent; union by size) fit.
 *
 * @module
 */

/** Disjoint sets over 0 … size − 1, each element its own set at first. */
export class UnionFind {
  /** parent[x] = x for a root; otherwise a step towards x's root. */
  readonly parent: Int32Array;

  /** Creates `size` singleton sets. */
  constructor(size: number) {
    this.parent = new Int32Array(size);
    for (let i = 0; i < size; i++) this.parent[i] = i;
  }

  /** The root of x's set; compresses the path walked so later calls are short. */
  find(x: number): number {
    const parent = this.parent;
    let root = x;
    while (parent[root] !== root) root = parent[root]!;
    while (parent[x] !== root) {
      const next = parent[x]!;
      parent[x] = root;
      x = next;
    }
    return root;
  }

  /** Makes `root` (a root) point at `to`, so its set joins `to`'s. */
  attach(root: number, to: number): void {
    this.parent[root] = to;
  }
}
