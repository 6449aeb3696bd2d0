import assert from 'node:assert/strict';
import { SpmmPool } from '../../src/engine/graph/parallelSpmm';
import { precomputePropagation, precomputePropagationWith } from '../../src/engine/models/propagation';
import { karateWithIdentityFeatures } from './karateFixture';

describe('models/propagation [X, ÂX, Â²X]', () => {
  const club = karateWithIdentityFeatures();
  const n = club.inputs.nodeCount;

  /** Â = D^-1/2 (A + I) D^-1/2 as a dense matrix, from the definition. */
  function denseNormalized(): Float64Array {
    const a = new Float64Array(n * n);
    const { rowPtr, colIndex, values } = club.inputs.adjacency;
    for (let r = 0; r < n; r++) for (let k = rowPtr[r]; k < rowPtr[r + 1]; k++) a[r * n + colIndex[k]] = values[k];
    for (let i = 0; i < n; i++) a[i * n + i] += 1;
    const degree = Array.from({ length: n }, (_, i) => a.subarray(i * n, (i + 1) * n).reduce((s, v) => s + v, 0));
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) a[i * n + j] /= Math.sqrt(degree[i] * degree[j]);
    return a;
  }

  it('uses the published degrees of the club (instructor 16, officer 17 friends)', () => {
    // Source: Zachary (1977) via graphology-generators; node 0 has 16 ties, node 33 has 17.
    const { rowPtr } = club.inputs.adjacency;
    assert.equal(rowPtr[1] - rowPtr[0], 16);
    assert.equal(rowPtr[34] - rowPtr[33], 17);
  });

  it('with identity features, the blocks are I, Â and Â², row by row', () => {
    const p = precomputePropagation(club.inputs, 2);
    assert.equal(p.dim, 3 * n);
    const a = denseNormalized();
    const a2 = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) for (let j = 0; j < n; j++) a2[i * n + j] += a[i * n + k] * a[k * n + j];
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        assert.equal(p.data[i * 3 * n + j], i === j ? 1 : 0);
        assert.ok(Math.abs(p.data[i * 3 * n + n + j] - a[i * n + j]) < 1e-6);
        assert.ok(Math.abs(p.data[i * 3 * n + 2 * n + j] - a2[i * n + j]) < 1e-6);
      }
    }
    // Â's rows for a node and its self-loop: Â[0][0] = 1 / (16 + 1).
    assert.ok(Math.abs(p.data[n] - 1 / 17) < 1e-7);
  });

  it('the worker-pool variant gives the same numbers', async () => {
    const pool = await SpmmPool.create(2);
    try {
      const parallel = await precomputePropagationWith(pool, club.inputs, 2);
      assert.deepEqual(Array.from(parallel.data), Array.from(precomputePropagation(club.inputs, 2).data));
    } finally {
      await pool.dispose();
    }
  });

  it('rejects a negative number of steps', () => {
    assert.throws(() => precomputePropagation(club.inputs, -1), /whole number ≥ 0, got -1/);
  });
});
