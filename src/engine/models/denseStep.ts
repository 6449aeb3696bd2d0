// The in-process training step of the mlp/sign network (one shard holding every training
// row, see denseShard.ts for the maths), the flat parameter layout, and prediction.
import * as tf from '@tensorflow/tfjs';
import { throwIfCancelled, type CancelSignal } from '../util/progress';
import { createDenseShard, disposeDenseShard, gradientLength, runDenseShard, type DenseShard } from './denseShard';

export interface DenseParameters {
  hiddenKernel: Float32Array; // inputDim × hidden
  hiddenBias: Float32Array; // hidden
  outputKernel: Float32Array; // hidden × classCount
  outputBias: Float32Array; // classCount
}

export interface LossAndGradients {
  /** Sum of the per-entry losses times lossScale (the mean when lossScale = 1 / (rows · classes)). */
  loss: number;
  gradients: DenseParameters;
}

/** Copies the parameters into one vector in the order of denseShard's layout (without the loss slot). */
export function flattenParameters(
  p: DenseParameters,
  out: Float32Array = new Float32Array(p.hiddenKernel.length + p.hiddenBias.length + p.outputKernel.length + p.outputBias.length),
): Float32Array {
  let at = 0;
  for (const part of [p.hiddenKernel, p.hiddenBias, p.outputKernel, p.outputBias]) {
    out.set(part, at);
    at += part.length;
  }
  return out;
}

/** Views on a gradient vector of denseShard's layout (loss first). */
export function splitGradients(vector: Float32Array, inputDim: number, hiddenUnits: number, classCount: number): LossAndGradients {
  const hiddenBiasAt = 1 + inputDim * hiddenUnits;
  const outputKernelAt = hiddenBiasAt + hiddenUnits;
  const outputBiasAt = outputKernelAt + hiddenUnits * classCount;
  return {
    loss: vector[0],
    gradients: {
      hiddenKernel: vector.subarray(1, hiddenBiasAt),
      hiddenBias: vector.subarray(hiddenBiasAt, outputKernelAt),
      outputKernel: vector.subarray(outputKernelAt, outputBiasAt),
      outputBias: vector.subarray(outputBiasAt, outputBiasAt + classCount),
    },
  };
}

export class DenseTrainingStep {
  private readonly shard: DenseShard;
  private readonly flat: Float32Array;

  /**
   * inputs: rows × inputDim (row-major); targets: rows × classCount in {0, 1};
   * lossScale: 1 / (rows · classCount) for the mean.
   */
  constructor(
    inputs: Float32Array,
    readonly rowCount: number,
    readonly inputDim: number,
    targets: Float32Array,
    posWeight: Float32Array,
    readonly hiddenUnits: number,
    lossScale: number,
  ) {
    this.shard = createDenseShard(tf, inputs, rowCount, inputDim, targets, posWeight, hiddenUnits, lossScale);
    this.flat = new Float32Array(gradientLength(inputDim, hiddenUnits, posWeight.length) - 1);
  }

  /** mask: rows × hidden inverted-dropout mask (0 or 1/(1-rate)), or null for no dropout. */
  run(parameters: DenseParameters, mask: Float32Array | null): LossAndGradients {
    const classCount = parameters.outputBias.length;
    const out = new Float32Array(gradientLength(this.inputDim, this.hiddenUnits, classCount));
    runDenseShard(tf, this.shard, flattenParameters(parameters, this.flat), mask, out);
    return splitGradients(out, this.inputDim, this.hiddenUnits, classCount);
  }

  dispose(): void {
    disposeDenseShard(tf, this.shard);
  }
}

/** Logits and hidden activations (no dropout) for every row, in chunks to bound memory. */
export function predictDense(
  features: Float32Array,
  rowCount: number,
  inputDim: number,
  parameters: DenseParameters,
  hiddenUnits: number,
  cancel?: CancelSignal,
): { logits: Float32Array; embeddings: Float32Array } {
  const classCount = parameters.outputBias.length;
  const logits = new Float32Array(rowCount * classCount);
  const embeddings = new Float32Array(rowCount * hiddenUnits);
  const chunkRows = Math.max(1, Math.floor((1 << 22) / Math.max(inputDim, 1)));
  const kernels = [
    tf.tensor2d(parameters.hiddenKernel, [inputDim, hiddenUnits]),
    tf.tensor1d(parameters.hiddenBias),
    tf.tensor2d(parameters.outputKernel, [hiddenUnits, classCount]),
    tf.tensor1d(parameters.outputBias),
  ] as const;
  try {
    for (let start = 0; start < rowCount; start += chunkRows) {
      throwIfCancelled(cancel);
      const end = Math.min(rowCount, start + chunkRows);
      const [hidden, out] = tf.tidy(() => {
        const x = tf.tensor2d(features.subarray(start * inputDim, end * inputDim), [end - start, inputDim]);
        const h = tf.fused.matMul({ a: x, b: kernels[0], bias: kernels[1], activation: 'relu' });
        return [h, tf.fused.matMul({ a: h, b: kernels[2], bias: kernels[3] })];
      });
      embeddings.set(hidden.dataSync(), start * hiddenUnits);
      logits.set(out.dataSync(), start * classCount);
      tf.dispose([hidden, out]);
    }
  } finally {
    tf.dispose([...kernels]);
  }
  return { logits, embeddings };
}

export function transposeSmall(m: Float32Array, rows: number, columns: number): Float32Array {
  const out = new Float32Array(m.length);
  for (let r = 0; r < rows; r++) for (let c = 0; c < columns; c++) out[c * rows + r] = m[r * columns + c];
  return out;
}
