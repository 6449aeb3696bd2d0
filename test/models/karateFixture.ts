// Zachary's karate club (Zachary 1977, "An Information Flow Model for Conflict and Fission in
// Small Groups"), as shipped by graphology-generators: 34 members, 78 friendships, and the
// faction each member joined after the split in the `club` attribute ('Mr. Hi' or 'Officer').
import Graph from 'graphology';
import karateClub from 'graphology-generators/social/karate-club';
import { buildAdjacency } from '../../src/engine/graph/csr';
import type { GraphInputs } from '../../src/engine/models/types';

export interface KarateClub {
  inputs: GraphInputs;
  /** 0 = Mr. Hi's faction, 1 = the officer's. */
  faction: Int32Array;
  edgeCount: number;
}

/** The club with one-hot identity features (node i has feature i only). */
export function karateWithIdentityFeatures(): KarateClub {
  const graph = karateClub(Graph);
  const nodeCount = graph.order;
  const faction = new Int32Array(nodeCount);
  graph.forEachNode((key, attributes) => {
    faction[Number(key)] = attributes.club === 'Mr. Hi' ? 0 : 1;
  });
  const source: number[] = [];
  const target: number[] = [];
  graph.forEachEdge((_edge, _attributes, from, to) => {
    source.push(Number(from));
    target.push(Number(to));
  });
  const adjacency = buildAdjacency(
    nodeCount,
    { source: Int32Array.from(source), target: Int32Array.from(target), weight: null, count: source.length },
    true,
  );
  const features = new Float32Array(nodeCount * nodeCount);
  for (let i = 0; i < nodeCount; i++) features[i * nodeCount + i] = 1;
  return { inputs: { nodeCount, features, featureDim: nodeCount, adjacency }, faction, edgeCount: source.length };
}

/** Share of nodes other than `excluded` whose higher output is their faction. */
export function factionAccuracy(logits: Float32Array, faction: Int32Array, excluded: number[]): number {
  let correct = 0;
  let counted = 0;
  for (let node = 0; node < faction.length; node++) {
    if (excluded.includes(node)) continue;
    const predicted = logits[node * 2 + 1] > logits[node * 2] ? 1 : 0;
    if (predicted === faction[node]) correct++;
    counted++;
  }
  return correct / counted;
}
