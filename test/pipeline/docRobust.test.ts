import { strict as assert } from 'node:assert';
import { docMargin, docNovelty, docRejected, docThresholdsRobust, MAD_TO_SIGMA } from '../../src/engine/scoring/docThresholds';

describe('DOC thresholds with a robust scale, and the unclamped margin', () => {
  it('uses 1.4826 · median |1 − p| as σ (worked by hand)', () => {
    // The constant 1.4826 ≈ 1/Φ⁻¹(3/4) is the default of R's mad() (R documentation, stats::mad:
    // "constant = 1.4826"); Φ⁻¹(0.75) = 0.6744898 gives 1/0.6744898 = 1.482602.
    assert.ok(Math.abs(MAD_TO_SIGMA - 1 / 0.6744898) < 1e-4);
    // Class 0 training outputs 0.9, 0.8, 0.99, 0.5, 0.95 → |1 − p| = 0.1, 0.2, 0.01, 0.5, 0.05,
    // sorted 0.01, 0.05, 0.1, 0.2, 0.5 → median 0.1 → σ = 0.14826 → threshold 1 − 3·0.14826 = 0.55522.
    // Class 1 outputs 0.97, 0.99 → median of 0.03, 0.01 = 0.02 → σ = 0.029652 → 1 − 3σ = 0.911044.
    // Class 2 has no training node → the 0.5 floor.
    const p0 = [0.9, 0.8, 0.99, 0.5, 0.95];
    const p1 = [0.97, 0.99];
    const rows: number[] = [];
    for (const p of p0) rows.push(p, 0.1, 0.1);
    for (const p of p1) rows.push(0.2, p, 0.1);
    const thresholds = docThresholdsRobust(
      Float32Array.from(rows),
      3,
      Int32Array.from([0, 1, 2, 3, 4, 5, 6]),
      Int32Array.from([0, 0, 0, 0, 0, 1, 1]),
      3,
    );
    assert.ok(Math.abs(thresholds[0] - 0.55522) < 1e-5, `class 0: ${thresholds[0]}`);
    assert.ok(Math.abs(thresholds[1] - 0.911044) < 1e-5, `class 1: ${thresholds[1]}`);
    assert.equal(thresholds[2], 0.5);
  });

  it('is not moved by one member any model would miss, where the standard deviation is', () => {
    const outputs = [0.97, 0.98, 0.96, 0.99, 0.97, 0.98, 0.02];
    const rows = Float32Array.from(outputs);
    const nodes = Int32Array.from(outputs.keys());
    const classes = new Int32Array(outputs.length);
    const robust = docThresholdsRobust(rows, 1, nodes, classes, 3)[0];
    // σ_std = sqrt(mean((1 − p)²)) ≈ 0.37 → 1 − 3σ < 0.5 → the floor.
    const squared = outputs.reduce((sum, p) => sum + (1 - p) * (1 - p), 0) / outputs.length;
    assert.equal(Math.max(0.5, 1 - 3 * Math.sqrt(squared)), 0.5);
    // |1 − p| sorted: 0.01, 0.02, 0.02, 0.03, 0.03, 0.04, 0.98 → median 0.03 → 1 − 3·1.4826·0.03 = 0.866566.
    assert.ok(Math.abs(robust - 0.866566) < 1e-5, `robust threshold ${robust}`);
  });

  it('gives a margin in logit units that is positive exactly where DOC rejects', () => {
    const probabilities = Float32Array.from([0.9, 0.1, 0.4, 0.45, 0.2, 0.95, 0.6, 0.6]);
    const thresholds = Float32Array.from([0.8, 0.7]);
    const margin = docMargin(probabilities, 2, thresholds);
    const novelty = docNovelty(probabilities, 2, thresholds);
    const rejected = docRejected(probabilities, 2, thresholds);
    const logit = (p: number) => Math.log(p / (1 - p));
    // min over classes of logit(t_c) − logit(p_c), by hand: row 0 min(1.386294 − 2.197225, 0.847298 + 2.197225) = −0.810930;
    // row 1 min(1.386294 + 0.405465, 0.847298 + 0.200671) = 1.047969; row 2 min(2.772589, 0.847298 − 2.944439) = −2.097141;
    // row 3 min(1.386294 − 0.405465, 0.847298 − 0.405465) = 0.441833.
    const expected = [-0.81093, 1.047969, -2.097141, 0.441833];
    expected.forEach((m, i) => {
      assert.ok(Math.abs(margin[i] - m) < 1e-5, `row ${i}: ${margin[i]} vs ${m}`);
      assert.equal(rejected[i], m > 0 ? 1 : 0);
      // The clamped novelty in [0, 1] keeps the probability form 1 − max_c p_c/t_c.
      const ratio = Math.max(probabilities[2 * i] / 0.8, probabilities[2 * i + 1] / 0.7);
      assert.ok(Math.abs(novelty[i] - Math.max(0, 1 - ratio)) < 1e-6);
    });
    assert.ok(Math.abs(logit(0.8) - 1.386294) < 1e-6);
  });

  it('keeps the rule at saturated outputs and thresholds of 1', () => {
    const below = 1 - 2 ** -24; // the largest float32 under 1
    const probabilities = Float32Array.from([1, 0, below, 0, 0, 0]);
    const margin = docMargin(probabilities, 2, Float32Array.from([1, 0.5]));
    const rejected = docRejected(probabilities, 2, Float32Array.from([1, 0.5]));
    assert.deepEqual(
      Array.from(margin, (m) => (m > 0 ? 1 : 0)),
      Array.from(rejected),
    );
    assert.deepEqual(Array.from(rejected), [0, 1, 1]);
    assert.ok(margin.every(Number.isFinite));
  });

  it('lets a confident known node stay accepted beside a novel neighbour after smoothing', () => {
    // Thresholds near 1 (well-separated classes): in probability units the known node's margin
    // would be at most 1 − 1/0.99 ≈ −0.01, and one round at λ = 0.5 beside a margin of 0.7 flips it.
    const probabilities = Float32Array.from([0.99999, 0.001, 0.3, 0.2]);
    const thresholds = Float32Array.from([0.99, 0.99]);
    const margin = docMargin(probabilities, 2, thresholds);
    assert.ok(margin[0] < 0 && margin[1] > 0);
    const smoothedKnown = 0.5 * margin[0] + 0.5 * margin[1];
    assert.ok(smoothedKnown < 0, `smoothed margin of the known node ${smoothedKnown}`);
    const inProbabilities = 0.5 * (1 - 0.99999 / 0.99) + 0.5 * (1 - 0.3 / 0.99);
    assert.ok(inProbabilities > 0, 'the probability-unit margin would have rejected it');
  });
});
