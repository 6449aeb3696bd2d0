import assert from 'node:assert/strict';
import { trainAndPredict } from '../../src/engine/models/train';
import { defaultModelSettings, type ModelKind } from '../../src/engine/models/types';
import { factionAccuracy, karateWithIdentityFeatures } from './karateFixture';

// One labelled member per faction: the instructor (node 0, 'Mr. Hi') and the officer (node 33).
const labelled = { nodeIndex: Int32Array.from([0, 33]), classIndex: Int32Array.from([0, 1]), classCount: 2 };

describe('models/karate club (Zachary 1977, from graphology-generators)', () => {
  const club = karateWithIdentityFeatures();

  it('the fixture is the published graph: 34 members, 78 friendships, two factions of 17', () => {
    // Source: Zachary (1977), as shipped by graphology-generators (social/karate-club).
    assert.equal(club.inputs.nodeCount, 34);
    assert.equal(club.edgeCount, 78);
    assert.equal(club.faction.filter((f) => f === 0).length, 17);
    assert.equal(club.faction[0], 0);
    assert.equal(club.faction[33], 1);
  });

  for (const kind of ['gcn', 'sage', 'sign'] as ModelKind[]) {
    it(`${kind} puts at least 90% of the other 32 members in their faction from two labels`, async () => {
      const out = await trainAndPredict(club.inputs, labelled, { ...defaultModelSettings, kind, seed: 0 });
      const accuracy = factionAccuracy(out.logits, club.faction, [0, 33]);
      assert.ok(accuracy >= 0.9, `${kind} accuracy ${accuracy}`);
      assert.equal(out.embeddings.length, 34 * defaultModelSettings.hiddenUnits);
      assert.ok(out.lossHistory.at(-1)! < out.lossHistory[0], 'the loss went down');
    });
  }

  it('mlp on identity features does no better than chance on the unlabelled members', async () => {
    // With one-hot identity features, an unlabelled member's row of the first kernel is only
    // touched by weight decay (its input is 0 on every training row), so its output depends on
    // its own random initial row and on the shared biases and output layer, never on which
    // faction it belongs to. Each prediction is then a label-blind guess; over 5 seeds × 32
    // members (16 per faction) a mean accuracy above 65% would be a 3.8-sigma event under
    // coin flips (sd of the mean of 160 fair flips = 0.040), which cannot happen by chance.
    // A graph model given the same two labels reaches ≥ 90% (tests above).
    let total = 0;
    for (let seed = 0; seed < 5; seed++) {
      const out = await trainAndPredict(club.inputs, labelled, { ...defaultModelSettings, kind: 'mlp', seed });
      // It does fit its two training nodes.
      assert.ok(out.logits[0 * 2 + 0] > out.logits[0 * 2 + 1] && out.logits[33 * 2 + 1] > out.logits[33 * 2 + 0]);
      total += factionAccuracy(out.logits, club.faction, [0, 33]);
    }
    assert.ok(total / 5 <= 0.65, `mean mlp accuracy ${total / 5}`);
  });
});
