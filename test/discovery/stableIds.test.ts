import { strict as assert } from 'node:assert';
import { assignStableIds, memberHash } from '../../src/engine/discovery/stableIds';

describe('discovery/assignStableIds', () => {
  const previous = [
    { id: 'cand-old-a', members: [1, 2, 3, 4], decision: { action: 'accept', name: 'Icing' } },
    { id: 'cand-old-b', members: [10, 11, 12, 13, 14, 15] },
  ];

  it('keeps the id and decision at Jaccard exactly 0.5, not below', () => {
    // {1,2,3,4} vs {1,2,3,4,5,6,7,8}: 4 shared / 8 in the union = 0.5 → same candidate.
    // {10,11,12} vs {10..15} plus {20,21,22,23}: 3 / 10 = 0.3 → a new one.
    const [a, b] = assignStableIds(
      [
        [1, 2, 3, 4, 5, 6, 7, 8],
        [10, 11, 12, 20, 21, 22, 23],
      ],
      previous,
    );
    assert.deepEqual(a, { id: 'cand-old-a', decision: { action: 'accept', name: 'Icing' } });
    assert.notEqual(b.id, 'cand-old-b');
    assert.equal(b.decision, undefined);
    assert.equal(b.id, 'cand-' + memberHash([10, 11, 12, 20, 21, 22, 23]));
  });

  it('gives an earlier id to one new candidate only: the best overlap', () => {
    // {10..14}: 5/6 ≈ 0.83; {10..15, 16}: 6/7 ≈ 0.86 → the second one keeps cand-old-b.
    const ids = assignStableIds(
      [
        [10, 11, 12, 13, 14],
        [10, 11, 12, 13, 14, 15, 16],
      ],
      previous,
    );
    assert.equal(ids[1].id, 'cand-old-b');
    assert.notEqual(ids[0].id, 'cand-old-b');
  });

  it('never reuses an earlier id for a fresh candidate', () => {
    const members = [40, 41, 42];
    const clash = [{ id: 'cand-' + memberHash(members), members: [90, 91, 92] }];
    const [fresh] = assignStableIds([members], clash);
    assert.equal(fresh.id, 'cand-' + memberHash(members) + '-2');
  });

  it('hashes members independently of their order', () => {
    assert.equal(memberHash([3, 1, 2]), memberHash(Int32Array.from([1, 2, 3])));
    assert.notEqual(memberHash([1, 2, 3]), memberHash([1, 2, 4]));
    assert.match(memberHash([7]), /^[0-9a-f]{12}$/);
  });
});
