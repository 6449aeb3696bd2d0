import { strict as assert } from 'node:assert';
import {
  meanSilhouette,
  pairwiseDistances,
  sampledMeanSilhouette,
  silhouetteFromDistances,
  silhouetteValues,
  silhouetteValuesAgainstReference,
} from '../../src/engine/discovery/silhouette';
import { SeededRandom } from '../../src/engine/util/random';

// Worked by hand (definition: a(i) = mean distance to the rest of i's group, b(i) = smallest mean
// distance to another group, s(i) = (b − a) / max(a, b), s = 0 for a point alone in its group).
// Points on a line: 0 and 2 in group 0; 3 and 10 in group 1; 20 alone in group 2.
//   x=0 : a = |0−2| = 2;  to group 1: (3 + 10)/2 = 6.5; to group 2: 20  → b = 6.5; s = 4.5/6.5 = 9/13
//   x=2 : a = 2;          to group 1: (1 + 8)/2 = 4.5;  to group 2: 18  → b = 4.5; s = 2.5/4.5 = 5/9
//   x=3 : a = |3−10| = 7; to group 0: (3 + 1)/2 = 2;    to group 2: 17  → b = 2;   s = (2 − 7)/7 = −5/7
//   x=10: a = 7;          to group 0: (10 + 8)/2 = 9;   to group 2: 10  → b = 9;   s = 2/9
//   x=20: alone → 0
//   mean = (9/13 + 5/9 − 5/7 + 2/9 + 0) / 5
const handPoints = Float32Array.from([0, 2, 3, 10, 20]);
const handGroups = Int32Array.from([0, 0, 1, 1, 2]);
const handValues = [9 / 13, 5 / 9, -5 / 7, 2 / 9, 0];
const handMean = (9 / 13 + 5 / 9 - 5 / 7 + 2 / 9) / 5;

function close(actual: ArrayLike<number>, expected: ArrayLike<number>, tolerance = 1e-6): void {
  assert.equal(actual.length, expected.length);
  for (let i = 0; i < expected.length; i++)
    assert.ok(Math.abs(actual[i] - expected[i]) < tolerance, `[${i}] ${actual[i]} vs ${expected[i]}`);
}

describe('discovery/silhouette', () => {
  it('matches the hand-worked example, point by point and on average', () => {
    close(silhouetteValues(handPoints, 1, handGroups, 3), handValues);
    assert.ok(Math.abs(meanSilhouette(handPoints, 1, handGroups, 3) - handMean) < 1e-7);
  });

  it('gives the same values from a distance matrix, from a full reference set and from a full sample', () => {
    const distances = pairwiseDistances(handPoints, 1, [0, 1, 2, 3, 4]);
    close(silhouetteFromDistances(distances, 5, handGroups, 3), handValues);
    close(silhouetteValuesAgainstReference(handPoints, 1, handGroups, 3, Int32Array.from([0, 1, 2, 3, 4])), handValues);
    assert.ok(Math.abs(sampledMeanSilhouette(handPoints, 1, handGroups, 3, 10, 1) - handMean) < 1e-7);
  });

  it('leaves out points with a negative assignment', () => {
    // Dropping x=20: x=0 → b = 6.5, s = 9/13; x=2 → 5/9; x=3 → −5/7; x=10 → b = 9, s = 2/9.
    const values = silhouetteValues(handPoints, 1, Int32Array.from([0, 0, 1, 1, -1]), 3);
    close(values.subarray(0, 4), handValues.slice(0, 4));
    assert.ok(Number.isNaN(values[4]));
  });

  it('is 0 everywhere when there is only one group', () => {
    close(silhouetteValues(handPoints, 1, new Int32Array(5), 1), [0, 0, 0, 0, 0]);
  });

  it('the reference estimate is close to the exact values on two blobs', () => {
    const random = new SeededRandom(8);
    const dim = 4;
    const n = 400;
    const points = new Float32Array(n * dim);
    const groups = new Int32Array(n);
    for (let i = 0; i < n; i++) {
      groups[i] = i < n / 2 ? 0 : 1;
      for (let d = 0; d < dim; d++) points[i * dim + d] = random.normal() + (groups[i] === 1 ? 2.5 : 0);
    }
    const exact = silhouetteValues(points, dim, groups, 2);
    const reference = Int32Array.from({ length: 150 }, (_, r) => r * 2 + (r % 2));
    const estimate = silhouetteValuesAgainstReference(points, dim, groups, 2, reference);
    let worst = 0;
    for (let i = 0; i < n; i++) worst = Math.max(worst, Math.abs(exact[i] - estimate[i]));
    assert.ok(worst < 0.1, `largest difference ${worst}`);
  });
});
