/**
 * The stemmers of languages other than English are loaded on first use
 * (src/analyze/languages.ts): each gives what natural's module, imported
 * directly, gives, on random words (fast-check).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { STEMMING_LANGUAGES, stemmerFor } from '../src/analyze/languages.js';
import porterEn from 'natural/lib/natural/stemmers/porter_stemmer.js';
import stemmerDe from 'natural/lib/natural/stemmers/porter_stemmer_de.js';
import stemmerEs from 'natural/lib/natural/stemmers/porter_stemmer_es.js';
import stemmerFr from 'natural/lib/natural/stemmers/porter_stemmer_fr.js';
import stemmerIt from 'natural/lib/natural/stemmers/porter_stemmer_it.js';
import stemmerNl from 'natural/lib/natural/stemmers/porter_stemmer_nl.js';
import stemmerNo from 'natural/lib/natural/stemmers/porter_stemmer_no.js';
import stemmerPt from 'natural/lib/natural/stemmers/porter_stemmer_pt.js';
import stemmerRu from 'natural/lib/natural/stemmers/porter_stemmer_ru.js';
import stemmerSv from 'natural/lib/natural/stemmers/porter_stemmer_sv.js';
import stemmerUk from 'natural/lib/natural/stemmers/porter_stemmer_uk.js';
import stemmerId from 'natural/lib/natural/stemmers/indonesian/stemmer_id.js';

const DIRECT: Record<string, { stem(t: string): string }> = {
  en: porterEn, de: stemmerDe, es: stemmerEs, fr: stemmerFr, it: stemmerIt, nl: stemmerNl, nb: stemmerNo, no: stemmerNo,
  pt: stemmerPt, ru: stemmerRu, sv: stemmerSv, uk: stemmerUk, id: stemmerId,
};
const word = fc.stringMatching(/^[a-zäöüßéèàçñõãåøæуиеакнорст]{1,14}$/);

describe('stemmers loaded on first use', () => {
  it('the stemming languages are those natural has a stemmer for', () => {
    expect([...STEMMING_LANGUAGES]).toEqual(Object.keys(DIRECT).sort());
  });

  for (const lang of Object.keys(DIRECT)) {
    it(`${lang}: the same stems as natural's module imported directly`, () => {
      const stem = stemmerFor(lang)!;
      fc.assert(
        fc.property(word, (w) => {
          expect(stem(w)).toBe(DIRECT[lang]!.stem(w));
        }),
        { numRuns: 200 },
      );
    });
  }

  it('no stemmer for a language natural has none for', () => {
    expect(stemmerFor('ja')).toBeNull();
  });
});
