import assert from 'node:assert/strict';
import { classWeightedBce, oneHotTargets, positiveWeights } from '../../src/engine/models/classWeightedLoss';

describe('class-weighted binary cross-entropy', () => {
  it('matches the worked example of the PyTorch BCEWithLogitsLoss documentation', () => {
    // Source: PyTorch documentation, torch.nn.BCEWithLogitsLoss, "Examples": target = ones(10, 64),
    // output = full(10, 64, 1.5), pos_weight = ones(64) gives -log(sigmoid(1.5)), printed as
    // tensor(0.20...). -log(sigmoid(1.5)) = log(1 + e^-1.5) = 0.201413 (to 6 places).
    const logits = new Float32Array(10 * 64).fill(1.5);
    const targets = new Float32Array(10 * 64).fill(1);
    const loss = classWeightedBce(logits, targets, new Float32Array(64).fill(1));
    assert.ok(Math.abs(loss - 0.201413) < 1e-5, `loss ${loss}`);
    assert.ok(loss.toFixed(2) === '0.20');
  });

  it('weights positives as negatives / positives, as the BCEWithLogitsLoss documentation advises', () => {
    // Source: PyTorch documentation, torch.nn.BCEWithLogitsLoss: "if a dataset contains 100
    // positive and 300 negative examples of a single class, then pos_weight for the class should
    // be equal to 300/100 = 3".
    const classIndex = new Int32Array(400);
    classIndex.fill(1, 0, 300); // 300 rows of class 1 are negatives of class 0
    const weights = positiveWeights(classIndex, 2);
    assert.equal(weights[0], 3);
    assert.equal(weights[1], Math.fround(100 / 300));
  });

  it('equals a hand-computed value with the positive weight on the positive term only', () => {
    // Two rows, two classes, pos_weight w = [3, 0.5]; logits z and targets y:
    //   row 0: z = [0, 2],  y = [1, 0]      row 1: z = [-1, 0.5], y = [0, 1]
    // loss(z, y) = -[w·y·log σ(z) + (1 - y)·log(1 - σ(z))]:
    //   (0,0): y=1, w=3:   3·log(1 + e^0)    = 3·0.693147 = 2.079442
    //   (0,1): y=0:        log(1 + e^2)      = 2.126928
    //   (1,0): y=0:        log(1 + e^-1)     = 0.313262
    //   (1,1): y=1, w=0.5: 0.5·log(1 + e^-0.5) = 0.5·0.474077 = 0.237038
    // mean over 4 entries = (2.079442 + 2.126928 + 0.313262 + 0.237038) / 4 = 1.189168
    const logits = Float32Array.from([0, 2, -1, 0.5]);
    const targets = oneHotTargets(Int32Array.from([0, 1]), 2);
    assert.deepEqual(Array.from(targets), [1, 0, 0, 1]);
    const gradient = new Float32Array(4);
    const loss = classWeightedBce(logits, targets, Float32Array.from([3, 0.5]), gradient);
    assert.ok(Math.abs(loss - 1.189168) < 1e-5, `loss ${loss}`);
    // d/dz = (σ(z)·(1 + (w-1)·y) - w·y) / 4: (0,0): (0.5·3 - 3)/4 = -0.375; (1,0): σ(-1)/4 = 0.067235
    assert.ok(Math.abs(gradient[0] + 0.375) < 1e-6);
    assert.ok(Math.abs(gradient[2] - 0.0672352) < 1e-6);
  });

  it('agrees with the naive formula where it is finite and stays finite where it is not', () => {
    const posWeight = Float32Array.from([2.5]);
    for (const z of [-8, -1.25, 0, 0.3, 4]) {
      for (const y of [0, 1]) {
        const sigma = 1 / (1 + Math.exp(-z));
        const naive = -(posWeight[0] * y * Math.log(sigma) + (1 - y) * Math.log(1 - sigma));
        const stable = classWeightedBce(Float32Array.from([z]), Float32Array.from([y]), posWeight);
        assert.ok(Math.abs(naive - stable) < 1e-5, `z ${z} y ${y}: ${naive} vs ${stable}`);
      }
    }
    // σ(200) rounds to 1 in float64, so the naive negative term is -log(0) = ∞; the loss is 200.
    const large = classWeightedBce(Float32Array.from([200]), Float32Array.from([0]), posWeight);
    assert.ok(Math.abs(large - 200) < 1e-9);
  });
});
