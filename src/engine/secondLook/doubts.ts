// Doubtful labels: every curated label of a slice's training window is judged by models that
// never saw it (k-fold cross-fitting) and by the labels of its neighbours.
//
// With q the out-of-fold outputs normalised to sum to 1, g the curated class, w the neighbour
// weight (default 0.3) and s_j the share of the node's labelled neighbours labelled j:
//   selfConfidenceMargin  m = q_g − max_{j≠g} q_j                    (in [−1, 1])
//   modelDoubt              = (1 − m) / 2                            (in [0, 1]; > 0.5 when another class wins)
//   neighbourDisagreement d = 1 − s_g                                (share of labelled neighbours that disagree)
//   score                   = (1 − w)·modelDoubt + w·d               (d := modelDoubt when no neighbour is labelled)
//   suggested label         = argmax_{j≠g} (1 − w)·q_j + w·s_j       (s := q when no neighbour is labelled)
// The model gets most of the weight because its input already mixes in the neighbours' features;
// labelled neighbours add direct evidence the model cannot see. A label is doubtful when its
// score is above 0.5 or confident learning counts it off the diagonal of the confident joint.
import type { Dataset } from '../dataset/types';
import { precomputePropagation } from '../models/train';
import { outOfFoldProbabilities, type FoldObservation } from '../pipeline/crossFit';
import { NoTrainingLabelsError } from '../pipeline/modelOnPrefix';
import { prefixGraph } from '../pipeline/prefixGraph';
import { modelSettingsOf, settingsHash, type RunSettings } from '../pipeline/runSettings';
import { firstWindowSlice, modelClassSet, selectTrainingNodes } from '../pipeline/trainingWindow';
import type { CancelSignal, ProgressSink } from '../util/progress';
import { labelFileHashes, rounded, topClassOutputs } from './classOutputs';
import { confidentJoint, normaliseRows, offDiagonalRows } from './confidentJoint';
import { namedCounts, neighbourLabelsOf, type NeighbourLabels } from './neighbourLabels';
import type { DoubtfulLabel, DoubtsReport } from './reportTypes';

export const defaultDoubtFolds = 5;
export const defaultNeighbourWeight = 0.3;

export interface DoubtOptions {
  /** The slice whose training window is checked. */
  slice: number;
  folds?: number;
  neighbourWeight?: number;
  /** Curated labels as global class indices (default dataset.labels). */
  labels?: Int32Array;
  /** 'doubtful' (default) keeps only doubtful labels; 'all' ranks every checked label. */
  keep?: 'doubtful' | 'all';
  progress?: ProgressSink;
  cancel?: CancelSignal;
  /** Sees each fold's training set (checks that no node is scored by a model trained on its label). */
  observeFold?: (fold: FoldObservation) => void;
}

export interface LabelEvidence {
  score: number;
  selfConfidenceMargin: number;
  neighbourDisagreement: number | null;
  /** Index into the row of the suggested class. */
  suggested: number;
}

/**
 * The score and suggestion of one label. shares: normalised outputs of the node; given: its
 * curated class (row index); neighbourShares: share of labelled neighbours per class, or null
 * when none is labelled. Needs at least two classes.
 */
export function labelEvidence(
  shares: ArrayLike<number>,
  given: number,
  neighbourShares: ArrayLike<number> | null,
  neighbourWeight: number,
): LabelEvidence {
  let bestOther = -1;
  let bestOtherEvidence = -Infinity;
  let bestOtherShare = -Infinity;
  for (let j = 0; j < shares.length; j++) {
    if (j === given) continue;
    bestOtherShare = Math.max(bestOtherShare, shares[j]);
    const evidence = (1 - neighbourWeight) * shares[j] + neighbourWeight * (neighbourShares ? neighbourShares[j] : shares[j]);
    if (evidence > bestOtherEvidence) {
      bestOtherEvidence = evidence;
      bestOther = j;
    }
  }
  const margin = shares[given] - bestOtherShare;
  const modelDoubt = (1 - margin) / 2;
  const disagreement = neighbourShares ? 1 - neighbourShares[given] : null;
  const score = (1 - neighbourWeight) * modelDoubt + neighbourWeight * (disagreement ?? modelDoubt);
  return { score, selfConfidenceMargin: margin, neighbourDisagreement: disagreement, suggested: bestOther };
}

export async function findDoubtfulLabels(dataset: Dataset, settings: RunSettings, options: DoubtOptions): Promise<DoubtsReport> {
  const folds = options.folds ?? defaultDoubtFolds;
  const neighbourWeight = options.neighbourWeight ?? defaultNeighbourWeight;
  if (!Number.isInteger(folds) || folds < 2) throw new Error(`folds must be a whole number ≥ 2, got ${folds}`);
  if (!(neighbourWeight >= 0 && neighbourWeight <= 1)) throw new Error(`neighbour weight must be in [0, 1], got ${neighbourWeight}`);
  const labels = options.labels ?? dataset.labels;
  const { slice } = options;
  const sliceKey = dataset.slices[slice].key;

  // Every label of the window is checked, so the label rate does not thin it.
  const training = selectTrainingNodes(dataset, labels, {
    slice,
    historyWindow: settings.historyWindow,
    includeCurrentSlice: true,
    labelRate: 1,
    seed: settings.seed,
  });
  if (training.nodes.length === 0) throw new NoTrainingLabelsError(sliceKey);
  if (training.nodes.length < folds)
    throw new Error(
      `only ${training.nodes.length} labelled nodes in the window of slice ${sliceKey}: at least ${folds} are needed for ${folds} folds`,
    );
  const modelClasses = modelClassSet(training, null);
  const classCount = modelClasses.length;
  if (classCount < 2)
    throw new Error(`the window of slice ${sliceKey} holds labels of one class only: there is nothing to doubt them against`);
  const rowOfGlobal = new Map<number, number>();
  modelClasses.forEach((g, row) => rowOfGlobal.set(g, row));
  const classNames = Array.from(modelClasses, (g) => dataset.classNames[g]);

  const prefix = prefixGraph(dataset, slice);
  const trainLocal = Int32Array.from(training.nodes, (node) => prefix.localIndex[node]);
  const trainClass = Int32Array.from(training.globalClasses, (g) => rowOfGlobal.get(g) as number);
  const modelSettings = modelSettingsOf(settings);
  const precomputed = settings.model === 'sign' ? precomputePropagation(prefix.inputs, modelSettings.propagationSteps) : undefined;
  const outOfFold = await outOfFoldProbabilities({
    inputs: prefix.inputs,
    trainLocal,
    trainClass,
    classCount,
    settings: modelSettings,
    folds,
    precomputed,
    progress: options.progress,
    cancel: options.cancel,
    observeFold: options.observeFold,
  });

  const shares = normaliseRows(outOfFold, classCount);
  const joint = confidentJoint(shares, classCount, trainClass);
  const flagged = offDiagonalRows(joint, trainClass);
  const entries: { entry: DoubtfulLabel; score: number }[] = [];
  const neighbourShares = new Float64Array(classCount);
  for (let row = 0; row < trainLocal.length; row++) {
    const neighbours = neighbourLabelsOf(trainLocal[row], prefix.inputs.adjacency, prefix.globalIndex, labels);
    const hasShares = sharesOfModelClasses(neighbours, rowOfGlobal, neighbourShares);
    const rowShares = shares.subarray(row * classCount, (row + 1) * classCount);
    const evidence = labelEvidence(rowShares, trainClass[row], hasShares ? neighbourShares : null, neighbourWeight);
    const doubtful = evidence.score > 0.5 || flagged[row] === 1;
    if (!doubtful && options.keep !== 'all') continue;
    const node = training.nodes[row];
    entries.push({
      score: evidence.score,
      entry: {
        rank: 0,
        node: dataset.nodeIds[node],
        slice: dataset.slices[dataset.nodeSlice[node]].key,
        curatedLabel: classNames[trainClass[row]],
        suggestedLabel: classNames[evidence.suggested],
        score: rounded(evidence.score),
        selfConfidenceMargin: rounded(evidence.selfConfidenceMargin),
        neighbourDisagreement: evidence.neighbourDisagreement === null ? null : rounded(evidence.neighbourDisagreement),
        outputs: topClassOutputs(outOfFold.subarray(row * classCount, (row + 1) * classCount), classNames),
        neighbourLabels: namedCounts(neighbours.byClass, dataset.classNames),
        unlabelledNeighbours: neighbours.unlabelled,
        confidentLearning: flagged[row] === 1,
        confidentClass: joint.confidentClass[row] >= 0 ? classNames[joint.confidentClass[row]] : null,
      },
    });
  }
  // Ties fall back to node id so the order is the same on every run.
  entries.sort((a, b) => b.score - a.score || (a.entry.node < b.entry.node ? -1 : a.entry.node > b.entry.node ? 1 : 0));
  const doubts = entries.map(({ entry }, k) => ({ ...entry, rank: k + 1 }));

  return {
    format: 'graph-curator-doubts',
    version: 1,
    dataset: dataset.manifest.name,
    slice: sliceKey,
    windowSlices: { first: dataset.slices[firstWindowSlice(slice, settings.historyWindow)].key, last: sliceKey },
    settingsHash: settingsHash(settings),
    folds,
    neighbourWeight,
    labelsChecked: trainLocal.length,
    classes: classNames,
    selfConfidence: Array.from(joint.thresholds, (t) => (Number.isNaN(t) ? null : rounded(t))),
    confidentJoint: joint.counts,
    confidentLearningFlags: flagged.reduce((sum, f) => sum + f, 0),
    baseHashes: labelFileHashes(dataset),
    doubts,
  };
}

/**
 * Fills out[row] with the share of labelled neighbours in each model class; labels of classes
 * the model lacks count as disagreeing (they are in the denominator). False when none is labelled.
 */
function sharesOfModelClasses(neighbours: NeighbourLabels, rowOfGlobal: Map<number, number>, out: Float64Array): boolean {
  out.fill(0);
  if (neighbours.labelled === 0) return false;
  for (const [global, count] of neighbours.byClass) {
    const row = rowOfGlobal.get(global);
    if (row !== undefined) out[row] += count / neighbours.labelled;
  }
  return true;
}
