/**
 * Properties of the analyzer on arbitrary input (fast-check): it never
 * throws, is deterministic (same settings -> same terms, whichever analyzer
 * instance and whatever came before), and its terms are non-empty and free
 * of white space (bigrams hold exactly one space).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { STEMMING_LANGUAGES, createAnalyzer, type AnalyzerOptions } from '../src/analyze/index.js';

const anyText = fc.string({
  unit: fc.oneof(
    { weight: 3, arbitrary: fc.constantFrom(...'aeiou bcdlmnrst-’\'.,0123456789ßçéøå'.split('')) },
    { weight: 1, arbitrary: fc.integer({ min: 0, max: 0xffff }).map((c) => String.fromCharCode(c)) },
    { weight: 1, arbitrary: fc.string({ unit: 'binary', minLength: 1, maxLength: 1 }) },
    { weight: 1, arbitrary: fc.constantFrom('灯塔', 'の', 'コーヒー', 'ภาษา', 'ລາວ', 'ខ្មែរ', 'မြန်မာ', 'м’ясо', "l'", "qu'", "'s") },
  ),
  maxLength: 80,
});

const options: fc.Arbitrary<Partial<AnalyzerOptions>> = fc.record(
  {
    lang: fc.constantFrom(...STEMMING_LANGUAGES, 'zh', 'ja', 'th', 'fi', 'ca', 'el'),
    stem: fc.boolean(),
    minLength: fc.integer({ min: 1, max: 4 }),
    numbers: fc.boolean(),
    phrases: fc.boolean(),
    stopwords: fc.array(fc.constantFrom('lamp', 'constructor', '__proto__', 'ß', 'toString'), { maxLength: 3 }),
  },
  { requiredKeys: [] },
);

describe('analyzer properties', () => {
  it('never throws, and gives non-empty terms without stray white space', () => {
    fc.assert(
      fc.property(options, anyText, (opts, text) => {
        const terms = createAnalyzer(opts).analyze(text);
        for (const t of terms) {
          expect(t.length).toBeGreaterThan(0);
          const spaces = t.split(' ').length - 1;
          expect(spaces).toBeLessThanOrEqual(opts.phrases === true ? 1 : 0);
          expect(/[\t\n\r\u00a0]/.test(t)).toBe(false);
        }
      }),
      { numRuns: 1500 },
    );
  });

  it('is deterministic: a fresh analyzer, a reused one and one rebuilt from saved settings agree', () => {
    fc.assert(
      fc.property(options, fc.array(anyText, { minLength: 1, maxLength: 5 }), (opts, texts) => {
        const a = createAnalyzer(opts);
        const warm = texts.map((t) => a.analyze(t)); // fills the stem cache
        const again = texts.map((t) => a.analyze(t));
        const rebuilt = createAnalyzer(JSON.parse(JSON.stringify(a.settings)) as AnalyzerOptions);
        expect(again).toEqual(warm);
        expect(texts.map((t) => rebuilt.analyze(t))).toEqual(warm);
        expect([...texts].reverse().map((t) => createAnalyzer(opts).analyze(t))).toEqual([...warm].reverse());
      }),
      { numRuns: 400 },
    );
  });

  it('with phrases on, the output is the phrase-free output followed by its adjacent pairs', () => {
    fc.assert(
      fc.property(options, anyText, (opts, text) => {
        const uni = createAnalyzer({ ...opts, phrases: false }).analyze(text);
        const both = createAnalyzer({ ...opts, phrases: true }).analyze(text);
        const pairs = uni.slice(1).map((t, i) => `${uni[i]} ${t}`);
        expect(both).toEqual([...uni, ...pairs]);
      }),
      { numRuns: 500 },
    );
  });

  it('analyzeWithSurfaces gives the same terms as analyze, with one surface form per term', () => {
    fc.assert(
      fc.property(options, anyText, (opts, text) => {
        const a = createAnalyzer(opts);
        const { terms, surfaces } = a.analyzeWithSurfaces(text);
        expect(terms).toEqual(a.analyze(text));
        expect(surfaces).toHaveLength(terms.length);
        if (a.settings.stem === false) expect(surfaces).toEqual(terms);
      }),
      { numRuns: 500 },
    );
  });
});
