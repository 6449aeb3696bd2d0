// Entry point of the model layer: train one model kind on the labelled nodes and score every
// node. Seeded: the same inputs, settings and seed give the same logits.
import { initTensorflow } from '../tf/backend';
import { silentProgress, type CancelSignal, type ProgressSink } from '../util/progress';
import { SeededRandom } from '../util/random';
import { trainDenseNetwork } from './denseTrainer';
import { trainGraphNetwork } from './graphTrainer';
import { propagateForTraining } from './propagation';
import type { GraphInputs, ModelOutput, ModelSettings, ModelWeights, PropagatedFeatures, TrainingSet } from './types';
import { initialWeights } from './weights';

export { precomputePropagation, precomputePropagationWith } from './propagation';

export interface TrainOptions {
  /** Weights of the previous slice's model; used when kind and dimensions fit. */
  warmStart?: ModelWeights;
  /** Output of precomputePropagation for these inputs (sign only), to skip recomputing it. */
  precomputed?: PropagatedFeatures;
  progress?: ProgressSink;
  cancel?: CancelSignal;
  /**
   * mlp/sign only: split each training step over two worker threads. Default: when training
   * rows × input columns reach parallelTrainingThreshold (a function of the problem only, so a
   * seed gives the same result on every machine).
   */
  parallel?: boolean;
}

export async function trainAndPredict(
  inputs: GraphInputs,
  train: TrainingSet,
  settings: ModelSettings,
  options: TrainOptions = {},
): Promise<ModelOutput> {
  validate(inputs, train, settings);
  await initTensorflow();
  const progress = options.progress ?? silentProgress;
  const timings: Record<string, number> = {};
  const random = new SeededRandom(settings.seed);
  const { kind, hiddenUnits } = settings;
  const { classCount } = train;

  let modelInput = inputs.features;
  let inputDim = inputs.featureDim;
  if (kind === 'sign') {
    const started = performance.now();
    const propagated =
      usablePrecomputed(options.precomputed, inputs, settings.propagationSteps) ??
      (await propagateForTraining(inputs, settings.propagationSteps, options.cancel));
    timings.propagate = (performance.now() - started) / 1000;
    progress.report('propagate', 1);
    modelInput = propagated.data;
    inputDim = propagated.dim;
  }

  const { weights, notes } = initialWeights(kind, inputDim, hiddenUnits, classCount, random, options.warmStart);
  const result =
    kind === 'gcn' || kind === 'sage'
      ? await trainGraphNetwork(kind, inputs, train, settings, weights, random, timings, progress, options.cancel)
      : await trainDenseNetwork(
          modelInput,
          inputs.nodeCount,
          inputDim,
          train,
          settings,
          weights,
          random,
          timings,
          progress,
          options.cancel,
          options.parallel,
        );
  return {
    logits: result.logits,
    classCount,
    embeddings: result.embeddings,
    hiddenUnits,
    weights,
    lossHistory: result.lossHistory,
    timings,
    notes,
  };
}

function usablePrecomputed(
  precomputed: PropagatedFeatures | undefined,
  inputs: GraphInputs,
  steps: number,
): PropagatedFeatures | undefined {
  if (!precomputed) return undefined;
  const expectedDim = inputs.featureDim * (steps + 1);
  if (precomputed.steps !== steps || precomputed.dim !== expectedDim || precomputed.data.length !== inputs.nodeCount * expectedDim) {
    throw new Error(
      `precomputed propagation has ${precomputed.steps} steps × ${precomputed.dim} columns, but the settings need ${steps} steps × ${expectedDim} columns for ${inputs.nodeCount} nodes`,
    );
  }
  return precomputed;
}

function validate(inputs: GraphInputs, train: TrainingSet, settings: ModelSettings): void {
  const { nodeCount, featureDim, features, adjacency } = inputs;
  if (features.length !== nodeCount * featureDim) {
    throw new Error(`features hold ${features.length} values, expected ${nodeCount} nodes × ${featureDim} = ${nodeCount * featureDim}`);
  }
  if (adjacency.rowCount !== nodeCount || adjacency.colCount !== nodeCount) {
    throw new Error(`adjacency is ${adjacency.rowCount} × ${adjacency.colCount}, expected ${nodeCount} × ${nodeCount}`);
  }
  if (train.nodeIndex.length !== train.classIndex.length) {
    throw new Error(`training set has ${train.nodeIndex.length} nodes but ${train.classIndex.length} classes`);
  }
  if (!Number.isInteger(train.classCount) || train.classCount < 1)
    throw new Error(`class count must be at least 1, got ${train.classCount}`);
  for (let i = 0; i < train.nodeIndex.length; i++) {
    const node = train.nodeIndex[i];
    const cls = train.classIndex[i];
    if (node < 0 || node >= nodeCount) throw new Error(`training node index ${node} (entry ${i}) is outside [0, ${nodeCount})`);
    if (cls < 0 || cls >= train.classCount) throw new Error(`training class index ${cls} (entry ${i}) is outside [0, ${train.classCount})`);
  }
  const positiveWhole = (name: string, value: number) => {
    if (!Number.isInteger(value) || value < 1) throw new Error(`${name} must be a whole number ≥ 1, got ${value}`);
  };
  positiveWhole('hiddenUnits', settings.hiddenUnits);
  if (!Number.isInteger(settings.epochs) || settings.epochs < 0)
    throw new Error(`epochs must be a whole number ≥ 0, got ${settings.epochs}`);
  if (!(settings.dropout >= 0 && settings.dropout < 1)) throw new Error(`dropout must be in [0, 1), got ${settings.dropout}`);
  if (!(settings.learningRate > 0)) throw new Error(`learningRate must be > 0, got ${settings.learningRate}`);
  if (!(settings.weightDecay >= 0)) throw new Error(`weightDecay must be ≥ 0, got ${settings.weightDecay}`);
}
