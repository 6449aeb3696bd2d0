// Grouping the rejected nodes of a scored slice into candidate new classes, in the node space of
// the graph the model scored (the prefix up to the slice).
import type { Dataset } from '../dataset/types';
import type { CsrMatrix } from '../graph/csr';
import * as path from 'node:path';
import { discoverCandidates, type Candidate, type DiscoveryResult } from '../discovery';
import { candidatesFileOf, previousCandidatesOf, readCandidatesFile, type CandidatesFile } from './candidatesFile';
import type { PrefixFit } from './modelOnPrefix';
import type { RunSettings } from './runSettings';
import { listRuns, runsFolder } from './runStore';
import type { SliceScores } from './sliceScores';

export interface DiscoverySpace {
  /** Global node index of each local node. */
  globalIndex: Int32Array;
  adjacency: CsrMatrix;
  /** Local nodes × dim. */
  embeddings: Float32Array;
  embeddingDim: number;
  /** Global class index the model predicts per local node (−1 none). */
  predictedClass: Int32Array;
  noveltyScore: Float32Array;
  /** Local indices of the rejected nodes. */
  rejected: Int32Array;
}

export function discoverInSpace(dataset: Dataset, space: DiscoverySpace, seed: number, previous?: Candidate[]): DiscoveryResult {
  const n = space.globalIndex.length;
  const nodeText = new Array<string>(n);
  const nodeSlice = new Int32Array(n);
  const labels = new Int32Array(n);
  for (let l = 0; l < n; l++) {
    const g = space.globalIndex[l];
    nodeText[l] = dataset.nodeText[g];
    nodeSlice[l] = dataset.nodeSlice[g];
    labels[l] = dataset.labels[g];
  }
  return discoverCandidates({
    rejectedNodes: space.rejected,
    embeddings: space.embeddings,
    embeddingDim: space.embeddingDim,
    adjacency: space.adjacency,
    nodeText,
    nodeSlice,
    sliceKeys: dataset.slices.map((s) => s.key),
    labels,
    predictedClass: space.predictedClass,
    classNames: dataset.classNames,
    noveltyScore: space.noveltyScore,
    seed,
    previous,
  });
}

/** The discovery space of a fitted slice: the prefix graph, the model's hidden layer, the slice's rejected nodes. */
export function spaceFromFit(fit: PrefixFit, scores: SliceScores): DiscoverySpace {
  const classCount = fit.modelClasses.length;
  const n = fit.prefix.globalIndex.length;
  const predictedClass = new Int32Array(n);
  for (let l = 0; l < n; l++) {
    let best = 0;
    for (let c = 1; c < classCount; c++) if (fit.probabilities[l * classCount + c] > fit.probabilities[l * classCount + best]) best = c;
    predictedClass[l] = fit.modelClasses[best];
  }
  const rejected: number[] = [];
  scores.nodes.forEach((g, i) => {
    if (scores.rejected[i]) rejected.push(fit.prefix.localIndex[g]);
  });
  return {
    globalIndex: fit.prefix.globalIndex,
    adjacency: fit.prefix.inputs.adjacency,
    embeddings: fit.embeddings,
    embeddingDim: fit.hiddenUnits,
    predictedClass,
    noveltyScore: fit.noveltySmoothed,
    rejected: Int32Array.from(rejected).sort(),
  };
}

/** Candidates of the newest earlier run of the same slice, for stable ids and carried decisions. */
export async function previousCandidates(
  dataset: Dataset,
  sliceKey: string,
  localOf: (global: number) => number,
): Promise<Candidate[] | undefined> {
  for (const run of await listRuns(dataset.folder)) {
    if (run.slice !== sliceKey || !run.files.candidates) continue;
    const file = await readCandidatesFile(path.join(runsFolder(dataset.folder), run.runId, run.files.candidates));
    if (file) return previousCandidatesOf(file, dataset, localOf);
  }
  return undefined;
}

/** Groups the rejected nodes of a fitted slice and returns the candidates file. */
export async function discoverForFit(
  dataset: Dataset,
  fit: PrefixFit,
  scores: SliceScores,
  settings: RunSettings,
  runId: string | null,
): Promise<CandidatesFile> {
  const space = spaceFromFit(fit, scores);
  const previous = await previousCandidates(dataset, scores.sliceKey, (g) => fit.prefix.localIndex[g]);
  const result = discoverInSpace(dataset, space, settings.seed, previous);
  return candidatesFileOf(dataset, result, (l) => fit.prefix.globalIndex[l], {
    runId,
    slice: scores.sliceKey,
    scoresSource: 'run',
    rejectedCount: space.rejected.length,
  });
}
