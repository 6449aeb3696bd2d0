// What a review session needs to know about the dataset and the scoring run, indexed by global
// node index. Built once by the host (or worker) from engine results; the session never reads
// files itself.
import type { Dataset } from '../engine/dataset/types';
import type { CsrMatrix } from '../engine/graph/csr';
import type { SliceScores } from '../engine/pipeline/sliceScores';

export interface ReviewContext {
  /** dataset.json name. */
  dataset: string;
  /** Slice key of the scored slice; new classes are introduced in it. */
  slice: string;
  runId: string | null;
  settingsHash: string | null;
  /** Content hashes of the label files as read when the run started (DecisionsFile.baseHashes). */
  baseHashes: Record<string, string>;
  nodeIds: string[];
  nodeText: string[];
  nodeSlice: Int32Array;
  sliceKeys: string[];
  /** Known classes (classes.json order, then unregistered labels). */
  classNames: string[];
  /** Curated label as an index into classNames, −1 for none. */
  labels: Int32Array;
  /** Model's class as an index into classNames, −1 for unscored or rejected nodes. */
  predictedClass: Int32Array;
  /** Smoothed novelty of scored nodes, 0 elsewhere. */
  novelty: Float32Array;
  /** nodeCount × nodeCount one-hop links (symmetric for undirected graphs). */
  adjacency: CsrMatrix;
  /** nodeCount × embeddingDim; rows of unscored nodes are zeros (only members are ever used). */
  embeddings: Float32Array;
  embeddingDim: number;
  /** Seed for re-grouping inside a candidate (split). */
  seed: number;
}

export interface RunIdentity {
  runId: string | null;
  settingsHash: string | null;
}

/**
 * Spreads one slice's scores (local to the slice's nodes) over the whole dataset. The predicted
 * class of a rejected node is −1: the model found no known class for it.
 */
export function reviewContextOf(dataset: Dataset, scores: SliceScores, adjacency: CsrMatrix, run: RunIdentity): ReviewContext {
  const nodeCount = dataset.nodeIds.length;
  if (adjacency.rowCount !== nodeCount) throw new Error(`reviewContextOf: adjacency has ${adjacency.rowCount} rows for ${nodeCount} nodes`);
  const classIndexOfName = new Map(dataset.classNames.map((name, index) => [name, index]));
  const modelToGlobal = scores.modelClassNames.map((name) => classIndexOfName.get(name) ?? -1);
  const dim = scores.hiddenUnits;
  const predictedClass = new Int32Array(nodeCount).fill(-1);
  const novelty = new Float32Array(nodeCount);
  const embeddings = new Float32Array(nodeCount * dim);
  for (let i = 0; i < scores.nodes.length; i++) {
    const node = scores.nodes[i];
    if (!scores.rejected[i]) predictedClass[node] = modelToGlobal[scores.predicted[i]];
    novelty[node] = scores.noveltySmoothed[i];
    embeddings.set(scores.embeddings.subarray(i * dim, (i + 1) * dim), node * dim);
  }
  return {
    dataset: dataset.manifest.name,
    slice: scores.sliceKey,
    runId: run.runId,
    settingsHash: run.settingsHash,
    baseHashes: { ...dataset.contentHashes },
    nodeIds: dataset.nodeIds,
    nodeText: dataset.nodeText,
    nodeSlice: dataset.nodeSlice,
    sliceKeys: dataset.slices.map((s) => s.key),
    classNames: dataset.classNames,
    labels: dataset.labels,
    predictedClass,
    novelty,
    adjacency,
    embeddings,
    embeddingDim: dim,
    seed: dataset.manifest.seed,
  };
}
