import { strict as assert } from 'node:assert';
// External reference: the npm package ml-kmeans (7.0.1), run on the same data from the same
// starting centres. Its Lloyd loop assigns to the nearest centre (first on ties), moves centres to
// the means and stops when no centre moved more than `tolerance` in squared distance, as ours does.
import { kmeans as referenceKmeans } from 'ml-kmeans';
import { kmeans, kmeansPlusPlusInit, nearestCentre } from '../../src/engine/discovery/kmeans';
import { SeededRandom } from '../../src/engine/util/random';

function blobs(seed: number, perBlob: number, blobCount: number, dim: number, spread: number): Float32Array {
  const random = new SeededRandom(seed);
  const points = new Float32Array(perBlob * blobCount * dim);
  for (let b = 0; b < blobCount; b++) {
    const mean = Array.from({ length: dim }, () => random.normal() * spread);
    for (let i = 0; i < perBlob; i++) {
      const row = (b * perBlob + i) * dim;
      for (let d = 0; d < dim; d++) points[row + d] = mean[d] + random.normal();
    }
  }
  return points;
}

function rows(flat: Float32Array, dim: number): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < flat.length; i += dim) out.push(Array.from(flat.subarray(i, i + dim)));
  return out;
}

function inertiaOf(data: number[][], centroids: number[][], clusters: number[]): number {
  let sum = 0;
  data.forEach((p, i) => p.forEach((x, d) => (sum += (x - centroids[clusters[i]][d]) ** 2)));
  return sum;
}

describe('discovery/kmeans', () => {
  for (const [seed, k, dim, spread] of [
    [11, 3, 5, 3],
    [12, 5, 8, 1.5],
    [13, 4, 2, 1],
  ] as const) {
    it(`matches ml-kmeans from the same k-means++ centres (seed ${seed}, k ${k}, dim ${dim}, overlap ${spread})`, () => {
      const points = blobs(seed, 60, k, dim, spread);
      const start = kmeansPlusPlusInit(points, dim, k, new SeededRandom(seed));
      const ours = kmeans(points, dim, k, { seed, initialCentres: start });
      const data = rows(points, dim);
      const theirs = referenceKmeans(data, k, { initialization: rows(start, dim) });
      const theirInertia = inertiaOf(data, theirs.centroids, theirs.clusters);
      assert.ok(Math.abs(ours.inertia - theirInertia) <= 1e-6 * theirInertia, `inertia ${ours.inertia} vs ${theirInertia}`);
      assert.deepEqual(Array.from(ours.assignment), theirs.clusters);
      assert.equal(ours.iterations, theirs.iterations);
      theirs.centroids.forEach((centre, c) => centre.forEach((x, d) => assert.ok(Math.abs(ours.centres[c * dim + d] - x) < 1e-5)));
    });
  }

  it('k-means++ picks k distinct data points, reproducibly for a seed', () => {
    const dim = 3;
    const points = blobs(5, 20, 4, dim, 4);
    const a = kmeansPlusPlusInit(points, dim, 4, new SeededRandom(99));
    const b = kmeansPlusPlusInit(points, dim, 4, new SeededRandom(99));
    assert.deepEqual(a, b);
    const data = rows(points, dim).map((r) => r.join(','));
    const chosen = rows(a, dim).map((r) => r.join(','));
    for (const c of chosen) assert.ok(data.includes(c), 'every centre is a data point');
    assert.equal(new Set(chosen).size, 4);
  });

  it('on well separated blobs, every blob ends in its own group', () => {
    const dim = 4;
    const points = blobs(21, 30, 3, dim, 20);
    const result = kmeans(points, dim, 3, { seed: 1 });
    for (let b = 0; b < 3; b++) {
      const labels = new Set(Array.from(result.assignment.subarray(b * 30, b * 30 + 30)));
      assert.equal(labels.size, 1);
    }
    assert.deepEqual(nearestCentre(points, dim, result.centres), result.assignment);
  });

  it('rejects k larger than the number of points, and a ragged matrix', () => {
    assert.throws(() => kmeans(new Float32Array(6), 2, 4, { seed: 1 }), /larger than the number of points/);
    assert.throws(() => kmeans(new Float32Array(5), 2, 1, { seed: 1 }), /do not split into rows/);
  });

  it('keeps k groups when all points coincide but one', () => {
    const points = Float32Array.from([0, 0, 0, 0, 0, 0, 5, 5]);
    const result = kmeans(points, 2, 2, { seed: 3 });
    assert.equal(result.assignment[3] !== result.assignment[0], true);
    assert.ok(result.inertia < 1e-12);
  });
});
