// Row helpers over row-major matrices (n × dim) shared by the discovery modules.
import type { SeededRandom } from '../util/random';

/** Squared Euclidean distance between row i of a and row j of b. */
export function squaredDistanceBetweenRows(a: ArrayLike<number>, i: number, b: ArrayLike<number>, j: number, dim: number): number {
  let sum = 0;
  const ai = i * dim;
  const bj = j * dim;
  for (let d = 0; d < dim; d++) {
    const diff = a[ai + d] - b[bj + d];
    sum += diff * diff;
  }
  return sum;
}

// The two helpers below are the hot loops: each is only ever called with one pair of array types,
// which keeps V8's call sites monomorphic (a shared ArrayLike helper ran several times slower).

/** Squared distance between row i of a and row j of b, both Float32. */
export function squaredDistanceF32(a: Float32Array, i: number, b: Float32Array, j: number, dim: number): number {
  // Four running sums let the CPU overlap the additions (about 1.4x faster here at 64 dims).
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  const ai = i * dim;
  const bj = j * dim;
  let d = 0;
  for (; d + 3 < dim; d += 4) {
    const x0 = a[ai + d] - b[bj + d];
    const x1 = a[ai + d + 1] - b[bj + d + 1];
    const x2 = a[ai + d + 2] - b[bj + d + 2];
    const x3 = a[ai + d + 3] - b[bj + d + 3];
    s0 += x0 * x0;
    s1 += x1 * x1;
    s2 += x2 * x2;
    s3 += x3 * x3;
  }
  for (; d < dim; d++) {
    const x = a[ai + d] - b[bj + d];
    s0 += x * x;
  }
  return s0 + s1 + (s2 + s3);
}

/** Squared distance between Float32 point i and Float64 centre c. */
export function squaredDistanceToCentre(points: Float32Array, i: number, centres: Float64Array, c: number, dim: number): number {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  const pi = i * dim;
  const cc = c * dim;
  let d = 0;
  for (; d + 3 < dim; d += 4) {
    const x0 = points[pi + d] - centres[cc + d];
    const x1 = points[pi + d + 1] - centres[cc + d + 1];
    const x2 = points[pi + d + 2] - centres[cc + d + 2];
    const x3 = points[pi + d + 3] - centres[cc + d + 3];
    s0 += x0 * x0;
    s1 += x1 * x1;
    s2 += x2 * x2;
    s3 += x3 * x3;
  }
  for (; d < dim; d++) {
    const x = points[pi + d] - centres[cc + d];
    s0 += x * x;
  }
  return s0 + s1 + (s2 + s3);
}

/** Copies the given rows of a row-major matrix into a new compact matrix, in the given order. */
export function gatherRows(matrix: Float32Array, dim: number, rows: ArrayLike<number>): Float32Array {
  const out = new Float32Array(rows.length * dim);
  for (let r = 0; r < rows.length; r++) {
    const from = rows[r] * dim;
    out.set(matrix.subarray(from, from + dim), r * dim);
  }
  return out;
}

/** Mean of the given rows (Float64 so that large groups do not lose precision). */
export function meanOfRows(matrix: ArrayLike<number>, dim: number, rows: ArrayLike<number>): Float64Array {
  const mean = new Float64Array(dim);
  if (rows.length === 0) return mean;
  for (let r = 0; r < rows.length; r++) {
    const base = rows[r] * dim;
    for (let d = 0; d < dim; d++) mean[d] += matrix[base + d];
  }
  for (let d = 0; d < dim; d++) mean[d] /= rows.length;
  return mean;
}

/** A seeded sample of `size` distinct indices from [0, n), returned in ascending order. */
export function sampleIndices(n: number, size: number, random: SeededRandom): Int32Array {
  if (size >= n) {
    const all = new Int32Array(n);
    for (let i = 0; i < n; i++) all[i] = i;
    return all;
  }
  // Partial Fisher-Yates: only the first `size` positions are shuffled.
  const pool = new Int32Array(n);
  for (let i = 0; i < n; i++) pool[i] = i;
  for (let i = 0; i < size; i++) {
    const j = i + random.int(n - i);
    const tmp = pool[i];
    pool[i] = pool[j];
    pool[j] = tmp;
  }
  return pool.slice(0, size).sort();
}

/** Derives an independent seed for a sub-step, so that adding a step elsewhere does not shift this one's stream. */
export function deriveSeed(seed: number, ...parts: number[]): number {
  let h = (seed ^ 0x2545f491) >>> 0;
  for (const part of parts) {
    h = Math.imul(h ^ (part >>> 0), 0x9e3779b1) >>> 0;
    h = (h ^ (h >>> 15)) >>> 0;
  }
  return h;
}
