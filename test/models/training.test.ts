import assert from 'node:assert/strict';
import * as tf from '@tensorflow/tfjs';
import { buildAdjacency } from '../../src/engine/graph/csr';
import { trainAndPredict } from '../../src/engine/models/train';
import { defaultModelSettings, modelKinds, type GraphInputs, type ModelSettings } from '../../src/engine/models/types';
import { initTensorflow } from '../../src/engine/tf/backend';
import { CancelFlag, CancelledError } from '../../src/engine/util/progress';
import { karateWithIdentityFeatures } from './karateFixture';

const labelled = { nodeIndex: Int32Array.from([0, 33]), classIndex: Int32Array.from([0, 1]), classCount: 2 };
const short: ModelSettings = { ...defaultModelSettings, epochs: 40 };

describe('models/training', () => {
  const club = karateWithIdentityFeatures();
  before(async () => {
    await initTensorflow('wasm');
  });

  for (const kind of modelKinds) {
    it(`${kind}: the same seed gives identical logits, another seed different ones, and no tensor leaks`, async () => {
      const before = tf.memory().numTensors;
      const first = await trainAndPredict(club.inputs, labelled, { ...short, kind, seed: 3 });
      const again = await trainAndPredict(club.inputs, labelled, { ...short, kind, seed: 3 });
      const other = await trainAndPredict(club.inputs, labelled, { ...short, kind, seed: 4 });
      assert.deepEqual(again.logits, first.logits);
      assert.deepEqual(again.lossHistory, first.lossHistory);
      assert.notDeepEqual(other.logits, first.logits);
      assert.equal(tf.memory().numTensors, before);
      assert.equal(first.logits.length, 34 * 2);
      assert.ok(first.timings.train > 0 && first.timings.predict > 0);
    });
  }

  it('fits XOR, which needs the hidden layer, to every training point', async () => {
    // XOR, the classic problem no linear classifier can fit (common practice as a sanity check).
    const features = Float32Array.from([0, 0, 0, 1, 1, 0, 1, 1]);
    const noEdges = buildAdjacency(4, { source: new Int32Array(0), target: new Int32Array(0), weight: null, count: 0 }, true);
    const inputs: GraphInputs = { nodeCount: 4, features, featureDim: 2, adjacency: noEdges };
    const train = { nodeIndex: Int32Array.from([0, 1, 2, 3]), classIndex: Int32Array.from([0, 1, 1, 0]), classCount: 2 };
    const out = await trainAndPredict(inputs, train, { ...defaultModelSettings, kind: 'mlp', dropout: 0, seed: 1 });
    for (let node = 0; node < 4; node++) {
      const predicted = out.logits[node * 2 + 1] > out.logits[node * 2] ? 1 : 0;
      assert.equal(predicted, train.classIndex[node], `point ${node}`);
    }
    assert.ok(out.lossHistory.at(-1)! < 0.2 * out.lossHistory[0]);
  });

  it('reports progress per epoch and stops when cancelled, leaving no tensors behind', async () => {
    for (const kind of ['sign', 'gcn'] as const) {
      const before = tf.memory().numTensors;
      const cancel = new CancelFlag();
      const fractions: number[] = [];
      const progress = {
        report: (stage: string, fraction: number) => {
          if (stage !== 'train') return;
          fractions.push(fraction);
          if (fractions.length === 3) cancel.cancel();
        },
      };
      await assert.rejects(trainAndPredict(club.inputs, labelled, { ...short, kind }, { progress, cancel }), CancelledError);
      assert.deepEqual(fractions, [1 / 40, 2 / 40, 3 / 40]);
      assert.equal(tf.memory().numTensors, before);
    }
  });

  it('rejects a training class outside [0, classCount)', async () => {
    const bad = { nodeIndex: Int32Array.from([0]), classIndex: Int32Array.from([2]), classCount: 2 };
    await assert.rejects(trainAndPredict(club.inputs, bad, short), /training class index 2 \(entry 0\) is outside \[0, 2\)/);
  });
});
