import { strict as assert } from 'node:assert';
import { SpmmPool, splitRowsByWork } from '../../src/engine/graph/parallelSpmm';
import { spmm } from '../../src/engine/graph/spmm';
import { SeededRandom } from '../../src/engine/util/random';
import { randomCsr, randomDense, randomGraphAdjacency } from './fixtures';

describe('SpmmPool', () => {
  let pool: SpmmPool;
  before(async () => {
    pool = await SpmmPool.create(3);
  });
  after(async () => {
    await pool.dispose();
  });

  it('gives exactly the single-thread result on a graph large enough to use the workers', async () => {
    const random = new SeededRandom(21);
    const a = randomGraphAdjacency(random, 3000, 20000);
    const dense = randomDense(random, 3000 * 48);
    const result = await pool.multiply(a, dense, 48);
    assert.ok(result.buffer instanceof SharedArrayBuffer, 'workers took part');
    // Same kernel, same order of additions within each row: bit-for-bit equal.
    assert.deepEqual(result, spmm(a, dense, 48));
    // A shared result fed back in (the second propagation step) and a repeated matrix.
    const again = await pool.multiply(a, result, 48);
    assert.deepEqual(again, spmm(a, spmm(a, dense, 48), 48));
  });

  it('handles rectangular matrices with empty rows and odd column counts', async () => {
    const random = new SeededRandom(22);
    const a = randomCsr(random, 5000, 700, 40);
    const dense = randomDense(random, 700 * 7);
    assert.deepEqual(await pool.multiply(a, dense, 7), spmm(a, dense, 7));
  });

  it('runs concurrent products without mixing them up', async () => {
    const random = new SeededRandom(23);
    const first = randomGraphAdjacency(random, 2000, 30000);
    const second = randomGraphAdjacency(random, 2500, 30000);
    const dense1 = randomDense(random, 2000 * 16);
    const dense2 = randomDense(random, 2500 * 16);
    const [r1, r2] = await Promise.all([pool.multiply(first, dense1, 16), pool.multiply(second, dense2, 16)]);
    assert.deepEqual(r1, spmm(first, dense1, 16));
    assert.deepEqual(r2, spmm(second, dense2, 16));
  });

  it('computes small products on the calling thread', async () => {
    const random = new SeededRandom(24);
    const a = randomCsr(random, 10, 10, 2);
    const dense = randomDense(random, 10 * 3);
    const result = await pool.multiply(a, dense, 3);
    assert.ok(!(result.buffer instanceof SharedArrayBuffer));
    assert.deepEqual(result, spmm(a, dense, 3));
  });

  it('rejects a dense input of the wrong size and use after dispose', async () => {
    const a = randomCsr(new SeededRandom(25), 4, 6, 2);
    await assert.rejects(pool.multiply(a, new Float32Array(3), 2), /SpmmPool.multiply: dense input has 3 values, needs 6 rows/);
    const shortLived = await SpmmPool.create(2);
    await shortLived.dispose();
    await assert.rejects(shortLived.multiply(a, new Float32Array(12), 2), /after dispose/);
  });
});

describe('splitRowsByWork', () => {
  it('balances non-zeros plus rows, not rows', () => {
    // Row lengths 10, 0, 0, 0, 0, 0, 0, 0, 0, 10: work 11 + 8 + 11 = 30, half = 15 is reached
    // at row 4 (rowPtr[4] + 4 = 10 + 4 = 14 < 15, rowPtr[5] + 5 = 15).
    const rowPtr = Int32Array.from([0, 10, 10, 10, 10, 10, 10, 10, 10, 10, 20]);
    assert.deepEqual(Array.from(splitRowsByWork(rowPtr, 10, 2)), [0, 5, 10]);
    // All work in the first row: the first range is that row alone.
    const skewed = Int32Array.from([0, 100, 100, 100, 100]);
    assert.deepEqual(Array.from(splitRowsByWork(skewed, 4, 2)), [0, 1, 4]);
  });

  it('produces non-decreasing bounds covering every row, also with more parts than rows', () => {
    const bounds = splitRowsByWork(Int32Array.from([0, 1, 2]), 2, 4);
    assert.equal(bounds[0], 0);
    assert.equal(bounds[4], 2);
    for (let i = 1; i < bounds.length; i++) assert.ok(bounds[i] >= bounds[i - 1]);
  });
});
