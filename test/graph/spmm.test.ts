import { strict as assert } from 'node:assert';
import { transpose } from '../../src/engine/graph/csr';
import { spmm, spmmTransposed } from '../../src/engine/graph/spmm';
import { SeededRandom } from '../../src/engine/util/random';
import { denseMatMul, denseTranspose, maxAbsDifference, randomCsr, randomDense, toDense } from './fixtures';

// Column counts that exercise the four-wide blocks and every remainder (0, 1, 2, 3).
const COLUMN_COUNTS = [1, 3, 4, 6, 7, 64];

function tolerance(reference: Float64Array): number {
  let largest = 1;
  for (const value of reference) largest = Math.max(largest, Math.abs(value));
  return 1e-5 * largest;
}

describe('spmm', () => {
  it('equals the dense product on a hand case', () => {
    // [[1, 0, 2], [0, 0, 0], [0, 3, 0]] · [[1, 2], [3, 4], [5, 6]] = [[11, 14], [0, 0], [9, 12]] (by hand).
    const a = {
      rowCount: 3,
      colCount: 3,
      rowPtr: Int32Array.from([0, 2, 2, 3]),
      colIndex: Int32Array.from([0, 2, 1]),
      values: Float32Array.from([1, 2, 3]),
    };
    assert.deepEqual(Array.from(spmm(a, Float32Array.from([1, 2, 3, 4, 5, 6]), 2)), [11, 14, 0, 0, 9, 12]);
  });

  for (const merged of [true, false]) {
    for (const columns of COLUMN_COUNTS) {
      it(`equals the dense product, ${columns} columns, ${merged ? 'merged rows' : 'unsorted rows with repeated entries'}`, () => {
        const random = new SeededRandom(100 + columns);
        const a = randomCsr(random, 57, 43, 5, merged);
        const dense = randomDense(random, 43 * columns);
        const expected = denseMatMul(toDense(a), 57, 43, dense, columns);
        const result = spmm(a, dense, columns);
        assert.equal(result.length, 57 * columns);
        assert.ok(maxAbsDifference(result, expected) < tolerance(expected));
      });
    }
  }

  it('overwrites a given output buffer, including rows with no entries', () => {
    const random = new SeededRandom(3);
    const a = randomCsr(random, 30, 30, 3);
    const dense = randomDense(random, 30 * 5);
    const out = new Float32Array(30 * 5).fill(123);
    const returned = spmm(a, dense, 5, out);
    assert.equal(returned, out);
    assert.ok(maxAbsDifference(out, denseMatMul(toDense(a), 30, 30, dense, 5)) < 1e-4);
  });

  it('names the operation and the sizes when the dense input is too small', () => {
    const a = randomCsr(new SeededRandom(1), 4, 6, 2);
    assert.throws(() => spmm(a, new Float32Array(5 * 2), 2), /spmm: dense input has 10 values, needs 6 rows × 2 columns = 12/);
    assert.throws(() => spmm(a, new Float32Array(12), 2, new Float32Array(3)), /output has 3 values, needs 4 rows/);
  });
});

describe('spmmTransposed', () => {
  for (const merged of [true, false]) {
    for (const columns of COLUMN_COUNTS) {
      it(`equals Aᵀ·H computed densely, ${columns} columns, ${merged ? 'merged rows' : 'repeated entries'}`, () => {
        const random = new SeededRandom(200 + columns);
        const a = randomCsr(random, 57, 43, 5, merged);
        const dense = randomDense(random, 57 * columns);
        const expected = denseMatMul(denseTranspose(toDense(a), 57, 43), 43, 57, dense, columns);
        const result = spmmTransposed(a, dense, columns);
        assert.equal(result.length, 43 * columns);
        assert.ok(maxAbsDifference(result, expected) < tolerance(expected));
        // Same as materialising the transpose with csr.transpose and multiplying.
        assert.ok(maxAbsDifference(result, spmm(transpose(a), dense, columns)) < tolerance(expected));
      });
    }
  }

  it('clears a reused output buffer before accumulating', () => {
    const random = new SeededRandom(8);
    const a = randomCsr(random, 20, 10, 3);
    const dense = randomDense(random, 20 * 4);
    const out = new Float32Array(10 * 4).fill(-7);
    spmmTransposed(a, dense, 4, out);
    assert.ok(maxAbsDifference(out, spmmTransposed(a, dense, 4)) === 0);
  });
});
