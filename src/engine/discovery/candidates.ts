// Discovery: group the rejected nodes into candidate new classes for a curator to judge.
//  1. k-means++ / Lloyd on the rejected nodes' embeddings, k chosen by the best mean silhouette
//     over kRange (default 2..10, capped by the number of points); see chooseK.ts for sampling.
//  2. Groups that the graph links as densely as they are linked inside are merged (graphMerge.ts).
//  3. Nodes with a negative silhouette in the final grouping and no rejected neighbour are set
//     aside as "scattered": they fit their group worse than another and nothing ties them to it.
//     Groups left with fewer than minCandidateSize members are scattered too.
//  4. Each remaining group becomes a candidate with what a curator needs to judge it; ids are
//     kept across runs (stableIds.ts).
// With fewer than 2·kMin rejected nodes there is nothing to choose k from: they form one
// candidate when there are at least minCandidateSize of them, none otherwise.
import type { CsrMatrix } from '../graph/csr';
import { SeededRandom } from '../util/random';
import { chooseGroupCount } from './chooseK';
import { classTfidfTopTerms, type WeightedTerm } from './ctfidf';
import { classGeometry, dominantNeighbourClass, nearestClass, type ClassGeometry } from './drift';
import { mergeLinkedGroups } from './graphMerge';
import { silhouetteFromDistances, silhouetteValues, silhouetteValuesAgainstReference } from './silhouette';
import { assignStableIds } from './stableIds';
import { deriveSeed, gatherRows, meanOfRows, sampleIndices, squaredDistanceBetweenRows } from './vectors';

export interface CandidateInput {
  /** Node indices of the rejected nodes (distinct). */
  rejectedNodes: Int32Array;
  /** Row-major nodeCount × embeddingDim: row i is node i's embedding. */
  embeddings: Float32Array;
  embeddingDim: number;
  /** nodeCount × nodeCount; one-hop neighbours are a row's entries, so pass the symmetric adjacency for undirected graphs. */
  adjacency: CsrMatrix;
  nodeText: string[];
  nodeSlice: Int32Array;
  sliceKeys: string[];
  /** Curated label of each node (index into classNames), −1 for none. */
  labels: Int32Array;
  /** Model's class for each node (−1 for none); used for unlabelled, non-rejected neighbours. */
  predictedClass: Int32Array;
  classNames: string[];
  noveltyScore: Float32Array;
  /** classCount × dim, mean embedding of each known class's labelled nodes; computed from labels when absent. */
  knownClassCentroids?: Float32Array;
  seed: number;
  /** Inclusive range of k tried; default [2, 10]. */
  kRange?: [number, number];
  /** Candidates of the last run, for stable ids and carried decisions. */
  previous?: Candidate[];
  /** Smallest group kept as a candidate; default 3. */
  minCandidateSize?: number;
  /** Above this many rejected nodes, k is chosen on a sample; default 5,000. */
  sampleThreshold?: number;
  /** Sample size for silhouettes and for choosing k on large inputs; default 2,000. */
  silhouetteSampleSize?: number;
  /** Up to this many rejected nodes, per-node silhouettes are exact; above, measured against a sample of silhouetteReferenceSize; default 2,000. */
  exactSilhouetteLimit?: number;
  /** Reference sample for per-node silhouettes above exactSilhouetteLimit; default 500. */
  silhouetteReferenceSize?: number;
  /** See graphMerge.ts; defaults 0.5 and 4. */
  mergeDensityRatio?: number;
  minMergeLinks?: number;
  /** Terms reported per candidate; default 10. */
  topTermCount?: number;
}

export interface Candidate {
  id: string;
  /** Node indices, ascending. */
  members: Int32Array;
  size: number;
  /** Members per slice, every slice in time order (the emergence curve). */
  sliceCounts: { slice: string; count: number }[];
  topTerms: WeightedTerm[];
  /** The (up to) 5 members nearest the candidate's centre (mean embedding). */
  nearestMembers: { node: number; distance: number; text: string }[];
  /** Curated labels among the distinct one-hop neighbours of the members, most frequent first. */
  neighbourClasses: { className: string; count: number }[];
  /** Links from members to nodes of each class: curated label, else predicted class when that node is not rejected. */
  edgesToClasses: { className: string; edges: number }[];
  /** Mean silhouette of the members in the grouping after merging (−1..1; higher = better separated; 0 when there is only one group). */
  cohesion: number;
  /** Links among members / (size · (size − 1)); 1 when every member links to every other. */
  internalEdgeDensity: number;
  meanNovelty: number;
  nearestKnownClass: { className: string; distance: number } | null;
  /** See drift.ts for the rule. */
  looksLikeDrift: boolean;
  /** The class it seems to have drifted from, when looksLikeDrift. */
  driftTowards: string | null;
  decision?: unknown;
}

export interface DiscoveryResult {
  /** Largest first. */
  candidates: Candidate[];
  /** Rejected nodes in no candidate, ascending. */
  scattered: Int32Array;
  /** k chosen by silhouette (before graph merging); 1 when too few nodes to choose, 0 when none. */
  chosenK: number;
  silhouetteByK: { k: number; silhouette: number }[];
  /** Groups after graph merging (before scattered nodes and small groups are removed). */
  groupCountAfterMerge: number;
  /** Silhouette of each rejected node (rejectedNodes order) in the grouping after merging. */
  silhouettes: Float32Array;
}

const nearestMemberCount = 5;
const backgroundTextSample = 2000;

function validate(input: CandidateInput): number {
  const nodeCount = input.labels.length;
  const dim = input.embeddingDim;
  const problems: string[] = [];
  const expectLength = (name: string, length: number, expected: number): void => {
    if (length !== expected) problems.push(`${name} has ${length} entries, expected ${expected}`);
  };
  if (!Number.isInteger(dim) || dim < 1) problems.push(`embeddingDim must be a positive integer, got ${dim}`);
  else expectLength(`embeddings (nodeCount ${nodeCount} × embeddingDim ${dim})`, input.embeddings.length, nodeCount * dim);
  expectLength('nodeText', input.nodeText.length, nodeCount);
  expectLength('nodeSlice', input.nodeSlice.length, nodeCount);
  expectLength('predictedClass', input.predictedClass.length, nodeCount);
  expectLength('noveltyScore', input.noveltyScore.length, nodeCount);
  if (input.adjacency.rowCount !== nodeCount) problems.push(`adjacency has ${input.adjacency.rowCount} rows, expected ${nodeCount}`);
  const seen = new Uint8Array(nodeCount);
  for (let r = 0; r < input.rejectedNodes.length; r++) {
    const node = input.rejectedNodes[r];
    if (node < 0 || node >= nodeCount) problems.push(`rejectedNodes[${r}] = ${node} is not a node index (0..${nodeCount - 1})`);
    else if (seen[node]) problems.push(`rejectedNodes[${r}] = ${node} is listed twice`);
    else seen[node] = 1;
    if (problems.length > 10) break;
  }
  for (let i = 0; i < nodeCount; i++) {
    const slice = input.nodeSlice[i];
    if (slice < 0 || slice >= input.sliceKeys.length) {
      problems.push(`nodeSlice[${i}] = ${slice} is not a slice index (0..${input.sliceKeys.length - 1})`);
      break;
    }
  }
  const [kMin, kMax] = input.kRange ?? [2, 10];
  if (!Number.isInteger(kMin) || !Number.isInteger(kMax) || kMin < 2 || kMax < kMin)
    problems.push(`kRange must be integers with 2 ≤ min ≤ max, got [${kMin}, ${kMax}]`);
  if (problems.length > 0) throw new Error(`discoverCandidates: ${problems.join('; ')}`);
  return nodeCount;
}

/** Which rejected items have at least one rejected neighbour (links in either direction count). */
function rejectedNeighbourFlags(adjacency: CsrMatrix, rejected: Int32Array, itemOfNode: Int32Array): Uint8Array {
  const flags = new Uint8Array(rejected.length);
  for (let i = 0; i < rejected.length; i++) {
    const node = rejected[i];
    for (let e = adjacency.rowPtr[node]; e < adjacency.rowPtr[node + 1]; e++) {
      const j = itemOfNode[adjacency.colIndex[e]];
      if (j >= 0 && j !== i) {
        flags[i] = 1;
        flags[j] = 1;
      }
    }
  }
  return flags;
}

function countsByName(counts: Map<number, number>, classNames: string[]): { className: string; count: number }[] {
  return [...counts.entries()]
    .map(([c, count]) => ({ className: classNames[c] ?? `class ${c}`, count }))
    .sort((x, y) => y.count - x.count || (x.className < y.className ? -1 : x.className > y.className ? 1 : 0));
}

interface Describer {
  input: CandidateInput;
  isRejected: Uint8Array;
  geometry: ClassGeometry;
  silhouettes: Float32Array;
  itemOfNode: Int32Array;
}

function describe(members: Int32Array, ctx: Describer, topTerms: WeightedTerm[]): Omit<Candidate, 'id' | 'decision'> {
  const { input, isRejected, geometry } = ctx;
  const dim = input.embeddingDim;
  const classCount = input.classNames.length;
  const centre = meanOfRows(input.embeddings, dim, members);
  const sliceTotals = new Int32Array(input.sliceKeys.length);
  let cohesion = 0;
  let novelty = 0;
  const memberDistances: { node: number; distance: number }[] = [];
  for (let m = 0; m < members.length; m++) {
    const node = members[m];
    sliceTotals[input.nodeSlice[node]]++;
    cohesion += ctx.silhouettes[ctx.itemOfNode[node]];
    novelty += input.noveltyScore[node];
    memberDistances.push({ node, distance: Math.sqrt(squaredDistanceBetweenRows(input.embeddings, node, centre, 0, dim)) });
  }
  memberDistances.sort((x, y) => x.distance - y.distance || x.node - y.node);
  const isMember = new Set<number>(members);
  const neighbourLabels = new Map<number, number>();
  const linksToClasses = new Map<number, number>();
  const neighboursSeen = new Set<number>();
  let internalLinks = 0;
  for (let m = 0; m < members.length; m++) {
    const node = members[m];
    for (let e = input.adjacency.rowPtr[node]; e < input.adjacency.rowPtr[node + 1]; e++) {
      const other = input.adjacency.colIndex[e];
      if (other === node) continue;
      if (isMember.has(other)) internalLinks++;
      const curated = input.labels[other];
      if (curated >= 0 && !neighboursSeen.has(other)) {
        neighboursSeen.add(other);
        neighbourLabels.set(curated, (neighbourLabels.get(curated) ?? 0) + 1);
      }
      const linkedClass = curated >= 0 ? curated : !isRejected[other] ? input.predictedClass[other] : -1;
      if (linkedClass >= 0) linksToClasses.set(linkedClass, (linksToClasses.get(linkedClass) ?? 0) + 1);
    }
  }
  const nearest = nearestClass(geometry, centre, dim);
  let driftClass = -1;
  if (nearest && nearest.distance <= geometry.spreads[nearest.classIndex]) driftClass = nearest.classIndex;
  if (driftClass < 0) driftClass = dominantNeighbourClass(input.adjacency, members, input.labels, classCount);
  const size = members.length;
  return {
    members,
    size,
    sliceCounts: input.sliceKeys.map((slice, s) => ({ slice, count: sliceTotals[s] })),
    topTerms,
    nearestMembers: memberDistances
      .slice(0, nearestMemberCount)
      .map(({ node, distance }) => ({ node, distance, text: input.nodeText[node] })),
    neighbourClasses: countsByName(neighbourLabels, input.classNames),
    edgesToClasses: countsByName(linksToClasses, input.classNames).map(({ className, count }) => ({ className, edges: count })),
    cohesion: size > 0 ? cohesion / size : 0,
    internalEdgeDensity: size > 1 ? internalLinks / (size * (size - 1)) : 0,
    meanNovelty: size > 0 ? novelty / size : 0,
    nearestKnownClass: nearest ? { className: input.classNames[nearest.classIndex], distance: nearest.distance } : null,
    looksLikeDrift: driftClass >= 0,
    driftTowards: driftClass >= 0 ? input.classNames[driftClass] : null,
  };
}

interface Grouping {
  assignment: Int32Array;
  groupCount: number;
  chosenK: number;
  silhouetteByK: { k: number; silhouette: number }[];
  allPointDistances: Float32Array | null;
}

/** Initial grouping of the rejected items: k by silhouette, then graph merging. */
function groupRejected(input: CandidateInput, points: Float32Array): Grouping {
  const n = input.rejectedNodes.length;
  const kRange = input.kRange ?? [2, 10];
  if (n < 2 * kRange[0])
    return { assignment: new Int32Array(n), groupCount: n > 0 ? 1 : 0, chosenK: n > 0 ? 1 : 0, silhouetteByK: [], allPointDistances: null };
  const selection = chooseGroupCount(points, input.embeddingDim, kRange, input.seed, {
    sampleThreshold: input.sampleThreshold,
    silhouetteSampleSize: input.silhouetteSampleSize,
  });
  const merged = mergeLinkedGroups(input.adjacency, input.rejectedNodes, selection.result.assignment, selection.k, {
    mergeDensityRatio: input.mergeDensityRatio,
    minMergeLinks: input.minMergeLinks,
  });
  return {
    assignment: merged.assignment,
    groupCount: merged.groupCount,
    chosenK: selection.k,
    silhouetteByK: selection.silhouetteByK,
    allPointDistances: selection.allPointDistances,
  };
}

export function discoverCandidates(input: CandidateInput): DiscoveryResult {
  const nodeCount = validate(input);
  const dim = input.embeddingDim;
  const rejected = input.rejectedNodes;
  const n = rejected.length;
  const minCandidateSize = input.minCandidateSize ?? 3;
  const points = gatherRows(input.embeddings, dim, rejected);
  const { assignment, groupCount, chosenK, silhouetteByK, allPointDistances } = groupRejected(input, points);

  let silhouettes: Float32Array;
  if (groupCount < 2) silhouettes = new Float32Array(n);
  else if (allPointDistances) silhouettes = silhouetteFromDistances(allPointDistances, n, assignment, groupCount);
  else if (n <= (input.exactSilhouetteLimit ?? 2000)) silhouettes = silhouetteValues(points, dim, assignment, groupCount);
  else {
    const reference = sampleIndices(n, input.silhouetteReferenceSize ?? 500, new SeededRandom(deriveSeed(input.seed, 3)));
    silhouettes = silhouetteValuesAgainstReference(points, dim, assignment, groupCount, reference);
  }

  const itemOfNode = new Int32Array(nodeCount).fill(-1);
  const isRejected = new Uint8Array(nodeCount);
  for (let i = 0; i < n; i++) {
    itemOfNode[rejected[i]] = i;
    isRejected[rejected[i]] = 1;
  }
  const linked = rejectedNeighbourFlags(input.adjacency, rejected, itemOfNode);
  const finalGroup = Int32Array.from(assignment);
  for (let i = 0; i < n; i++) if (silhouettes[i] < 0 && !linked[i]) finalGroup[i] = -1;
  const groupMembers: number[][] = Array.from({ length: groupCount }, () => []);
  for (let i = 0; i < n; i++) if (finalGroup[i] >= 0) groupMembers[finalGroup[i]].push(rejected[i]);
  const kept = groupMembers.filter((members) => members.length >= minCandidateSize).map((members) => Int32Array.from(members).sort());
  kept.sort((x, y) => y.length - x.length || x[0] - y[0]);
  const inCandidate = new Uint8Array(nodeCount);
  for (const members of kept) for (const node of members) inCandidate[node] = 1;
  const scattered = Int32Array.from(rejected.filter((node) => !inCandidate[node])).sort();

  const groupTexts = kept.map((members) => Array.from(members, (node) => input.nodeText[node]));
  // The known part of the graph as more groups, one per known class (its labelled nodes) and one
  // for the unlabelled rest, so that words common everywhere rank low and words of one known
  // class do not pass for a candidate's own.
  const backgroundGroups: number[][] = Array.from({ length: input.classNames.length + 1 }, () => []);
  for (let node = 0; node < nodeCount; node++) {
    if (isRejected[node]) continue;
    const label = input.labels[node];
    backgroundGroups[label >= 0 && label < input.classNames.length ? label : input.classNames.length].push(node);
  }
  backgroundGroups.forEach((nodes, b) => {
    if (nodes.length === 0) return;
    const sample = sampleIndices(nodes.length, backgroundTextSample, new SeededRandom(deriveSeed(input.seed, 4 + b)));
    groupTexts.push(Array.from(sample, (s) => input.nodeText[nodes[s]]));
  });
  const terms = classTfidfTopTerms(groupTexts, input.topTermCount ?? 10);
  const geometry = classGeometry(input.embeddings, dim, input.labels, input.classNames.length, input.knownClassCentroids);
  const ctx: Describer = { input, isRejected, geometry, silhouettes, itemOfNode };
  const described = kept.map((members, g) => describe(members, ctx, terms[g]));
  const identities = assignStableIds(kept, input.previous);
  const candidates: Candidate[] = described.map((d, g) => {
    const { id, decision } = identities[g];
    return decision === undefined ? { id, ...d } : { id, ...d, decision };
  });
  return { candidates, scattered, chosenK, silhouetteByK, groupCountAfterMerge: groupCount, silhouettes };
}
