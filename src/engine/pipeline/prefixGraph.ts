// The graph as it stood at the end of a slice: nodes of that slice and earlier, and the edges
// among them. Models train and score on it so that no later structure leaks into a slice.
import type { Dataset } from '../dataset/types';
import { buildAdjacency, type CsrMatrix } from '../graph/csr';
import type { GraphInputs } from '../models/types';

export interface PrefixGraph {
  inputs: GraphInputs;
  /** Global node index of each local node. */
  globalIndex: Int32Array;
  /** Local index of each global node, or -1 when the node is later than the prefix. */
  localIndex: Int32Array;
}

export function prefixGraph(dataset: Dataset, lastSlice: number): PrefixGraph {
  const total = dataset.nodeIds.length;
  const localIndex = new Int32Array(total).fill(-1);
  let count = 0;
  for (let node = 0; node < total; node++) if (dataset.nodeSlice[node] <= lastSlice) localIndex[node] = count++;
  const globalIndex = new Int32Array(count);
  for (let node = 0; node < total; node++) if (localIndex[node] >= 0) globalIndex[localIndex[node]] = node;

  const dim = dataset.featureDim;
  let features: Float32Array;
  if (count === total) {
    features = dataset.features;
  } else {
    features = new Float32Array(count * dim);
    for (let local = 0; local < count; local++) {
      const g = globalIndex[local];
      features.set(dataset.features.subarray(g * dim, (g + 1) * dim), local * dim);
    }
  }

  const { source, target, weight, count: edgeCount } = dataset.edges;
  let kept = 0;
  for (let e = 0; e < edgeCount; e++) if (localIndex[source[e]] >= 0 && localIndex[target[e]] >= 0) kept++;
  const localSource = new Int32Array(kept);
  const localTarget = new Int32Array(kept);
  const localWeight = weight ? new Float32Array(kept) : null;
  let w = 0;
  for (let e = 0; e < edgeCount; e++) {
    const u = localIndex[source[e]];
    const v = localIndex[target[e]];
    if (u < 0 || v < 0) continue;
    localSource[w] = u;
    localTarget[w] = v;
    if (localWeight && weight) localWeight[w] = weight[e];
    w++;
  }
  // Message passing treats the graph as undirected even for directed datasets: a citation
  // informs both ends.
  const adjacency: CsrMatrix = buildAdjacency(count, { source: localSource, target: localTarget, weight: localWeight, count: kept }, true);
  return { inputs: { nodeCount: count, features, featureDim: dim, adjacency }, globalIndex, localIndex };
}
