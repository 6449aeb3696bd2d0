import assert from 'node:assert/strict';
import { idfOfCounts, tfidfFeatures, tokenize, weightCounts } from '../../src/engine/dataset/tfidf';

const NO_STOP_WORDS = new Set<string>();

describe('tfidf', () => {
  // Reference: scikit-learn user guide, "Tf–idf term weighting" (modules/feature_extraction.html):
  // TfidfTransformer() (smooth_idf=True, norm='l2') on these counts gives the rows below
  // (8-digit values as printed in the reproduction at blog.csdn.net/qq_15262671/article/details/78337503).
  const counts = [
    [3, 0, 1],
    [2, 0, 0],
    [3, 0, 0],
    [4, 0, 0],
    [3, 2, 0],
    [3, 0, 2],
  ];
  const expected = [
    [0.85151335, 0, 0.52433293],
    [1, 0, 0],
    [1, 0, 0],
    [1, 0, 0],
    [0.55422893, 0.83236428, 0],
    [0.63035731, 0, 0.77630514],
  ];

  it("matches scikit-learn's TfidfTransformer on its documented count example", () => {
    const flat = Float32Array.from(counts.flat());
    const weighted = weightCounts(flat, 6, 3, idfOfCounts(flat, 6, 3));
    for (let i = 0; i < 6; i++)
      for (let j = 0; j < 3; j++)
        assert.ok(Math.abs(weighted[i * 3 + j] - expected[i][j]) < 1e-6, `row ${i} col ${j}: ${weighted[i * 3 + j]}`);
  });

  it('gives the same values from text whose word counts are that example', () => {
    const terms = ['alpha', 'beta', 'gamma'];
    const documents = counts.map((row) => row.flatMap((n, j) => Array<string>(n).fill(terms[j])).join(' '));
    const result = tfidfFeatures(documents, { stopWords: NO_STOP_WORDS });
    assert.deepEqual(result.terms, terms);
    for (let i = 0; i < 6; i++) for (let j = 0; j < 3; j++) assert.ok(Math.abs(result.features[i * 3 + j] - expected[i][j]) < 1e-6);
  });

  it("tokenizes like scikit-learn's default token pattern on its TfidfVectorizer example corpus", () => {
    // Reference: scikit-learn TfidfVectorizer documentation example; get_feature_names_out() lists
    // these nine terms and the matrix has shape (4, 9) (from memory).
    const corpus = [
      'This is the first document.',
      'This document is the second document.',
      'And this is the third one.',
      'Is this the first document?',
    ];
    const result = tfidfFeatures(corpus, { stopWords: NO_STOP_WORDS });
    assert.deepEqual(result.terms, ['and', 'document', 'first', 'is', 'one', 'second', 'the', 'third', 'this']);
    assert.equal(result.features.length, 4 * 9);
    for (let i = 0; i < 4; i++) {
      let norm = 0;
      for (let j = 0; j < 9; j++) norm += result.features[i * 9 + j] ** 2;
      assert.ok(Math.abs(norm - 1) < 1e-6);
    }
  });

  it('lower-cases, drops one-letter tokens and stop words', () => {
    assert.deepEqual(tokenize("The Gearbox's OIL-leak, a 2nd time: x", NO_STOP_WORDS), ['the', 'gearbox', 'oil', 'leak', '2nd', 'time']);
    assert.deepEqual(tokenize("The Gearbox's OIL-leak, a 2nd time: x"), ['gearbox', 'oil', 'leak', '2nd', 'time']);
    assert.deepEqual(tokenize('Über café'), ['über', 'café']);
  });

  it('caps the vocabulary at the terms found in most documents', () => {
    const docs = ['common rare1', 'common medium', 'common medium rare2', 'common'];
    const result = tfidfFeatures(docs, { vocabularySize: 2, stopWords: NO_STOP_WORDS });
    assert.deepEqual(result.terms, ['common', 'medium']);
    // A document without kept terms is a zero row, not NaN.
    const empty = tfidfFeatures(['', 'word word'], { stopWords: NO_STOP_WORDS });
    assert.deepEqual([...empty.features], [0, 1]);
  });
});
