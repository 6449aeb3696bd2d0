// One full-batch training step of the mlp/sign network over a block ("shard") of the training
// rows on the WebAssembly SIMD kernels: the maths of models/denseShard.ts, the parameter and
// gradient layouts of denseShard's gradientLength. The shard's rows, activations and gradients
// live in its own linear memory for the whole training; a step copies in the parameters and
// the dropout mask and copies out the gradient vector.
//
// Both functions are shipped as source text to worker threads (parallelSimdTraining.ts), so
// they must stay self-contained: they use only their arguments (the compiled kernel module
// comes in as `module`), no imports, no helper functions, no named inner functions.
import type { KernelExports } from './kernels';

export interface SimdShard {
  rowCount: number;
  inputDim: number;
  hiddenUnits: number;
  classCount: number;
  lossScale: number;
  memory: WebAssembly.Memory;
  kernels: KernelExports;
  /** Byte offsets of the shard's matrices in memory. */
  at: {
    inputs: number;
    /** [hidden kernel | hidden bias | output kernel | output bias], contiguous: one copy per step. */
    parameters: number;
    mask: number;
    hidden: number;
    logits: number;
    hiddenGradient: number;
    /** [hidden kernel | hidden bias | output kernel | output bias] gradients, contiguous. */
    gradients: number;
    transposeScratch: number;
    indexScratch: number;
  };
  // Per entry of the rows × classes targets, as denseShard precomputes them.
  oneMinusTargets: Float32Array;
  logWeight: Float32Array;
  scaledLogWeight: Float32Array;
  scaledPositiveTarget: Float32Array;
}

/**
 * inputs: rows × inputDim (row-major); targets: rows × classCount in {0, 1};
 * lossScale: 1 / (all rows · classCount), so that the shards' sums add up to the mean.
 */
export function createSimdShard(
  module: WebAssembly.Module,
  inputs: Float32Array,
  rowCount: number,
  inputDim: number,
  targets: Float32Array,
  posWeight: Float32Array,
  hiddenUnits: number,
  lossScale: number,
): SimdShard {
  const classCount = posWeight.length;
  const parameterCount = inputDim * hiddenUnits + hiddenUnits + hiddenUnits * classCount + classCount;
  // Float counts of the regions, in the order of `at` (after the leading static-data page).
  const lengths = [
    rowCount * inputDim,
    parameterCount,
    rowCount * hiddenUnits,
    rowCount * hiddenUnits,
    rowCount * classCount,
    rowCount * hiddenUnits,
    parameterCount,
    classCount * hiddenUnits,
    // matMul's scratch (matMulListBytes in kernels.ts) for every product of the step.
    8 * (Math.max(inputDim, hiddenUnits, classCount) + 1) +
      4 +
      Math.max(inputDim, hiddenUnits, classCount) * Math.max(hiddenUnits, classCount),
  ];
  const starts: number[] = [];
  // The module's own static data (if any) lies below 64 KiB: heapBase() is checked below.
  let top = 65536;
  for (const length of lengths) {
    starts.push(top);
    top += (length * 4 + 15) & ~15;
  }
  const pages = Math.ceil(top / 65536);
  const memory = new WebAssembly.Memory({ initial: pages, maximum: pages });
  const kernels = new WebAssembly.Instance(module, { env: { memory } }).exports as unknown as KernelExports;
  if (kernels.heapBase() > 65536) throw new Error('SIMD kernels: the module has more static data than the shard layout reserves');
  new Float32Array(memory.buffer, starts[0], rowCount * inputDim).set(inputs.subarray(0, rowCount * inputDim));
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
  return {
    rowCount,
    inputDim,
    hiddenUnits,
    classCount,
    lossScale,
    memory,
    kernels,
    at: {
      inputs: starts[0],
      parameters: starts[1],
      mask: starts[2],
      hidden: starts[3],
      logits: starts[4],
      hiddenGradient: starts[5],
      gradients: starts[6],
      transposeScratch: starts[7],
      indexScratch: starts[8],
    },
    oneMinusTargets,
    logWeight,
    scaledLogWeight,
    scaledPositiveTarget,
  };
}

/**
 * Loss and gradients of this shard's rows [rowFrom, rowTo) (all of them by default), written
 * into out (layout of gradientLength: loss first), scaled by the shard's lossScale whatever the
 * range, so a mini-batch caller rescales by all rows / batch rows. parameters: [hidden kernel |
 * hidden bias | output kernel | output bias]; mask: the shard's rows × hidden inverted-dropout
 * mask (only the range's rows are read), or null.
 */
export function runSimdShard(
  shard: SimdShard,
  parameters: Float32Array,
  mask: Float32Array | null,
  out: Float32Array,
  rowFrom = 0,
  rowTo = shard.rowCount,
): void {
  const { inputDim, hiddenUnits, classCount, kernels: k } = shard;
  if (!(rowFrom >= 0 && rowFrom <= rowTo && rowTo <= shard.rowCount))
    throw new RangeError(`training rows [${rowFrom}, ${rowTo}) are outside the shard's ${shard.rowCount} rows`);
  const rowCount = rowTo - rowFrom;
  // The range's inputs start further in; every other matrix is laid out from the range's first row.
  const at = { ...shard.at, inputs: shard.at.inputs + rowFrom * inputDim * 4 };
  const buffer = shard.memory.buffer;
  const parameterCount = inputDim * hiddenUnits + hiddenUnits + hiddenUnits * classCount + classCount;
  const hiddenBiasAt = at.parameters + inputDim * hiddenUnits * 4;
  const outputKernelAt = hiddenBiasAt + hiddenUnits * 4;
  const outputBiasAt = outputKernelAt + hiddenUnits * classCount * 4;
  new Float32Array(buffer, at.parameters, parameterCount).set(parameters.subarray(0, parameterCount));
  if (mask) new Float32Array(buffer, at.mask, rowCount * hiddenUnits).set(mask.subarray(rowFrom * hiddenUnits, rowTo * hiddenUnits));
  const maskAt = mask ? at.mask : 0;

  // Forward: Hd = relu(X W1 + b1) ⊙ mask, Z = Hd W2 + b2.
  k.matMul(at.inputs, at.parameters, at.hidden, rowCount, inputDim, hiddenUnits, at.indexScratch);
  k.biasReluMask(at.hidden, hiddenBiasAt, maskAt, rowCount, hiddenUnits);
  k.matMul(at.hidden, outputKernelAt, at.logits, rowCount, hiddenUnits, classCount, at.indexScratch);
  k.addBias(at.logits, outputBiasAt, rowCount, classCount);

  // Class-weighted BCE, (1 - y) z + (1 + (w - 1) y) softplus(-z), and dZ in place of the logits.
  const logits = new Float32Array(buffer, at.logits, rowCount * classCount);
  const targetOffset = rowFrom * classCount;
  let lossSum = 0;
  for (let e = 0; e < logits.length; e++) {
    const z = logits[e];
    const t = targetOffset + e;
    lossSum += shard.oneMinusTargets[t] * z + shard.logWeight[t] * (Math.log1p(Math.exp(-Math.abs(z))) + Math.max(-z, 0));
    logits[e] = shard.scaledLogWeight[t] / (1 + Math.exp(-z)) - shard.scaledPositiveTarget[t];
  }

  // Backward: dW2 = Hdᵀ dZ, db2 = Σ dZ, dHd = dZ W2ᵀ, dZ1 = dHd ⊙ mask ⊙ [H > 0], dW1 = Xᵀ dZ1, db1 = Σ dZ1.
  const gradientHiddenBiasAt = at.gradients + inputDim * hiddenUnits * 4;
  const gradientOutputKernelAt = gradientHiddenBiasAt + hiddenUnits * 4;
  const gradientOutputBiasAt = gradientOutputKernelAt + hiddenUnits * classCount * 4;
  k.matMulTransposedA(at.hidden, at.logits, gradientOutputKernelAt, rowCount, hiddenUnits, classCount, 0);
  k.columnSums(at.logits, gradientOutputBiasAt, rowCount, classCount);
  k.matMulTransposedB(
    at.logits,
    outputKernelAt,
    at.hiddenGradient,
    rowCount,
    classCount,
    hiddenUnits,
    at.transposeScratch,
    at.indexScratch,
  );
  k.reluMaskBackward(at.hiddenGradient, at.hidden, maskAt, rowCount * hiddenUnits);
  k.matMulTransposedA(at.inputs, at.hiddenGradient, at.gradients, rowCount, inputDim, hiddenUnits, 0);
  k.columnSums(at.hiddenGradient, gradientHiddenBiasAt, rowCount, hiddenUnits);

  out[0] = lossSum * shard.lossScale;
  out.set(new Float32Array(buffer, at.gradients, parameterCount), 1);
}
