// Training of the feature-only network (mlp on X, sign on [X, ÂX, Â²X]): full batch over the
// labelled rows only, as the reference does, with hand-written backprop (denseStep.ts) and
// Adam in plain typed arrays (adam.ts).
import { predictDenseSimd, SimdDenseTrainingStep } from '../simd/denseTrainingStep';
import { simdAvailable } from '../simd/kernels';
import { ParallelSimdTraining } from '../simd/parallelSimdTraining';
import { throwIfCancelled, yieldToEventLoop, type CancelSignal, type ProgressSink } from '../util/progress';
import type { SeededRandom } from '../util/random';
import { AdamOptimizer } from './adam';
import { oneHotTargets, positiveWeights } from './classWeightedLoss';
import { DenseTrainingStep, flattenParameters, predictDense, splitGradients, type DenseParameters } from './denseStep';
import { dropoutMask } from './initialisation';
import { ParallelDenseTraining, sharedFloats } from './parallelDenseStep';
import type { ModelSettings, ModelWeights, TrainingSet } from './types';
import { tensorByName } from './weights';

export interface DenseTrainingResult {
  lossHistory: number[];
  logits: Float32Array;
  embeddings: Float32Array;
}

/** The four tensors of an mlp/sign model, as views on the weights (updates write through). */
export function denseParameters(weights: ModelWeights): DenseParameters {
  return {
    hiddenKernel: tensorByName(weights, 'hidden/kernel').data,
    hiddenBias: tensorByName(weights, 'hidden/bias').data,
    outputKernel: tensorByName(weights, 'output/kernel').data,
    outputBias: tensorByName(weights, 'output/bias').data,
  };
}

/**
 * Training rows × input columns from which the step is split over two worker threads. Below
 * it, worker start-up (about half a second) outweighs the gain. The split depends only on the
 * problem size, never on the machine, so a seed gives the same result everywhere.
 */
export const parallelTrainingThreshold = 2_000_000;
export const parallelShardCount = 2;

/** Copies the labelled rows out of the full matrix. */
export function gatherRows(
  matrix: Float32Array,
  width: number,
  rows: Int32Array,
  out: Float32Array = new Float32Array(rows.length * width),
): Float32Array {
  for (let r = 0; r < rows.length; r++) out.set(matrix.subarray(rows[r] * width, (rows[r] + 1) * width), r * width);
  return out;
}

/**
 * Trains weights (updated in place) on the training rows of features (nodeCount × inputDim),
 * then predicts every row. Timings of the two stages are added to timings.
 */
export async function trainDenseNetwork(
  features: Float32Array,
  nodeCount: number,
  inputDim: number,
  train: TrainingSet,
  settings: ModelSettings,
  weights: ModelWeights,
  random: SeededRandom,
  timings: Record<string, number>,
  progress: ProgressSink,
  cancel: CancelSignal | undefined,
  parallel?: boolean,
): Promise<DenseTrainingResult> {
  const started = performance.now();
  const rowCount = train.nodeIndex.length;
  const { classCount } = train;
  const parameters = denseParameters(weights);
  const optimiser = new AdamOptimizer([parameters.hiddenKernel, parameters.hiddenBias, parameters.outputKernel, parameters.outputBias], {
    learningRate: settings.learningRate,
    weightDecay: settings.weightDecay,
  });
  const lossHistory: number[] = [];
  if (rowCount > 0 && settings.epochs > 0) {
    const targets = oneHotTargets(train.classIndex, classCount);
    const posWeight = positiveWeights(train.classIndex, classCount);
    const report = (epoch: number, loss: number) => {
      lossHistory.push(loss);
      progress.report('train', (epoch + 1) / settings.epochs);
    };
    if (parallel ?? rowCount * inputDim >= parallelTrainingThreshold) {
      const sharedInputs = gatherRows(features, inputDim, train.nodeIndex, sharedFloats(rowCount * inputDim));
      const withDropout = settings.dropout > 0;
      // The WebAssembly SIMD kernels (src/engine/simd/) when the engine has them, tfjs-wasm otherwise.
      const training = await (simdAvailable() ? ParallelSimdTraining : ParallelDenseTraining).start(
        sharedInputs,
        rowCount,
        inputDim,
        targets,
        posWeight,
        settings.hiddenUnits,
        parallelShardCount,
        withDropout,
      );
      try {
        if (withDropout) dropoutMask(training.masks[0].length, settings.dropout, random, training.masks[0]);
        for (let epoch = 0; epoch < settings.epochs; epoch++) {
          throwIfCancelled(cancel);
          flattenParameters(parameters, training.parameters);
          const current = withDropout ? epoch % 2 : null;
          const running = training.run(current);
          // Draw the next epoch's mask while the workers compute this one.
          if (withDropout && epoch + 1 < settings.epochs)
            dropoutMask(training.masks[1 - (epoch % 2)].length, settings.dropout, random, training.masks[1 - (epoch % 2)]);
          const { loss, gradients } = splitGradients(await running, inputDim, settings.hiddenUnits, classCount);
          optimiser.update([gradients.hiddenKernel, gradients.hiddenBias, gradients.outputKernel, gradients.outputBias]);
          report(epoch, loss);
        }
      } finally {
        await training.dispose();
      }
    } else {
      const step = new (simdAvailable() ? SimdDenseTrainingStep : DenseTrainingStep)(
        gatherRows(features, inputDim, train.nodeIndex),
        rowCount,
        inputDim,
        targets,
        posWeight,
        settings.hiddenUnits,
        1 / (rowCount * classCount),
      );
      const mask = settings.dropout > 0 ? new Float32Array(rowCount * settings.hiddenUnits) : null;
      try {
        for (let epoch = 0; epoch < settings.epochs; epoch++) {
          throwIfCancelled(cancel);
          if (mask) dropoutMask(mask.length, settings.dropout, random, mask);
          const { loss, gradients } = step.run(parameters, mask);
          optimiser.update([gradients.hiddenKernel, gradients.hiddenBias, gradients.outputKernel, gradients.outputBias]);
          report(epoch, loss);
          await yieldToEventLoop();
        }
      } finally {
        step.dispose();
      }
    }
  }
  const trained = performance.now();
  timings.train = (timings.train ?? 0) + (trained - started) / 1000;
  throwIfCancelled(cancel);
  const { logits, embeddings } = (simdAvailable() ? predictDenseSimd : predictDense)(
    features,
    nodeCount,
    inputDim,
    parameters,
    settings.hiddenUnits,
    cancel,
  );
  timings.predict = (timings.predict ?? 0) + (performance.now() - trained) / 1000;
  return { lossHistory, logits, embeddings };
}
