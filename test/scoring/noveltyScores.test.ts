import { strict as assert } from 'node:assert';
import { energyNovelty, maxSoftmaxNovelty, quantileThreshold, rejectAbove } from '../../src/engine/scoring/noveltyScores';
import { rowArgmax, sigmoid, sigmoidOf, softmaxRows } from '../../src/engine/scoring/sigmoid';
import { openSetPredictions, REJECTED } from '../../src/engine/scoring/openSetPrediction';

const close = (actual: number, expected: number, tolerance = 1e-6) =>
  assert.ok(Math.abs(actual - expected) <= tolerance, `${actual} is not within ${tolerance} of ${expected}`);

describe('sigmoid and softmax', () => {
  it('sigmoid matches 1 / (1 + e^−z) and stays finite for large |z|', () => {
    close(sigmoidOf(0), 0.5);
    close(sigmoidOf(Math.log(3)), 0.75); // 1 / (1 + 1/3)
    close(sigmoidOf(-Math.log(3)), 0.25);
    const out = sigmoid(new Float32Array([1000, -1000, 80, -80]));
    assert.deepEqual(Array.from(out.slice(0, 2)), [1, 0]);
    assert.ok(out.every((v) => Number.isFinite(v)));
  });

  it('softmax rows on a hand case; argmax keeps the first maximum', () => {
    // Row [0, ln 3]: e^0 = 1, e^ln3 = 3, total 4 → [0.25, 0.75].
    const s = softmaxRows(new Float32Array([0, Math.log(3), 1000, 1000]), 2);
    close(s[0], 0.25);
    close(s[1], 0.75);
    close(s[2], 0.5);
    close(s[3], 0.5);
    assert.deepEqual(Array.from(rowArgmax(new Float32Array([1, 3, 3, 0, 2, 2]), 3)), [1, 1]);
  });
});

describe('logit novelty scores', () => {
  it('maximum-softmax novelty on a hand case', () => {
    // Row [0, ln 3]: max softmax 0.75 → novelty 0.25. Row [0, 0]: 1 − 1/2 = 0.5. Row [30, 0]: ≈ 0.
    const n = maxSoftmaxNovelty(new Float32Array([0, Math.log(3), 0, 0, 30, 0]), 2);
    close(n[0], 0.25);
    close(n[1], 0.5);
    close(n[2], 0);
    // Row [5, 5, 5, 5]: 1 − 1/4 = 0.75.
    const four = maxSoftmaxNovelty(new Float32Array([5, 5, 5, 5]), 4);
    close(four[0], 0.75);
    // Large logits: [1000, 1000, −1000] → max softmax 1/2.
    close(maxSoftmaxNovelty(new Float32Array([1000, 1000, -1000]), 3)[0], 0.5);
  });

  it('energy novelty on hand cases', () => {
    // z = [0, ln 3]: Σ e^z = 4 → E = −ln 4 = −1.386294 (T = 1).
    close(energyNovelty(new Float32Array([0, Math.log(3)]), 2)[0], -Math.log(4));
    // T = 2: z/T = [0, ln √3], Σ = 1 + √3 = 2.732051 → E = −2·ln(2.732051) = −2.010105.
    close(energyNovelty(new Float32Array([0, Math.log(3)]), 2, 2)[0], -2 * Math.log(1 + Math.sqrt(3)), 1e-5);
    // A confident row is less novel than a flat one.
    const e = energyNovelty(new Float32Array([10, 0, 0, 1, 1, 1]), 3);
    assert.ok(e[0] < e[1]);
  });

  it('energy novelty stays finite for z = 1000', () => {
    // [1000, 1000]: logsumexp = 1000 + ln 2 → −1000.693147 (float32 spacing near 1000 is 6e-5).
    const e = energyNovelty(new Float32Array([1000, 1000, -1000, -1000, 1000, -1000]), 2);
    assert.ok(e.every((v) => Number.isFinite(v)));
    close(e[0], -(1000 + Math.log(2)), 1e-4);
    close(e[1], 1000 - Math.log(2), 1e-4);
    close(e[2], -1000, 1e-4);
  });

  it('quantileThreshold leaves the top fraction strictly above', () => {
    const scores = new Float32Array([0.1, 0.9, 0.3, 0.7, 0.5, 0.2, 0.8, 0.4, 0.6, 0.0]);
    // 30 % of 10 → 3 rejected: 0.9, 0.8, 0.7; threshold = 4th largest = 0.6.
    const t = quantileThreshold(scores, 0.3);
    close(t, 0.6);
    assert.deepEqual(Array.from(rejectAbove(scores, t)), [0, 1, 0, 1, 0, 0, 1, 0, 0, 0]);
    assert.equal(quantileThreshold(scores, 0), Infinity);
    assert.equal(
      rejectAbove(scores, quantileThreshold(scores, 1)).reduce((a, b) => a + b, 0),
      10,
    );
    // Only among nodes 0..4 (0.1, 0.9, 0.3, 0.7, 0.5): 40 % → 2 rejected, threshold 0.5.
    close(quantileThreshold(scores, 0.4, new Int32Array([0, 1, 2, 3, 4])), 0.5);
    // 0.29 × 100 is 28.999999999999996 in floating point; still 29 rejected.
    const hundred = Float32Array.from({ length: 100 }, (_, i) => i);
    assert.equal(
      rejectAbove(hundred, quantileThreshold(hundred, 0.29)).reduce((a, b) => a + b, 0),
      29,
    );
    // Ties at the boundary are kept: [1, 1, 1, 2] at 50 % → threshold 1, only the 2 rejected.
    assert.equal(
      rejectAbove(new Float32Array([1, 1, 1, 2]), quantileThreshold(new Float32Array([1, 1, 1, 2]), 0.5)).reduce((a, b) => a + b, 0),
      1,
    );
    assert.throws(() => quantileThreshold(scores, 1.5), /rejectFraction/);
    assert.throws(() => quantileThreshold(new Float32Array([NaN, 1]), 0.5), /node 0 is NaN/);
  });

  it('openSetPredictions marks rejected nodes', () => {
    const p = openSetPredictions(new Float32Array([0.2, 0.7, 0.9, 0.1]), 2, new Uint8Array([0, 1]));
    assert.deepEqual(Array.from(p), [1, REJECTED]);
  });
});
