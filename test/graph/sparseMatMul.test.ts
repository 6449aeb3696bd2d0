import { strict as assert } from 'node:assert';
import * as tf from '@tensorflow/tfjs';
import { transpose, type CsrMatrix } from '../../src/engine/graph/csr';
import { initTensorflow, type TensorflowBackend } from '../../src/engine/tf/backend';
import { sparseMatMul } from '../../src/engine/tf/sparseMatMul';
import { SeededRandom } from '../../src/engine/util/random';
import { maxAbsDifference, randomCsr, randomDense, toDense } from './fixtures';

function denseTensor(m: CsrMatrix): tf.Tensor2D {
  return tf.tensor2d(Float32Array.from(toDense(m)), [m.rowCount, m.colCount]);
}

for (const backend of ['wasm', 'cpu'] as TensorflowBackend[]) {
  describe(`sparseMatMul on the ${backend} backend`, () => {
    before(async () => {
      assert.equal(await initTensorflow(backend), backend);
      assert.equal(tf.getBackend(), backend);
    });

    it('forward equals tf.matMul with the dense matrix', () => {
      const random = new SeededRandom(31);
      const a = randomCsr(random, 12, 9, 3);
      const before = tf.memory().numTensors;
      tf.tidy(() => {
        const h = tf.tensor2d(randomDense(random, 9 * 5), [9, 5]);
        const sparse = sparseMatMul(a, h);
        assert.deepEqual(sparse.shape, [12, 5]);
        assert.ok(maxAbsDifference(sparse.dataSync(), tf.matMul(denseTensor(a), h).dataSync()) < 1e-5);
      });
      assert.equal(tf.memory().numTensors, before);
    });

    it('gradient equals the tf.grad of the dense product, with and without a given transpose', () => {
      const random = new SeededRandom(32);
      const a = randomCsr(random, 15, 11, 4);
      const aTransposed = transpose(a);
      const before = tf.memory().numTensors;
      tf.tidy(() => {
        const h = tf.tensor2d(randomDense(random, 11 * 6), [11, 6]);
        // A loss that weights every output entry differently, so the upstream gradient is not uniform.
        const outputWeights = tf.tensor2d(randomDense(random, 15 * 6), [15, 6]);
        const denseA = denseTensor(a);
        const reference = tf.grad((x: tf.Tensor) => tf.sum(tf.mul(tf.matMul(denseA, x as tf.Tensor2D), outputWeights)))(h);
        const scattered = tf.grad((x: tf.Tensor) => tf.sum(tf.mul(sparseMatMul(a, x as tf.Tensor2D), outputWeights)))(h);
        const gathered = tf.grad((x: tf.Tensor) => tf.sum(tf.mul(sparseMatMul(a, x as tf.Tensor2D, aTransposed), outputWeights)))(h);
        assert.deepEqual(scattered.shape, [11, 6]);
        assert.ok(maxAbsDifference(scattered.dataSync(), reference.dataSync()) < 1e-5);
        assert.ok(maxAbsDifference(gathered.dataSync(), reference.dataSync()) < 1e-5);
      });
      assert.equal(tf.memory().numTensors, before, 'no tensor left behind');
    });

    it('trains a weight through two propagation steps like the dense version (tf.variableGrads)', () => {
      const random = new SeededRandom(33);
      const a = randomCsr(random, 10, 10, 3);
      const weight = tf.variable(tf.tensor2d(randomDense(random, 4 * 3), [4, 3]));
      const before = tf.memory().numTensors;
      tf.tidy(() => {
        const x = tf.tensor2d(randomDense(random, 10 * 4), [10, 4]);
        const denseA = denseTensor(a);
        const sparseLoss = () => tf.sum<tf.Scalar>(tf.square(sparseMatMul(a, sparseMatMul(a, tf.matMul(x, weight)))));
        const denseLoss = () => tf.sum<tf.Scalar>(tf.square(tf.matMul(denseA, tf.matMul(denseA, tf.matMul(x, weight)))));
        const sparse = tf.variableGrads(sparseLoss, [weight]);
        const dense = tf.variableGrads(denseLoss, [weight]);
        const scale = Math.max(1, Math.abs(dense.value.dataSync()[0]));
        assert.ok(Math.abs(sparse.value.dataSync()[0] - dense.value.dataSync()[0]) < 1e-5 * scale);
        const gradientScale = Math.max(1, ...Array.from(dense.grads[weight.name].dataSync(), Math.abs));
        assert.ok(maxAbsDifference(sparse.grads[weight.name].dataSync(), dense.grads[weight.name].dataSync()) < 1e-5 * gradientScale);
      });
      assert.equal(tf.memory().numTensors, before);
      weight.dispose();
    });

    it('rejects mismatched shapes with the sizes in the message', () => {
      const a = randomCsr(new SeededRandom(34), 4, 6, 2);
      const h = tf.zeros<tf.Rank.R2>([5, 2]);
      assert.throws(() => sparseMatMul(a, h), /6 columns but the dense one has 5 rows/);
      const h6 = tf.zeros<tf.Rank.R2>([6, 2]);
      assert.throws(() => sparseMatMul(a, h6, a), /aTransposed is 4 × 6, expected 6 × 4/);
      h.dispose();
      h6.dispose();
    });
  });
}

describe('initTensorflow', () => {
  it('is idempotent and restores the preferred backend when something else switched it', async () => {
    assert.equal(await initTensorflow('wasm'), 'wasm');
    assert.equal(await initTensorflow('wasm'), 'wasm');
    await tf.setBackend('cpu');
    assert.equal(await initTensorflow('wasm'), 'wasm');
    assert.equal(tf.getBackend(), 'wasm');
  });
});
