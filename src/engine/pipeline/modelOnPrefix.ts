// One model fit for one slice: train on the history window's labels over the graph as it stood
// at the end of the slice, then turn outputs into probabilities, DOC thresholds and novelty.
import type { Dataset } from '../dataset/types';
import { precomputePropagation, trainAndPredict } from '../models/train';
import { foldModelsFor, outOfFoldProbabilities } from './crossFit';
import type { ModelWeights, PropagatedFeatures } from '../models/types';
import { docMargin, docThresholds, docThresholdsRobust } from '../scoring/docThresholds';
import { energyNovelty, maxSoftmaxNovelty } from '../scoring/noveltyScores';
import { sigmoid } from '../scoring/sigmoid';
import { smoothNovelty } from '../scoring/smoothing';
import type { CancelSignal, ProgressSink } from '../util/progress';
import { prefixGraph, type PrefixGraph } from './prefixGraph';
import { modelSettingsOf, type RunSettings } from './runSettings';
import { modelClassSet, selectTrainingNodes, type TrainingSelection } from './trainingWindow';

export interface PreviousModel {
  weights: ModelWeights;
  /** Global class index of each output row of the previous model. */
  modelClasses: Int32Array;
}

export interface PrefixFit {
  slice: number;
  prefix: PrefixGraph;
  training: TrainingSelection;
  /** Global class index of each model output. */
  modelClasses: Int32Array;
  /** Local nodes × model classes. */
  logits: Float32Array;
  probabilities: Float32Array;
  embeddings: Float32Array;
  hiddenUnits: number;
  /** DOC threshold of each model class. */
  thresholds: Float32Array;
  /** What the thresholds were fitted on, so a preview can refit them for another α. */
  thresholdFit: ThresholdFit;
  noveltyRaw: Float32Array;
  noveltySmoothed: Float32Array;
  weights: ModelWeights;
  timings: Record<string, number>;
}

export interface ThresholdFit {
  /** Rows × model classes outputs the Gaussian is fitted on (out-of-fold, or the model's own). */
  probabilities: Float32Array;
  rows: Int32Array;
  classes: Int32Array;
  scale: 'std' | 'mad';
}

/** Per-class DOC thresholds of a fit for a given α. */
export function thresholdsFor(fit: ThresholdFit, classCount: number, alpha: number): Float32Array {
  return (fit.scale === 'mad' ? docThresholdsRobust : docThresholds)(fit.probabilities, classCount, fit.rows, fit.classes, alpha);
}

export interface FitOptions {
  /** Curated labels as global class indices (-1 = none): labels.csv, or a subset of it in evaluation. */
  labels: Int32Array;
  includeCurrentSlice: boolean;
  previous?: PreviousModel | null;
  /** Reused propagated features of this same prefix (SIGN), e.g. across a settings sweep. */
  precomputed?: PropagatedFeatures;
  prefix?: PrefixGraph;
  progress?: ProgressSink;
  cancel?: CancelSignal;
}

export class NoTrainingLabelsError extends Error {
  constructor(sliceKey: string) {
    super(`no labelled nodes in the history window of slice ${sliceKey}: label some nodes or widen the history window`);
    this.name = 'NoTrainingLabelsError';
  }
}

export async function fitSlice(dataset: Dataset, settings: RunSettings, slice: number, options: FitOptions): Promise<PrefixFit> {
  const started = performance.now();
  const prefix = options.prefix ?? prefixGraph(dataset, slice);
  const training = selectTrainingNodes(dataset, options.labels, {
    slice,
    historyWindow: settings.historyWindow,
    includeCurrentSlice: options.includeCurrentSlice,
    labelRate: settings.labelRate,
    seed: settings.seed,
  });
  if (training.nodes.length === 0) throw new NoTrainingLabelsError(dataset.slices[slice].key);
  const warm = settings.warmStart && options.previous ? options.previous : null;
  const modelClasses = modelClassSet(training, warm ? warm.modelClasses : null);
  const modelIndexOfGlobal = new Map<number, number>();
  modelClasses.forEach((g, i) => modelIndexOfGlobal.set(g, i));
  const trainLocal = new Int32Array(training.nodes.length);
  const trainClass = new Int32Array(training.nodes.length);
  for (let i = 0; i < training.nodes.length; i++) {
    trainLocal[i] = prefix.localIndex[training.nodes[i]];
    trainClass[i] = modelIndexOfGlobal.get(training.globalClasses[i]) ?? -1;
  }
  const graphSeconds = (performance.now() - started) / 1000;

  const modelSettings = modelSettingsOf(settings);
  let precomputed = options.precomputed;
  let propagateSeconds = 0;
  if (settings.model === 'sign' && !precomputed) {
    options.progress?.report('propagate', 0);
    const propagateStarted = performance.now();
    precomputed = precomputePropagation(prefix.inputs, modelSettings.propagationSteps);
    propagateSeconds = (performance.now() - propagateStarted) / 1000;
  }
  const output = await trainAndPredict(
    prefix.inputs,
    { nodeIndex: trainLocal, classIndex: trainClass, classCount: modelClasses.length },
    modelSettings,
    { warmStart: warm?.weights, precomputed, progress: options.progress, cancel: options.cancel },
  );

  const classCount = modelClasses.length;
  let thresholdSource = output.logits;
  let thresholdRows = trainLocal;
  let thresholdClasses = trainClass;
  let crossFitSeconds = 0;
  if (settings.thresholdFolds >= 2) {
    const crossFitStarted = performance.now();
    const outOfFold = await outOfFoldProbabilities({
      inputs: prefix.inputs,
      trainLocal,
      trainClass,
      classCount,
      settings: modelSettings,
      folds: settings.thresholdFolds,
      foldModels: foldModelsFor(trainLocal.length, settings.thresholdFolds),
      precomputed,
      progress: options.progress,
      cancel: options.cancel,
    });
    crossFitSeconds = (performance.now() - crossFitStarted) / 1000;
    thresholdSource = outOfFold;
    // Rows of folds whose model was not trained (large training sets) stay NaN and are left out.
    const scored = Array.from(trainLocal.keys()).filter((row) => !Number.isNaN(outOfFold[row * classCount]));
    thresholdRows = Int32Array.from(scored);
    thresholdClasses = Int32Array.from(scored, (row) => trainClass[row]);
  }
  const scoreStarted = performance.now();
  const probabilities = sigmoid(output.logits);
  const thresholdFit: ThresholdFit = {
    probabilities: thresholdSource === output.logits ? probabilities : thresholdSource,
    rows: thresholdRows,
    classes: thresholdClasses,
    scale: settings.thresholdScale,
  };
  const thresholds = thresholdsFor(thresholdFit, classCount, settings.alpha);
  let noveltyRaw: Float32Array;
  if (settings.noveltyMethod === 'msp') noveltyRaw = maxSoftmaxNovelty(output.logits, classCount);
  else if (settings.noveltyMethod === 'energy') noveltyRaw = energyNovelty(output.logits, classCount, settings.temperature);
  else noveltyRaw = docMargin(probabilities, classCount, thresholds);
  const scoreSeconds = (performance.now() - scoreStarted) / 1000;
  options.progress?.report('smooth', 0);
  const smoothStarted = performance.now();
  const noveltySmoothed = smoothNovelty(noveltyRaw, prefix.inputs.adjacency, settings.smoothingWeight, settings.smoothingRounds);
  const smoothSeconds = (performance.now() - smoothStarted) / 1000;
  options.progress?.report('smooth', 1);

  return {
    slice,
    prefix,
    training,
    modelClasses,
    logits: output.logits,
    probabilities,
    embeddings: output.embeddings,
    hiddenUnits: output.hiddenUnits,
    thresholds,
    thresholdFit,
    noveltyRaw,
    noveltySmoothed,
    weights: output.weights,
    timings: {
      graph: graphSeconds,
      ...(propagateSeconds ? { propagate: propagateSeconds } : {}),
      ...output.timings,
      crossFit: crossFitSeconds,
      score: scoreSeconds,
      smooth: smoothSeconds,
    },
  };
}

/**
 * Rejected nodes among `localNodes`: with the DOC score, those whose smoothed novelty is above 0
 * (every class output below its threshold); with a quantile, the top fraction by smoothed novelty.
 */
export function rejectedAmong(fit: PrefixFit, settings: RunSettings, localNodes: Int32Array): Uint8Array {
  const rejected = new Uint8Array(localNodes.length);
  const quantile = settings.rejectQuantile ?? (settings.noveltyMethod === 'doc' ? null : 0.1);
  if (quantile === null) {
    for (let i = 0; i < localNodes.length; i++) rejected[i] = fit.noveltySmoothed[localNodes[i]] > 0 ? 1 : 0;
    return rejected;
  }
  const order = Array.from(localNodes.keys()).sort((a, b) => fit.noveltySmoothed[localNodes[b]] - fit.noveltySmoothed[localNodes[a]]);
  const count = Math.round(quantile * localNodes.length);
  for (let k = 0; k < count; k++) rejected[order[k]] = 1;
  return rejected;
}

/** Local indices of the prefix nodes that belong to `slice`. */
export function localNodesOfSlice(dataset: Dataset, fit: { prefix: PrefixGraph }, slice: number): Int32Array {
  const out: number[] = [];
  const { globalIndex } = fit.prefix;
  for (let local = 0; local < globalIndex.length; local++) if (dataset.nodeSlice[globalIndex[local]] === slice) out.push(local);
  return Int32Array.from(out);
}
