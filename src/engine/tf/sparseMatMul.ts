// A sparse-dense product that tfjs can differentiate: tfjs has no sparse matmul, and its
// gather + segment-sum route is unusable for message passing on the cpu backend and missing on
// wasm. The product runs over typed arrays (graph/spmm) and enters the tape as one custom op.
import * as tf from '@tensorflow/tfjs';
import type { CsrMatrix } from '../graph/csr';
import { spmm, spmmTransposed } from '../graph/spmm';

/**
 * A·H with gradient Aᵀ·dy with respect to H (A is a constant, not trained). Pass aTransposed
 * (csr transpose(a), or a itself when A is symmetric) when the product is differentiated many
 * times: the gradient then gathers rows instead of scattering them, which is faster.
 */
export function sparseMatMul(a: CsrMatrix, h: tf.Tensor2D, aTransposed?: CsrMatrix): tf.Tensor2D {
  const [rows, columns] = h.shape;
  if (rows !== a.colCount) {
    throw new Error(`sparseMatMul: the sparse matrix has ${a.colCount} columns but the dense one has ${rows} rows`);
  }
  if (aTransposed && (aTransposed.rowCount !== a.colCount || aTransposed.colCount !== a.rowCount)) {
    throw new Error(
      `sparseMatMul: aTransposed is ${aTransposed.rowCount} × ${aTransposed.colCount}, expected ${a.colCount} × ${a.rowCount}`,
    );
  }
  const product = tf.customGrad((input: tf.Tensor | tf.GradSaveFunc) => {
    const dense = input as tf.Tensor2D;
    const value = tf.tensor2d(spmm(a, float32Data(dense), columns), [a.rowCount, columns], 'float32');
    const gradFunc = (dy: tf.Tensor2D): tf.Tensor2D => {
      const upstream = float32Data(dy);
      const gradient = aTransposed ? spmm(aTransposed, upstream, columns) : spmmTransposed(a, upstream, columns);
      return tf.tensor2d(gradient, [a.colCount, columns], 'float32');
    };
    return { value, gradFunc };
  });
  return product(h);
}

function float32Data(tensor: tf.Tensor): Float32Array {
  const data = tensor.dataSync();
  return data instanceof Float32Array ? data : Float32Array.from(data as ArrayLike<number>);
}
