import { strict as assert } from 'node:assert';
import { classTfidfTopTerms, tokenize } from '../../src/engine/discovery/ctfidf';

describe('discovery/classTfidfTopTerms', () => {
  // Worked by hand. Group 0 = "apple apple banana", group 1 = "banana cherry".
  //   terms per group: 3 and 2 → A = 5/2 = 2.5;  f_apple = 2, f_banana = 2, f_cherry = 1
  //   group 0: apple  = 2/3 · ln(1 + 2.5/2) = 2/3 · ln 2.25 ≈ 0.540620
  //            banana = 1/3 · ln 2.25                       ≈ 0.270310
  //   group 1: cherry = 1/2 · ln(1 + 2.5/1) = 1/2 · ln 3.5  ≈ 0.626381
  //            banana = 1/2 · ln 2.25                       ≈ 0.405465
  it('matches a hand-worked example', () => {
    const [first, second] = classTfidfTopTerms([['apple apple banana'], ['banana cherry']], 5, new Set());
    assert.deepEqual(
      first.map((t) => t.term),
      ['apple', 'banana'],
    );
    assert.deepEqual(
      second.map((t) => t.term),
      ['cherry', 'banana'],
    );
    assert.ok(Math.abs(first[0].weight - (2 / 3) * Math.log(2.25)) < 1e-12);
    assert.ok(Math.abs(first[1].weight - (1 / 3) * Math.log(2.25)) < 1e-12);
    assert.ok(Math.abs(second[0].weight - 0.5 * Math.log(3.5)) < 1e-12);
    assert.ok(Math.abs(second[1].weight - 0.5 * Math.log(2.25)) < 1e-12);
  });

  it('treats the documents of one group as one text, drops stop words and keeps topN', () => {
    const [group] = classTfidfTopTerms([['The apple', 'an apple and a pear'], ['the plum']], 1);
    assert.deepEqual(group, [{ term: 'apple', weight: (2 / 3) * Math.log(1 + 2 / 2) }]);
  });

  it('tokenizes letters and digits, lower-cased, without one-letter tokens or bare numbers', () => {
    assert.deepEqual(tokenize('Gearbox-fault: 2024 X vibration_level3, Überhitzung'), [
      'gearbox',
      'fault',
      'vibration',
      'level3',
      'überhitzung',
    ]);
  });
});
