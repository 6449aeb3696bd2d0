import assert from 'node:assert/strict';
import { positiveWeights, oneHotTargets } from '../../src/engine/models/classWeightedLoss';
import { DenseTrainingStep, flattenParameters, splitGradients, type DenseParameters } from '../../src/engine/models/denseStep';
import { dropoutMask, glorotUniform } from '../../src/engine/models/initialisation';
import { ParallelDenseTraining, sharedFloats, splitRows } from '../../src/engine/models/parallelDenseStep';
import { buildAdjacency } from '../../src/engine/graph/csr';
import { trainAndPredict } from '../../src/engine/models/train';
import { defaultModelSettings } from '../../src/engine/models/types';
import { initTensorflow } from '../../src/engine/tf/backend';
import { SeededRandom } from '../../src/engine/util/random';

describe('models/data-parallel training step', () => {
  before(async () => {
    await initTensorflow('wasm');
  });

  it('splits rows into contiguous, nearly equal blocks', () => {
    assert.deepEqual(splitRows(10, 2), [0, 5, 10]);
    assert.deepEqual(splitRows(7, 3), [0, 2, 5, 7]);
  });

  it('two worker shards give the gradients of the single in-process step', async () => {
    // The reference is the in-process step, itself checked against finite differences in
    // gradients.test.ts; the shards differ from it only in the order of float32 additions.
    const random = new SeededRandom(31);
    const rows = 301;
    const inputDim = 7;
    const hidden = 8;
    const classes = 3;
    const inputs = sharedFloats(rows * inputDim);
    for (let i = 0; i < inputs.length; i++) inputs[i] = random.normal();
    const classIndex = Int32Array.from({ length: rows }, () => random.int(classes));
    const targets = oneHotTargets(classIndex, classes);
    const posWeight = positiveWeights(classIndex, classes);
    const params: DenseParameters = {
      hiddenKernel: glorotUniform(inputDim, hidden, random),
      hiddenBias: Float32Array.from({ length: hidden }, () => random.next() - 0.5),
      outputKernel: glorotUniform(hidden, classes, random),
      outputBias: Float32Array.from({ length: classes }, () => random.next() - 0.5),
    };
    const single = new DenseTrainingStep(inputs, rows, inputDim, targets, posWeight, hidden, 1 / (rows * classes));
    const parallel = await ParallelDenseTraining.start(inputs, rows, inputDim, targets, posWeight, hidden, 2, true);
    try {
      for (const useMask of [true, false]) {
        const mask = dropoutMask(rows * hidden, 0.5, random, parallel.masks[1]);
        const expected = single.run(params, useMask ? mask : null);
        flattenParameters(params, parallel.parameters);
        const actual = splitGradients(await parallel.run(useMask ? 1 : null), inputDim, hidden, classes);
        assert.ok(Math.abs(actual.loss - expected.loss) < 1e-6, `loss ${actual.loss} vs ${expected.loss}`);
        for (const name of ['hiddenKernel', 'hiddenBias', 'outputKernel', 'outputBias'] as const) {
          for (let i = 0; i < expected.gradients[name].length; i++) {
            assert.ok(Math.abs(actual.gradients[name][i] - expected.gradients[name][i]) < 1e-6, `${name}[${i}]`);
          }
        }
      }
    } finally {
      single.dispose();
      await parallel.dispose();
    }
  });
});

describe('models/trainAndPredict on two threads', () => {
  it('draws the same dropout masks as one thread, so both give nearly the same model', async () => {
    // 1,500 rows × 24 columns, 3 classes; only the order of float32 additions differs between
    // the paths, so after 30 epochs the logits agree closely (not bit for bit).
    const random = new SeededRandom(41);
    const nodeCount = 1500;
    const featureDim = 24;
    const features = Float32Array.from({ length: nodeCount * featureDim }, () => random.normal());
    const adjacency = buildAdjacency(nodeCount, { source: new Int32Array(0), target: new Int32Array(0), weight: null, count: 0 }, true);
    const nodeIndex = Int32Array.from({ length: 1000 }, (_, i) => i);
    const train = {
      nodeIndex,
      classIndex: nodeIndex.map((i) => (features[i * featureDim] > 0 ? 0 : features[i * featureDim + 1] > 0 ? 1 : 2)),
      classCount: 3,
    };
    const inputs = { nodeCount, features, featureDim, adjacency };
    const settings = { ...defaultModelSettings, kind: 'mlp' as const, epochs: 30, seed: 2 };
    const one = await trainAndPredict(inputs, train, settings, { parallel: false });
    const two = await trainAndPredict(inputs, train, settings, { parallel: true });
    const twoAgain = await trainAndPredict(inputs, train, settings, { parallel: true });
    assert.deepEqual(twoAgain.logits, two.logits, 'two threads are reproducible');
    let largest = 0;
    for (let i = 0; i < one.logits.length; i++) largest = Math.max(largest, Math.abs(one.logits[i] - two.logits[i]));
    assert.ok(largest < 1e-3, `largest logit difference ${largest}`);
    assert.ok(two.lossHistory[29] < two.lossHistory[0]);
  });
});
