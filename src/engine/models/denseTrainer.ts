// Training of the feature-only network (mlp on X, sign on [X, ÂX, Â²X]): full batch over the
// labelled rows only, as the reference does, with hand-written backprop (denseStep.ts) and
// Adam in plain typed arrays (adam.ts).
import { throwIfCancelled, yieldToEventLoop, type CancelSignal, type ProgressSink } from '../util/progress';
import type { SeededRandom } from '../util/random';
import { AdamOptimizer } from './adam';
import { oneHotTargets, positiveWeights } from './classWeightedLoss';
import { DenseTrainingStep, predictDense, type DenseParameters } from './denseStep';
import { dropoutMask } from './initialisation';
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

/** Copies the labelled rows out of the full matrix. */
export function gatherRows(matrix: Float32Array, width: number, rows: Int32Array): Float32Array {
  const out = new Float32Array(rows.length * width);
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
): Promise<DenseTrainingResult> {
  const started = performance.now();
  const rowCount = train.nodeIndex.length;
  const { classCount } = train;
  const parameters = denseParameters(weights);
  const optimiser = new AdamOptimizer(
    [parameters.hiddenKernel, parameters.hiddenBias, parameters.outputKernel, parameters.outputBias],
    { learningRate: settings.learningRate, weightDecay: settings.weightDecay },
  );
  const lossHistory: number[] = [];
  if (rowCount > 0) {
    const step = new DenseTrainingStep(
      gatherRows(features, inputDim, train.nodeIndex),
      rowCount,
      inputDim,
      oneHotTargets(train.classIndex, classCount),
      positiveWeights(train.classIndex, classCount),
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
        lossHistory.push(loss);
        progress.report('train', (epoch + 1) / settings.epochs);
        await yieldToEventLoop();
      }
    } finally {
      step.dispose();
    }
  }
  const trained = performance.now();
  timings.train = (timings.train ?? 0) + (trained - started) / 1000;
  throwIfCancelled(cancel);
  const { logits, embeddings } = predictDense(features, nodeCount, inputDim, parameters, settings.hiddenUnits);
  timings.predict = (timings.predict ?? 0) + (performance.now() - trained) / 1000;
  return { lossHistory, logits, embeddings };
}
