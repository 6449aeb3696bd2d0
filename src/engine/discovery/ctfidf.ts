// Class-based TF-IDF: the terms that set one group's text apart from the other groups'.
// Each group's documents are treated as one document:
//   weight(t, c) = tf(t, c) · log(1 + A / f_t)
//   tf(t, c) = count of t in group c / number of terms in group c
//   A        = average number of terms per group
//   f_t      = count of t over all groups
// (natural logarithm). Rare-overall terms that are common inside one group score highest.

export interface WeightedTerm {
  term: string;
  weight: number;
}

/** A small English stop list (common practice: articles, pronouns, auxiliaries, prepositions). */
export const englishStopWords: ReadonlySet<string> = new Set(
  (
    'a an and are as at be been but by can could did do does for from had has have he her his how i if in into is it its ' +
    'may might more most my no not of on or our out she should so some such than that the their them then there these ' +
    'they this those to too up us was we were what when where which while who why will with would you your'
  ).split(' '),
);

/** Lower-cased runs of letters and digits; tokens shorter than two characters and pure numbers are dropped. */
export function tokenize(text: string): string[] {
  const tokens = text.toLowerCase().match(/[\p{L}\p{N}]+/gu) ?? [];
  return tokens.filter((t) => t.length >= 2 && !/^\p{N}+$/u.test(t));
}

/**
 * Top terms of every group by c-TF-IDF weight, highest first (ties broken alphabetically so the
 * order is stable). groupTexts[c] holds the documents of group c; stopWords defaults to
 * englishStopWords (pass an empty set to keep every token).
 */
export function classTfidfTopTerms(
  groupTexts: string[][],
  topN: number,
  stopWords: ReadonlySet<string> = englishStopWords,
): WeightedTerm[][] {
  const groupCounts: Map<string, number>[] = [];
  const groupTotals: number[] = [];
  const overall = new Map<string, number>();
  for (const documents of groupTexts) {
    const counts = new Map<string, number>();
    let total = 0;
    for (const document of documents) {
      for (const token of tokenize(document)) {
        if (stopWords.has(token)) continue;
        counts.set(token, (counts.get(token) ?? 0) + 1);
        overall.set(token, (overall.get(token) ?? 0) + 1);
        total++;
      }
    }
    groupCounts.push(counts);
    groupTotals.push(total);
  }
  const averageTermsPerGroup = groupTexts.length > 0 ? groupTotals.reduce((s, x) => s + x, 0) / groupTexts.length : 0;
  return groupCounts.map((counts, c) => {
    const terms: WeightedTerm[] = [];
    for (const [term, count] of counts) {
      const tf = count / groupTotals[c];
      terms.push({ term, weight: tf * Math.log(1 + averageTermsPerGroup / (overall.get(term) as number)) });
    }
    terms.sort((x, y) => y.weight - x.weight || (x.term < y.term ? -1 : x.term > y.term ? 1 : 0));
    return terms.slice(0, Math.max(0, topN));
  });
}
