// Area under the ROC curve as the Mann–Whitney statistic: the probability that a random positive
// scores above a random negative, ties counting one half (the mid-rank convention). Sorting the
// two groups separately lets the native typed-array sort do the work and a merge count the pairs.

/** AUROC of `scores` for the binary truth `positives` (true or nonzero = positive). NaN when either group is empty. */
export function auroc(scores: ArrayLike<number>, positives: ArrayLike<boolean | number>): number {
  if (scores.length !== positives.length) throw new RangeError(`auroc: ${scores.length} scores for ${positives.length} labels`);
  let positiveCount = 0;
  for (let i = 0; i < positives.length; i++) if (positives[i]) positiveCount++;
  const negativeCount = scores.length - positiveCount;
  if (positiveCount === 0 || negativeCount === 0) return NaN;
  const positiveScores = new Float64Array(positiveCount);
  const negativeScores = new Float64Array(negativeCount);
  let p = 0;
  let q = 0;
  for (let i = 0; i < scores.length; i++) {
    const s = scores[i];
    if (Number.isNaN(s)) throw new RangeError(`auroc: score ${i} is NaN`);
    if (positives[i]) positiveScores[p++] = s;
    else negativeScores[q++] = s;
  }
  positiveScores.sort();
  negativeScores.sort();
  // For each positive: negatives strictly below + half the negatives tied with it.
  let u = 0;
  let below = 0;
  let belowOrEqual = 0;
  for (let k = 0; k < positiveCount; k++) {
    const s = positiveScores[k];
    while (below < negativeCount && negativeScores[below] < s) below++;
    if (belowOrEqual < below) belowOrEqual = below;
    while (belowOrEqual < negativeCount && negativeScores[belowOrEqual] <= s) belowOrEqual++;
    u += below + (belowOrEqual - below) / 2;
  }
  return u / (positiveCount * negativeCount);
}
