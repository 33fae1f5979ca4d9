/**
 * The pieces the parallel fit is built from, on one thread: the term
 * collector's packed segments against a naive per-document count written
 * here, the shared back half (`fitCollected`) giving `fitTfidf`'s result
 * bit for bit however the documents are cut into segments and whatever
 * order the provisional ids were interned in, and the chunk plan.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { TermCollector, type TermSegment } from '../src/vectorize/collect.js';
import { fitCollected, fitTfidf, type TfidfFit } from '../src/vectorize/tfidf.js';
import { resolveVectorizeOptions, type VectorizeOptions } from '../src/vectorize/options.js';
import { chunkBounds } from '../src/parallel/analyze-parallel.js';

const TERMS = ['a', 'b', 'lamp', 'lens', 'Lamp', 'constructor', '__proto__', 'toString', 'é', '\u{1F600}', 'x y'];
const docs = fc.array(fc.array(fc.constantFrom(...TERMS), { maxLength: 14 }), { minLength: 1, maxLength: 25 });
const options: fc.Arbitrary<VectorizeOptions> = fc
  .record({
    minDf: fc.oneof(fc.integer({ min: 1, max: 4 }), fc.double({ min: 0.01, max: 0.6, noNaN: true })),
    maxDf: fc.oneof(fc.double({ min: 0.3, max: 1, noNaN: true }), fc.integer({ min: 2, max: 30 })),
    maxTerms: fc.option(fc.integer({ min: 1, max: 10 }), { nil: null }),
  })
  .filter((o) => (o.minDf < 1) !== (o.maxDf <= 1) || o.maxDf >= o.minDf);

/** Decodes one segment into per-document [term, count] lists, test-side. */
function decode(seg: TermSegment, names: readonly string[]): [string, number][][] {
  const out: [string, number][][] = [];
  for (let r = 0; r < seg.rows; r++) {
    const row: [string, number][] = [];
    for (let p = seg.offsets[r]!; p < seg.offsets[r + 1]!; p++) {
      const e = seg.entries[p]!;
      if (e >= 0) row.push([names[e]!, 1]);
      else row.push([names[~e]!, seg.entries[++p]!]);
    }
    out.push(row);
  }
  return out;
}

/** Naive: each document's distinct terms in first-occurrence order with their counts. */
function naiveCounts(input: string[][]): [string, number][][] {
  return input.map((d) => {
    const m = new Map<string, number>();
    for (const t of d) m.set(t, (m.get(t) ?? 0) + 1);
    return [...m];
  });
}

/**
 * Where two typed arrays first differ, as bytes (-1 when identical, so
 * float values are compared bit for bit; a plain loop, as deep equality
 * on arrays of millions of entries is very slow).
 */
function firstDifference(a: ArrayBufferView, b: ArrayBufferView): number {
  const x = new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
  const y = new Uint8Array(b.buffer, b.byteOffset, b.byteLength);
  if (x.length !== y.length) return Math.min(x.length, y.length);
  for (let i = 0; i < x.length; i++) if (x[i] !== y[i]) return i;
  return -1;
}

function expectSameFit(got: TfidfFit, want: TfidfFit): void {
  // Serialised: deep equality on arrays of tens of thousands of entries is slow, and this is exact.
  expect(JSON.stringify(got.vocabulary.terms)).toBe(JSON.stringify(want.vocabulary.terms));
  expect(JSON.stringify([...got.vocabulary.index])).toBe(JSON.stringify([...want.vocabulary.index]));
  expect(got.vocabulary.docCount).toBe(want.vocabulary.docCount);
  expect(firstDifference(got.vocabulary.df, want.vocabulary.df), 'df').toBe(-1);
  expect(firstDifference(got.vocabulary.idf, want.vocabulary.idf), 'idf').toBe(-1);
  expect([got.matrix.rows, got.matrix.cols]).toEqual([want.matrix.rows, want.matrix.cols]);
  expect(firstDifference(got.matrix.indptr, want.matrix.indptr), 'indptr').toBe(-1);
  expect(firstDifference(got.matrix.indices, want.matrix.indices), 'indices').toBe(-1);
  expect(firstDifference(got.matrix.values, want.matrix.values), 'values').toBe(-1);
}

function outcome(run: () => TfidfFit): TfidfFit | string {
  try {
    return run();
  } catch (e) {
    return `${(e as Error).name}: ${(e as Error).message}`;
  }
}

describe('TermCollector', () => {
  it('packs each document as its distinct terms with counts, in first-occurrence order, across segments', () => {
    fc.assert(
      fc.property(docs, fc.array(fc.nat(25), { maxLength: 4 }), fc.boolean(), (input, cutsRaw, exact) => {
        const cuts = new Set(cutsRaw.map((c) => c % (input.length + 1)));
        const c = new TermCollector();
        const got: [string, number][][] = [];
        const segs: TermSegment[] = [];
        input.forEach((d, i) => {
          if (cuts.has(i)) segs.push(c.take(exact));
          c.add(d);
        });
        segs.push(c.take(exact));
        for (const s of segs) got.push(...decode(s, c.names));
        expect(got).toEqual(naiveCounts(input));
        expect(segs.reduce((n, s) => n + s.rows, 0)).toBe(input.length);
        // Interned in first-seen order over the whole stream.
        expect(c.names).toEqual([...new Set(input.flat())]);
        for (const s of segs) {
          expect(s.offsets[0]).toBe(0);
          expect(s.offsets[s.rows]).toBe(s.entries.length);
        }
        // Never more than one entry per token, never more than two per distinct term.
        const tokens = input.reduce((n, d) => n + d.length, 0);
        const distinct = input.reduce((n, d) => n + new Set(d).size, 0);
        const stored = segs.reduce((n, s) => n + s.entries.length, 0);
        expect(stored).toBeLessThanOrEqual(tokens);
        expect(stored).toBeLessThanOrEqual(2 * distinct);
      }),
      { numRuns: 300 },
    );
  });

  it('a hand-worked document: "b a b b c a" is b×3, a×2, c×1, stored as ~0 3 ~1 2 2', () => {
    const c = new TermCollector();
    c.add(['b', 'a', 'b', 'b', 'c', 'a']);
    c.add([]);
    c.add(['c']);
    const s = c.take(true);
    expect(c.names).toEqual(['b', 'a', 'c']);
    expect(Array.from(s.offsets)).toEqual([0, 5, 5, 6]);
    expect(Array.from(s.entries)).toEqual([~0, 3, ~1, 2, 2, 2]);
  });

  it('ids from 1024 and beyond (arrays grow) and documents with more than 256 distinct terms (scratch grows)', () => {
    const words = Array.from({ length: 3000 }, (_, i) => `w${i}`);
    const input = [words.slice(0, 2000), [...words.slice(1500), 'w1', 'w1'], words.slice(0, 3)];
    const c = new TermCollector();
    for (const d of input) c.add(d);
    expect(decode(c.take(false), c.names)).toEqual(naiveCounts(input));
  });
});

describe('fitCollected (the back half shared by fitTfidf and the parallel fit)', () => {
  it('equals fitTfidf bit for bit for any cut into segments and any interning order', () => {
    fc.assert(
      fc.property(docs, options, fc.array(fc.nat(25), { maxLength: 4 }), fc.array(fc.nat(30)), (input, o, cutsRaw, pre) => {
        const want = outcome(() => fitTfidf(input, o));
        // Another collector, primed with some terms first (a different provisional numbering), cut into segments.
        const c = new TermCollector();
        for (const i of pre) c.intern(TERMS[i % TERMS.length]!);
        const cuts = new Set(cutsRaw.map((x) => x % (input.length + 1)));
        const segs: TermSegment[] = [];
        input.forEach((d, i) => {
          if (cuts.has(i)) segs.push(c.take(true));
          c.add(d);
        });
        segs.push(c.take(true));
        const got = outcome(() => fitCollected(c.names, segs, resolveVectorizeOptions(o)));
        if (typeof want === 'string') {
          // Priming adds terms that no document has, so "no terms at all" becomes "none left after pruning".
          expect(typeof got).toBe('string');
          if (pre.length === 0) expect(got).toBe(want);
          return;
        }
        if (typeof got === 'string') throw new Error(`fitCollected failed where fitTfidf did not: ${got}`);
        expectSameFit(got, want);
      }),
      { numRuns: 300 },
    );
  });

  it('no segments, or segments of no documents: "no documents to vectorize"', () => {
    const o = resolveVectorizeOptions({});
    expect(() => fitCollected([], [], o)).toThrow('no documents to vectorize');
    const c = new TermCollector();
    expect(() => fitCollected(c.names, [c.take(true), c.take(true)], o)).toThrow('no documents to vectorize');
  });
});

describe('chunkBounds', () => {
  it('covers every document once, in order; a chunk closes at the document reaching chunkChars (or 8192 documents)', () => {
    fc.assert(
      fc.property(fc.array(fc.string({ maxLength: 30 }), { maxLength: 60 }), fc.integer({ min: 1, max: 120 }), (texts, chunkChars) => {
        const b = Array.from(chunkBounds(texts, chunkChars));
        if (texts.length === 0) {
          expect(b).toEqual([0]);
          return;
        }
        expect(b[0]).toBe(0);
        expect(b[b.length - 1]).toBe(texts.length);
        for (let c = 0; c + 1 < b.length; c++) {
          expect(b[c + 1]!).toBeGreaterThan(b[c]!);
          const len = (i: number): number => texts[i]!.length;
          let chars = 0;
          for (let i = b[c]!; i < b[c + 1]!; i++) {
            // Before the chunk's last document it had not yet reached chunkChars.
            if (i + 1 < b[c + 1]!) expect(chars + len(i)).toBeLessThan(chunkChars);
            chars += len(i);
          }
          if (c + 2 < b.length) expect(chars).toBeGreaterThanOrEqual(chunkChars);
        }
      }),
      { numRuns: 300 },
    );
  });

  it('cuts 20000 empty texts into 8192 + 8192 + 3616', () => {
    expect(Array.from(chunkBounds(new Array<string>(20000).fill(''), 1 << 18))).toEqual([0, 8192, 16384, 20000]);
  });
});
