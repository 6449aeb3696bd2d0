// Logit-based novelty scores (higher = more novel) and a rejection threshold chosen as a
// fraction of nodes to set aside. Alternatives to DOC for models trained with softmax.
import { rowCountOf } from './rowShape';

/** 1 − max softmax probability of each row (maximum softmax probability baseline). */
export function maxSoftmaxNovelty(logits: Float32Array, classCount: number): Float32Array {
  const rows = rowCountOf(logits, classCount, 'maxSoftmaxNovelty');
  const out = new Float32Array(rows);
  for (let r = 0; r < rows; r++) {
    const base = r * classCount;
    let max = -Infinity;
    for (let c = 0; c < classCount; c++) if (logits[base + c] > max) max = logits[base + c];
    let total = 0;
    for (let c = 0; c < classCount; c++) total += Math.exp(logits[base + c] - max);
    // The largest softmax entry is exp(0) / total.
    out[r] = 1 - 1 / total;
  }
  return out;
}

/**
 * Energy score. The energy of a row is E = −T·logsumexp(z / T); −E is its "known-ness",
 * so the novelty returned is E itself: −T·logsumexp(z / T) (higher = more novel). The
 * log-sum-exp subtracts the row maximum first, so z = 1000 stays finite.
 */
export function energyNovelty(logits: Float32Array, classCount: number, temperature = 1): Float32Array {
  const rows = rowCountOf(logits, classCount, 'energyNovelty');
  if (!(temperature > 0) || !Number.isFinite(temperature))
    throw new RangeError(`energyNovelty: temperature must be a finite number > 0, got ${temperature}`);
  const out = new Float32Array(rows);
  for (let r = 0; r < rows; r++) {
    const base = r * classCount;
    let max = -Infinity;
    for (let c = 0; c < classCount; c++) {
      const scaled = logits[base + c] / temperature;
      if (scaled > max) max = scaled;
    }
    let total = 0;
    for (let c = 0; c < classCount; c++) total += Math.exp(logits[base + c] / temperature - max);
    out[r] = -temperature * (max + Math.log(total));
  }
  return out;
}

/**
 * The score above which the top `rejectFraction` of the scores lies (restricted to the indices in
 * `among` when given). With n scores and k = ⌊rejectFraction·n⌋, returns the (n − k)-th smallest
 * score, so exactly k scores are strictly above it when there are no ties; scores tied with the
 * threshold are kept, so ties can only make fewer than k rejected. k = 0 (or no scores) gives
 * +Infinity (nothing rejected); k = n gives −Infinity (everything rejected).
 */
export function quantileThreshold(scores: Float32Array, rejectFraction: number, among?: Int32Array): number {
  if (!(rejectFraction >= 0 && rejectFraction <= 1))
    throw new RangeError(`quantileThreshold: rejectFraction must be in [0, 1], got ${rejectFraction}`);
  const n = among ? among.length : scores.length;
  const selected = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const index = among ? among[k] : k;
    if (index < 0 || index >= scores.length)
      throw new RangeError(`quantileThreshold: index ${index} (entry ${k}) is outside 0..${scores.length - 1}`);
    const value = scores[index];
    if (Number.isNaN(value)) throw new RangeError(`quantileThreshold: score of node ${index} is NaN`);
    selected[k] = value;
  }
  // The small epsilon keeps 0.29 × 100 (= 28.999999999999996 in floating point) at 29.
  const rejectCount = Math.min(n, Math.floor(rejectFraction * n + 1e-9));
  if (rejectCount === 0) return Infinity;
  if (rejectCount === n) return -Infinity;
  selected.sort();
  return selected[n - rejectCount - 1];
}

/** 1 where the score is strictly above the threshold (rejected as novel). */
export function rejectAbove(scores: Float32Array, threshold: number): Uint8Array {
  if (Number.isNaN(threshold)) throw new RangeError('rejectAbove: threshold is NaN');
  const out = new Uint8Array(scores.length);
  for (let i = 0; i < scores.length; i++) out[i] = scores[i] > threshold ? 1 : 0;
  return out;
}
