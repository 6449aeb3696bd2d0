// TF-IDF node features from free text, with the usual scikit-learn TfidfVectorizer defaults:
// lower-cased word tokens of two or more letters/digits, raw term counts, smooth idf
// idf(t) = ln((1 + n) / (1 + df(t))) + 1, and rows scaled to unit L2 norm.
// Two deliberate differences: a small built-in English stop-word list is removed by default,
// and the vocabulary is capped at the `vocabularySize` terms with the highest document
// frequency (ties broken by term, code-unit order); default cap 2000. Features are ordered by term.

export const DEFAULT_VOCABULARY_SIZE = 2000;

/** Common English function words that carry no topic (common practice; a short list on purpose). */
export const ENGLISH_STOP_WORDS: ReadonlySet<string> = new Set(
  (
    'a about above after again against all am an and any are as at be because been before being below between both but by ' +
    'can could did do does doing down during each few for from further had has have having he her here hers herself him ' +
    'himself his how i if in into is it its itself just me more most my myself no nor not now of off on once only or other ' +
    'our ours ourselves out over own same she should so some such than that the their theirs them themselves then there ' +
    'these they this those through to too under until up very was we were what when where which while who whom why will ' +
    'with would you your yours yourself yourselves'
  ).split(' '),
);

export interface TfidfOptions {
  vocabularySize?: number;
  /** Words removed before counting; defaults to ENGLISH_STOP_WORDS. Pass an empty set to keep all. */
  stopWords?: ReadonlySet<string>;
}

export interface TfidfFeatures {
  /** Vocabulary, sorted by term; column j of features is terms[j]. */
  terms: string[];
  idf: Float64Array;
  /** Row-major documents × terms. */
  features: Float32Array;
}

const WORD = /[\p{L}\p{N}_]{2,}/gu;

/** Lower-cased word tokens (two or more letters, digits or underscores), stop words removed. */
export function tokenize(text: string, stopWords: ReadonlySet<string> = ENGLISH_STOP_WORDS): string[] {
  const tokens = text.toLowerCase().match(WORD) ?? [];
  return stopWords.size === 0 ? tokens : tokens.filter((t) => !stopWords.has(t));
}

export function smoothIdf(documentFrequency: number, documentCount: number): number {
  return Math.log((1 + documentCount) / (1 + documentFrequency)) + 1;
}

export function tfidfFeatures(documents: readonly string[], options: TfidfOptions = {}): TfidfFeatures {
  const vocabularySize = options.vocabularySize ?? DEFAULT_VOCABULARY_SIZE;
  const stopWords = options.stopWords ?? ENGLISH_STOP_WORDS;
  const documentFrequency = new Map<string, number>();
  for (const doc of documents) {
    for (const term of new Set(tokenize(doc, stopWords))) documentFrequency.set(term, (documentFrequency.get(term) ?? 0) + 1);
  }
  const ranked = [...documentFrequency.entries()].sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
  const terms = ranked
    .slice(0, vocabularySize)
    .map(([term]) => term)
    .sort();
  const column = new Map(terms.map((t, j) => [t, j]));
  const counts = new Float32Array(documents.length * terms.length);
  documents.forEach((doc, i) => {
    for (const term of tokenize(doc, stopWords)) {
      const j = column.get(term);
      if (j !== undefined) counts[i * terms.length + j]++;
    }
  });
  const idf = new Float64Array(terms.map((t) => smoothIdf(documentFrequency.get(t) ?? 0, documents.length)));
  return { terms, idf, features: weightCounts(counts, documents.length, terms.length, idf) };
}

/** The smooth idf of each column of a count matrix (row-major documents × terms). */
export function idfOfCounts(counts: ArrayLike<number>, documentCount: number, termCount: number): Float64Array {
  const df = new Float64Array(termCount);
  for (let i = 0; i < documentCount; i++) for (let j = 0; j < termCount; j++) if (counts[i * termCount + j] > 0) df[j]++;
  return df.map((d) => smoothIdf(d, documentCount));
}

/** Counts × idf, each row scaled to unit L2 norm (rows of zeros stay zero); in place on `counts`. */
export function weightCounts(counts: Float32Array, documentCount: number, termCount: number, idf: ArrayLike<number>): Float32Array {
  for (let i = 0; i < documentCount; i++) {
    const offset = i * termCount;
    let squared = 0;
    for (let j = 0; j < termCount; j++) {
      const w = counts[offset + j] * idf[j];
      counts[offset + j] = w;
      squared += w * w;
    }
    if (squared > 0) {
      const scale = 1 / Math.sqrt(squared);
      for (let j = 0; j < termCount; j++) counts[offset + j] *= scale;
    }
  }
  return counts;
}
