import assert from 'node:assert/strict';
import { addTransposedProduct, gatherMatMul, matMul, matMulTransposedRight } from '../../src/engine/dense/matmul';
import { SeededRandom } from '../../src/engine/util/random';

// The reference is the definition of the matrix product, (AB)ij = Σk Aik Bkj, in float64.
function naive(a: ArrayLike<number>, b: ArrayLike<number>, rows: number, inner: number, columns: number): Float64Array {
  const out = new Float64Array(rows * columns);
  for (let i = 0; i < rows; i++)
    for (let k = 0; k < inner; k++) for (let j = 0; j < columns; j++) out[i * columns + j] += a[i * inner + k] * b[k * columns + j];
  return out;
}

function transposed(m: Float32Array, rows: number, columns: number): Float32Array {
  const out = new Float32Array(m.length);
  for (let r = 0; r < rows; r++) for (let c = 0; c < columns; c++) out[c * rows + r] = m[r * columns + c];
  return out;
}

function close(actual: ArrayLike<number>, expected: ArrayLike<number>): void {
  assert.equal(actual.length, expected.length);
  for (let i = 0; i < expected.length; i++)
    assert.ok(Math.abs(actual[i] - expected[i]) < 1e-4, `entry ${i}: ${actual[i]} vs ${expected[i]}`);
}

describe('dense/matmul kernels', () => {
  const random = new SeededRandom(3);
  // 7 columns: exercises both the 4-wide loop and its remainder; zeros exercise the skip.
  const rows = 9;
  const inner = 5;
  const columns = 7;
  const a = Float32Array.from({ length: rows * inner }, (_, i) => (i % 4 === 0 ? 0 : random.normal()));
  const b = Float32Array.from({ length: inner * columns }, () => random.normal());

  it('matMul and gatherMatMul equal the definition', () => {
    close(matMul(a, b, rows, inner, columns), naive(a, b, rows, inner, columns));
    const pick = Int32Array.from([8, 0, 3]);
    const picked = Float32Array.from(Array.from(pick).flatMap((r) => Array.from(a.subarray(r * inner, (r + 1) * inner))));
    close(gatherMatMul(a, pick, b, inner, columns), naive(picked, b, 3, inner, columns));
  });

  it('addTransposedProduct accumulates Aᵀ G, and matMulTransposedRight gives G Bᵀ', () => {
    const g = Float32Array.from({ length: rows * columns }, () => random.normal());
    const out = new Float32Array(inner * columns).fill(1);
    addTransposedProduct(a, null, g, inner, columns, out, 0, rows);
    close(
      out,
      naive(transposed(a, rows, inner), g, inner, rows, columns).map((v) => v + 1),
    );
    close(matMulTransposedRight(g, b, rows, columns, inner), naive(g, transposed(b, inner, columns), rows, columns, inner));
  });
});
