// Silhouette of a partition under Euclidean distance.
// For point i in group A: a(i) = mean distance to the other members of A, b(i) = the smallest
// mean distance to the members of another non-empty group, s(i) = (b − a) / max(a, b).
// A point alone in its group has s = 0 (the usual convention). Points whose assignment is
// negative are left out (their value is NaN) and do not count as members of any group.
import { SeededRandom } from '../util/random';
import { sampleIndices, squaredDistanceF32 } from './vectors';

function checkShape(points: Float32Array, dim: number, assignment: Int32Array, k: number): number {
  if (points.length % dim !== 0) throw new Error(`silhouette: ${points.length} values do not split into rows of ${dim}`);
  const n = points.length / dim;
  if (assignment.length !== n) throw new Error(`silhouette: assignment has ${assignment.length} entries for ${n} points`);
  for (let i = 0; i < n; i++) {
    if (assignment[i] >= k) throw new Error(`silhouette: point ${i} is assigned to group ${assignment[i]}, but k = ${k}`);
  }
  return n;
}

/** Turns per-point sums of distances to each group into silhouette values. */
function valuesFromGroupSums(
  sums: Float64Array,
  assignment: Int32Array,
  k: number,
  sizes: ArrayLike<number>,
  ownSizeCorrection: number,
): Float32Array {
  const n = assignment.length;
  const out = new Float32Array(n);
  let nonEmptyGroups = 0;
  for (let c = 0; c < k; c++) if (sizes[c] > 0) nonEmptyGroups++;
  for (let i = 0; i < n; i++) {
    const own = assignment[i];
    if (own < 0) {
      out[i] = NaN;
      continue;
    }
    const ownCount = sizes[own] - ownSizeCorrection;
    if (ownCount <= 0 || nonEmptyGroups < 2) {
      out[i] = 0;
      continue;
    }
    const a = sums[i * k + own] / ownCount;
    let b = Infinity;
    for (let c = 0; c < k; c++) {
      if (c === own || sizes[c] === 0) continue;
      const meanDistance = sums[i * k + c] / sizes[c];
      if (meanDistance < b) b = meanDistance;
    }
    const scale = Math.max(a, b);
    out[i] = scale > 0 ? (b - a) / scale : 0;
  }
  return out;
}

function groupSizes(assignment: Int32Array, k: number): Int32Array {
  const sizes = new Int32Array(k);
  for (let i = 0; i < assignment.length; i++) if (assignment[i] >= 0) sizes[assignment[i]]++;
  return sizes;
}

/** Exact per-point silhouette values, O(n² · dim). */
export function silhouetteValues(points: Float32Array, dim: number, assignment: Int32Array, k: number): Float32Array {
  const n = checkShape(points, dim, assignment, k);
  const sums = new Float64Array(n * k);
  for (let i = 0; i < n; i++) {
    const gi = assignment[i];
    if (gi < 0) continue;
    for (let j = i + 1; j < n; j++) {
      const gj = assignment[j];
      if (gj < 0) continue;
      const d = Math.sqrt(squaredDistanceF32(points, i, points, j, dim));
      sums[i * k + gj] += d;
      sums[j * k + gi] += d;
    }
  }
  // A point's own group holds it too: a(i) averages over size − 1 others.
  return valuesFromGroupSums(sums, assignment, k, groupSizes(assignment, k), 1);
}

/** Mean of the finite values (NaN marks points left out). 0 when there are none. */
export function meanOfValues(values: Float32Array): number {
  let sum = 0;
  let count = 0;
  for (let i = 0; i < values.length; i++) {
    if (Number.isNaN(values[i])) continue;
    sum += values[i];
    count++;
  }
  return count > 0 ? sum / count : 0;
}

/** Exact mean silhouette over the assigned points. */
export function meanSilhouette(points: Float32Array, dim: number, assignment: Int32Array, k: number): number {
  return meanOfValues(silhouetteValues(points, dim, assignment, k));
}

/** Mean silhouette of a seeded sample of the points, computed within the sample (O(sampleSize² · dim)). */
export function sampledMeanSilhouette(
  points: Float32Array,
  dim: number,
  assignment: Int32Array,
  k: number,
  sampleSize: number,
  seed: number,
): number {
  const n = checkShape(points, dim, assignment, k);
  const sample = sampleIndices(n, sampleSize, new SeededRandom(seed));
  const distances = pairwiseDistances(points, dim, sample);
  const sampleAssignment = new Int32Array(sample.length);
  for (let s = 0; s < sample.length; s++) sampleAssignment[s] = assignment[sample[s]];
  return meanOfValues(silhouetteFromDistances(distances, sample.length, sampleAssignment, k));
}

/** Euclidean distances between the given rows: a full m × m matrix (Float32, m = rows.length). */
export function pairwiseDistances(points: Float32Array, dim: number, rows: ArrayLike<number>): Float32Array {
  const m = rows.length;
  const out = new Float32Array(m * m);
  for (let a = 0; a < m; a++) {
    for (let b = a + 1; b < m; b++) {
      const d = Math.sqrt(squaredDistanceF32(points, rows[a], points, rows[b], dim));
      out[a * m + b] = d;
      out[b * m + a] = d;
    }
  }
  return out;
}

/** Per-point silhouette from a precomputed m × m distance matrix (reused when trying several k). */
export function silhouetteFromDistances(distances: Float32Array, m: number, assignment: Int32Array, k: number): Float32Array {
  if (distances.length !== m * m) throw new Error(`silhouette: distance matrix has ${distances.length} entries, expected ${m} × ${m}`);
  if (assignment.length !== m) throw new Error(`silhouette: assignment has ${assignment.length} entries for ${m} points`);
  const sums = new Float64Array(m * k);
  for (let i = 0; i < m; i++) {
    if (assignment[i] < 0) continue;
    const row = i * m;
    const base = i * k;
    for (let j = 0; j < m; j++) {
      const gj = assignment[j];
      if (gj >= 0 && j !== i) sums[base + gj] += distances[row + j];
    }
  }
  return valuesFromGroupSums(sums, assignment, k, groupSizes(assignment, k), 1);
}

/**
 * Approximate per-point silhouette for large n, O(n · |reference| · dim): a(i) and b(i) are
 * mean distances to the reference points of each group instead of to all of its members
 * (unbiased estimates of the exact means when the reference is a uniform sample).
 */
export function silhouetteValuesAgainstReference(
  points: Float32Array,
  dim: number,
  assignment: Int32Array,
  k: number,
  reference: Int32Array,
): Float32Array {
  const n = checkShape(points, dim, assignment, k);
  const referenceSizes = new Int32Array(k);
  for (let r = 0; r < reference.length; r++) if (assignment[reference[r]] >= 0) referenceSizes[assignment[reference[r]]]++;
  const inReference = new Uint8Array(n);
  for (let r = 0; r < reference.length; r++) inReference[reference[r]] = 1;
  const sums = new Float64Array(n * k);
  for (let i = 0; i < n; i++) {
    if (assignment[i] < 0) continue;
    for (let r = 0; r < reference.length; r++) {
      const j = reference[r];
      const gj = assignment[j];
      if (gj < 0 || j === i) continue;
      sums[i * k + gj] += Math.sqrt(squaredDistanceF32(points, i, points, j, dim));
    }
  }
  // Each point's own-group count excludes itself only when it is one of the reference points.
  const out = new Float32Array(n);
  const inside = valuesFromGroupSums(sums, assignment, k, referenceSizes, 1);
  const outside = valuesFromGroupSums(sums, assignment, k, referenceSizes, 0);
  for (let i = 0; i < n; i++) out[i] = inReference[i] ? inside[i] : outside[i];
  return out;
}
