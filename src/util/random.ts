/**
 * Seeded pseudo-random numbers. Every random choice in the core takes an
 * {@link Rng} explicitly, so the same seed and input give the same output.
 *
 * @module
 */

/** A seeded source of uniform numbers in [0, 1). */
export interface Rng {
  /** Next uniform double in [0, 1). */
  next(): number;
  /** Uniform integer in [0, n). */
  int(n: number): number;
}

/**
 * Creates a generator from a 32-bit seed: SplitMix32 to expand the seed into
 * state, then xoshiro128** (Blackman & Vigna, "Scrambled linear pseudorandom
 * number generators", 2018). Doubles use 53 bits from two outputs.
 */
export function createRng(seed: number): Rng {
  let z = seed >>> 0;
  const splitmix = (): number => {
    z = (z + 0x9e3779b9) >>> 0;
    let t = z;
    t = Math.imul(t ^ (t >>> 16), 0x85ebca6b);
    t = Math.imul(t ^ (t >>> 13), 0xc2b2ae35);
    return (t ^ (t >>> 16)) >>> 0;
  };
  let a = splitmix();
  let b = splitmix();
  let c = splitmix();
  let d = splitmix();
  if ((a | b | c | d) === 0) a = 1;
  const nextU32 = (): number => {
    const result = Math.imul(rotl(Math.imul(b, 5), 7), 9) >>> 0;
    const t = b << 9;
    c ^= a;
    d ^= b;
    b ^= c;
    a ^= d;
    c ^= t;
    d = rotl(d, 11);
    return result;
  };
  const next = (): number => {
    const hi = nextU32() >>> 5; // 27 bits
    const lo = nextU32() >>> 6; // 26 bits
    return (hi * 67108864 + lo) / 9007199254740992;
  };
  return {
    next,
    int(n: number): number {
      return Math.floor(next() * n);
    },
  };
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

/**
 * Derives an independent 32-bit seed for a sub-task (a restart, a sample) from
 * a base seed and an index, so sub-tasks do not share streams.
 */
export function deriveSeed(seed: number, index: number): number {
  let h = (seed ^ Math.imul(index + 1, 0x9e3779b1)) >>> 0;
  h = Math.imul(h ^ (h >>> 16), 0x7feb352d);
  h = Math.imul(h ^ (h >>> 15), 0x846ca68b);
  return (h ^ (h >>> 16)) >>> 0;
}
