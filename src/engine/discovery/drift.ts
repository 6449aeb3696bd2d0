// Does a candidate look like a known class that drifted, rather than a new one?
// Two signs, either one is enough:
//  1. Position: the candidate's centre lies within the typical spread of its nearest known class,
//     i.e. distance(centre, class centroid) ≤ that class's mean distance of its labelled nodes to
//     its centroid. A new class should sit outside every known class's usual radius.
//  2. Neighbourhood: more than half of the members have that one class as the most common
//     curated label among their one-hop neighbours (members without labelled neighbours count
//     against it).
import type { CsrMatrix } from '../graph/csr';
import { squaredDistanceBetweenRows } from './vectors';

export interface ClassGeometry {
  /** classCount × dim; a row of NaN for a class with no labelled node. */
  centroids: Float32Array;
  /** Mean distance of each class's labelled nodes to its centroid; NaN when unknown. */
  spreads: Float64Array;
}

/**
 * Centroids (given, or the mean embedding of each class's labelled nodes) and spreads. The
 * spread of a class needs at least two labelled nodes.
 */
export function classGeometry(
  embeddings: Float32Array,
  dim: number,
  labels: Int32Array,
  classCount: number,
  givenCentroids?: Float32Array,
): ClassGeometry {
  const counts = new Int32Array(classCount);
  for (let i = 0; i < labels.length; i++) if (labels[i] >= 0 && labels[i] < classCount) counts[labels[i]]++;
  let centroids: Float32Array;
  if (givenCentroids) {
    if (givenCentroids.length !== classCount * dim) {
      throw new Error(
        `discovery: knownClassCentroids has ${givenCentroids.length} values, expected classCount (${classCount}) × embeddingDim (${dim}) = ${classCount * dim}`,
      );
    }
    centroids = givenCentroids;
  } else {
    const sums = new Float64Array(classCount * dim);
    for (let i = 0; i < labels.length; i++) {
      const c = labels[i];
      if (c < 0 || c >= classCount) continue;
      for (let d = 0; d < dim; d++) sums[c * dim + d] += embeddings[i * dim + d];
    }
    centroids = new Float32Array(classCount * dim);
    for (let c = 0; c < classCount; c++) {
      for (let d = 0; d < dim; d++) centroids[c * dim + d] = counts[c] > 0 ? sums[c * dim + d] / counts[c] : NaN;
    }
  }
  const distanceSums = new Float64Array(classCount);
  for (let i = 0; i < labels.length; i++) {
    const c = labels[i];
    if (c < 0 || c >= classCount) continue;
    distanceSums[c] += Math.sqrt(squaredDistanceBetweenRows(embeddings, i, centroids, c, dim));
  }
  const spreads = new Float64Array(classCount);
  for (let c = 0; c < classCount; c++) spreads[c] = counts[c] >= 2 ? distanceSums[c] / counts[c] : NaN;
  return { centroids, spreads };
}

/** Nearest class centroid to a point (classes with unknown centroid skipped); null when none. */
export function nearestClass(
  geometry: ClassGeometry,
  centre: ArrayLike<number>,
  dim: number,
): { classIndex: number; distance: number } | null {
  const classCount = geometry.centroids.length / dim;
  let best: { classIndex: number; distance: number } | null = null;
  for (let c = 0; c < classCount; c++) {
    const squared = squaredDistanceBetweenRows(centre, 0, geometry.centroids, c, dim);
    if (!Number.isFinite(squared)) continue;
    const distance = Math.sqrt(squared);
    if (!best || distance < best.distance) best = { classIndex: c, distance };
  }
  return best;
}

/**
 * The class that is the most common curated label among the neighbours of more than half of the
 * members, or -1. Ties within one member's neighbourhood go to the lower class index.
 */
export function dominantNeighbourClass(adjacency: CsrMatrix, members: ArrayLike<number>, labels: Int32Array, classCount: number): number {
  const votes = new Int32Array(classCount);
  const local = new Int32Array(classCount);
  for (let m = 0; m < members.length; m++) {
    const node = members[m];
    local.fill(0);
    let any = false;
    for (let e = adjacency.rowPtr[node]; e < adjacency.rowPtr[node + 1]; e++) {
      const label = labels[adjacency.colIndex[e]];
      if (label >= 0 && label < classCount) {
        local[label]++;
        any = true;
      }
    }
    if (!any) continue;
    let top = 0;
    for (let c = 1; c < classCount; c++) if (local[c] > local[top]) top = c;
    votes[top]++;
  }
  for (let c = 0; c < classCount; c++) if (votes[c] * 2 > members.length) return c;
  return -1;
}
