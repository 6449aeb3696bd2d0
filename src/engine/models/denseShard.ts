// One full-batch training step of the two-layer network input → hidden (ReLU, dropout) →
// one sigmoid per class, over a block ("shard") of the training rows, on tfjs matrix products
// with the backward pass written by hand. Measured (bench/training.ts): tfjs autograd spends
// most of its time in the wasm backend's transposed matMul path and in bookkeeping; this pass
// uses only untransposed products, against a transposed copy of the (fixed) input made once,
// and computes no gradient with respect to the input.
//
//   Z1 = X W1 + b1, H = relu(Z1), Hd = H ⊙ mask, Z = Hd W2 + b2
//   dZ = (σ(Z) ⊙ (1 + (w - 1) y) - w y) · lossScale          (class-weighted BCE, see classWeightedLoss.ts)
//   dW2 = Hdᵀ dZ = (dZᵀ Hd)ᵀ, db2 = Σ_rows dZ
//   dZ1 = (dZ W2ᵀ) ⊙ mask ⊙ [H > 0], [dW1; db1] = [Xᵀ; 1ᵀ] dZ1
//
// The functions below are shipped as source text to worker threads (parallelDenseStep.ts), so
// they must stay self-contained: they use only their arguments (tfjs comes in as `tf`), no
// imports, no helper functions, no named inner functions.
import type * as tfModule from '@tensorflow/tfjs';

export type Tfjs = typeof tfModule;

export interface DenseShard {
  rowCount: number;
  inputDim: number;
  hiddenUnits: number;
  classCount: number;
  inputs: tfModule.Tensor2D;
  /** Xᵀ with a row of ones appended: one product then gives [dW1; db1]. */
  inputsTransposedWithOnes: tfModule.Tensor2D;
  /** rows × 1 ones: Σ_rows dZ as a product, faster than tfjs's axis-0 sum on wasm. */
  onesColumn: tfModule.Tensor2D;
  oneMinusTargets: tfModule.Tensor2D;
  logWeight: tfModule.Tensor2D;
  scaledLogWeight: tfModule.Tensor2D;
  scaledPositiveTarget: tfModule.Tensor2D;
  lossScale: tfModule.Scalar;
}

/**
 * Gradient vector layout shared by shards and their callers:
 * [loss | hidden kernel (inputDim × hidden) | hidden bias | output kernel (hidden × classes) | output bias].
 */
export function gradientLength(inputDim: number, hiddenUnits: number, classCount: number): number {
  return 1 + inputDim * hiddenUnits + hiddenUnits + hiddenUnits * classCount + classCount;
}

/**
 * inputs: rows × inputDim (row-major); targets: rows × classCount in {0, 1};
 * lossScale: 1 / (all rows · classCount), so that the shards' sums add up to the mean.
 */
export function createDenseShard(
  tf: Tfjs,
  inputs: Float32Array,
  rowCount: number,
  inputDim: number,
  targets: Float32Array,
  posWeight: Float32Array,
  hiddenUnits: number,
  lossScale: number,
): DenseShard {
  const classCount = posWeight.length;
  const oneMinusTargets = new Float32Array(targets.length);
  const logWeight = new Float32Array(targets.length);
  const scaledLogWeight = new Float32Array(targets.length);
  const scaledPositiveTarget = new Float32Array(targets.length);
  for (let k = 0; k < targets.length; k++) {
    const w = posWeight[k % classCount];
    oneMinusTargets[k] = 1 - targets[k];
    logWeight[k] = 1 + (w - 1) * targets[k];
    scaledLogWeight[k] = logWeight[k] * lossScale;
    scaledPositiveTarget[k] = w * targets[k] * lossScale;
  }
  const inputTensor = tf.tensor2d(inputs, [rowCount, inputDim]);
  const ones = new Float32Array(rowCount).fill(1);
  return {
    rowCount,
    inputDim,
    hiddenUnits,
    classCount,
    inputs: inputTensor,
    inputsTransposedWithOnes: tf.tidy(() => tf.concat([tf.transpose(inputTensor), tf.tensor2d(ones, [1, rowCount])], 0)),
    onesColumn: tf.tensor2d(ones, [rowCount, 1]),
    oneMinusTargets: tf.tensor2d(oneMinusTargets, [rowCount, classCount]),
    logWeight: tf.tensor2d(logWeight, [rowCount, classCount]),
    scaledLogWeight: tf.tensor2d(scaledLogWeight, [rowCount, classCount]),
    scaledPositiveTarget: tf.tensor2d(scaledPositiveTarget, [rowCount, classCount]),
    lossScale: tf.scalar(lossScale),
  };
}

/**
 * Loss and gradients of this shard's rows, written into out (layout of gradientLength).
 * parameters: [hidden kernel | hidden bias | output kernel | output bias] in that layout
 * without the leading loss; mask: rows × hidden inverted-dropout mask, or null.
 */
export function runDenseShard(tf: Tfjs, shard: DenseShard, parameters: Float32Array, mask: Float32Array | null, out: Float32Array): void {
  const { rowCount, inputDim, hiddenUnits, classCount } = shard;
  const hiddenBiasAt = inputDim * hiddenUnits;
  const outputKernelAt = hiddenBiasAt + hiddenUnits;
  const outputBiasAt = outputKernelAt + hiddenUnits * classCount;
  const outputKernelTransposed = new Float32Array(hiddenUnits * classCount);
  for (let j = 0; j < hiddenUnits; j++) {
    for (let c = 0; c < classCount; c++) outputKernelTransposed[c * hiddenUnits + j] = parameters[outputKernelAt + j * classCount + c];
  }
  const results = tf.tidy(() => {
    const hiddenKernel = tf.tensor2d(parameters.subarray(0, hiddenBiasAt), [inputDim, hiddenUnits]);
    const hiddenBias = tf.tensor1d(parameters.subarray(hiddenBiasAt, outputKernelAt));
    const outputKernel = tf.tensor2d(parameters.subarray(outputKernelAt, outputBiasAt), [hiddenUnits, classCount]);
    const outputBias = tf.tensor1d(parameters.subarray(outputBiasAt, outputBiasAt + classCount));

    const hidden = tf.fused.matMul({ a: shard.inputs, b: hiddenKernel, bias: hiddenBias, activation: 'relu' });
    const maskTensor = mask ? tf.tensor2d(mask, [rowCount, hiddenUnits]) : null;
    const dropped = maskTensor ? tf.mul(hidden, maskTensor) : hidden;
    const logits = tf.fused.matMul({ a: dropped, b: outputKernel, bias: outputBias });

    // Stable BCE with pos_weight: (1 - y) z + (1 + (w - 1) y) softplus(-z).
    const lossTerms = tf.add(tf.mul(shard.oneMinusTargets, logits), tf.mul(shard.logWeight, tf.softplus(tf.neg(logits))));
    const loss = tf.mul(tf.sum(lossTerms), shard.lossScale);

    const logitsGradient = tf.sub(tf.mul(tf.sigmoid(logits), shard.scaledLogWeight), shard.scaledPositiveTarget);
    const logitsGradientT = tf.transpose(logitsGradient);
    const outputKernelGradientT = tf.matMul(logitsGradientT, dropped); // classes × hidden
    const outputBiasGradient = tf.matMul(logitsGradientT, shard.onesColumn); // classes × 1
    const droppedGradient = tf.matMul(logitsGradient, tf.tensor2d(outputKernelTransposed, [classCount, hiddenUnits]));
    // [Hd > 0] = [H > 0]·[mask > 0]; multiplying by the mask again restores its 1/(1 - rate) factor.
    const hiddenGradient = maskTensor
      ? tf.mul(droppedGradient, tf.mul(tf.step(dropped), maskTensor))
      : tf.mul(droppedGradient, tf.step(hidden));
    // (inputDim + 1) × hidden: the hidden kernel's gradient, then the hidden bias's as the last row.
    const hiddenGradients = tf.matMul(shard.inputsTransposedWithOnes, hiddenGradient);
    return [loss, hiddenGradients, outputKernelGradientT, outputBiasGradient];
  });
  const [loss, hiddenGradients, outputKernelGradientT, outputBiasGradient] = results.map((t) => t.dataSync() as Float32Array);
  tf.dispose(results);
  out[0] = loss[0];
  out.set(hiddenGradients, 1);
  for (let c = 0; c < classCount; c++) {
    for (let j = 0; j < hiddenUnits; j++) out[1 + outputKernelAt + j * classCount + c] = outputKernelGradientT[c * hiddenUnits + j];
  }
  out.set(outputBiasGradient, 1 + outputBiasAt);
}

export function disposeDenseShard(tf: Tfjs, shard: DenseShard): void {
  tf.dispose([
    shard.inputs,
    shard.inputsTransposedWithOnes,
    shard.onesColumn,
    shard.oneMinusTargets,
    shard.logWeight,
    shard.scaledLogWeight,
    shard.scaledPositiveTarget,
    shard.lossScale,
  ]);
}
