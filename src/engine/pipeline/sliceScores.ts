// The per-node results of scoring one slice, in the form the CLI writes, discovery groups and
// the review panel shows.
import type { Dataset } from '../dataset/types';
import type { RunSettings } from './runSettings';
import { localNodesOfSlice, rejectedAmong, type PrefixFit } from './modelOnPrefix';

export interface SliceScores {
  sliceIndex: number;
  sliceKey: string;
  /** Names of the model's classes (its output rows). */
  modelClassNames: string[];
  /** Global node indices of the slice's nodes. */
  nodes: Int32Array;
  /** Model class index (into modelClassNames) with the highest output, per node. */
  predicted: Int32Array;
  /** Nodes × model classes sigmoid outputs. */
  probabilities: Float32Array;
  noveltyRaw: Float32Array;
  noveltySmoothed: Float32Array;
  rejected: Uint8Array;
  /** Nodes × hiddenUnits: the model's hidden layer, used to group rejected nodes. */
  embeddings: Float32Array;
  hiddenUnits: number;
  thresholds: Float32Array;
  trainingNodeCount: number;
  timings: Record<string, number>;
}

export function sliceScoresOf(dataset: Dataset, fit: PrefixFit, settings: RunSettings): SliceScores {
  const local = localNodesOfSlice(dataset, fit, fit.slice);
  const classCount = fit.modelClasses.length;
  const count = local.length;
  const probabilities = new Float32Array(count * classCount);
  const embeddings = new Float32Array(count * fit.hiddenUnits);
  const predicted = new Int32Array(count);
  const noveltyRaw = new Float32Array(count);
  const noveltySmoothed = new Float32Array(count);
  const nodes = new Int32Array(count);
  for (let i = 0; i < count; i++) {
    const l = local[i];
    nodes[i] = fit.prefix.globalIndex[l];
    const row = fit.probabilities.subarray(l * classCount, (l + 1) * classCount);
    probabilities.set(row, i * classCount);
    embeddings.set(fit.embeddings.subarray(l * fit.hiddenUnits, (l + 1) * fit.hiddenUnits), i * fit.hiddenUnits);
    let best = 0;
    for (let c = 1; c < classCount; c++) if (row[c] > row[best]) best = c;
    predicted[i] = best;
    noveltyRaw[i] = fit.noveltyRaw[l];
    noveltySmoothed[i] = fit.noveltySmoothed[l];
  }
  return {
    sliceIndex: fit.slice,
    sliceKey: dataset.slices[fit.slice].key,
    modelClassNames: Array.from(fit.modelClasses, (g) => dataset.classNames[g]),
    nodes,
    predicted,
    probabilities,
    noveltyRaw,
    noveltySmoothed,
    rejected: rejectedAmong(fit, settings, local),
    embeddings,
    hiddenUnits: fit.hiddenUnits,
    thresholds: fit.thresholds,
    trainingNodeCount: fit.training.nodes.length,
    timings: fit.timings,
  };
}

/** The three highest outputs of row i, best first. */
export function topOutputs(scores: SliceScores, i: number, howMany = 3): { className: string; output: number }[] {
  const classCount = scores.modelClassNames.length;
  const row = scores.probabilities.subarray(i * classCount, (i + 1) * classCount);
  return Array.from(row.keys())
    .sort((a, b) => row[b] - row[a])
    .slice(0, howMany)
    .map((c) => ({ className: scores.modelClassNames[c], output: row[c] }));
}

export function rejectedCount(scores: SliceScores): number {
  let n = 0;
  for (const r of scores.rejected) n += r;
  return n;
}
