// Training of the feature-only network (mlp on X, sign on [X, ÂX, Â²X]) over the labelled rows
// only: full batch, as the reference does, up to settings.batchRows rows, mini-batches beyond
// (miniBatches.ts), with hand-written backprop (denseStep.ts) and
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
import { batchPlan, batchRange, batchSchedule, laidOut } from './miniBatches';
import { ParallelDenseTraining, sharedFloats } from './parallelDenseStep';
import { splitRows } from './shardedTraining';
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
    // Mini-batches need the SIMD shards' row ranges; the tfjs fallback always trains full batch.
    const plan = simdAvailable() ? batchPlan(rowCount, settings.batchRows, random) : null;
    const rows = plan ? laidOut(train.nodeIndex, plan.order) : train.nodeIndex;
    const rowClasses = plan ? laidOut(train.classIndex, plan.order) : train.classIndex;
    const schedule = plan ? batchSchedule(plan.batchCount, settings.epochs, random) : null;
    const targets = oneHotTargets(rowClasses, classCount);
    const posWeight = positiveWeights(rowClasses, classCount);
    const report = (epoch: number, loss: number) => {
      lossHistory.push(loss);
      progress.report('train', (epoch + 1) / settings.epochs);
    };
    /**
     * Rescales gradients computed at the all-rows loss scale (simdShard.ts) to the mean over the
     * batch's rows, in place; returns the factor (1 for a full batch).
     */
    const toBatchMean = (parts: Float32Array[], batchRowCount: number): number => {
      const factor = rowCount / batchRowCount;
      if (factor !== 1) for (const part of parts) for (let i = 0; i < part.length; i++) part[i] *= factor;
      return factor;
    };
    if (parallel ?? rowCount * inputDim >= parallelTrainingThreshold) {
      const sharedInputs = gatherRows(features, inputDim, rows, sharedFloats(rowCount * inputDim));
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
      const bounds = splitRows(rowCount, parallelShardCount);
      /** Rows of every shard that step `epoch` uses (global row ranges), and their count. */
      const stepRows = (epoch: number): { ranges: [number, number][]; count: number } => {
        if (!schedule || !plan) return { ranges: [[0, rowCount]], count: rowCount };
        const ranges = bounds.slice(0, -1).map((start, s): [number, number] => {
          const [from, to] = batchRange(bounds[s + 1] - start, schedule[epoch], plan.batchCount);
          return [start + from, start + to];
        });
        return { ranges, count: ranges.reduce((sum, [from, to]) => sum + to - from, 0) };
      };
      const drawMask = (epoch: number, mask: Float32Array) => {
        const h = settings.hiddenUnits;
        for (const [from, to] of stepRows(epoch).ranges)
          dropoutMask((to - from) * h, settings.dropout, random, mask.subarray(from * h, to * h));
      };
      try {
        if (withDropout) drawMask(0, training.masks[0]);
        for (let epoch = 0; epoch < settings.epochs; epoch++) {
          throwIfCancelled(cancel);
          flattenParameters(parameters, training.parameters);
          const current = withDropout ? epoch % 2 : null;
          const running = training.run(current, schedule && plan ? { index: schedule[epoch], count: plan.batchCount } : undefined);
          // Draw the next step's mask while the workers compute this one.
          if (withDropout && epoch + 1 < settings.epochs) drawMask(epoch + 1, training.masks[1 - (epoch % 2)]);
          const summed = await running;
          toBatchMean([summed], stepRows(epoch).count);
          const { loss, gradients } = splitGradients(summed, inputDim, settings.hiddenUnits, classCount);
          optimiser.update([gradients.hiddenKernel, gradients.hiddenBias, gradients.outputKernel, gradients.outputBias]);
          report(epoch, loss);
        }
      } finally {
        await training.dispose();
      }
    } else {
      const gathered = gatherRows(features, inputDim, rows);
      const lossScale = 1 / (rowCount * classCount);
      const step = simdAvailable()
        ? new SimdDenseTrainingStep(gathered, rowCount, inputDim, targets, posWeight, settings.hiddenUnits, lossScale)
        : new DenseTrainingStep(gathered, rowCount, inputDim, targets, posWeight, settings.hiddenUnits, lossScale);
      const mask = settings.dropout > 0 ? new Float32Array(rowCount * settings.hiddenUnits) : null;
      try {
        for (let epoch = 0; epoch < settings.epochs; epoch++) {
          throwIfCancelled(cancel);
          const [from, to] = schedule && plan ? batchRange(rowCount, schedule[epoch], plan.batchCount) : [0, rowCount];
          const h = settings.hiddenUnits;
          if (mask) dropoutMask((to - from) * h, settings.dropout, random, mask.subarray(from * h, to * h));
          const { loss, gradients } =
            step instanceof SimdDenseTrainingStep ? step.run(parameters, mask, from, to) : step.run(parameters, mask);
          const parts = [gradients.hiddenKernel, gradients.hiddenBias, gradients.outputKernel, gradients.outputBias];
          const factor = toBatchMean(parts, to - from);
          optimiser.update(parts);
          report(epoch, loss * factor);
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
