// A small seeded scenario for review tests: known classes of maintenance notes with curated
// labels, and unknown groups whose nodes the scorer rejected. Candidates come from the real
// discovery module, so the review session is tested on what it will be given.
import { discoverCandidates, type DiscoveryResult } from '../../src/engine/discovery';
import { buildAdjacency } from '../../src/engine/graph/csr';
import { SeededRandom } from '../../src/engine/util/random';
import { fromDiscovery, summariseMembers, type ReviewCandidate } from '../../src/review/reviewCandidate';
import type { ReviewContext } from '../../src/review/reviewContext';

export interface ScenarioGroup {
  size: number;
  /** Class name for a known group; undefined for a group the scorer rejected. */
  className?: string;
  words: string[];
  firstSlice?: number;
}

export interface ReviewScenario {
  context: ReviewContext;
  /** Node indices of each group. */
  groups: Int32Array[];
  rejected: Int32Array;
}

export const sliceKeys = ['2024-Q1', '2024-Q2', '2024-Q3', '2024-Q4'];

export const defaultGroups: ScenarioGroup[] = [
  { size: 40, className: 'blade-crack', words: ['blade', 'crack', 'leading', 'edge', 'erosion'] },
  { size: 40, className: 'gearbox-wear', words: ['gearbox', 'bearing', 'oil', 'vibration', 'wear'] },
  { size: 30, className: 'grid-fault', words: ['grid', 'voltage', 'converter', 'trip', 'fault'] },
  { size: 18, words: ['icing', 'frost', 'sensor', 'anemometer', 'cold'], firstSlice: 2 },
  { size: 12, words: ['bird', 'strike', 'nest', 'nacelle', 'feathers'], firstSlice: 1 },
  { size: 8, words: ['lightning', 'receptor', 'burn', 'storm', 'tip'], firstSlice: 3 },
];

export function buildScenario(seed = 11, groups: ScenarioGroup[] = defaultGroups, dim = 6): ReviewScenario {
  const random = new SeededRandom(seed);
  const nodeCount = groups.reduce((sum, g) => sum + g.size, 0);
  const classNames = groups.filter((g) => g.className).map((g) => g.className as string);
  const nodeIds: string[] = [];
  const nodeText: string[] = [];
  const nodeSlice = new Int32Array(nodeCount);
  const labels = new Int32Array(nodeCount).fill(-1);
  const predictedClass = new Int32Array(nodeCount).fill(-1);
  const novelty = new Float32Array(nodeCount);
  const embeddings = new Float32Array(nodeCount * dim);
  const groupNodes: Int32Array[] = [];
  const rejected: number[] = [];
  let node = 0;
  groups.forEach((group, g) => {
    const mean = Array.from({ length: dim }, () => random.normal() * 4);
    const classIndex = group.className ? classNames.indexOf(group.className) : -1;
    const start = node;
    for (let i = 0; i < group.size; i++, node++) {
      nodeIds.push(`n${String(node).padStart(5, '0')}`);
      const words = [0, 1, 2].map(() => group.words[random.int(group.words.length)]);
      nodeText.push(`${words.join(' ')} seen on turbine T${1 + random.int(40)}`);
      const first = group.firstSlice ?? 0;
      nodeSlice[node] = first + random.int(sliceKeys.length - first);
      for (let d = 0; d < dim; d++) embeddings[node * dim + d] = mean[d] + random.normal();
      if (classIndex >= 0) {
        predictedClass[node] = classIndex;
        if (random.next() < 0.6) labels[node] = classIndex;
        novelty[node] = random.next() * 0.2;
      } else {
        novelty[node] = 0.5 + random.next() * 0.5;
        rejected.push(node);
      }
    }
    groupNodes.push(Int32Array.from({ length: group.size }, (_, i) => start + i));
    void g;
  });
  // Three links inside the group per node, and one link in five to a node of another group.
  const source: number[] = [];
  const target: number[] = [];
  for (const members of groupNodes) {
    for (const u of members) {
      for (let k = 0; k < 3 && members.length > 1; k++) {
        const v = members[random.int(members.length)];
        if (v !== u) {
          source.push(u);
          target.push(v);
        }
      }
      if (random.next() < 0.2) {
        const v = random.int(nodeCount);
        if (v !== u) {
          source.push(u);
          target.push(v);
        }
      }
    }
  }
  const adjacency = buildAdjacency(
    nodeCount,
    { source: Int32Array.from(source), target: Int32Array.from(target), weight: null, count: source.length },
    true,
  );
  const context: ReviewContext = {
    dataset: 'wind-farm-review',
    slice: sliceKeys[sliceKeys.length - 1],
    runId: 'run-test-1',
    settingsHash: 'abc123',
    baseHashes: { 'labels.csv': 'f'.repeat(64) },
    nodeIds,
    nodeText,
    nodeSlice,
    sliceKeys,
    classNames,
    labels,
    predictedClass,
    novelty,
    adjacency,
    embeddings,
    embeddingDim: dim,
    seed,
  };
  return { context, groups: groupNodes, rejected: Int32Array.from(rejected) };
}

export function discoverScenario(scenario: ReviewScenario): DiscoveryResult {
  const { context } = scenario;
  return discoverCandidates({
    rejectedNodes: scenario.rejected,
    embeddings: context.embeddings,
    embeddingDim: context.embeddingDim,
    adjacency: context.adjacency,
    nodeText: context.nodeText,
    nodeSlice: context.nodeSlice,
    sliceKeys: context.sliceKeys,
    labels: context.labels,
    predictedClass: context.predictedClass,
    classNames: context.classNames,
    noveltyScore: context.novelty,
    seed: context.seed,
    kRange: [2, 5],
  });
}

/** The scenario's candidates as the review session takes them (largest first). */
export function scenarioCandidates(scenario: ReviewScenario): ReviewCandidate[] {
  return discoverScenario(scenario).candidates.map(fromDiscovery);
}

/**
 * One very large candidate (for the virtualised table): the first `memberCount` nodes of a big
 * unknown group `groupScale` times its size (with 2, a candidate of 5,000 reaches the 20,000-link cap).
 */
export function largeScenario(memberCount: number, groupScale = 1): { scenario: ReviewScenario; candidates: ReviewCandidate[] } {
  const scenario = buildScenario(5, [
    { size: 300, className: 'blade-crack', words: ['blade', 'crack', 'leading', 'edge', 'erosion'] },
    { size: 300, className: 'gearbox-wear', words: ['gearbox', 'bearing', 'oil', 'vibration', 'wear'] },
    { size: memberCount * groupScale, words: ['icing', 'frost', 'sensor', 'anemometer', 'cold', 'heater', 'rime'] },
  ]);
  return { scenario, candidates: [summariseMembers(scenario.context, 'c-large', scenario.groups[2].subarray(0, memberCount))] };
}
