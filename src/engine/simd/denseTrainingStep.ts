// The mlp/sign training step and prediction on the WebAssembly SIMD kernels: the same maths and
// the same interface as DenseTrainingStep and predictDense (models/denseStep.ts, on tfjs), see
// models/denseShard.ts for the equations. The training rows, activations and gradients stay
// resident in one workspace for the whole training; an epoch copies in only the parameters and
// the dropout mask, and copies out only the gradients.
import type { DenseParameters, LossAndGradients } from '../models/denseStep';
import { throwIfCancelled, type CancelSignal } from '../util/progress';
import { KernelWorkspace, withWorkspace } from './kernels';

interface Region {
  at: number;
  length: number;
}

export class SimdDenseTrainingStep {
  private readonly workspace: KernelWorkspace;
  private readonly classCount: number;
  private readonly inputs: Region;
  private readonly hiddenKernel: Region;
  private readonly hiddenBias: Region;
  private readonly outputKernel: Region;
  private readonly outputBias: Region;
  private readonly mask: Region;
  private readonly hidden: Region;
  private readonly logits: Region;
  private readonly hiddenGradient: Region;
  private readonly hiddenKernelGradient: Region;
  private readonly hiddenBiasGradient: Region;
  private readonly outputKernelGradient: Region;
  private readonly outputBiasGradient: Region;
  private readonly transposeScratch: number;
  private readonly indexScratch: number;
  // Per entry of the rows × classes targets, as denseShard precomputes them.
  private readonly oneMinusTargets: Float32Array;
  private readonly logWeight: Float32Array;
  private readonly scaledLogWeight: Float32Array;
  private readonly scaledPositiveTarget: Float32Array;

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
    private readonly lossScale: number,
  ) {
    const classCount = posWeight.length;
    this.classCount = classCount;
    if (inputs.length < rowCount * inputDim)
      throw new Error(`training inputs hold ${inputs.length} values, need ${rowCount} × ${inputDim}`);
    if (targets.length !== rowCount * classCount)
      throw new Error(`training targets hold ${targets.length} values, need ${rowCount} × ${classCount}`);
    const sizes = [
      rowCount * inputDim,
      inputDim * hiddenUnits,
      hiddenUnits,
      hiddenUnits * classCount,
      classCount,
      rowCount * hiddenUnits,
      rowCount * hiddenUnits,
      rowCount * classCount,
      rowCount * hiddenUnits,
      inputDim * hiddenUnits,
      hiddenUnits,
      hiddenUnits * classCount,
      classCount,
      classCount * hiddenUnits,
      Math.max(inputDim, hiddenUnits, classCount),
    ];
    this.workspace = new KernelWorkspace(sizes.reduce((sum, n) => sum + n * 4 + 16, 0));
    const regions = sizes.map((length) => ({ at: this.workspace.allocate(length * 4), length }));
    [
      this.inputs,
      this.hiddenKernel,
      this.hiddenBias,
      this.outputKernel,
      this.outputBias,
      this.mask,
      this.hidden,
      this.logits,
      this.hiddenGradient,
      this.hiddenKernelGradient,
      this.hiddenBiasGradient,
      this.outputKernelGradient,
      this.outputBiasGradient,
    ] = regions;
    this.transposeScratch = regions[13].at;
    this.indexScratch = regions[14].at;
    this.view(this.inputs).set(inputs.subarray(0, rowCount * inputDim));

    this.oneMinusTargets = new Float32Array(targets.length);
    this.logWeight = new Float32Array(targets.length);
    this.scaledLogWeight = new Float32Array(targets.length);
    this.scaledPositiveTarget = new Float32Array(targets.length);
    for (let k = 0; k < targets.length; k++) {
      const w = posWeight[k % classCount];
      this.oneMinusTargets[k] = 1 - targets[k];
      this.logWeight[k] = 1 + (w - 1) * targets[k];
      this.scaledLogWeight[k] = this.logWeight[k] * lossScale;
      this.scaledPositiveTarget[k] = w * targets[k] * lossScale;
    }
  }

  /** mask: rows × hidden inverted-dropout mask (0 or 1/(1-rate)), or null for no dropout. */
  run(parameters: DenseParameters, mask: Float32Array | null): LossAndGradients {
    const { rowCount, inputDim, hiddenUnits, classCount } = this;
    const k = this.workspace.kernels;
    this.view(this.hiddenKernel).set(parameters.hiddenKernel);
    this.view(this.hiddenBias).set(parameters.hiddenBias);
    this.view(this.outputKernel).set(parameters.outputKernel);
    this.view(this.outputBias).set(parameters.outputBias);
    if (mask) this.view(this.mask).set(mask.subarray(0, rowCount * hiddenUnits));
    const maskAt = mask ? this.mask.at : 0;

    // Forward: Hd = relu(X W1 + b1) ⊙ mask, Z = Hd W2 + b2.
    k.matMul(this.inputs.at, this.hiddenKernel.at, this.hidden.at, rowCount, inputDim, hiddenUnits, this.indexScratch);
    k.biasReluMask(this.hidden.at, this.hiddenBias.at, maskAt, rowCount, hiddenUnits);
    k.matMul(this.hidden.at, this.outputKernel.at, this.logits.at, rowCount, hiddenUnits, classCount, this.indexScratch);
    k.addBias(this.logits.at, this.outputBias.at, rowCount, classCount);

    // Class-weighted BCE and dZ, in place of the logits (rows × classes: small beside the products).
    const logits = this.view(this.logits);
    let lossSum = 0;
    for (let e = 0; e < logits.length; e++) {
      const z = logits[e];
      lossSum += this.oneMinusTargets[e] * z + this.logWeight[e] * (Math.log1p(Math.exp(-Math.abs(z))) + Math.max(-z, 0));
      logits[e] = this.scaledLogWeight[e] / (1 + Math.exp(-z)) - this.scaledPositiveTarget[e];
    }

    // Backward: dW2 = Hdᵀ dZ, db2 = Σ dZ, dHd = dZ W2ᵀ, dZ1 = dHd ⊙ mask ⊙ [H > 0], dW1 = Xᵀ dZ1, db1 = Σ dZ1.
    k.matMulTransposedA(this.hidden.at, this.logits.at, this.outputKernelGradient.at, rowCount, hiddenUnits, classCount, 0);
    k.columnSums(this.logits.at, this.outputBiasGradient.at, rowCount, classCount);
    k.matMulTransposedB(
      this.logits.at,
      this.outputKernel.at,
      this.hiddenGradient.at,
      rowCount,
      classCount,
      hiddenUnits,
      this.transposeScratch,
      this.indexScratch,
    );
    k.reluMaskBackward(this.hiddenGradient.at, this.hidden.at, maskAt, rowCount * hiddenUnits);
    k.matMulTransposedA(this.inputs.at, this.hiddenGradient.at, this.hiddenKernelGradient.at, rowCount, inputDim, hiddenUnits, 0);
    k.columnSums(this.hiddenGradient.at, this.hiddenBiasGradient.at, rowCount, hiddenUnits);

    return {
      loss: lossSum * this.lossScale,
      gradients: {
        hiddenKernel: this.view(this.hiddenKernelGradient).slice(),
        hiddenBias: this.view(this.hiddenBiasGradient).slice(),
        outputKernel: this.view(this.outputKernelGradient).slice(),
        outputBias: this.view(this.outputBiasGradient).slice(),
      },
    };
  }

  /** Nothing to release by hand (the memory goes with the object); kept for DenseTrainingStep's interface. */
  dispose(): void {}

  private view(region: Region): Float32Array {
    return this.workspace.floats(region.at, region.length);
  }
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
    const indexAt = workspace.allocate(Math.max(inputDim, hiddenUnits) * 4);
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
