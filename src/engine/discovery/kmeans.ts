// k-means over row-major Float32Array points (n × dim): k-means++ seeding, then Lloyd iterations.
import { SeededRandom } from '../util/random';
import { squaredDistanceBetweenRows, squaredDistanceF32, squaredDistanceToCentre } from './vectors';

export interface KMeansOptions {
  seed: number;
  /** Default 100. */
  maxIterations?: number;
  /** k × dim starting centres; when given, no k-means++ seeding is done and the seed is unused. */
  initialCentres?: Float32Array;
  /** Stop when no centre moves by more than this squared distance in one iteration. Default 1e-6. */
  tolerance?: number;
}

export interface KMeansResult {
  centres: Float32Array;
  assignment: Int32Array;
  /** Sum of squared distances of the points to their assigned centre. */
  inertia: number;
  iterations: number;
}

function pointCount(points: Float32Array, dim: number, k: number): number {
  if (!Number.isInteger(dim) || dim < 1) throw new Error(`k-means: dim must be a positive integer, got ${dim}`);
  if (points.length % dim !== 0) throw new Error(`k-means: ${points.length} values do not split into rows of ${dim}`);
  const n = points.length / dim;
  if (!Number.isInteger(k) || k < 1) throw new Error(`k-means: k must be a positive integer, got ${k}`);
  if (k > n) throw new Error(`k-means: k = ${k} is larger than the number of points (${n})`);
  return n;
}

/**
 * k-means++ seeding: the first centre is a uniformly chosen point, each next one a point drawn
 * with probability proportional to its squared distance to the nearest centre chosen so far.
 */
export function kmeansPlusPlusInit(points: Float32Array, dim: number, k: number, random: SeededRandom): Float32Array {
  const n = pointCount(points, dim, k);
  const centres = new Float32Array(k * dim);
  const nearestSquared = new Float64Array(n);
  let chosen = random.int(n);
  centres.set(points.subarray(chosen * dim, chosen * dim + dim), 0);
  for (let i = 0; i < n; i++) nearestSquared[i] = squaredDistanceF32(points, i, centres, 0, dim);
  for (let c = 1; c < k; c++) {
    let total = 0;
    for (let i = 0; i < n; i++) total += nearestSquared[i];
    // All points coincide with a centre already: any point is as good as another.
    chosen = total > 0 ? random.weightedIndex(nearestSquared) : random.int(n);
    centres.set(points.subarray(chosen * dim, chosen * dim + dim), c * dim);
    for (let i = 0; i < n; i++) {
      const d = squaredDistanceF32(points, i, centres, c, dim);
      if (d < nearestSquared[i]) nearestSquared[i] = d;
    }
  }
  return centres;
}

/** Index of the nearest centre (first one on ties) and its squared distance. */
function assignToNearest(
  points: Float32Array,
  n: number,
  dim: number,
  centres: Float64Array,
  k: number,
  assignment: Int32Array,
  distances: Float64Array,
): void {
  for (let i = 0; i < n; i++) {
    let best = -1;
    let bestDistance = Infinity;
    for (let c = 0; c < k; c++) {
      const d = squaredDistanceToCentre(points, i, centres, c, dim);
      if (d < bestDistance) {
        bestDistance = d;
        best = c;
      }
    }
    assignment[i] = best;
    distances[i] = bestDistance;
  }
}

/**
 * Lloyd's algorithm. One iteration assigns every point to its nearest centre, then moves each
 * centre to the mean of its points; it stops once no centre moved more than `tolerance`
 * (squared distance) or after maxIterations. The returned assignment is the last one made and
 * the centres are the means of that assignment. A centre left without points is moved to the
 * point farthest from its own centre, so that k groups stay in play.
 */
export function kmeans(points: Float32Array, dim: number, k: number, options: KMeansOptions): KMeansResult {
  const n = pointCount(points, dim, k);
  const maxIterations = options.maxIterations ?? 100;
  const tolerance = options.tolerance ?? 1e-6;
  if (!Number.isInteger(maxIterations) || maxIterations < 1)
    throw new Error(`k-means: maxIterations must be a positive integer, got ${maxIterations}`);
  let start = options.initialCentres;
  if (start) {
    if (start.length !== k * dim) throw new Error(`k-means: initialCentres has ${start.length} values, expected k × dim = ${k * dim}`);
  } else {
    start = kmeansPlusPlusInit(points, dim, k, new SeededRandom(options.seed));
  }
  let centres = Float64Array.from(start);
  let next = new Float64Array(k * dim);
  const counts = new Int32Array(k);
  const assignment = new Int32Array(n);
  const distances = new Float64Array(n);
  let iterations = 0;
  while (iterations < maxIterations) {
    iterations++;
    assignToNearest(points, n, dim, centres, k, assignment, distances);
    next.fill(0);
    counts.fill(0);
    for (let i = 0; i < n; i++) {
      const c = assignment[i];
      counts[c]++;
      const base = i * dim;
      const cb = c * dim;
      for (let d = 0; d < dim; d++) next[cb + d] += points[base + d];
    }
    let taken: Uint8Array | null = null;
    for (let c = 0; c < k; c++) {
      const cb = c * dim;
      if (counts[c] > 0) {
        for (let d = 0; d < dim; d++) next[cb + d] /= counts[c];
        continue;
      }
      taken ??= new Uint8Array(n);
      let farthest = -1;
      for (let i = 0; i < n; i++) if (!taken[i] && (farthest < 0 || distances[i] > distances[farthest])) farthest = i;
      taken[farthest] = 1;
      for (let d = 0; d < dim; d++) next[cb + d] = points[farthest * dim + d];
    }
    let converged = true;
    for (let c = 0; c < k && converged; c++) {
      if (squaredDistanceBetweenRows(next, c, centres, c, dim) > tolerance) converged = false;
    }
    const previous = centres;
    centres = next;
    next = previous;
    if (converged) break;
  }
  let inertia = 0;
  for (let i = 0; i < n; i++) inertia += squaredDistanceToCentre(points, i, centres, assignment[i], dim);
  return { centres: Float32Array.from(centres), assignment, inertia, iterations };
}

/** Assigns each point to its nearest centre (first one on ties). */
export function nearestCentre(points: Float32Array, dim: number, centres: Float32Array): Int32Array {
  const n = points.length / dim;
  const k = centres.length / dim;
  const assignment = new Int32Array(n);
  assignToNearest(points, n, dim, Float64Array.from(centres), k, assignment, new Float64Array(n));
  return assignment;
}
