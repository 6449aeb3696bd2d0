// Quality over time: for each slice i fit a model (warm-started along the chain or cold), measure
// it on every slice j (the accuracy matrix R[i][j]) and report per-slice closed-set accuracy and
// macro-F1, open-set macro-F1, novelty AUROC and rejection rate, for the graph model and the
// feature-only MLP baseline side by side.
import type { Dataset } from '../dataset/types';
import { accuracy, macroF1 } from '../metrics/classification';
import { auroc } from '../metrics/auroc';
import { averageAccuracy, backwardTransfer } from '../metrics/continual';
import type { ModelKind, PropagatedFeatures } from '../models/types';
import { precomputePropagation } from '../models/train';
import type { CancelSignal, ProgressSink } from '../util/progress';
import { throwIfCancelled } from '../util/progress';
import { fitSlice, localNodesOfSlice, NoTrainingLabelsError, rejectedAmong, type PrefixFit } from './modelOnPrefix';
import { predictOnPrefix } from './predictOnPrefix';
import { prefixGraph, type PrefixGraph } from './prefixGraph';
import type { RunSettings } from './runSettings';

export interface ReferenceLabels {
  /** Global class index per node (-1 = no reference); indices ≥ dataset.classNames.length are classes the dataset does not know. */
  classOfNode: Int32Array;
  /** dataset.classNames followed by the reference's unknown classes. */
  classNames: string[];
  /** Where the reference came from: a truth file, or "labels.csv (held-out slice)". */
  source: string;
}

export interface SliceMetrics {
  slice: string;
  trainingNodes: number;
  testNodes: number;
  /** Test nodes whose reference class the model does not know. */
  unseenTestNodes: number;
  accuracy: number | null;
  macroF1: number | null;
  openSetMacroF1: number | null;
  noveltyAuroc: number | null;
  rejectionRate: number;
  trainSeconds: number;
}

export interface ModelEvaluation {
  model: ModelKind;
  warmStart: boolean;
  perSlice: SliceMetrics[];
  /** R[i][j]: closed-set accuracy on slice j of the model fitted through slice i (null where undefined). */
  accuracyMatrix: (number | null)[][];
  averageAccuracy: number | null;
  backwardTransfer: number | null;
  /** Per slice: accuracy with warm start minus accuracy with cold start (diagonal of R). */
  warmMinusCold: (number | null)[] | null;
  forwardTransfer: number | null;
}

export interface EvaluationReport {
  dataset: string;
  reference: string;
  slices: string[];
  settings: RunSettings;
  graphModel: ModelEvaluation;
  baseline: ModelEvaluation;
}

export interface EvaluateOptions {
  reference: ReferenceLabels | null;
  /** Also fit the cold-start chain to measure warm minus cold (doubles the work). */
  compareColdStart: boolean;
  progress?: ProgressSink;
  cancel?: CancelSignal;
  /** Prefix graphs and SIGN propagation shared across calls on the same dataset (a settings sweep computes each once). */
  cache?: PrefixCache;
  /** Fit only these slice indices (default every slice); the others get empty metrics and matrix rows. */
  onlySlices?: readonly number[];
}

/** Work that depends only on the dataset, never on the settings: reusable across evaluateSlices calls. */
export interface PrefixCache {
  prefixes?: PrefixGraph[];
  propagated: Map<number, PropagatedFeatures>;
}

/** Labels used for training: with a truth file every curated label; without one the same labels, each slice tested on its own. */
export function referenceFromLabels(dataset: Dataset): ReferenceLabels {
  return { classOfNode: dataset.labels, classNames: dataset.classNames, source: 'labels.csv (each slice held out from its own model)' };
}

interface ChainContext {
  dataset: Dataset;
  reference: ReferenceLabels;
  includeCurrentSlice: boolean;
  prefixes: PrefixGraph[];
  propagated: Map<number, PropagatedFeatures>;
  options: EvaluateOptions;
}

function propagatedFor(ctx: ChainContext, slice: number, settings: RunSettings): PropagatedFeatures | undefined {
  if (settings.model !== 'sign') return undefined;
  const cached = ctx.propagated.get(slice);
  if (cached) return cached;
  const computed = precomputePropagation(ctx.prefixes[slice].inputs, 2);
  ctx.propagated.set(slice, computed);
  return computed;
}

interface SliceTest {
  local: Int32Array;
  /** Reference class (global) of each tested node. */
  reference: Int32Array;
}

/** Nodes of slice j that have a reference label and were not training nodes of the fit. */
function testNodes(ctx: ChainContext, fit: PrefixFit, prefix: PrefixGraph, slice: number): SliceTest {
  const training = new Set(fit.training.nodes);
  const local: number[] = [];
  const reference: number[] = [];
  for (const l of localNodesOfSlice(ctx.dataset, { prefix }, slice)) {
    const g = prefix.globalIndex[l];
    const r = ctx.reference.classOfNode[g];
    if (r >= 0 && !training.has(g)) {
      local.push(l);
      reference.push(r);
    }
  }
  return { local: Int32Array.from(local), reference: Int32Array.from(reference) };
}

function closedSetAccuracy(fit: PrefixFit, probabilities: Float32Array, test: SliceTest): number | null {
  const classCount = fit.modelClasses.length;
  const modelIndex = new Map<number, number>();
  fit.modelClasses.forEach((g, i) => modelIndex.set(g, i));
  const predicted: number[] = [];
  const truth: number[] = [];
  test.local.forEach((l, i) => {
    const t = modelIndex.get(test.reference[i]);
    if (t === undefined) return;
    let best = 0;
    for (let c = 1; c < classCount; c++) if (probabilities[l * classCount + c] > probabilities[l * classCount + best]) best = c;
    predicted.push(best);
    truth.push(t);
  });
  return truth.length ? accuracy(Int32Array.from(predicted), Int32Array.from(truth)) : null;
}

function sliceMetrics(ctx: ChainContext, fit: PrefixFit, settings: RunSettings): SliceMetrics {
  const slice = fit.slice;
  const classCount = fit.modelClasses.length;
  const modelIndex = new Map<number, number>();
  fit.modelClasses.forEach((g, i) => modelIndex.set(g, i));
  const test = testNodes(ctx, fit, fit.prefix, slice);
  const sliceLocal = localNodesOfSlice(ctx.dataset, fit, slice);
  const rejectedAll = rejectedAmong(fit, settings, sliceLocal);
  const rejectedOfLocal = new Map<number, number>();
  sliceLocal.forEach((l, i) => rejectedOfLocal.set(l, rejectedAll[i]));

  const closedPred: number[] = [];
  const closedTruth: number[] = [];
  const openPred: number[] = [];
  const openTruth: number[] = [];
  const scores: number[] = [];
  const unseen: number[] = [];
  test.local.forEach((l, i) => {
    let best = 0;
    for (let c = 1; c < classCount; c++) if (fit.probabilities[l * classCount + c] > fit.probabilities[l * classCount + best]) best = c;
    const t = modelIndex.get(test.reference[i]);
    if (t !== undefined) {
      closedPred.push(best);
      closedTruth.push(t);
    }
    openPred.push(rejectedOfLocal.get(l) ? classCount : best);
    openTruth.push(t ?? classCount);
    scores.push(fit.noveltySmoothed[l]);
    unseen.push(t === undefined ? 1 : 0);
  });
  const unseenCount = unseen.reduce((a, b) => a + b, 0);
  let rejected = 0;
  for (const r of rejectedAll) rejected += r;
  return {
    slice: ctx.dataset.slices[slice].key,
    trainingNodes: fit.training.nodes.length,
    testNodes: test.local.length,
    unseenTestNodes: unseenCount,
    accuracy: closedTruth.length ? accuracy(Int32Array.from(closedPred), Int32Array.from(closedTruth)) : null,
    macroF1: closedTruth.length ? macroF1(Int32Array.from(closedPred), Int32Array.from(closedTruth), classCount) : null,
    openSetMacroF1: openTruth.length ? macroF1(Int32Array.from(openPred), Int32Array.from(openTruth), classCount + 1) : null,
    noveltyAuroc: unseenCount > 0 && unseenCount < unseen.length ? auroc(scores, unseen) : null,
    rejectionRate: sliceLocal.length ? rejected / sliceLocal.length : 0,
    trainSeconds: fit.timings.train ?? 0,
  };
}

function emptySliceMetrics(slice: string): SliceMetrics {
  return {
    slice,
    trainingNodes: 0,
    testNodes: 0,
    unseenTestNodes: 0,
    accuracy: null,
    macroF1: null,
    openSetMacroF1: null,
    noveltyAuroc: null,
    rejectionRate: 0,
    trainSeconds: 0,
  };
}

async function evaluateChain(
  ctx: ChainContext,
  settings: RunSettings,
  stageName: string,
): Promise<{ metrics: SliceMetrics[]; matrix: (number | null)[][] }> {
  const { dataset } = ctx;
  const sliceCount = dataset.slices.length;
  const metrics: SliceMetrics[] = [];
  const matrix: (number | null)[][] = [];
  let previous: PrefixFit | null = null;
  for (let i = 0; i < sliceCount; i++) {
    throwIfCancelled(ctx.options.cancel);
    ctx.options.progress?.report(stageName, i / sliceCount);
    if (ctx.options.onlySlices && !ctx.options.onlySlices.includes(i)) {
      metrics.push(emptySliceMetrics(dataset.slices[i].key));
      matrix.push(new Array<number | null>(sliceCount).fill(null));
      continue;
    }
    let fit: PrefixFit;
    try {
      fit = await fitSlice(dataset, settings, i, {
        labels: dataset.labels,
        includeCurrentSlice: ctx.includeCurrentSlice,
        previous: previous ? { weights: previous.weights, modelClasses: previous.modelClasses } : null,
        prefix: ctx.prefixes[i],
        precomputed: propagatedFor(ctx, i, settings),
        cancel: ctx.options.cancel,
      });
    } catch (error) {
      if (!(error instanceof NoTrainingLabelsError)) throw error;
      metrics.push(emptySliceMetrics(dataset.slices[i].key));
      matrix.push(new Array<number | null>(sliceCount).fill(null));
      continue;
    }
    metrics.push(sliceMetrics(ctx, fit, settings));
    const row: (number | null)[] = [];
    for (let j = 0; j < sliceCount; j++) {
      if (j <= i) {
        row.push(closedSetAccuracy(fit, fit.probabilities, testNodes(ctx, fit, fit.prefix, j)));
      } else {
        const prefix = ctx.prefixes[j];
        const probabilities = await predictOnPrefix(prefix, fit, settings, propagatedFor(ctx, j, settings));
        row.push(closedSetAccuracy(fit, probabilities, testNodes(ctx, fit, prefix, j)));
      }
    }
    matrix.push(row);
    previous = fit;
  }
  ctx.options.progress?.report(stageName, 1);
  return { metrics, matrix };
}

/**
 * GEM-style summaries need a full square matrix: keep the slices with a defined diagonal, then
 * drop any slice whose row or column among the kept ones has an undefined entry.
 */
function completeSquare(matrix: (number | null)[][]): number[][] | null {
  let keep = matrix.map((_, i) => i).filter((i) => matrix[i][i] !== null);
  for (;;) {
    const next = keep.filter((i) => keep.every((j) => matrix[i][j] !== null && matrix[j][i] !== null));
    if (next.length === keep.length) break;
    keep = next;
  }
  if (keep.length < 2) return null;
  return keep.map((i) => keep.map((j) => matrix[i][j] as number));
}

async function evaluateModel(ctx: ChainContext, settings: RunSettings): Promise<ModelEvaluation> {
  const warm = await evaluateChain(ctx, settings, `evaluate ${settings.model}${settings.warmStart ? ' (warm)' : ''}`);
  let warmMinusCold: (number | null)[] | null = null;
  let forwardTransfer: number | null = null;
  if (ctx.options.compareColdStart && settings.warmStart) {
    const cold = await evaluateChain(ctx, { ...settings, warmStart: false }, `evaluate ${settings.model} (cold)`);
    warmMinusCold = warm.metrics.map((m, i) => {
      const coldAccuracy = cold.metrics[i].accuracy;
      return m.accuracy !== null && coldAccuracy !== null ? m.accuracy - coldAccuracy : null;
    });
    const defined = warmMinusCold.filter((v): v is number => v !== null);
    forwardTransfer = defined.length ? defined.reduce((a, b) => a + b, 0) / defined.length : null;
  }
  const square = completeSquare(warm.matrix);
  return {
    model: settings.model,
    warmStart: settings.warmStart,
    perSlice: warm.metrics,
    accuracyMatrix: warm.matrix,
    averageAccuracy: square ? averageAccuracy(square) : null,
    backwardTransfer: square ? backwardTransfer(square) : null,
    warmMinusCold,
    forwardTransfer,
  };
}

export async function evaluateSlices(dataset: Dataset, settings: RunSettings, options: EvaluateOptions): Promise<EvaluationReport> {
  const reference = options.reference ?? referenceFromLabels(dataset);
  const prefixes = options.cache?.prefixes ?? dataset.slices.map((_, i) => prefixGraph(dataset, i));
  if (options.cache) options.cache.prefixes = prefixes;
  const propagated = options.cache?.propagated ?? new Map<number, PropagatedFeatures>();
  const ctx: ChainContext = { dataset, reference, includeCurrentSlice: options.reference !== null, prefixes, propagated, options };
  const graphModel = await evaluateModel(ctx, settings);
  const baseline = await evaluateModel(ctx, { ...settings, model: 'mlp' });
  return {
    dataset: dataset.manifest.name,
    reference: reference.source,
    slices: dataset.slices.map((s) => s.key),
    settings,
    graphModel,
    baseline,
  };
}
