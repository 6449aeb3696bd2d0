import { strict as assert } from 'node:assert';
import { averageAccuracy, backwardTransfer, forwardTransfer, warmMinusCold } from '../../src/engine/metrics/continual';

const close = (actual: number, expected: number) => assert.ok(Math.abs(actual - expected) < 1e-12, `${actual} vs ${expected}`);

describe('continual-learning metrics', () => {
  // Definitions: Lopez-Paz & Ranzato 2017, "Gradient Episodic Memory for Continual Learning",
  // Section 2 (ACC, BWT, FWT), checked against two public restatements of those definitions.
  // R[i][j] = accuracy on slice j after training through slice i (0-based), T = 3.
  const R = [
    [0.8, 0.3, 0.2],
    [0.7, 0.9, 0.4],
    [0.6, 0.8, 0.95],
  ];
  const baseline = [0.1, 0.2, 0.25];

  it('ACC on a 3 × 3 matrix by hand', () => {
    // Last row: (0.6 + 0.8 + 0.95) / 3 = 2.35 / 3 = 0.783333…
    close(averageAccuracy(R), 2.35 / 3);
  });

  it('BWT on a 3 × 3 matrix by hand', () => {
    // (R[2][0] − R[0][0]) + (R[2][1] − R[1][1]) = (0.6 − 0.8) + (0.8 − 0.9) = −0.2 − 0.1 = −0.3; / 2 = −0.15.
    close(backwardTransfer(R), -0.15);
  });

  it('FWT on a 3 × 3 matrix by hand', () => {
    // (R[0][1] − b[1]) + (R[1][2] − b[2]) = (0.3 − 0.2) + (0.4 − 0.25) = 0.1 + 0.15 = 0.25; / 2 = 0.125.
    close(forwardTransfer(R, baseline), 0.125);
  });

  it('reads only the entries it needs and names a missing one', () => {
    const lower = [[0.8], [0.7, 0.9], [0.6, 0.8, 0.95]];
    close(averageAccuracy(lower), 2.35 / 3);
    close(backwardTransfer(lower), -0.15);
    assert.throws(() => forwardTransfer(lower, baseline), /R\[0\]\[1\] must be a finite number/);
    assert.throws(() => forwardTransfer(R, [0.1]), /1 baseline accuracies for 3 slices/);
    assert.ok(Number.isNaN(backwardTransfer([[0.9]])));
    assert.ok(Number.isNaN(forwardTransfer([[0.9]], [0.1])));
    close(averageAccuracy([[0.9]]), 0.9);
  });

  it('warm minus cold per slice', () => {
    const gains = warmMinusCold([0.8, 0.75, NaN], [0.7, 0.8, 0.6]);
    close(gains[0], 0.1);
    close(gains[1], -0.05);
    assert.ok(Number.isNaN(gains[2]));
    assert.throws(() => warmMinusCold([1], [1, 2]), /1 warm accuracies for 2 cold/);
  });
});
