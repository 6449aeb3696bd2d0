// Binary cross-entropy per class with a positive weight per class, the loss of the open-set
// head. Semantics follow BCEWithLogitsLoss(pos_weight) in PyTorch:
//   loss(z, y) = -[ w·y·log σ(z) + (1 - y)·log(1 - σ(z)) ],  mean over rows and classes,
// computed stably as (1 - y)·z + (1 + (w - 1)·y)·(log(1 + e^-|z|) + max(-z, 0)).
// Its gradient is dloss/dz = (σ(z)·(1 + (w - 1)·y) - w·y) / (rows · classes).

/** Per-class weight negatives / positives among the training rows (positives counted as at least 1, as the reference does). */
export function positiveWeights(classIndex: Int32Array, classCount: number): Float32Array {
  const positives = new Float64Array(classCount);
  for (let i = 0; i < classIndex.length; i++) positives[classIndex[i]]++;
  const out = new Float32Array(classCount);
  for (let c = 0; c < classCount; c++) out[c] = (classIndex.length - positives[c]) / Math.max(positives[c], 1);
  return out;
}

/** One-hot targets, rows × classCount. */
export function oneHotTargets(classIndex: Int32Array, classCount: number): Float32Array {
  const out = new Float32Array(classIndex.length * classCount);
  for (let i = 0; i < classIndex.length; i++) out[i * classCount + classIndex[i]] = 1;
  return out;
}

/**
 * Loss value and, when gradientOut is given, d loss / d logits written into it.
 * logits and targets are rows × classCount; the mean runs over rows × classCount.
 */
export function classWeightedBce(
  logits: Float32Array | Float64Array,
  targets: Float32Array,
  posWeight: Float32Array,
  gradientOut?: Float32Array,
): number {
  const classCount = posWeight.length;
  const total = logits.length;
  let sum = 0;
  for (let k = 0; k < total; k++) {
    const z = logits[k];
    const y = targets[k];
    const w = posWeight[k % classCount];
    const logWeight = 1 + (w - 1) * y;
    sum += (1 - y) * z + logWeight * (Math.log1p(Math.exp(-Math.abs(z))) + Math.max(-z, 0));
    if (gradientOut) {
      const sigma = 1 / (1 + Math.exp(-z));
      gradientOut[k] = (sigma * logWeight - w * y) / total;
    }
  }
  return sum / total;
}
