import assert from 'node:assert/strict';
import { averageSelfConfidence, confidentJoint, normaliseRows, offDiagonalRows } from '../../src/engine/secondLook/confidentJoint';

// Reference: the confident joint as defined by Northcutt, Jiang & Chuang (2021), "Confident
// Learning: Estimating Uncertainty in Dataset Labels", JAIR 70, 1373–1411, section 3.1: the
// threshold t_j is the average self-confidence, mean of p̂_j(x) over the examples labelled j; an
// example labelled i is counted in C[i][j] when p̂_j(x) ≥ t_j and j is the argmax of p̂ among the
// classes whose output reaches their threshold; examples reaching no threshold are not counted.
// The expected values below were worked by hand from that definition (all inputs are multiples of
// 1/16, exact in float32, so no comparison sits on a rounding edge).
describe('confident joint (hand-worked example of the published definition)', () => {
  //            class:  0       1       2
  const rows = [
    [0, [14 / 16, 1 / 16, 1 / 16]], // a
    [0, [12 / 16, 2 / 16, 2 / 16]], // b
    [0, [1 / 16, 8 / 16, 7 / 16]], // c
    [1, [2 / 16, 10 / 16, 4 / 16]], // d
    [1, [8 / 16, 1 / 16, 7 / 16]], // e
    [2, [4 / 16, 4 / 16, 8 / 16]], // f
    [2, [0, 12 / 16, 4 / 16]], // g
  ] as const;
  const given = Int32Array.from(rows, ([g]) => g);
  const outputs = Float32Array.from(rows.flatMap(([, p]) => p));

  it('thresholds are the average self-confidence of each class', () => {
    // t0 = (14 + 12 + 1) / 16 / 3 = 27/48 = 0.5625
    // t1 = (10 + 1) / 16 / 2      = 11/32 = 0.34375
    // t2 = (8 + 4) / 16 / 2       = 12/32 = 0.375
    assert.deepEqual(Array.from(averageSelfConfidence(outputs, 3, given)), [0.5625, 0.34375, 0.375]);
  });

  it('counts each row under the highest class among those that reach their threshold', () => {
    // a: 0.875 ≥ t0; 0.0625 < t1; 0.0625 < t2                         → C[0][0]
    // b: 0.75 ≥ t0; 0.125 < t1; 0.125 < t2                            → C[0][0]
    // c: 0.0625 < t0; 0.5 ≥ t1; 0.4375 ≥ t2; argmax of {0.5, 0.4375}  → C[0][1] (off the diagonal)
    // d: 0.125 < t0; 0.625 ≥ t1; 0.25 < t2                            → C[1][1]
    // e: 0.5 < t0 (the plain argmax does not count); 0.0625 < t1; 0.4375 ≥ t2 → C[1][2] (off)
    // f: 0.25 < t0; 0.25 < t1; 0.5 ≥ t2                               → C[2][2]
    // g: 0 < t0; 0.75 ≥ t1; 0.25 < t2                                 → C[2][1] (off)
    const joint = confidentJoint(outputs, 3, given);
    assert.deepEqual(joint.counts, [
      [2, 1, 0],
      [0, 1, 1],
      [0, 1, 1],
    ]);
    assert.deepEqual(Array.from(joint.confidentClass), [0, 0, 1, 1, 2, 2, 1]);
    assert.deepEqual(Array.from(offDiagonalRows(joint, given)), [0, 0, 1, 0, 1, 0, 1]);
  });

  it('leaves out rows that reach no threshold and counts a row that reaches one exactly (p ≥ t)', () => {
    // t0 = (0.75 + 0.25) / 2 = 0.5 and t1 = (0.75 + 0.25) / 2 = 0.5.
    // Row 1 reaches neither; row 3 reaches t0 exactly (0.5 ≥ 0.5) → C[1][0].
    const two = Float32Array.from([0.75, 0.25, 0.25, 0.25, 0.25, 0.75, 0.5, 0.25]);
    const twoGiven = Int32Array.from([0, 0, 1, 1]);
    const joint = confidentJoint(two, 2, twoGiven);
    assert.deepEqual(joint.counts, [
      [1, 0],
      [1, 1],
    ]);
    assert.deepEqual(Array.from(joint.confidentClass), [0, -1, 1, 0]);
  });

  it('a class no row is labelled with gets no threshold and is never the confident class', () => {
    const joint = confidentJoint(Float32Array.from([0.2, 0.9, 0.6, 0.3]), 2, Int32Array.from([0, 0]));
    assert.ok(Number.isNaN(joint.thresholds[1]));
    assert.deepEqual(Array.from(joint.confidentClass), [-1, 0]);
  });

  it('normaliseRows scales one-vs-rest outputs to shares and leaves an all-zero row at zero', () => {
    assert.deepEqual(Array.from(normaliseRows(Float32Array.from([0.5, 0.25, 0.25, 0, 0, 0]), 3)), [0.5, 0.25, 0.25, 0, 0, 0]);
    assert.deepEqual(Array.from(normaliseRows(Float32Array.from([0.75, 0.75]), 2)), [0.5, 0.5]);
  });
});
