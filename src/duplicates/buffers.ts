/**
 * Growable typed-array buffers for outputs whose size is known only at the
 * end (pairs found by a similarity join). Capacity doubles when full, so
 * pushing n values costs O(n) amortised and memory stays within 2× of what
 * is kept.
 *
 * @module
 */

/** An Int32Array that grows by doubling. */
export class GrowableInt32 {
  private data: Int32Array;
  /** Number of values pushed so far. */
  length = 0;

  /** Starts with room for `capacity` values (at least 16). */
  constructor(capacity = 16) {
    this.data = new Int32Array(Math.max(16, capacity));
  }

  /** Appends one value. */
  push(value: number): void {
    if (this.length === this.data.length) {
      const next = new Int32Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = value;
  }

  /** A trimmed copy of the values pushed. */
  toArray(): Int32Array {
    return this.data.slice(0, this.length);
  }
}

/** A Float32Array that grows by doubling. */
export class GrowableFloat32 {
  private data: Float32Array;
  /** Number of values pushed so far. */
  length = 0;

  /** Starts with room for `capacity` values (at least 16). */
  constructor(capacity = 16) {
    this.data = new Float32Array(Math.max(16, capacity));
  }

  /** Appends one value (rounded to float32). */
  push(value: number): void {
    if (this.length === this.data.length) {
      const next = new Float32Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = value;
  }

  /** A trimmed copy of the values pushed. */
  toArray(): Float32Array {
    return this.data.slice(0, this.length);
  }
}
