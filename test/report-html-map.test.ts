import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { groupMap } from '../src/report/map.js';

interface FixtureCase {
  terms: number;
  groups: number;
  centroids: number[];
  x: number[];
  y: number[];
  eigenvalues: number[];
}
const fixture = JSON.parse(
  readFileSync(new URL('./fixtures/report-map/classical-mds.json', import.meta.url), 'utf8'),
) as { cases: FixtureCase[] };

/** Term-major centroids from group-major unit vectors (vectors[g] is group g's column). */
function termMajor(vectors: number[][]): { c: Float32Array; terms: number; groups: number } {
  const groups = vectors.length;
  const terms = vectors[0].length;
  const c = new Float32Array(terms * groups);
  for (let g = 0; g < groups; g++) for (let t = 0; t < terms; t++) c[t * groups + g] = vectors[g][t];
  return { c, terms, groups };
}

function mapDistance(m: { x: Float64Array; y: Float64Array }, a: number, b: number): number {
  return Math.hypot(m.x[a] - m.x[b], m.y[a] - m.y[b]);
}

/** Straight-line distance between unit vectors at angle θ: 2·sin(θ/2) (chord of the unit circle). */
function chord(theta: number): number {
  return 2 * Math.sin(theta / 2);
}

describe('groupMap: hand-checked configurations', () => {
  it('three centroids at 0°, 60° and 150° in one plane reproduce their chord distances exactly', () => {
    const deg = Math.PI / 180;
    const angles = [0, 60 * deg, 150 * deg];
    // Embedded in a 4-term space so the plane is not the axes' own.
    const vectors = angles.map((a) => [Math.cos(a) / Math.SQRT2, Math.sin(a), Math.cos(a) / Math.SQRT2, 0]);
    const { c, terms, groups } = termMajor(vectors);
    const m = groupMap(c, terms, groups);
    // By hand: 60° apart -> 2 sin 30° = 1; 150° -> 2 sin 75° ≈ 1.93185; 90° -> 2 sin 45° = √2.
    expect(mapDistance(m, 0, 1)).toBeCloseTo(1, 6);
    expect(mapDistance(m, 0, 2)).toBeCloseTo(chord(150 * deg), 6);
    expect(mapDistance(m, 1, 2)).toBeCloseTo(Math.SQRT2, 6);
    // Centred: classical scaling puts the centroid of the points at the origin.
    expect(m.x[0] + m.x[1] + m.x[2]).toBeCloseTo(0, 9);
    expect(m.y[0] + m.y[1] + m.y[2]).toBeCloseTo(0, 9);
  });

  it('three orthogonal centroids form an equilateral triangle of side √2', () => {
    const m = groupMap(...Object.values(termMajor([[1, 0, 0], [0, 1, 0], [0, 0, 1]])) as [Float32Array, number, number]);
    for (const [a, b] of [[0, 1], [0, 2], [1, 2]]) expect(mapDistance(m, a, b)).toBeCloseTo(Math.SQRT2, 6);
  });

  it('two groups lie on the first axis, ± half their distance, second axis zero', () => {
    const theta = Math.PI / 3;
    const { c, terms, groups } = termMajor([[1, 0], [Math.cos(theta), Math.sin(theta)]]);
    const m = groupMap(c, terms, groups);
    const half = chord(theta) / 2; // = 0.5
    expect(Math.abs(m.x[0])).toBeCloseTo(half, 6);
    expect(m.x[0]).toBeCloseTo(-m.x[1], 9);
    expect(Array.from(m.y)).toEqual([0, 0]);
    // Sign convention: the larger-magnitude coordinate (a tie here: the first group) is positive.
    expect(m.x[0]).toBeGreaterThan(0);
  });

  it('one group sits at the origin; no groups gives empty arrays', () => {
    const one = groupMap(new Float32Array([0.6, 0.8]), 2, 1);
    expect(Array.from(one.x)).toEqual([0]);
    expect(Array.from(one.y)).toEqual([0]);
    const none = groupMap(new Float32Array(0), 5, 0);
    expect(none.x.length).toBe(0);
  });

  it('identical centroids collapse to one point', () => {
    const v = [0.6, 0.8, 0];
    const m = groupMap(...Object.values(termMajor([v, v, v])) as [Float32Array, number, number]);
    for (let g = 0; g < 3; g++) {
      expect(Math.abs(m.x[g])).toBeLessThan(1e-6);
      expect(Math.abs(m.y[g])).toBeLessThan(1e-6);
    }
  });

  it('each axis is oriented with its largest-magnitude coordinate positive', () => {
    for (const kase of fixture.cases) {
      const m = groupMap(Float32Array.from(kase.centroids), kase.terms, kase.groups);
      for (const axis of [m.x, m.y]) {
        let best = 0;
        for (let g = 1; g < axis.length; g++) if (Math.abs(axis[g]) > Math.abs(axis[best])) best = g;
        expect(axis[best]).toBeGreaterThan(0);
      }
    }
  });

  it('rejects a centroid array of the wrong length with a message naming both sizes', () => {
    expect(() => groupMap(new Float32Array(5), 2, 3)).toThrow(
      new RangeError('centroids must hold terms * groups = 6 values; got 5'),
    );
    expect(() => groupMap(new Float32Array(0), -1, 3)).toThrow(new RangeError('terms must be a whole number >= 0; got -1'));
    expect(() => groupMap(new Float32Array(0), 0, 1.5)).toThrow(new RangeError('groups must be a whole number >= 0; got 1.5'));
  });
});

describe('groupMap against numpy (test/fixtures/report-map/make_fixture.py, numpy.linalg.eigh)', () => {
  for (const kase of fixture.cases) {
    it(`${kase.groups} groups over ${kase.terms} terms: same coordinates as the numpy reference`, () => {
      const m = groupMap(Float32Array.from(kase.centroids), kase.terms, kase.groups);
      for (let g = 0; g < kase.groups; g++) {
        expect(m.x[g]).toBeCloseTo(kase.x[g], 9);
        expect(m.y[g]).toBeCloseTo(kase.y[g], 9);
      }
    });
  }

  it('map distances never exceed the true distances (a projection) and match when the rest of the spectrum is small', () => {
    for (const kase of fixture.cases) {
      const { terms, groups: k } = kase;
      const c = Float32Array.from(kase.centroids);
      const m = groupMap(c, terms, k);
      for (let a = 0; a < k; a++) {
        for (let b = a + 1; b < k; b++) {
          let d2 = 0;
          for (let t = 0; t < terms; t++) d2 += (c[t * k + a] - c[t * k + b]) ** 2;
          expect(mapDistance(m, a, b)).toBeLessThanOrEqual(Math.sqrt(d2) + 1e-9);
        }
      }
    }
    // The first case (3 groups) is rank 2 after centring (third eigenvalue ~1e-17): exact.
    const first = fixture.cases[0];
    expect(first.eigenvalues[2]).toBeLessThan(1e-12);
    const c = Float32Array.from(first.centroids);
    const m = groupMap(c, first.terms, first.groups);
    for (const [a, b] of [[0, 1], [0, 2], [1, 2]]) {
      let d2 = 0;
      for (let t = 0; t < first.terms; t++) d2 += (c[t * 3 + a] - c[t * 3 + b]) ** 2;
      expect(mapDistance(m, a, b)).toBeCloseTo(Math.sqrt(d2), 9);
    }
  });
});

describe('groupMap property: unit centroids in one plane through the origin map without distortion', () => {
  it('pairwise map distances equal 2·sin(Δθ/2) for any angles and any orthonormal plane', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 0, max: Math.PI / 2, noNaN: true }), { minLength: 2, maxLength: 9 }),
        fc.integer({ min: 2, max: 7 }),
        fc.integer({ min: 0, max: 1_000_000 }),
        (angles, terms, seed) => {
          // Two orthonormal directions in `terms` dimensions from a seeded Gram–Schmidt.
          let s = seed + 1;
          const rand = () => ((s = (s * 16807) % 2147483647) / 2147483647) - 0.5;
          const u = Array.from({ length: terms }, rand);
          const nu = Math.hypot(...u);
          for (let i = 0; i < terms; i++) u[i] /= nu;
          const w = Array.from({ length: terms }, rand);
          const dot = w.reduce((acc, v, i) => acc + v * u[i], 0);
          for (let i = 0; i < terms; i++) w[i] -= dot * u[i];
          const nw = Math.hypot(...w);
          fc.pre(nw > 1e-3);
          for (let i = 0; i < terms; i++) w[i] /= nw;
          const vectors = angles.map((a) => u.map((ui, i) => Math.cos(a) * ui + Math.sin(a) * w[i]));
          const { c } = termMajor(vectors);
          // Compare with the float32-rounded vectors' own distances.
          const k = angles.length;
          const m = groupMap(c, terms, k);
          for (let a = 0; a < k; a++) {
            for (let b = a + 1; b < k; b++) {
              let d2 = 0;
              for (let t = 0; t < terms; t++) d2 += (c[t * k + a] - c[t * k + b]) ** 2;
              expect(Math.abs(mapDistance(m, a, b) - Math.sqrt(d2))).toBeLessThan(1e-5);
              expect(Math.abs(Math.sqrt(d2) - chord(Math.abs(angles[a] - angles[b])))).toBeLessThan(1e-5);
            }
          }
        },
      ),
      { numRuns: 200, seed: 42 },
    );
  });
});
