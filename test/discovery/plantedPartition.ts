// A seeded planted-partition graph for discovery tests: groups of nodes with Gaussian embeddings
// around per-group means (so groups overlap in their tails), dense links inside a group, sparse
// links across, and a few words of text drawn from a per-group vocabulary.
import { buildAdjacency, type CsrMatrix } from '../../src/engine/graph/csr';
import { SeededRandom } from '../../src/engine/util/random';

export interface PlantedGroup {
  size: number;
  /** Sub-blobs: the group's embeddings are split evenly among this many means (default 1). */
  blobs?: number;
  /** Distance of each sub-blob mean from the group mean along a random direction. */
  blobOffset?: number;
  /** Slice each member falls in is drawn uniformly from [firstSlice, sliceCount). */
  firstSlice?: number;
  /** Fraction of members given a curated label (known groups only). */
  labelledFraction?: number;
  known: boolean;
  /** Overrides PlantedOptions.insideLinkProbability for this group. */
  insideLinkProbability?: number;
  /** Overrides PlantedOptions.noise for this group. */
  noise?: number;
}

export interface PlantedGraph {
  nodeCount: number;
  dim: number;
  embeddings: Float32Array;
  adjacency: CsrMatrix;
  group: Int32Array;
  labels: Int32Array;
  predictedClass: Int32Array;
  classNames: string[];
  nodeText: string[];
  nodeSlice: Int32Array;
  sliceKeys: string[];
  noveltyScore: Float32Array;
  /** Nodes of each group, ascending. */
  membersOf: Int32Array[];
  vocabularyOf: string[][];
}

export interface PlantedOptions {
  seed: number;
  dim: number;
  groups: PlantedGroup[];
  meanScale: number;
  noise: number;
  insideLinkProbability: number;
  acrossLinkProbability: number;
  sliceCount: number;
}

export function plantedPartition(options: PlantedOptions): PlantedGraph {
  const random = new SeededRandom(options.seed);
  const { dim, groups } = options;
  const nodeCount = groups.reduce((s, g) => s + g.size, 0);
  const embeddings = new Float32Array(nodeCount * dim);
  const group = new Int32Array(nodeCount);
  const labels = new Int32Array(nodeCount).fill(-1);
  const predictedClass = new Int32Array(nodeCount).fill(-1);
  const nodeSlice = new Int32Array(nodeCount);
  const noveltyScore = new Float32Array(nodeCount);
  const nodeText: string[] = [];
  const membersOf: Int32Array[] = [];
  const vocabularyOf: string[][] = [];
  const classNames: string[] = [];
  const knownIndexOfGroup = groups.map((g) => (g.known ? classNames.push(`known${classNames.length}`) - 1 : -1));
  const common = ['report', 'update', 'note', 'entry', 'record'];
  let node = 0;
  groups.forEach((g, gi) => {
    const vocabulary = Array.from({ length: 6 }, (_, w) => `g${gi}word${String.fromCharCode(97 + w)}`);
    vocabularyOf.push(vocabulary);
    const mean = Array.from({ length: dim }, () => random.normal() * options.meanScale);
    const blobs = g.blobs ?? 1;
    const blobMeans: number[][] = [];
    for (let b = 0; b < blobs; b++) {
      const direction = Array.from({ length: dim }, () => random.normal());
      const length = Math.hypot(...direction);
      blobMeans.push(mean.map((m, d) => m + (blobs > 1 ? ((g.blobOffset ?? 0) * direction[d]) / length : 0)));
    }
    const members: number[] = [];
    for (let i = 0; i < g.size; i++, node++) {
      members.push(node);
      group[node] = gi;
      const blobMean = blobMeans[Math.floor((i * blobs) / g.size)];
      for (let d = 0; d < dim; d++) embeddings[node * dim + d] = blobMean[d] + random.normal() * (g.noise ?? options.noise);
      const firstSlice = g.firstSlice ?? 0;
      nodeSlice[node] = firstSlice + random.int(options.sliceCount - firstSlice);
      if (g.known) {
        predictedClass[node] = knownIndexOfGroup[gi];
        if (random.next() < (g.labelledFraction ?? 0.5)) labels[node] = knownIndexOfGroup[gi];
        noveltyScore[node] = random.next() * 0.3;
      } else {
        noveltyScore[node] = 0.7 + random.next() * 0.3;
      }
      const words = [0, 1, 2].map(() => vocabulary[random.int(vocabulary.length)]);
      words.push(common[random.int(common.length)], 'the');
      nodeText.push(words.join(' '));
    }
    membersOf.push(Int32Array.from(members));
  });
  const source: number[] = [];
  const target: number[] = [];
  for (let u = 0; u < nodeCount; u++) {
    for (let v = u + 1; v < nodeCount; v++) {
      const p =
        group[u] === group[v] ? (groups[group[u]].insideLinkProbability ?? options.insideLinkProbability) : options.acrossLinkProbability;
      if (random.next() < p) {
        source.push(u);
        target.push(v);
      }
    }
  }
  const adjacency = buildAdjacency(
    nodeCount,
    { source: Int32Array.from(source), target: Int32Array.from(target), weight: null, count: source.length },
    true,
  );
  const sliceKeys = Array.from({ length: options.sliceCount }, (_, s) => `2024-Q${s + 1}`);
  return {
    nodeCount,
    dim,
    embeddings,
    adjacency,
    group,
    labels,
    predictedClass,
    classNames,
    nodeText,
    nodeSlice,
    sliceKeys,
    noveltyScore,
    membersOf,
    vocabularyOf,
  };
}

/** Concatenation of the given groups' members, ascending. */
export function nodesOfGroups(graph: PlantedGraph, groupIndices: number[]): Int32Array {
  const all: number[] = [];
  for (const g of groupIndices) all.push(...graph.membersOf[g]);
  return Int32Array.from(all).sort();
}
