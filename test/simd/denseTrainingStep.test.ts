import assert from 'node:assert/strict';
import { classWeightedBce, oneHotTargets, positiveWeights } from '../../src/engine/models/classWeightedLoss';
import {
  DenseTrainingStep,
  flattenParameters,
  predictDense,
  splitGradients,
  type DenseParameters,
} from '../../src/engine/models/denseStep';
import { dropoutMask, glorotUniform } from '../../src/engine/models/initialisation';
import { predictDenseSimd, SimdDenseTrainingStep } from '../../src/engine/simd/denseTrainingStep';
import { ParallelSimdTraining } from '../../src/engine/simd/parallelSimdTraining';
import { initTensorflow } from '../../src/engine/tf/backend';
import { SeededRandom } from '../../src/engine/util/random';

function assertClose(actual: Float32Array, expected: Float32Array, what: string): void {
  assert.equal(actual.length, expected.length, `${what}: length`);
  let largest = 0;
  for (const v of expected) largest = Math.max(largest, Math.abs(v));
  // Float32 products summed in different orders (tfjs's blocked wasm kernels against ours).
  const allowed = 1e-4 * largest + 1e-7;
  for (let i = 0; i < expected.length; i++) {
    assert.ok(Math.abs(actual[i] - expected[i]) <= allowed, `${what}, entry ${i}: ${actual[i]} vs ${expected[i]}`);
  }
}

interface Problem {
  rows: number;
  inputDim: number;
  hidden: number;
  classes: number;
  inputs: Float32Array;
  targets: Float32Array;
  posWeight: Float32Array;
  parameters: DenseParameters;
}

function problem(rows: number, inputDim: number, hidden: number, classes: number, seed: number): Problem {
  const random = new SeededRandom(seed);
  // A third of the inputs are 0, as in TF-IDF features.
  const inputs = Float32Array.from({ length: rows * inputDim }, () => (random.next() < 0.33 ? 0 : random.normal()));
  const classIndex = Int32Array.from({ length: rows }, () => random.int(classes));
  const parameters: DenseParameters = {
    hiddenKernel: glorotUniform(inputDim, hidden, random),
    hiddenBias: Float32Array.from({ length: hidden }, () => 0.1 * random.normal()),
    outputKernel: glorotUniform(hidden, classes, random),
    outputBias: Float32Array.from({ length: classes }, () => 0.1 * random.normal()),
  };
  return {
    rows,
    inputDim,
    hidden,
    classes,
    inputs,
    targets: oneHotTargets(classIndex, classes),
    posWeight: positiveWeights(classIndex, classes),
    parameters,
  };
}

describe('SIMD dense training step', () => {
  before(async () => {
    await initTensorflow();
  });

  // Odd sizes on purpose: none is a multiple of the kernels' 4 × 8 blocks.
  for (const [rows, inputDim, hidden, classes, withDropout] of [
    [37, 13, 9, 3, true],
    [203, 70, 64, 10, true],
    [50, 6, 5, 2, false],
  ] as const) {
    it(`gives the loss and gradients of the tfjs step, ${rows} rows × ${inputDim} → ${hidden} → ${classes}${withDropout ? ', dropout' : ''}`, () => {
      const p = problem(rows, inputDim, hidden, classes, rows + inputDim);
      const mask = withDropout ? dropoutMask(rows * hidden, 0.5, new SeededRandom(3)) : null;
      const lossScale = 1 / (rows * classes);
      const tfStep = new DenseTrainingStep(p.inputs, rows, inputDim, p.targets, p.posWeight, hidden, lossScale);
      const simdStep = new SimdDenseTrainingStep(p.inputs, rows, inputDim, p.targets, p.posWeight, hidden, lossScale);
      try {
        const expected = tfStep.run(p.parameters, mask);
        const actual = simdStep.run(p.parameters, mask);
        assert.ok(Math.abs(actual.loss - expected.loss) <= 1e-5 * Math.abs(expected.loss), `loss ${actual.loss} vs ${expected.loss}`);
        assertClose(actual.gradients.hiddenKernel, expected.gradients.hiddenKernel, 'hidden kernel gradient');
        assertClose(actual.gradients.hiddenBias, expected.gradients.hiddenBias, 'hidden bias gradient');
        assertClose(actual.gradients.outputKernel, expected.gradients.outputKernel, 'output kernel gradient');
        assertClose(actual.gradients.outputBias, expected.gradients.outputBias, 'output bias gradient');
        // A second run with other parameters reuses the resident buffers.
        p.parameters.hiddenKernel.forEach((v, i, a) => (a[i] = v * 0.5));
        assertClose(
          simdStep.run(p.parameters, mask).gradients.hiddenKernel,
          tfStep.run(p.parameters, mask).gradients.hiddenKernel,
          'second run',
        );
      } finally {
        tfStep.dispose();
        simdStep.dispose();
      }
    });
  }

  it('has the loss of classWeightedBce and its gradient by central differences', () => {
    const p = problem(23, 7, 6, 3, 8);
    const step = new SimdDenseTrainingStep(p.inputs, p.rows, p.inputDim, p.targets, p.posWeight, p.hidden, 1 / (p.rows * p.classes));
    const { loss, gradients } = step.run(p.parameters, null);
    const { logits } = predictDenseSimd(p.inputs, p.rows, p.inputDim, p.parameters, p.hidden);
    assert.ok(Math.abs(loss - classWeightedBce(logits, p.targets, p.posWeight)) < 1e-6);
    // Central differences in float64 are not available through float32 kernels; a step of 1e-2
    // on a smooth entry (an output bias) keeps the error well under the tolerance (common practice).
    for (let c = 0; c < p.classes; c++) {
      const original = p.parameters.outputBias[c];
      p.parameters.outputBias[c] = original + 1e-2;
      const up = step.run(p.parameters, null).loss;
      p.parameters.outputBias[c] = original - 1e-2;
      const down = step.run(p.parameters, null).loss;
      p.parameters.outputBias[c] = original;
      assert.ok(Math.abs((up - down) / 2e-2 - gradients.outputBias[c]) < 1e-4, `output bias ${c}`);
    }
  });

  it('gives the same step split over two worker threads', async () => {
    const p = problem(301, 33, 16, 4, 12);
    const lossScale = 1 / (p.rows * p.classes);
    const single = new SimdDenseTrainingStep(p.inputs, p.rows, p.inputDim, p.targets, p.posWeight, p.hidden, lossScale);
    const inputs = new Float32Array(new SharedArrayBuffer(p.inputs.length * 4));
    inputs.set(p.inputs);
    const parallel = await ParallelSimdTraining.start(inputs, p.rows, p.inputDim, p.targets, p.posWeight, p.hidden, 2, true);
    try {
      for (const withMask of [true, false]) {
        const mask = dropoutMask(p.rows * p.hidden, 0.5, new SeededRandom(4), parallel.masks[0]);
        const expected = single.run(p.parameters, withMask ? mask : null);
        flattenParameters(p.parameters, parallel.parameters);
        const actual = splitGradients(await parallel.run(withMask ? 0 : null), p.inputDim, p.hidden, p.classes);
        assert.ok(Math.abs(actual.loss - expected.loss) < 1e-6, `loss ${actual.loss} vs ${expected.loss}`);
        assertClose(actual.gradients.hiddenKernel, expected.gradients.hiddenKernel, 'hidden kernel gradient');
        assertClose(actual.gradients.outputBias, expected.gradients.outputBias, 'output bias gradient');
      }
    } finally {
      await parallel.dispose();
    }
  });

  it('predicts the logits and embeddings of predictDense', () => {
    const p = problem(301, 45, 19, 4, 2);
    const expected = predictDense(p.inputs, p.rows, p.inputDim, p.parameters, p.hidden);
    const actual = predictDenseSimd(p.inputs, p.rows, p.inputDim, p.parameters, p.hidden);
    assertClose(actual.embeddings, expected.embeddings, 'embeddings');
    assertClose(actual.logits, expected.logits, 'logits');
    const empty = predictDenseSimd(new Float32Array(0), 0, p.inputDim, p.parameters, p.hidden);
    assert.equal(empty.logits.length, 0);
  });
});
