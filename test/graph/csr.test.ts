import { strict as assert } from 'node:assert';
import { buildAdjacency, rowLengths, sortAndMergeRows, transpose } from '../../src/engine/graph/csr';
import { SeededRandom } from '../../src/engine/util/random';
import { denseAdjacency, denseTranspose, edgeList, karateEdges, maxAbsDifference, randomCsr, toDense } from './fixtures';

describe('buildAdjacency', () => {
  it('sorts rows, sums repeated edges and keeps a given self-loop once (hand case)', () => {
    // Edges 2-0 (w 1), 0-2 again (w 2), 1-1 (w 5), 2-1 (w 3) on 3 nodes, undirected:
    // row 0: {2: 1 + 2}; row 1: {1: 5, 2: 3}; row 2: {0: 3, 1: 3}.
    const adjacency = buildAdjacency(
      3,
      edgeList(
        [
          [2, 0],
          [0, 2],
          [1, 1],
          [2, 1],
        ],
        [1, 2, 5, 3],
      ),
      true,
    );
    assert.deepEqual(Array.from(adjacency.rowPtr), [0, 1, 3, 5]);
    assert.deepEqual(Array.from(adjacency.colIndex), [2, 1, 2, 0, 1]);
    assert.deepEqual(Array.from(adjacency.values), [3, 5, 3, 3, 3]);
  });

  it('keeps direction when symmetric is false', () => {
    const adjacency = buildAdjacency(
      3,
      edgeList([
        [0, 2],
        [0, 1],
        [2, 1],
      ]),
      false,
    );
    assert.deepEqual(Array.from(rowLengths(adjacency)), [2, 0, 1]);
    assert.deepEqual(Array.from(adjacency.colIndex), [1, 2, 1]);
  });

  it('equals the dense adjacency of a random weighted multigraph', () => {
    const random = new SeededRandom(41);
    const pairs: Array<[number, number]> = [];
    const weights: number[] = [];
    for (let e = 0; e < 400; e++) {
      pairs.push([random.int(50), random.int(50)]);
      weights.push(random.next());
    }
    const edges = edgeList(pairs, weights);
    const adjacency = buildAdjacency(50, edges, true);
    assert.ok(maxAbsDifference(toDense(adjacency), denseAdjacency(50, edges)) < 1e-6);
    for (let row = 0; row < 50; row++) {
      for (let k = adjacency.rowPtr[row] + 1; k < adjacency.rowPtr[row + 1]; k++)
        assert.ok(adjacency.colIndex[k] > adjacency.colIndex[k - 1]);
    }
  });

  it('gives the karate club its 78 edges and known degrees', () => {
    // 34 members, 78 ties; the instructor (node 0) has 16 ties, the administrator (node 33) 17
    // (Zachary 1977, from memory; the edge count is also in FIELD-NOTES).
    const { nodeCount, edges } = karateEdges();
    const adjacency = buildAdjacency(nodeCount, edges, true);
    const degrees = rowLengths(adjacency);
    assert.equal(nodeCount, 34);
    assert.equal(adjacency.rowPtr[34], 156);
    assert.equal(degrees[0], 16);
    assert.equal(degrees[33], 17);
  });

  it('names the edge whose node index is out of range', () => {
    assert.throws(
      () =>
        buildAdjacency(
          3,
          edgeList([
            [0, 1],
            [1, 3],
          ]),
          true,
        ),
      /edge 1 joins node indices 1 and 3, outside 0..2/,
    );
  });
});

describe('sortAndMergeRows and transpose', () => {
  it('sortAndMergeRows keeps the dense matrix and leaves its inputs untouched', () => {
    const random = new SeededRandom(42);
    const raw = randomCsr(random, 40, 25, 6, false);
    const colsBefore = raw.colIndex.slice();
    const merged = sortAndMergeRows(raw.rowCount, raw.colCount, raw.rowPtr, raw.colIndex, raw.values);
    assert.ok(maxAbsDifference(toDense(merged), toDense(raw)) < 1e-6);
    assert.ok(merged.rowPtr[40] < raw.rowPtr[40], 'some repeated entries were merged');
    assert.deepEqual(raw.colIndex, colsBefore);
  });

  it('transpose equals the dense transpose and has sorted rows', () => {
    const random = new SeededRandom(43);
    const m = randomCsr(random, 30, 20, 4);
    const t = transpose(m);
    assert.equal(t.rowCount, 20);
    assert.equal(t.colCount, 30);
    assert.deepEqual(toDense(t), denseTranspose(toDense(m), 30, 20));
    for (let row = 0; row < 20; row++) {
      for (let k = t.rowPtr[row] + 1; k < t.rowPtr[row + 1]; k++) assert.ok(t.colIndex[k] > t.colIndex[k - 1]);
    }
  });
});
