/**
 * sheaf's own English stop list: words that carry grammar rather than
 * topic, so a group named after them names nothing. Written for sheaf
 * (grouped by kind below, from general knowledge of English grammar) rather
 * than copied from another list; the classes are the usual ones of the
 * trade (common practice): articles and determiners, pronouns, auxiliary and
 * modal verbs with their contracted forms, prepositions, conjunctions,
 * negations, question words, frequent adverbs and quantifiers, and a few
 * verbs so frequent in any text that they tell no theme apart (`see`,
 * `get`, `make`, `use` ...). Surface forms only; the analyzer compares them
 * with tokens before stemming. Contractions are written with `'` (the
 * analyzer turns `’` into `'` first); forms that end in a possessive `'s`
 * are left out, as the analyzer drops that ending before the lookup.
 *
 * @module
 */

const ARTICLES_DETERMINERS = [
  'a', 'an', 'the', 'this', 'that', 'these', 'those', 'such', 'each', 'every', 'either', 'neither',
  'any', 'some', 'all', 'both', 'few', 'fewer', 'many', 'much', 'more', 'most', 'less', 'least',
  'several', 'other', 'others', 'another', 'own', 'same', 'enough', 'certain', 'whatever', 'whichever',
];

const PRONOUNS = [
  'i', 'me', 'my', 'mine', 'myself', 'we', 'us', 'our', 'ours', 'ourselves', 'you', 'your', 'yours',
  'yourself', 'yourselves', 'he', 'him', 'his', 'himself', 'she', 'her', 'hers', 'herself', 'it', 'its',
  'itself', 'they', 'them', 'their', 'theirs', 'themselves', 'one', 'ones', 'oneself', 'someone', 'somebody',
  'something', 'anyone', 'anybody', 'anything', 'everyone', 'everybody', 'everything', 'nobody', 'nothing',
  'none', 'noone', 'who', 'whom', 'whose', 'which', 'what', 'whoever', 'whomever', 'thee', 'thou', 'thy',
  'ye',
];

const AUXILIARIES_MODALS = [
  'be', 'am', 'is', 'are', 'was', 'were', 'been', 'being', 'have', 'has', 'had', 'having', 'do', 'does',
  'did', 'doing', 'done', 'can', 'could', 'may', 'might', 'must', 'shall', 'should', 'will', 'would',
  'ought', 'need', 'needs', 'dare', 'cannot',
];

const CONTRACTIONS = [
  "i'm", "i've", "i'll", "i'd", "you're", "you've", "you'll", "you'd", "he'd", "he'll", "she'd", "she'll",
  "it'd", "it'll", "we're", "we've", "we'll", "we'd", "they're", "they've", "they'll", "they'd", "that'll",
  "that'd", "there'd", "there'll", "there're", "who'd", "who'll", "who've", "what'll", "what've", "what're",
  "isn't", "aren't", "wasn't", "weren't", "haven't", "hasn't", "hadn't", "don't", "doesn't", "didn't",
  "can't", "couldn't", "won't", "wouldn't", "shan't", "shouldn't", "mustn't", "mightn't", "needn't",
  "oughtn't", "ain't", "let's", "y'all", "'tis", "'twas", "o'clock", "ma'am", "c'mon",
  // the same words when the apostrophe was lost in typing or markup
  'im', 'ive', 'youre', 'youve', 'youll', 'youd', 'theyre', 'theyve', 'isnt', 'arent', 'wasnt', 'werent',
  'havent', 'hasnt', 'hadnt', 'dont', 'doesnt', 'didnt', 'cant', 'couldnt', 'wont', 'wouldnt', 'shouldnt',
  'aint', 'lets',
  // what is left of a contraction split at its apostrophe (`don ’ t`, `we ’ ll`)
  'don', 'doesn', 'didn', 'isn', 'aren', 'wasn', 'weren', 'hasn', 'haven', 'hadn', 'couldn', 'wouldn',
  'shouldn', 'mustn', 'll', 've', 're',
];

const PREPOSITIONS = [
  'about', 'above', 'across', 'after', 'against', 'along', 'alongside', 'amid', 'among', 'amongst', 'around',
  'as', 'at', 'before', 'behind', 'below', 'beneath', 'beside', 'besides', 'between', 'beyond', 'by',
  'despite', 'down', 'during', 'except', 'for', 'from', 'in', 'inside', 'into', 'like', 'near', 'of',
  'off', 'on', 'onto', 'out', 'outside', 'over', 'past', 'per', 'since', 'than', 'through', 'throughout',
  'thru', 'till', 'to', 'toward', 'towards', 'under', 'underneath', 'unlike', 'until', 'unto', 'up', 'upon',
  'via', 'with', 'within', 'without', 'versus', 'vs',
];

const CONJUNCTIONS = [
  'and', 'but', 'or', 'nor', 'so', 'yet', 'if', 'unless', 'because', 'although', 'though', 'while',
  'whilst', 'whether', 'whereas', 'whereby', 'wherein', 'whereupon', 'thereby', 'therefore', 'thus',
  'hence', 'otherwise', 'however', 'moreover', 'furthermore', 'nevertheless', 'nonetheless', 'meanwhile',
  'accordingly', 'consequently', 'instead', 'anyway', 'anyhow', 'else',
];

const NEGATIONS = ['no', 'not', 'never', 'nor', 'neither', 'nowhere', 'none', 'nope'];

const QUESTION_WORDS = [
  'when', 'whenever', 'where', 'wherever', 'why', 'how', 'however', 'whence', 'whither',
];

const ADVERBS = [
  'here', 'there', 'now', 'then', 'once', 'twice', 'again', 'also', 'too', 'very', 'just', 'only', 'even',
  'still', 'already', 'always', 'often', 'sometimes', 'usually', 'rather', 'quite', 'almost', 'perhaps',
  'maybe', 'ever', 'soon', 'later', 'ago', 'away', 'back', 'well', 'really', 'indeed', 'anywhere',
  'everywhere', 'somewhere', 'somehow', 'sometime', 'somewhat', 'hereby', 'herein', 'hereafter',
  'thereafter', 'therein', 'thereof', 'thereupon', 'whereafter', 'wherever', 'afterwards', 'beforehand',
  'elsewhere', 'further', 'namely', 'mostly', 'nearly', 'merely', 'simply', 'probably', 'certainly',
  'actually', 'especially', 'particularly', 'generally', 'relatively', 'fairly', 'pretty', 'yes', 'ok',
  'okay', 'oh', 'etc', 'eg', 'ie', 'cf', 'thing', 'things', 'lot', 'lots',
];

const QUANTITIES = [
  'two', 'three', 'four', 'five', 'six', 'seven', 'eight', 'nine', 'ten', 'first', 'second', 'third',
  'last', 'next', 'previous', 'former', 'latter', 'half', 'hundred', 'thousand', 'whole', 'single',
];

/** Verbs frequent in any kind of text that do not tell one theme from another. */
const COMMON_VERBS = [
  'get', 'gets', 'got', 'gotten', 'getting', 'go', 'goes', 'went', 'gone', 'going', 'make', 'makes', 'made',
  'making', 'take', 'takes', 'took', 'taken', 'come', 'comes', 'came', 'coming', 'see', 'sees', 'saw',
  'seen', 'seem', 'seems', 'seemed', 'say', 'says', 'said', 'tell', 'told', 'know', 'knows', 'knew',
  'known', 'think', 'thought', 'want', 'wants', 'wanted', 'give', 'gives', 'gave', 'given', 'put', 'puts',
  'use', 'uses', 'used', 'using', 'let', 'become', 'becomes', 'became', 'like', 'likes',
];

/**
 * The English stop list, de-duplicated, in code-unit order (390-odd words).
 * `stopword`'s English list is added to it by the analyzer.
 */
export const ENGLISH_STOPWORDS: readonly string[] = Object.freeze(
  [...new Set([
    ...ARTICLES_DETERMINERS,
    ...PRONOUNS,
    ...AUXILIARIES_MODALS,
    ...CONTRACTIONS,
    ...PREPOSITIONS,
    ...CONJUNCTIONS,
    ...NEGATIONS,
    ...QUESTION_WORDS,
    ...ADVERBS,
    ...QUANTITIES,
    ...COMMON_VERBS,
  ])].sort(),
);
