import { strict as assert } from 'node:assert';
import { adjustedRandIndex } from '../../src/engine/discovery/ari';
import { SeededRandom } from '../../src/engine/util/random';

/** Pair counting: ARI = 2(a·d − b·c) / ((a + b)(b + d) + (a + c)(c + d)), a = pairs together in both, d = apart in both. */
function bruteForceAri(x: number[], y: number[]): number {
  let a = 0;
  let b = 0;
  let c = 0;
  let d = 0;
  for (let i = 0; i < x.length; i++) {
    for (let j = i + 1; j < x.length; j++) {
      const sameX = x[i] === x[j];
      const sameY = y[i] === y[j];
      if (sameX && sameY) a++;
      else if (sameX) b++;
      else if (sameY) c++;
      else d++;
    }
  }
  if (b === 0 && c === 0) return 1;
  return (2 * (a * d - b * c)) / ((a + b) * (b + d) + (a + c) * (c + d));
}

describe('discovery/adjustedRandIndex', () => {
  // scikit-learn's adjusted_rand_score documentation examples
  // (https://scikit-learn.org/stable/modules/generated/sklearn.metrics.adjusted_rand_score.html; the
  // docstring of sklearn/metrics/cluster/_supervised.py in scikit-learn/scikit-learn): 1.0, 1.0,
  // 0.57..., 0.57..., 0.0 and -0.5.
  it('reproduces the scikit-learn documentation examples', () => {
    assert.equal(adjustedRandIndex([0, 0, 1, 1], [0, 0, 1, 1]), 1);
    assert.equal(adjustedRandIndex([0, 0, 1, 1], [1, 1, 0, 0]), 1);
    const incomplete = adjustedRandIndex([0, 0, 1, 2], [0, 0, 1, 1]);
    const split = adjustedRandIndex([0, 0, 1, 1], [0, 0, 1, 2]);
    assert.ok(incomplete >= 0.57 && incomplete < 0.58, `${incomplete}`);
    assert.ok(split >= 0.57 && split < 0.58, `${split}`);
    assert.equal(adjustedRandIndex([0, 0, 0, 0], [0, 1, 2, 3]), 0);
    assert.equal(adjustedRandIndex([0, 0, 1, 1], [0, 1, 0, 1]), -0.5);
  });

  // Hubert & Arabie (1985) formula, worked by hand on this table (rows: a, columns: b):
  //   a = [0,0,0,1,1,1,2,2], b = [0,0,1,1,1,2,2,2]
  //            b=0  b=1  b=2 | row sum
  //     a=0     2    1    0  |   3
  //     a=1     0    2    1  |   3
  //     a=2     0    0    2  |   2
  //     col     2    3    3  |   8
  //   Σ C(n_ij,2) = 1 + 1 + 1 = 3;  Σ C(a_i,2) = 3 + 3 + 1 = 7;  Σ C(b_j,2) = 1 + 3 + 3 = 7;  C(8,2) = 28
  //   expected = 7·7/28 = 1.75;  max = (7 + 7)/2 = 7;  ARI = (3 − 1.75)/(7 − 1.75) = 1.25/5.25 = 5/21
  it('matches a contingency table worked by hand with the Hubert–Arabie formula, and pair counting', () => {
    const a = [0, 0, 0, 1, 1, 1, 2, 2];
    const b = [0, 0, 1, 1, 1, 2, 2, 2];
    assert.ok(Math.abs(adjustedRandIndex(a, b) - 5 / 21) < 1e-12);
    assert.ok(Math.abs(bruteForceAri(a, b) - 5 / 21) < 1e-12);
  });

  it('equals pair counting on seeded random partitions, and is symmetric', () => {
    const random = new SeededRandom(4);
    for (let trial = 0; trial < 20; trial++) {
      const n = 5 + random.int(40);
      const kx = 1 + random.int(5);
      const ky = 1 + random.int(5);
      const x = Array.from({ length: n }, () => random.int(kx));
      const y = Array.from({ length: n }, (_, i) => (random.next() < 0.6 ? x[i] : random.int(ky)));
      const value = adjustedRandIndex(x, y);
      assert.ok(Math.abs(value - bruteForceAri(x, y)) < 1e-12, `trial ${trial}`);
      assert.ok(Math.abs(value - adjustedRandIndex(y, x)) < 1e-12);
    }
  });

  it('rejects partitions of different lengths', () => {
    assert.throws(() => adjustedRandIndex([0, 1], [0]), /2 and 1 items/);
  });
});
