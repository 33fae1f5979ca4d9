/**
 * Unicode handling: NFKC and case folding, the tokeniser against its
 * regular-expression definition, and word segmentation of scripts written
 * without spaces.
 *
 * NFKC examples: the ligature and superscript cases are those of Unicode
 * Standard Annex #15, "Unicode Normalization Forms", figure of
 * compatibility-equivalent examples (from memory: "ﬁ" -> "fi",
 * "2⁵" -> "25", "ẛ̣" -> "ṩ"); full-width and half-width forms follow their
 * <wide>/<narrow> decompositions in the Unicode Character Database.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { createAnalyzer, normalizeText } from '../src/analyze/index.js';
import { APOSTROPHE, NO_SPACE, NO_SPACE_RE, NUMERIC, TOKEN_RE, scanTokens } from '../src/analyze/text.js';

describe('normalisation (NFKC, then case folding)', () => {
  it('UAX #15 compatibility examples', () => {
    expect(normalizeText('\uFB01')).toBe('fi'); // LATIN SMALL LIGATURE FI
    expect(normalizeText('2\u2075')).toBe('25'); // SUPERSCRIPT FIVE
    expect(normalizeText('\u1E9B\u0323')).toBe('\u1E69'); // long s with dot above + dot below -> ṩ
    expect(normalizeText('\u212B')).toBe('\u00E5'); // ANGSTROM SIGN -> Å -> lower-cased å
  });

  it('full-width and half-width forms', () => {
    expect(normalizeText('ＬＩＧＨＴＨＯＵＳＥ ２０２４')).toBe('lighthouse 2024');
    expect(normalizeText('ｶﾀｶﾅ ﾊﾟ')).toBe('カタカナ パ');
  });

  it('folds ß to ss and final sigma to σ, beyond lower-casing', () => {
    expect(normalizeText('Straße STRASSE ẞ')).toBe('strasse strasse ss');
    expect(normalizeText('ΟΔΟΣ οδος')).toBe('οδοσ οδοσ');
  });

  it('so the analyzer sees the same term however the word was typed', () => {
    const a = createAnalyzer({ stem: false });
    expect(a.analyze('ﬁnd FIND ｆｉｎｄ find')).toEqual(['find', 'find', 'find', 'find']);
    expect(createAnalyzer({ lang: 'el' }).analyze('ΟΔΟΣ οδος')).toEqual(['οδοσ', 'οδοσ']);
  });
});

/** Any UTF-16 code units (lone surrogates included) mixed with the characters the tokeniser cares about. */
const anyText = fc.string({
  unit: fc.oneof(
    fc.integer({ min: 0, max: 0xffff }).map((c) => String.fromCharCode(c)),
    fc.string({ unit: 'binary', minLength: 1, maxLength: 1 }),
    fc.constantFrom("'", '’', '-', ' ', 'a', 'Z', '7', '\u0301', '灯', 'の', 'ー', 'ไ', '٣', '\u{10330}', 'ß', 'İ', 'ﬁ'),
  ),
  maxLength: 60,
});

describe('tokeniser', () => {
  it('the table-driven scanner finds exactly the matches of the reference regex', () => {
    fc.assert(
      fc.property(anyText, (raw) => {
        const s = normalizeText(raw);
        const got: string[] = [];
        scanTokens(s, (t, any, all, codePoints) => {
          got.push(t);
          expect((any & NO_SPACE) !== 0).toBe(NO_SPACE_RE.test(t));
          expect((any & APOSTROPHE) !== 0).toBe(/['’]/.test(t));
          const letters = t.replace(/['’]/g, '');
          expect((all & NUMERIC) !== 0).toBe(/^\p{N}+$/u.test(letters));
          expect(codePoints).toBe([...t].length);
        });
        expect(got).toEqual(s.match(TOKEN_RE) ?? []);
      }),
      { numRuns: 2000 },
    );
  });
});

describe('scripts written without spaces', () => {
  const en = createAnalyzer({ lang: 'en', stem: false });

  it('segments Chinese into words and drops Chinese stop words (的)', () => {
    expect(createAnalyzer({ lang: 'zh' }).analyze('我们正在修复灯塔的玻璃。')).toEqual(['我们', '正在', '修复', '灯塔', '玻璃']);
  });

  it('keeps every Han character when no stop words apply: the words re-join to the text', () => {
    const text = '我们正在修复灯塔的玻璃';
    const words = en.analyze(text);
    expect(words.length).toBeGreaterThan(3);
    expect(words.join('')).toBe(text);
  });

  it('segments Japanese (kanji + kana, with the long-vowel mark inside katakana words)', () => {
    const words = en.analyze('東京都に住んでいるコーヒー');
    expect(words).toContain('東京');
    expect(words).toContain('コーヒー');
    expect(words.join('')).toBe('東京都に住んでいるコーヒー');
    expect(createAnalyzer({ lang: 'ja' }).analyze('東京都に住んでいる')).not.toContain('に');
  });

  it('segments Thai', () => {
    const words = en.analyze('ภาษาไทยง่ายนิดเดียว');
    expect(words.slice(0, 2)).toEqual(['ภาษา', 'ไทย']);
    expect(words.join('')).toBe('ภาษาไทยง่ายนิดเดียว');
  });

  it('splits a token mixing scripts: Latin part whole, Han part segmented, digits by the number rule', () => {
    expect(en.analyze('iPhone用 灯塔2023年')).toEqual(['iphone', '用', '灯塔', '年']);
    expect(createAnalyzer({ stem: false, numbers: true }).analyze('灯塔2023年')).toEqual(['灯塔', '2023', '年']);
  });

  it('segmenter words are exempt from minLength (one Han character is a word)', () => {
    expect(createAnalyzer({ lang: 'zh', minLength: 3 }).analyze('水')).toEqual(['水']);
    expect(createAnalyzer({ lang: 'en', minLength: 3 }).analyze('ab 水')).toEqual(['水']);
  });

  it('Korean is written with spaces and goes through the ordinary tokeniser', () => {
    expect(createAnalyzer({ lang: 'ko' }).analyze('등대 복원 협회')).toEqual(['등대', '복원', '협회']);
  });
});
