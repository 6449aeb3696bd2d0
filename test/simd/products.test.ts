import assert from 'node:assert/strict';
import * as tf from '@tensorflow/tfjs';
import { addTransposedProduct, gatherMatMul, matMul, matMulTransposedRight } from '../../src/engine/dense/matmul';
import type { CsrMatrix } from '../../src/engine/graph/csr';
import { spmm, spmmTransposed } from '../../src/engine/graph/spmm';
import { setSimdEnabled, simdAvailable } from '../../src/engine/simd/kernels';
import { initTensorflow } from '../../src/engine/tf/backend';
import {
  simdAddTransposedProduct,
  simdMatMulRows,
  simdMatMulTransposedRight,
  simdSpmm,
  simdSpmmTransposed,
} from '../../src/engine/simd/products';
import { SeededRandom } from '../../src/engine/util/random';
import { randomCsr, randomGraphAdjacency, toDense } from '../graph/fixtures';

/** The JavaScript kernels of dense/matmul.ts and graph/spmm.ts, with the SIMD routing switched off. */
function reference<T>(run: () => T): T {
  const previous = setSimdEnabled(false);
  try {
    return run();
  } finally {
    setSimdEnabled(previous);
  }
}

/** Random matrix with about `zeroShare` of its entries exactly 0 (so the kernels' zero skipping is exercised). */
function randomMatrix(random: SeededRandom, length: number, zeroShare = 0.2): Float32Array {
  return Float32Array.from({ length }, () => (random.next() < zeroShare ? 0 : random.normal()));
}

/**
 * Float32 summation error bound: each entry may differ by 1e-5 of the sum of its terms'
 * magnitudes (common practice: n·ε with ε = 2⁻²⁴ stays under 1e-5 for these inner sizes).
 */
function assertWithinRounding(actual: Float32Array, expected: Float32Array, magnitudes: Float64Array, what: string): void {
  assert.equal(actual.length, expected.length, `${what}: length`);
  for (let i = 0; i < expected.length; i++) {
    const allowed = 1e-5 * magnitudes[i] + 1e-30;
    assert.ok(Math.abs(actual[i] - expected[i]) <= allowed, `${what}, entry ${i}: ${actual[i]} vs ${expected[i]} (allowed ${allowed})`);
  }
}

/** Σ_k |a_ik|·|b_kj| for every entry of a·b. */
function productMagnitudes(a: Float32Array, b: Float32Array, rows: number, inner: number, columns: number): Float64Array {
  const out = new Float64Array(rows * columns);
  for (let i = 0; i < rows; i++)
    for (let k = 0; k < inner; k++)
      for (let j = 0; j < columns; j++) out[i * columns + j] += Math.abs(a[i * inner + k] * b[k * columns + j]);
  return out;
}

function transpose(m: Float32Array, rows: number, columns: number): Float32Array {
  const out = new Float32Array(m.length);
  for (let r = 0; r < rows; r++) for (let c = 0; c < columns; c++) out[c * rows + r] = m[r * columns + c];
  return out;
}

// Shapes around the kernels' blocks (4 rows × 8 columns, 4 inner rows, chunks of rows), with
// empty dimensions and the shapes training meets.
const SHAPES: Array<[rows: number, inner: number, columns: number]> = [
  [0, 5, 7],
  [5, 0, 7],
  [5, 7, 0],
  [1, 1, 1],
  [3, 5, 7],
  [4, 4, 8],
  [5, 9, 9],
  [9, 13, 17],
  [17, 3, 12],
  [37, 130, 64],
  [301, 64, 10],
  [600, 37, 5],
];

describe('SIMD kernels', () => {
  before(async () => {
    // Node 20 has WebAssembly SIMD; if a runtime lacked it, the routing tests would only test the fallback.
    assert.ok(simdAvailable(), 'WebAssembly SIMD is available in this Node.js');
    await initTensorflow();
  });

  it('matMul equals numpy.dot on its documented example', () => {
    // numpy.dot documentation: a = [[1, 0], [0, 1]], b = [[4, 1], [2, 2]] gives [[4, 1], [2, 2]].
    const out = new Float32Array(4);
    simdMatMulRows(Float32Array.from([1, 0, 0, 1]), null, Float32Array.from([4, 1, 2, 2]), 2, 2, out, 0, 2);
    assert.deepEqual(Array.from(out), [4, 1, 2, 2]);
  });

  for (const [rows, inner, columns] of SHAPES) {
    it(`matMul, gathered rows and row ranges equal the JS kernels, ${rows} × ${inner} · ${inner} × ${columns}`, () => {
      const random = new SeededRandom(rows * 1000 + inner * 10 + columns);
      const a = randomMatrix(random, rows * inner);
      const b = randomMatrix(random, inner * columns, 0);
      const magnitudes = productMagnitudes(a, b, rows, inner, columns);
      const expected = reference(() => matMul(a, b, rows, inner, columns));
      const actual = new Float32Array(rows * columns).fill(Number.NaN);
      simdMatMulRows(a, null, b, inner, columns, actual, 0, rows);
      assertWithinRounding(actual, expected, magnitudes, 'matMul');

      // Rows picked in reverse order, only the middle range written.
      const pick = Int32Array.from({ length: rows }, (_, r) => rows - 1 - r);
      const start = Math.floor(rows / 3);
      const end = rows - Math.floor(rows / 4);
      const expectedPicked = reference(() => gatherMatMul(a, pick, b, inner, columns, new Float32Array(rows * columns), start, end));
      const actualPicked = new Float32Array(rows * columns);
      simdMatMulRows(a, pick, b, inner, columns, actualPicked, start, end);
      const pickedMagnitudes = productMagnitudes(
        reference(() => gatherRows(a, pick, inner)),
        b,
        rows,
        inner,
        columns,
      );
      assertWithinRounding(actualPicked, expectedPicked, pickedMagnitudes, 'gatherMatMul');
    });

    it(`Aᵀ·G accumulates and G·Wᵀ equal the JS kernels, ${rows} × ${inner}, ${columns} columns`, () => {
      const random = new SeededRandom(rows * 7 + inner * 3 + columns);
      const a = randomMatrix(random, rows * inner);
      const g = randomMatrix(random, rows * columns, 0.3);
      const start = rows > 2 ? 1 : 0;
      const initial = randomMatrix(random, inner * columns, 0);
      const expected = reference(() => addTransposedProduct(a, null, g, inner, columns, initial.slice(), start, rows));
      const actual = initial.slice();
      simdAddTransposedProduct(a, null, g, inner, columns, actual, start, rows);
      const magnitudes = productMagnitudes(
        transpose(a.slice(start * inner), rows - start, inner),
        g.slice(start * columns),
        inner,
        rows - start,
        columns,
      );
      for (let i = 0; i < magnitudes.length; i++) magnitudes[i] += Math.abs(initial[i]);
      assertWithinRounding(actual, expected, magnitudes, 'addTransposedProduct');

      // G (rows × columns) · W (inner × columns)ᵀ.
      const w = randomMatrix(random, inner * columns, 0);
      const expectedBack = reference(() => matMulTransposedRight(g, w, rows, columns, inner));
      const actualBack = new Float32Array(rows * inner);
      simdMatMulTransposedRight(g, w, columns, inner, actualBack, 0, rows);
      assertWithinRounding(
        actualBack,
        expectedBack,
        productMagnitudes(g, transpose(w, inner, columns), rows, columns, inner),
        'matMulTransposedRight',
      );
    });
  }

  it('agrees with tfjs matMul with transposeA and transposeB', () => {
    const random = new SeededRandom(5);
    const [rows, inner, columns] = [45, 23, 19];
    const a = randomMatrix(random, rows * inner, 0);
    const g = randomMatrix(random, rows * columns, 0);
    const w = randomMatrix(random, inner * columns, 0);
    const aTg = tf.tidy(
      () => tf.matMul(tf.tensor2d(a, [rows, inner]), tf.tensor2d(g, [rows, columns]), true, false).dataSync() as Float32Array,
    );
    const gwT = tf.tidy(
      () => tf.matMul(tf.tensor2d(g, [rows, columns]), tf.tensor2d(w, [inner, columns]), false, true).dataSync() as Float32Array,
    );
    const actual = new Float32Array(inner * columns);
    simdAddTransposedProduct(a, null, g, inner, columns, actual, 0, rows);
    assertWithinRounding(actual, aTg, productMagnitudes(transpose(a, rows, inner), g, inner, rows, columns), 'Aᵀ·G against tfjs');
    const back = new Float32Array(rows * inner);
    simdMatMulTransposedRight(g, w, columns, inner, back, 0, rows);
    assertWithinRounding(back, gwT, productMagnitudes(g, transpose(w, inner, columns), rows, columns, inner), 'G·Wᵀ against tfjs');
  });

  for (const columns of [0, 1, 3, 4, 5, 8, 12, 16, 17, 64]) {
    it(`spmm and spmmTransposed reproduce the JS kernels bit for bit, ${columns} columns`, () => {
      const random = new SeededRandom(100 + columns);
      const matrices: CsrMatrix[] = [
        randomCsr(random, 57, 31, 6),
        randomCsr(random, 40, 70, 9, false),
        randomGraphAdjacency(random, 200, 900),
      ];
      for (const a of matrices) {
        const dense = randomMatrix(random, a.colCount * columns);
        const out = new Float32Array(a.rowCount * columns).fill(Number.NaN);
        simdSpmm(a, dense, columns, out);
        assert.deepEqual(
          out,
          reference(() => spmm(a, dense, columns)),
        );

        const denseRows = randomMatrix(random, a.rowCount * columns);
        const outT = new Float32Array(a.colCount * columns).fill(Number.NaN);
        simdSpmmTransposed(a, denseRows, columns, outT);
        assert.deepEqual(
          outT,
          reference(() => spmmTransposed(a, denseRows, columns)),
        );
      }
    });
  }

  it('spmm agrees with tfjs matMul of the densified matrix', () => {
    const random = new SeededRandom(9);
    const a = randomCsr(random, 30, 25, 5, false);
    const dense = randomMatrix(random, 25 * 6, 0);
    const out = new Float32Array(30 * 6);
    simdSpmm(a, dense, 6, out);
    const expected = tf.tidy(
      () => tf.matMul(tf.tensor2d(Float32Array.from(toDense(a)), [30, 25]), tf.tensor2d(dense, [25, 6])).dataSync() as Float32Array,
    );
    const magnitudes = productMagnitudes(Float32Array.from(toDense(a), Math.abs), Float32Array.from(dense, Math.abs), 30, 25, 6);
    assertWithinRounding(out, expected, magnitudes, 'spmm against tfjs');
  });

  it('routes dense/matmul.ts and graph/spmm.ts through the SIMD kernels above the size threshold', () => {
    const random = new SeededRandom(11);
    const [rows, inner, columns] = [200, 64, 16];
    const a = randomMatrix(random, rows * inner);
    const b = randomMatrix(random, inner * columns, 0);
    const direct = new Float32Array(rows * columns);
    simdMatMulRows(a, null, b, inner, columns, direct, 0, rows);
    assert.deepEqual(matMul(a, b, rows, inner, columns), direct, 'matMul takes the SIMD path (identical bits)');
    assert.notDeepEqual(
      reference(() => matMul(a, b, rows, inner, columns)),
      direct,
      'the JS path rounds differently somewhere',
    );
  });
});

function gatherRows(a: Float32Array, pick: Int32Array, width: number): Float32Array {
  const out = new Float32Array(pick.length * width);
  for (let r = 0; r < pick.length; r++) out.set(a.subarray(pick[r] * width, (pick[r] + 1) * width), r * width);
  return out;
}
