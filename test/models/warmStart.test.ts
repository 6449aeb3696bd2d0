import assert from 'node:assert/strict';
import { precomputePropagation, trainAndPredict } from '../../src/engine/models/train';
import { defaultModelSettings, type ModelWeights } from '../../src/engine/models/types';
import { initialWeights, tensorByName } from '../../src/engine/models/weights';
import { SeededRandom } from '../../src/engine/util/random';
import { karateWithIdentityFeatures } from './karateFixture';

describe('models/warm start', () => {
  const club = karateWithIdentityFeatures();
  const twoClasses = { nodeIndex: Int32Array.from([0, 33]), classIndex: Int32Array.from([0, 1]), classCount: 2 };
  // A third class appears in the next slice: member 16 (a leaf attached to 5 and 6).
  const threeClasses = { nodeIndex: Int32Array.from([0, 33, 16]), classIndex: Int32Array.from([0, 1, 2]), classCount: 3 };
  const settings = { ...defaultModelSettings, kind: 'sign' as const, epochs: 60 };

  it('keeps every old weight and output column and grows a fresh column per new class', async () => {
    const previous = await trainAndPredict(club.inputs, twoClasses, settings);
    const { weights, notes, warmStarted } = initialWeights('sign', previous.weights.inputDim, 64, 3, new SeededRandom(9), previous.weights);
    assert.ok(warmStarted);
    assert.match(notes[0], /1 new class/);
    assert.deepEqual(tensorByName(weights, 'hidden/kernel').data, tensorByName(previous.weights, 'hidden/kernel').data);
    assert.deepEqual(tensorByName(weights, 'hidden/bias').data, tensorByName(previous.weights, 'hidden/bias').data);
    const oldKernel = tensorByName(previous.weights, 'output/kernel');
    const newKernel = tensorByName(weights, 'output/kernel');
    assert.deepEqual(newKernel.shape, [64, 3]);
    const bound = Math.sqrt(6 / (64 + 3)); // Glorot-uniform bound for a 64 × 3 kernel
    let newColumnNorm = 0;
    for (let row = 0; row < 64; row++) {
      assert.equal(newKernel.data[row * 3], oldKernel.data[row * 2]);
      assert.equal(newKernel.data[row * 3 + 1], oldKernel.data[row * 2 + 1]);
      assert.ok(Math.abs(newKernel.data[row * 3 + 2]) <= bound);
      newColumnNorm += Math.abs(newKernel.data[row * 3 + 2]);
    }
    assert.ok(newColumnNorm > 0, 'the new column is initialised, not left at zero');
    const newBias = tensorByName(weights, 'output/bias').data;
    const oldBias = tensorByName(previous.weights, 'output/bias').data;
    assert.deepEqual(Array.from(newBias), [oldBias[0], oldBias[1], 0]);
  });

  it('with zero epochs a warm-started model scores the old classes exactly as before', async () => {
    const propagated = precomputePropagation(club.inputs, 2);
    const previous = await trainAndPredict(club.inputs, twoClasses, settings, { precomputed: propagated });
    const grown = await trainAndPredict(
      club.inputs,
      threeClasses,
      { ...settings, epochs: 0 },
      { warmStart: previous.weights, precomputed: propagated },
    );
    for (let node = 0; node < 34; node++) {
      assert.equal(grown.logits[node * 3], previous.logits[node * 2]);
      assert.equal(grown.logits[node * 3 + 1], previous.logits[node * 2 + 1]);
    }
  });

  it('starts training from a lower loss than a cold start', async () => {
    const previous = await trainAndPredict(club.inputs, twoClasses, settings);
    const warm = await trainAndPredict(club.inputs, threeClasses, settings, { warmStart: previous.weights });
    const cold = await trainAndPredict(club.inputs, threeClasses, settings);
    assert.ok(warm.lossHistory[0] < cold.lossHistory[0], `warm ${warm.lossHistory[0]} cold ${cold.lossHistory[0]}`);
    assert.deepEqual(warm.notes, ['warm start: 1 new class output(s) initialised']);
  });

  it('falls back to a cold start, with a note, when the input dimension changed', async () => {
    const previous = await trainAndPredict(club.inputs, twoClasses, settings);
    const narrower: ModelWeights = { ...previous.weights, inputDim: previous.weights.inputDim - 1 };
    const out = await trainAndPredict(club.inputs, twoClasses, settings, { warmStart: narrower });
    const cold = await trainAndPredict(club.inputs, twoClasses, settings);
    assert.deepEqual(out.notes, [`cold start: input dimension changed from ${34 * 3 - 1} to ${34 * 3}`]);
    assert.deepEqual(out.logits, cold.logits);
  });
});
