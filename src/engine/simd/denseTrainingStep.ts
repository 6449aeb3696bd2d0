// The mlp/sign training step and prediction on the WebAssembly SIMD kernels: the same maths and
// the same interface as DenseTrainingStep and predictDense (models/denseStep.ts, on tfjs). The
// step is one shard (simdShard.ts) holding every training row; its rows, activations and
// gradients stay resident in the shard's memory for the whole training.
import { gradientLength } from '../models/denseShard';
import { flattenParameters, splitGradients, type DenseParameters, type LossAndGradients } from '../models/denseStep';
import { throwIfCancelled, type CancelSignal } from '../util/progress';
import { kernelModule, matMulListBytes, withWorkspace } from './kernels';
import { createSimdShard, runSimdShard, type SimdShard } from './simdShard';

export class SimdDenseTrainingStep {
  private readonly shard: SimdShard;
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
    const module = kernelModule();
    if (!module) throw new Error('WebAssembly SIMD kernels are not available in this JavaScript engine');
    if (inputs.length < rowCount * inputDim)
      throw new Error(`training inputs hold ${inputs.length} values, need ${rowCount} × ${inputDim}`);
    if (targets.length !== rowCount * posWeight.length) {
      throw new Error(`training targets hold ${targets.length} values, need ${rowCount} × ${posWeight.length}`);
    }
    this.shard = createSimdShard(module, inputs, rowCount, inputDim, targets, posWeight, hiddenUnits, lossScale);
    this.flat = new Float32Array(gradientLength(inputDim, hiddenUnits, posWeight.length) - 1);
  }

  /**
   * mask: rows × hidden inverted-dropout mask (0 or 1/(1-rate)), or null for no dropout. With a
   * row range, only those rows count, at the all-rows loss scale (the caller rescales).
   */
  run(parameters: DenseParameters, mask: Float32Array | null, rowFrom = 0, rowTo = this.rowCount): LossAndGradients {
    flattenParameters(parameters, this.flat);
    const out = new Float32Array(1 + this.flat.length);
    runSimdShard(this.shard, this.flat, mask, out, rowFrom, rowTo);
    return splitGradients(out, this.inputDim, this.hiddenUnits, this.shard.classCount);
  }

  /** Nothing to release by hand (the memory goes with the object); kept for DenseTrainingStep's interface. */
  dispose(): void {}
}

/** As predictDense: logits and hidden activations (no dropout) for every row, in chunks of rows. */
export function predictDenseSimd(
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
  const chunkRows = Math.max(4, Math.floor((1 << 22) / Math.max(inputDim, 1)));
  withWorkspace((workspace) => {
    const k = workspace.kernels;
    const rowsAt = workspace.allocate(Math.min(chunkRows, rowCount) * inputDim * 4);
    const hiddenKernelAt = workspace.allocate(inputDim * hiddenUnits * 4);
    const hiddenBiasAt = workspace.allocate(hiddenUnits * 4);
    const outputKernelAt = workspace.allocate(hiddenUnits * classCount * 4);
    const outputBiasAt = workspace.allocate(classCount * 4);
    const hiddenAt = workspace.allocate(Math.min(chunkRows, rowCount) * hiddenUnits * 4);
    const logitsAt = workspace.allocate(Math.min(chunkRows, rowCount) * classCount * 4);
    const indexAt = workspace.allocate(matMulListBytes(Math.max(inputDim, hiddenUnits), Math.max(hiddenUnits, classCount)));
    workspace.floats(hiddenKernelAt, inputDim * hiddenUnits).set(parameters.hiddenKernel);
    workspace.floats(hiddenBiasAt, hiddenUnits).set(parameters.hiddenBias);
    workspace.floats(outputKernelAt, hiddenUnits * classCount).set(parameters.outputKernel);
    workspace.floats(outputBiasAt, classCount).set(parameters.outputBias);
    for (let start = 0; start < rowCount; start += chunkRows) {
      throwIfCancelled(cancel);
      const rows = Math.min(rowCount, start + chunkRows) - start;
      workspace.floats(rowsAt, rows * inputDim).set(features.subarray(start * inputDim, (start + rows) * inputDim));
      k.matMul(rowsAt, hiddenKernelAt, hiddenAt, rows, inputDim, hiddenUnits, indexAt);
      k.biasReluMask(hiddenAt, hiddenBiasAt, 0, rows, hiddenUnits);
      k.matMul(hiddenAt, outputKernelAt, logitsAt, rows, hiddenUnits, classCount, indexAt);
      k.addBias(logitsAt, outputBiasAt, rows, classCount);
      embeddings.set(workspace.floats(hiddenAt, rows * hiddenUnits), start * hiddenUnits);
      logits.set(workspace.floats(logitsAt, rows * classCount), start * classCount);
    }
  });
  return { logits, embeddings };
}
