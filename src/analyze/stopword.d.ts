/*
 * Types for the `stopword` package (CommonJS, no bundled types). It exports
 * one word list per language under ISO 639-3 style keys (`eng`, `deu`, ...),
 * plus `removeStopwords`, which sheaf does not use.
 */
declare module 'stopword' {
  const lists: { readonly [key: string]: unknown };
  export = lists;
}
