// Label-quality metrics over dense class indices. Shared conventions:
// - truth < 0 means "no curated label": such nodes are skipped by every metric;
// - mask (optional): only nodes with mask[i] ≠ 0 count;
// - an empty selection gives NaN rather than a misleading 0 or 1.
// Open-set metrics add one class, "unknown", after the known ones: a rejected prediction
// (REJECTED = −1) and any truth outside the known classes both map to it.
import { REJECTED } from '../scoring/openSetPrediction';

function checkPair(predicted: Int32Array, truth: Int32Array, mask: Uint8Array | undefined, name: string): void {
  if (predicted.length !== truth.length) throw new RangeError(`${name}: ${predicted.length} predictions for ${truth.length} labels`);
  if (mask && mask.length !== truth.length) throw new RangeError(`${name}: mask has ${mask.length} entries for ${truth.length} labels`);
}

function checkClassCount(classCount: number, name: string): void {
  if (!Number.isInteger(classCount) || classCount < 1)
    throw new RangeError(`${name}: classCount must be a positive integer, got ${classCount}`);
}

/** Fraction of counted nodes whose prediction equals the truth (NaN when none is counted). */
export function accuracy(predicted: Int32Array, truth: Int32Array, mask?: Uint8Array): number {
  checkPair(predicted, truth, mask, 'accuracy');
  let counted = 0;
  let correct = 0;
  for (let i = 0; i < truth.length; i++) {
    if (truth[i] < 0 || (mask && !mask[i])) continue;
    counted++;
    if (predicted[i] === truth[i]) correct++;
  }
  return counted === 0 ? NaN : correct / counted;
}

export interface PerClassScores {
  /** Nodes of the class that were predicted as the class. */
  truePositives: Int32Array;
  /** Nodes predicted as the class. */
  predictedCount: Int32Array;
  /** Nodes whose truth is the class (its support). */
  truthCount: Int32Array;
  /** 2·tp / (2·tp + fp + fn); NaN for a class absent from both truth and prediction. */
  f1: Float64Array;
  /** tp / predicted (NaN when never predicted). */
  precision: Float64Array;
  /** tp / support (NaN when the class has no support). */
  recall: Float64Array;
}

/**
 * Per-class counts, precision, recall and F1. A prediction outside 0..classCount−1 (e.g. REJECTED)
 * is a miss for the true class but not a class of its own; use the open-set functions to score
 * rejection as a class. A truth label ≥ classCount is an error.
 */
export function perClassScores(predicted: Int32Array, truth: Int32Array, classCount: number, mask?: Uint8Array): PerClassScores {
  checkPair(predicted, truth, mask, 'perClassScores');
  checkClassCount(classCount, 'perClassScores');
  const truePositives = new Int32Array(classCount);
  const predictedCount = new Int32Array(classCount);
  const truthCount = new Int32Array(classCount);
  for (let i = 0; i < truth.length; i++) {
    const t = truth[i];
    if (t < 0 || (mask && !mask[i])) continue;
    if (t >= classCount) throw new RangeError(`perClassScores: truth label ${t} of node ${i} is outside 0..${classCount - 1}`);
    truthCount[t]++;
    const p = predicted[i];
    if (p >= 0 && p < classCount) {
      predictedCount[p]++;
      if (p === t) truePositives[t]++;
    }
  }
  const f1 = new Float64Array(classCount);
  const precision = new Float64Array(classCount);
  const recall = new Float64Array(classCount);
  for (let c = 0; c < classCount; c++) {
    const tp = truePositives[c];
    const denominator = predictedCount[c] + truthCount[c]; // = 2·tp + fp + fn
    f1[c] = denominator === 0 ? NaN : (2 * tp) / denominator;
    precision[c] = predictedCount[c] === 0 ? NaN : tp / predictedCount[c];
    recall[c] = truthCount[c] === 0 ? NaN : tp / truthCount[c];
  }
  return { truePositives, predictedCount, truthCount, f1, precision, recall };
}

/**
 * Unweighted mean of per-class F1 over the classes present in the truth or the predictions of the
 * counted nodes; a class absent from both is skipped (scikit-learn's default, labels = the union
 * of labels present). A class that is predicted but never true, or true but never predicted,
 * contributes F1 = 0. NaN when no node is counted.
 */
export function macroF1(predicted: Int32Array, truth: Int32Array, classCount: number, mask?: Uint8Array): number {
  const { f1 } = perClassScores(predicted, truth, classCount, mask);
  let total = 0;
  let present = 0;
  for (let c = 0; c < classCount; c++) {
    if (Number.isNaN(f1[c])) continue;
    total += f1[c];
    present++;
  }
  return present === 0 ? NaN : total / present;
}

/**
 * Maps labels into the open-set label space of knownClasses.length + 1 classes: a known class keeps
 * its index, REJECTED (or any negative prediction) and any class not known become
 * `unknown = knownClasses.length`. For truth, negative entries stay −1 (unlabelled, skipped).
 */
export function openSetLabels(labels: Int32Array, knownClasses: ArrayLike<boolean | number>, role: 'predicted' | 'truth'): Int32Array {
  const unknown = knownClasses.length;
  const out = new Int32Array(labels.length);
  for (let i = 0; i < labels.length; i++) {
    const label = labels[i];
    if (label < 0) out[i] = role === 'truth' ? -1 : unknown;
    else out[i] = label < unknown && knownClasses[label] ? label : unknown;
  }
  return out;
}

/**
 * Macro-F1 with rejection as one extra class "unknown": predictions equal to REJECTED and truths of
 * classes the model did not know (knownClasses[c] falsy, or c ≥ knownClasses.length) both map to
 * it; then macroF1 over the known classes plus unknown, with the same skipping convention.
 */
export function openSetMacroF1(
  predicted: Int32Array,
  truth: Int32Array,
  knownClasses: ArrayLike<boolean | number>,
  mask?: Uint8Array,
): number {
  checkPair(predicted, truth, mask, 'openSetMacroF1');
  const classCount = knownClasses.length + 1;
  return macroF1(openSetLabels(predicted, knownClasses, 'predicted'), openSetLabels(truth, knownClasses, 'truth'), classCount, mask);
}

export interface ConfusionMatrix {
  classCount: number;
  /** Row-major classCount × classCount: counts[t·classCount + p] = nodes of truth t predicted p. */
  counts: Int32Array;
}

/** Confusion counts (rows truth, columns prediction, as scikit-learn). Labels must lie in 0..classCount−1. */
export function confusionMatrix(predicted: Int32Array, truth: Int32Array, classCount: number, mask?: Uint8Array): ConfusionMatrix {
  checkPair(predicted, truth, mask, 'confusionMatrix');
  checkClassCount(classCount, 'confusionMatrix');
  const counts = new Int32Array(classCount * classCount);
  for (let i = 0; i < truth.length; i++) {
    const t = truth[i];
    if (t < 0 || (mask && !mask[i])) continue;
    const p = predicted[i];
    if (t >= classCount) throw new RangeError(`confusionMatrix: truth label ${t} of node ${i} is outside 0..${classCount - 1}`);
    if (p < 0 || p >= classCount) {
      throw new RangeError(
        `confusionMatrix: prediction ${p} of node ${i} is outside 0..${classCount - 1}${p === REJECTED ? ' (rejected: use openSetConfusionMatrix)' : ''}`,
      );
    }
    counts[t * classCount + p]++;
  }
  return { classCount, counts };
}

/** Confusion counts in the open-set label space (last row/column = unknown). */
export function openSetConfusionMatrix(
  predicted: Int32Array,
  truth: Int32Array,
  knownClasses: ArrayLike<boolean | number>,
  mask?: Uint8Array,
): ConfusionMatrix {
  checkPair(predicted, truth, mask, 'openSetConfusionMatrix');
  return confusionMatrix(
    openSetLabels(predicted, knownClasses, 'predicted'),
    openSetLabels(truth, knownClasses, 'truth'),
    knownClasses.length + 1,
    mask,
  );
}
