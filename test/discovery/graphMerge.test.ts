import { strict as assert } from 'node:assert';
import { mergeLinkedGroups } from '../../src/engine/discovery/graphMerge';
import { buildAdjacency } from '../../src/engine/graph/csr';

/** Nine nodes in three triangles (groups 0, 1, 2) plus the given cross edges, as a symmetric adjacency. */
function triangles(cross: [number, number][]) {
  const edges: [number, number][] = [[0, 1], [0, 2], [1, 2], [3, 4], [3, 5], [4, 5], [6, 7], [6, 8], [7, 8], ...cross];
  return buildAdjacency(
    9,
    { source: Int32Array.from(edges.map((e) => e[0])), target: Int32Array.from(edges.map((e) => e[1])), weight: null, count: edges.length },
    true,
  );
}

const items = Int32Array.from([0, 1, 2, 3, 4, 5, 6, 7, 8]);
const groups = Int32Array.from([0, 0, 0, 1, 1, 1, 2, 2, 2]);
const groupZeroToOne: [number, number][] = [
  [0, 3],
  [0, 4],
  [0, 5],
  [1, 3],
  [1, 4],
  [1, 5],
  [2, 3],
  [2, 4],
  [2, 5],
];

describe('discovery/mergeLinkedGroups', () => {
  // Worked by hand: each triangle has within-density 6 links / (3·2) = 1. Between groups 0 and 1
  // with e cross edges: 2e links / (2·3·3) = e/9. The rule merges when e/9 ≥ 0.5 · 1, i.e. e ≥ 5.
  it('merges two groups linked as densely as inside (9 of 9 possible edges)', () => {
    const merged = mergeLinkedGroups(triangles(groupZeroToOne), items, groups, 3);
    assert.equal(merged.groupCount, 2);
    assert.deepEqual(Array.from(merged.assignment), [0, 0, 0, 0, 0, 0, 1, 1, 1]);
    assert.deepEqual(merged.merges, [[0, 1]]);
  });

  it('stops at the threshold: 4 cross edges (4/9 < 0.5) stay apart, 5 (5/9) merge', () => {
    assert.equal(mergeLinkedGroups(triangles(groupZeroToOne.slice(0, 4)), items, groups, 3).groupCount, 3);
    assert.equal(mergeLinkedGroups(triangles(groupZeroToOne.slice(0, 5)), items, groups, 3).groupCount, 2);
  });

  it('needs at least minMergeLinks links: one edge between triangles is not enough even at ratio 1/9 ≥ 0.1', () => {
    const oneEdge = triangles([[0, 3]]);
    assert.equal(mergeLinkedGroups(oneEdge, items, groups, 3, { mergeDensityRatio: 0.1 }).groupCount, 3);
    assert.equal(mergeLinkedGroups(oneEdge, items, groups, 3, { mergeDensityRatio: 0.1, minMergeLinks: 2 }).groupCount, 2);
  });

  it('merges transitively, and leaves unassigned items out', () => {
    const chain = triangles([...groupZeroToOne, [3, 6], [3, 7], [3, 8], [4, 6], [4, 7], [4, 8], [5, 6], [5, 7], [5, 8]]);
    const merged = mergeLinkedGroups(chain, items, Int32Array.from([0, 0, 0, 1, 1, 1, 2, 2, -1]), 3);
    assert.equal(merged.groupCount, 1);
    assert.deepEqual(Array.from(merged.assignment), [0, 0, 0, 0, 0, 0, 0, 0, -1]);
  });
});
