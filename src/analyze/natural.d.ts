/*
 * Types for the few `natural` stemmer modules sheaf imports by deep path.
 * The package root is never imported: it is slow to load and writes to the
 * terminal. Each module is CommonJS and exports one stemmer object.
 */

/** One natural stemmer: maps a lower-case token to its stem. */
interface NaturalStemmerModule {
  stem(token: string): string;
}

declare module 'natural/lib/natural/stemmers/porter_stemmer.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
declare module 'natural/lib/natural/stemmers/porter_stemmer_de.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
declare module 'natural/lib/natural/stemmers/porter_stemmer_es.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
declare module 'natural/lib/natural/stemmers/porter_stemmer_fr.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
declare module 'natural/lib/natural/stemmers/porter_stemmer_it.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
declare module 'natural/lib/natural/stemmers/porter_stemmer_nl.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
declare module 'natural/lib/natural/stemmers/porter_stemmer_no.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
declare module 'natural/lib/natural/stemmers/porter_stemmer_pt.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
declare module 'natural/lib/natural/stemmers/porter_stemmer_ru.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
declare module 'natural/lib/natural/stemmers/porter_stemmer_sv.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
declare module 'natural/lib/natural/stemmers/porter_stemmer_uk.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
declare module 'natural/lib/natural/stemmers/indonesian/stemmer_id.js' {
  const stemmer: NaturalStemmerModule;
  export = stemmer;
}
