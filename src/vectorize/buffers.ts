/**
 * Growable typed-array buffers: amortised doubling, so a one-shot stream
 * of documents can be collected without arrays of arrays.
 *
 * @module
 */

/** An Int32Array that grows; `data[0 .. length)` holds the values. */
export class IntBuffer {
  /** Backing store; may be longer than {@link length}. Replaced when it grows. */
  data: Int32Array;
  /** Number of values held. */
  length = 0;
  constructor(capacity = 1024) {
    this.data = new Int32Array(Math.max(1, capacity));
  }
  /** Appends one value. */
  push(value: number): void {
    if (this.length === this.data.length) this.reserve(1);
    this.data[this.length++] = value;
  }
  /** Makes room for `extra` more values. */
  reserve(extra: number): void {
    const need = this.length + extra;
    if (need <= this.data.length) return;
    let cap = this.data.length * 2;
    while (cap < need) cap *= 2;
    const next = new Int32Array(cap);
    next.set(this.data.subarray(0, this.length));
    this.data = next;
  }
  /** A copy of exactly the values held. */
  toArray(): Int32Array {
    return this.data.slice(0, this.length);
  }
}

/** A Float32Array that grows; `data[0 .. length)` holds the values. */
export class Float32Buffer {
  /** Backing store; may be longer than {@link length}. Replaced when it grows. */
  data: Float32Array;
  /** Number of values held. */
  length = 0;
  constructor(capacity = 1024) {
    this.data = new Float32Array(Math.max(1, capacity));
  }
  /** Makes room for `extra` more values. */
  reserve(extra: number): void {
    const need = this.length + extra;
    if (need <= this.data.length) return;
    let cap = this.data.length * 2;
    while (cap < need) cap *= 2;
    const next = new Float32Array(cap);
    next.set(this.data.subarray(0, this.length));
    this.data = next;
  }
  /** A copy of exactly the values held. */
  toArray(): Float32Array {
    return this.data.slice(0, this.length);
  }
}
