/**
 * The analyzer's options, stop words, tokenisation policy, numbers,
 * minLength, bigrams and settings round trip.
 */
import { describe, expect, it } from 'vitest';
import stopwordLists from 'stopword';
import {
  DEFAULT_ANALYZER_OPTIONS,
  STEMMING_LANGUAGES,
  SUPPORTED_LANGUAGES,
  ENGLISH_STOPWORDS,
  builtInStopwords,
  createAnalyzer,
  isJunkToken,
  JUNK_WORDS,
  normalizeTerm,
  resolveAnalyzerOptions,
  type AnalyzerOptions,
} from '../src/analyze/index.js';
import { UsageError } from '../src/util/errors.js';

function usageError(f: () => unknown): UsageError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(UsageError);
    return e as UsageError;
  }
  throw new Error('expected a UsageError');
}

describe('options', () => {
  it('defaults: English, stemming, minLength 2, digit-only and junk tokens dropped, no bigrams, no extra stop words', () => {
    expect(DEFAULT_ANALYZER_OPTIONS).toEqual({
      lang: 'en',
      stem: true,
      minLength: 2,
      numbers: false,
      phrases: false,
      stopwords: [],
      junk: true,
    });
    expect(resolveAnalyzerOptions()).toEqual(DEFAULT_ANALYZER_OPTIONS);
    expect(resolveAnalyzerOptions({ minLength: undefined })).toEqual(DEFAULT_ANALYZER_OPTIONS);
  });

  it('stem resolves to false for a language natural has no stemmer for, and the settings say so', () => {
    expect(resolveAnalyzerOptions({ lang: 'zh', stem: true }).stem).toBe(false);
    expect(resolveAnalyzerOptions({ lang: 'fi' }).stem).toBe(false);
    expect(resolveAnalyzerOptions({ lang: 'de' }).stem).toBe(true);
    expect(resolveAnalyzerOptions({ lang: 'de', stem: false }).stem).toBe(false);
    expect(STEMMING_LANGUAGES).toEqual(['de', 'en', 'es', 'fr', 'id', 'it', 'nb', 'nl', 'no', 'pt', 'ru', 'sv', 'uk']);
  });

  it('lang is matched case-insensitively and stored lower-case', () => {
    expect(resolveAnalyzerOptions({ lang: ' FR ' }).lang).toBe('fr');
  });

  it('extra stop words are normalised like the text, de-duplicated and sorted', () => {
    expect(resolveAnalyzerOptions({ stopwords: ['ＬＡＭＰ', 'Straße', 'lamp', '  ', 'O’Neill'] }).stopwords).toEqual([
      'lamp',
      "o'neill",
      'strasse',
    ]);
  });

  it('rejects bad values with one-line messages naming the value and what is allowed', () => {
    const cases: [unknown, string, string | undefined][] = [
      [
        { lang: 'xx' },
        'lang must be one of af, ar, bg, bn, br, ca, cs, da, de, el, en, eo, es, et, eu, fa, fi, fr, ga, gl, gu, ha, he, hi, hr, hu, hy, id, it, ja, ko, ku, la, lt, lv, mr, ms, my, nb, nl, no, pa, pl, pt, ro, ru, sk, sl, so, st, sv, sw, th, tl, tr, uk, ur, vi, yo, zh, zu; got "xx"',
        'lang',
      ],
      [{ minLength: 0 }, 'minLength must be a whole number >= 1; got 0', 'minLength'],
      [{ minLength: 1.5 }, 'minLength must be a whole number >= 1; got 1.5', 'minLength'],
      [{ minLength: '3' }, 'minLength must be a whole number >= 1; got "3"', 'minLength'],
      [{ stem: 'yes' }, 'stem must be true or false; got "yes"', 'stem'],
      [{ numbers: 1 }, 'numbers must be true or false; got 1', 'numbers'],
      [{ phrases: null }, 'phrases must be true or false; got null', 'phrases'],
      [{ junk: 'no' }, 'junk must be true or false; got "no"', 'junk'],
      [{ stopwords: 'the' }, 'stopwords must be a list of words; got "the"', 'stopwords'],
      [{ stopwords: ['a', 3] }, 'stopwords must be a list of words; got 3 at position 2', 'stopwords'],
      [
        { minlength: 3 },
        'unknown analyzer option "minlength"; allowed: lang, stem, minLength, numbers, phrases, stopwords, junk',
        'minlength',
      ],
      [null, 'analyzer options must be an object; got null', undefined],
    ];
    for (const [input, message, option] of cases) {
      const e = usageError(() => resolveAnalyzerOptions(input as Partial<AnalyzerOptions>));
      expect(e.message).toBe(message);
      expect(e.option).toBe(option);
    }
    expect(usageError(() => createAnalyzer({ minLength: -1 })).message).toBe('minLength must be a whole number >= 1; got -1');
  });

  it('settings survive JSON and rebuild an analyzer that gives the same terms', () => {
    const a = createAnalyzer({ lang: 'fr', phrases: true, stopwords: ['Phare'], minLength: 3 });
    const saved = JSON.parse(JSON.stringify(a.settings)) as AnalyzerOptions;
    const b = createAnalyzer(saved);
    expect(b.settings).toEqual(a.settings);
    const text = "Les gardiens du phare restaurèrent l'ancienne lanterne et les lentilles de Fresnel.";
    expect(b.analyze(text)).toEqual(a.analyze(text));
    expect(a.analyze(text)).toEqual(['gardien', 'restaur', 'ancien', 'lantern', 'lentill', 'fresnel',
      'gardien restaur', 'restaur ancien', 'ancien lantern', 'lantern lentill', 'lentill fresnel']);
  });
});

describe('stop words', () => {
  it('maps ISO 639-1 codes to the stopword package lists (en -> eng + our own list, de -> deu, zh -> zho, no/nb -> nob)', () => {
    const lists = stopwordLists as unknown as Record<string, string[]>;
    expect([...builtInStopwords('en')].sort()).toEqual([...new Set([...ENGLISH_STOPWORDS, ...lists['eng']!])].sort());
    expect(builtInStopwords('de')).toEqual(lists['deu']);
    expect(builtInStopwords('zh')).toEqual(lists['zho']);
    expect(builtInStopwords('no')).toEqual(lists['nob']);
    expect(builtInStopwords('nb')).toEqual(lists['nob']);
    expect(builtInStopwords('xx')).toEqual([]);
    for (const lang of SUPPORTED_LANGUAGES) expect(builtInStopwords(lang).length, lang).toBeGreaterThan(10);
  });

  it("our English list: 350+ distinct words, sorted, normalised, with negations, question words and contractions", () => {
    expect(ENGLISH_STOPWORDS.length).toBeGreaterThanOrEqual(350);
    expect(new Set(ENGLISH_STOPWORDS).size).toBe(ENGLISH_STOPWORDS.length);
    expect([...ENGLISH_STOPWORDS].sort()).toEqual(ENGLISH_STOPWORDS);
    for (const w of ENGLISH_STOPWORDS) {
      expect(normalizeTerm(w), w).toBe(w);
      // A word ending in a possessive 's would never match: the analyzer cuts that ending first.
      expect(w.endsWith("'s") && w !== "let's", w).toBe(false);
    }
    for (const w of ['not', 'no', 'when', 'why', 'will', 'its', 'though', 'whose', 'see', 'every', 'without', "don't", "won't", "ain't"]) {
      expect(ENGLISH_STOPWORDS, w).toContain(w);
    }
    // The 108-word `stopword` list lacked these; with them a group of quotations is no longer named "not · things · does".
    expect(createAnalyzer({ stem: false }).analyze("Why won't it see every lamp? It's not the keeper, though, whose lamp ain't lit")).toEqual([
      'lamp',
      'keeper',
      'lamp',
      'lit',
    ]);
  });

  it('removes the language list: English "the", "and", "of"; German "und", "der"', () => {
    expect(createAnalyzer({ stem: false }).analyze('The keepers and the lamps of the tower')).toEqual([
      'keepers',
      'lamps',
      'tower',
    ]);
    expect(createAnalyzer({ lang: 'de', stem: false }).analyze('Der Leuchtturm und der Hafen')).toEqual([
      'leuchtturm',
      'hafen',
    ]);
  });

  it('removes stop words before stemming: a stop word "lamps" drops "lamps" but keeps "lamp"', () => {
    const a = createAnalyzer({ stopwords: ['lamps'] });
    expect(a.analyze('lamps lamp lamping')).toEqual(['lamp', 'lamp']);
  });

  it('treats prototype names as ordinary words, both as terms and as stop words', () => {
    const plain = createAnalyzer({ stem: false });
    expect(plain.analyze('constructor toString hasOwnProperty __proto__ valueOf')).toEqual([
      'constructor',
      'tostring',
      'hasownproperty',
      'proto',
      'valueof',
    ]);
    const a = createAnalyzer({ stem: false, stopwords: ['constructor', 'ToString', 'proto'] });
    expect(a.analyze('constructor toString hasOwnProperty __proto__')).toEqual(['hasownproperty']);
  });
});

describe('tokenisation policy', () => {
  const plain = createAnalyzer({ stem: false });

  it('splits on hyphens, underscores, dots, slashes and @', () => {
    expect(plain.analyze('lamp-room node_modules v2.3 a/b/cd keeper@harbour.example')).toEqual([
      'lamp',
      'room',
      'node',
      'modules',
      'v2',
      'cd',
      'keeper',
      'harbour',
      'example',
    ]);
  });

  it("keeps internal apostrophes (' or ’ written '), drops the English possessive 's", () => {
    expect(plain.analyze("the keeper's lamp; O’Neill’s log; rock’n’roll")).toEqual(['keeper', 'lamp', "o'neill", 'log', "rock'n'roll"]);
    // A contraction is one token, so the stop list can hold it: "don't" goes, as a stop word.
    expect(plain.analyze("don’t drop the lamp")).toEqual(['drop', 'lamp']);
    expect(plain.analyze("'quoted' keepers' lamps")).toEqual(['quoted', 'keepers', 'lamps']);
  });

  it("drops French and Italian elided articles: l'eau -> eau, jusqu'au -> au (a stop word), dell'acqua -> acqua", () => {
    expect(createAnalyzer({ lang: 'fr', stem: false }).analyze("l'eau jusqu'au phare d'Ouessant")).toEqual([
      'eau',
      'phare',
      'ouessant',
    ]);
    expect(createAnalyzer({ lang: 'it', stem: false }).analyze("dell'acqua un'isola")).toEqual(['acqua', 'isola']);
    // English has no elision rule: the apostrophe stays.
    expect(plain.analyze("l'eau")).toEqual(["l'eau"]);
  });

  it('keeps apostrophes that are part of the spelling (Ukrainian м’ясо)', () => {
    expect(createAnalyzer({ lang: 'uk', stem: false }).analyze('м’ясо')).toEqual(["м'ясо"]);
  });
});

describe('numbers and minLength', () => {
  it('drops tokens made only of digits (any script) unless numbers is on; mixed tokens stay unless junk', () => {
    const text = '2024 ٢٠٢٤ mp3 1990s ²³';
    expect(createAnalyzer({ stem: false }).analyze(text)).toEqual(['mp3']);
    expect(createAnalyzer({ stem: false, junk: false }).analyze(text)).toEqual(['mp3', '1990s']);
    expect(createAnalyzer({ stem: false, numbers: true, junk: false }).analyze(text)).toEqual(['2024', '٢٠٢٤', 'mp3', '1990s', '23']);
    // numbers: true keeps digit-only tokens even with junk on: they are numbers, not machine-made strings.
    expect(createAnalyzer({ stem: false, numbers: true }).analyze(text)).toEqual(['2024', '٢٠٢٤', 'mp3', '23']);
  });

  it('counts minLength in code points, not UTF-16 units (Gothic letters are two units each)', () => {
    const gothic2 = '\u{10330}\u{10331}';
    const gothic3 = '\u{10330}\u{10331}\u{10332}';
    expect(gothic2.length).toBe(4);
    const a = createAnalyzer({ stem: false, minLength: 3 });
    expect(a.analyze(`${gothic2} ${gothic3} ab abc`)).toEqual([gothic3, 'abc']);
    expect(createAnalyzer({ stem: false, minLength: 1 }).analyze('q b 7 x')).toEqual(['q', 'b', 'x']);
  });
});

describe('phrases', () => {
  it('adds bigrams of adjacent kept terms after stop-word removal and stemming, after the unigrams', () => {
    const a = createAnalyzer({ phrases: true });
    expect(a.analyze('Restoring the old lighthouse lamps')).toEqual([
      'restor',
      'old',
      'lighthous',
      'lamp',
      'restor old',
      'old lighthous',
      'lighthous lamp',
    ]);
    expect(a.analyze('lamps')).toEqual(['lamp']);
    expect(a.analyze('')).toEqual([]);
  });
});

describe('stem cache', () => {
  it('gives the same stems when many distinct words pass through one analyzer', () => {
    const a = createAnalyzer();
    const fresh = (w: string): string[] => createAnalyzer().analyze(w);
    const words: string[] = [];
    for (let i = 0; i < 3000; i++) words.push(`restoration${i.toString(36).replace(/\d/g, 'q')}s`);
    const all = a.analyze(words.join(' '));
    expect(all).toHaveLength(words.length);
    for (let i = 0; i < words.length; i += 97) expect([all[i]]).toEqual(fresh(words[i]!));
  });
});

describe('analyzeWithSurfaces', () => {
  it('returns the normalised, unstemmed word behind each term, index for index (bigrams too)', () => {
    const a = createAnalyzer({ phrases: true });
    const text = 'Restoring the LAMPS of the keeper’s cottage, x86s mp3';
    const { terms, surfaces } = a.analyzeWithSurfaces(text);
    expect(terms).toEqual(a.analyze(text));
    expect(terms.slice(0, 6)).toEqual(['restor', 'lamp', 'keeper', 'cottag', 'x86s', 'mp3']);
    expect(surfaces.slice(0, 6)).toEqual(['restoring', 'lamps', 'keeper', 'cottage', 'x86s', 'mp3']);
    expect(terms[6]).toBe('restor lamp');
    expect(surfaces[6]).toBe('restoring lamps');
    expect(surfaces).toHaveLength(terms.length);
  });
});

describe('what is not stemmed', () => {
  it('tokens holding a digit (codes, sizes, versions) and segmenter words stay as written', () => {
    expect(createAnalyzer({ junk: false }).analyze('1990s x86s lenses')).toEqual(['1990s', 'x86s', 'lens']);
  });
});

describe('junk tokens', () => {
  it('isJunkToken: digit-heavy, alternating and hex-like tokens are junk; codes people name things by are not', () => {
    const junk = ['06t18', '17t18', '1990s', 'h264', 'x86', 'ab12cd34', '6b2fefb9', '2fefb9', 'deadbeef01', 'a1b2c3', '٢٠٢٤x'];
    const kept = ['mp3', 'ipv6', 'amd64', 'utf8', '3d', 'k8s', '10th', '2nd', 'win32', 'abcdef', 'facade', 'lamp', 'deadbeef'];
    for (const t of junk) expect(isJunkToken(t), t).toBe(true);
    for (const t of kept) expect(isJunkToken(t), t).toBe(false);
  });

  it('the analyzer drops junk tokens, markup words and cleaning placeholders by default, and keeps them with junk: false', () => {
    const text = 'Lamp&nbsp;order <br> <a href="x">font</a> xnumx xurlx 2029-03-06T18:20 commit 6b2fefb9 mp3';
    expect(createAnalyzer({ stem: false }).analyze(text)).toEqual(['lamp', 'order', 'font', 'commit', 'mp3']);
    expect(createAnalyzer({ stem: false, junk: false }).analyze(text)).toEqual([
      'lamp', 'nbsp', 'order', 'br', 'href', 'font', 'xnumx', 'xurlx', '06t18', 'commit', '6b2fefb9', 'mp3',
    ]);
    for (const w of ['nbsp', 'href', 'xnumx', 'xurlx', 'xmailx', 'xidx']) expect(JUNK_WORDS).toContain(w);
  });
});
