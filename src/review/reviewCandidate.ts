// A candidate as the review session holds it: discovery's description, or one worked out here
// for candidates the curator made by merging or splitting.
import type { Candidate } from '../engine/discovery/candidates';
import { classTfidfTopTerms, type WeightedTerm } from '../engine/discovery/ctfidf';
import { dominantNeighbourClass } from '../engine/discovery/drift';
import { kmeans } from '../engine/discovery/kmeans';
import { deriveSeed, gatherRows, meanOfRows, sampleIndices, squaredDistanceBetweenRows } from '../engine/discovery/vectors';
import { SeededRandom } from '../engine/util/random';
import type { ReviewContext } from './reviewContext';

export interface ReviewCandidate {
  id: string;
  /** Node indices, ascending. */
  members: Int32Array;
  sliceCounts: { slice: string; count: number }[];
  topTerms: WeightedTerm[];
  nearestMembers: { node: number; distance: number; text: string }[];
  neighbourClasses: { className: string; count: number }[];
  meanNovelty: number;
  /** From discovery; null for candidates made in review. */
  cohesion: number | null;
  looksLikeDrift: boolean;
  driftTowards: string | null;
}

const nearestMemberCount = 5;
const topTermCount = 10;
/** Non-member texts compared against, so that words common everywhere rank low (as discovery does). */
const backgroundTextSample = 2000;

export function fromDiscovery(candidate: Candidate): ReviewCandidate {
  return {
    id: candidate.id,
    members: Int32Array.from(candidate.members).sort(),
    sliceCounts: candidate.sliceCounts.map((s) => ({ ...s })),
    topTerms: candidate.topTerms.map((t) => ({ ...t })),
    nearestMembers: candidate.nearestMembers.map((m) => ({ ...m })),
    neighbourClasses: candidate.neighbourClasses.map((c) => ({ ...c })),
    meanNovelty: candidate.meanNovelty,
    cohesion: candidate.cohesion,
    looksLikeDrift: candidate.looksLikeDrift,
    driftTowards: candidate.driftTowards,
  };
}

/**
 * Describes a set of members made during review. Drift uses discovery's neighbourhood sign only
 * (its position sign needs embeddings of the labelled nodes, which a review context lacks).
 */
export function summariseMembers(context: ReviewContext, id: string, members: ArrayLike<number>): ReviewCandidate {
  const sorted = Int32Array.from(members).sort();
  const dim = context.embeddingDim;
  const sliceTotals = new Int32Array(context.sliceKeys.length);
  const isMember = new Set<number>(sorted);
  let novelty = 0;
  for (const node of sorted) {
    sliceTotals[context.nodeSlice[node]]++;
    novelty += context.novelty[node];
  }
  const centre = meanOfRows(context.embeddings, dim, sorted);
  const nearestMembers = Array.from(sorted, (node) => ({
    node,
    distance: Math.sqrt(squaredDistanceBetweenRows(context.embeddings, node, centre, 0, dim)),
    text: context.nodeText[node],
  }))
    .sort((a, b) => a.distance - b.distance || a.node - b.node)
    .slice(0, nearestMemberCount);
  const neighbourCounts = new Map<number, number>();
  const seen = new Set<number>();
  const { rowPtr, colIndex } = context.adjacency;
  for (const node of sorted) {
    for (let e = rowPtr[node]; e < rowPtr[node + 1]; e++) {
      const other = colIndex[e];
      const label = context.labels[other];
      if (other === node || label < 0 || seen.has(other)) continue;
      seen.add(other);
      neighbourCounts.set(label, (neighbourCounts.get(label) ?? 0) + 1);
    }
  }
  const neighbourClasses = [...neighbourCounts.entries()]
    .map(([c, count]) => ({ className: context.classNames[c], count }))
    .sort((a, b) => b.count - a.count || (a.className < b.className ? -1 : a.className > b.className ? 1 : 0));
  const others: number[] = [];
  for (let node = 0; node < context.nodeIds.length; node++) if (!isMember.has(node)) others.push(node);
  const background = sampleIndices(
    others.length,
    Math.min(backgroundTextSample, others.length),
    new SeededRandom(deriveSeed(context.seed, 4)),
  );
  const [topTerms] = classTfidfTopTerms(
    [Array.from(sorted, (node) => context.nodeText[node]), Array.from(background, (s) => context.nodeText[others[s]])],
    topTermCount,
  );
  const drift = dominantNeighbourClass(context.adjacency, sorted, context.labels, context.classNames.length);
  return {
    id,
    members: sorted,
    sliceCounts: context.sliceKeys.map((slice, s) => ({ slice, count: sliceTotals[s] })),
    topTerms,
    nearestMembers,
    neighbourClasses,
    meanNovelty: sorted.length > 0 ? novelty / sorted.length : 0,
    cohesion: null,
    looksLikeDrift: drift >= 0,
    driftTowards: drift >= 0 ? context.classNames[drift] : null,
  };
}

/**
 * Re-groups a candidate's members into `parts` groups by k-means on their embeddings (seeded by
 * the context seed and the candidate id, so the same candidate always splits the same way).
 * Largest part first; each part ascending.
 */
export function splitMembers(context: ReviewContext, candidateId: string, members: Int32Array, parts: number): Int32Array[] {
  if (!Number.isInteger(parts) || parts < 2) throw new Error(`split: parts must be an integer ≥ 2, got ${parts}`);
  if (members.length < parts)
    throw new Error(`split: candidate ${candidateId} has ${members.length} member(s), too few to split into ${parts} parts`);
  const dim = context.embeddingDim;
  const points = gatherRows(context.embeddings, dim, members);
  const result = kmeans(points, dim, parts, { seed: deriveSeed(context.seed, ...Array.from(candidateId, (ch) => ch.charCodeAt(0))) });
  const groups: number[][] = Array.from({ length: parts }, () => []);
  for (let i = 0; i < members.length; i++) groups[result.assignment[i]].push(members[i]);
  return groups
    .filter((g) => g.length > 0)
    .map((g) => Int32Array.from(g).sort())
    .sort((a, b) => b.length - a.length || a[0] - b[0]);
}
