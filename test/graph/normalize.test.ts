import { strict as assert } from 'node:assert';
import { buildAdjacency, type CsrMatrix } from '../../src/engine/graph/csr';
import { addSelfLoops, meanNormalized, symmetricNormalized } from '../../src/engine/graph/normalize';
import { spmm } from '../../src/engine/graph/spmm';
import { SeededRandom } from '../../src/engine/util/random';
import { denseAdjacency, denseMatMul, edgeList, karateEdges, maxAbsDifference, randomDense, toDense } from './fixtures';

/** D^-1/2 (A + I) D^-1/2 written out densely, with D the row sums of A + I. */
function denseGcn(nodeCount: number, adjacency: Float64Array): Float64Array {
  const looped = adjacency.slice();
  for (let i = 0; i < nodeCount; i++) looped[i * nodeCount + i] += 1;
  const degree = new Float64Array(nodeCount);
  for (let i = 0; i < nodeCount; i++) for (let j = 0; j < nodeCount; j++) degree[i] += looped[i * nodeCount + j];
  const out = new Float64Array(nodeCount * nodeCount);
  for (let i = 0; i < nodeCount; i++) {
    for (let j = 0; j < nodeCount; j++) out[i * nodeCount + j] = looped[i * nodeCount + j] / Math.sqrt(degree[i] * degree[j]);
  }
  return out;
}

function assertSortedRows(m: CsrMatrix): void {
  for (let row = 0; row < m.rowCount; row++) {
    for (let k = m.rowPtr[row] + 1; k < m.rowPtr[row + 1]; k++)
      assert.ok(m.colIndex[k] > m.colIndex[k - 1], `row ${row} not strictly sorted`);
  }
}

describe('symmetricNormalized (GCN)', () => {
  it('matches the hand computation on the path 0-1-2 plus an isolated node 3', () => {
    // Degrees of A + I: node 0 → 2, node 1 → 3, node 2 → 2, node 3 (isolated) → 1.
    // Â[0][0] = 1/2, Â[0][1] = 1/√(2·3) = 1/√6 ≈ 0.408248, Â[1][1] = 1/3, Â[1][2] = 1/√6,
    // Â[2][2] = 1/2, Â[3][3] = 1/1 = 1, and 0 elsewhere (worked by hand).
    const normalized = symmetricNormalized(
      buildAdjacency(
        4,
        edgeList([
          [0, 1],
          [1, 2],
        ]),
        true,
      ),
    );
    const s6 = 1 / Math.sqrt(6);
    const expected = [
      [0.5, s6, 0, 0],
      [s6, 1 / 3, s6, 0],
      [0, s6, 0.5, 0],
      [0, 0, 0, 1],
    ].flat();
    assert.ok(maxAbsDifference(toDense(normalized), expected) < 1e-7);
    assert.equal(normalized.rowPtr[4], 8, 'four edge entries plus four self-loops');
    assertSortedRows(normalized);
  });

  it('propagates one step on the star K1,3 as worked by hand', () => {
    // Centre 0 joined to leaves 1, 2, 3. Degrees of A + I: centre 4, leaves 2.
    // Â[0][0] = 1/4, Â[0][leaf] = 1/√(4·2) = 1/(2√2) ≈ 0.353553, Â[leaf][leaf] = 1/2.
    // With X = [[1, 0], [0, 1], [0, 1], [0, 1]] (centre marked in column 0, leaves in column 1):
    // (ÂX)[0] = [1/4, 3/(2√2)] ≈ [0.25, 1.060660], (ÂX)[leaf] = [1/(2√2), 1/2] ≈ [0.353553, 0.5].
    const normalized = symmetricNormalized(
      buildAdjacency(
        4,
        edgeList([
          [0, 1],
          [0, 2],
          [0, 3],
        ]),
        true,
      ),
    );
    const features = Float32Array.from([1, 0, 0, 1, 0, 1, 0, 1]);
    const propagated = spmm(normalized, features, 2);
    const leaf = [1 / (2 * Math.SQRT2), 0.5];
    assert.ok(maxAbsDifference(propagated, [0.25, 3 / (2 * Math.SQRT2), ...leaf, ...leaf, ...leaf]) < 1e-6);
  });

  it('equals the dense D^-1/2 (A + I) D^-1/2 on a random weighted graph with duplicates and self-loops', () => {
    const random = new SeededRandom(11);
    const nodeCount = 40;
    const pairs: Array<[number, number]> = [];
    const weights: number[] = [];
    for (let e = 0; e < 120; e++) {
      pairs.push([random.int(nodeCount), random.int(nodeCount)]);
      weights.push(0.1 + random.next());
    }
    pairs.push([5, 5], [7, 8], [7, 8]); // a given self-loop and a repeated edge
    weights.push(2, 0.5, 0.25);
    const edges = edgeList(pairs, weights);
    const normalized = symmetricNormalized(buildAdjacency(nodeCount, edges, true));
    const expected = denseGcn(nodeCount, denseAdjacency(nodeCount, edges));
    assert.ok(maxAbsDifference(toDense(normalized), expected) < 1e-6);
    assertSortedRows(normalized);
    // One propagation step equals the dense product.
    const features = randomDense(random, nodeCount * 3);
    const step = spmm(normalized, features, 3);
    assert.ok(maxAbsDifference(step, denseMatMul(expected, nodeCount, nodeCount, features, 3)) < 1e-5);
  });

  it('has √d as an eigenvector with eigenvalue 1 on the karate club', () => {
    // For Â = D^-1/2 (A + I) D^-1/2, Â·D^{1/2}1 = D^-1/2 (A + I) 1 = D^-1/2 D 1 = D^{1/2}1: the
    // top eigenvalue of the renormalised matrix is 1 (Kipf & Welling, ICLR 2017, section 2.2).
    const { nodeCount, edges } = karateEdges();
    const normalized = symmetricNormalized(buildAdjacency(nodeCount, edges, true));
    const rootDegree = new Float32Array(nodeCount);
    for (let i = 0; i < nodeCount; i++) rootDegree[i] = Math.sqrt(normalized.rowPtr[i + 1] - normalized.rowPtr[i]);
    assert.ok(maxAbsDifference(spmm(normalized, rootDegree, 1), rootDegree) < 1e-5);
  });

  it('gives the same [ÂX, Â²X] as PyTorch on the karate club', () => {
    // Reference: PyTorch 1.13.1 (Debian python3-torch), the normalisation of
    // shared/reference/torch_pipeline.py, karate club adjacency as shipped by graphology-generators,
    // X = node index as one float32 column; printed with 7 decimals.
    //   A = torch.sparse_coo_tensor([dst, src], w, (34, 34)).coalesce().to_sparse_csr()
    //   AX = A @ X; A2X = A @ AX
    // Node 0 has degree 16 and node 33 degree 17 (Zachary 1977, from memory); node 11's only
    // neighbour is node 0, so (ÂX)[11] = 11/2 + 0/√(2·17) = 5.5 by hand.
    const reference: Record<number, [number, number]> = {
      0: [20.2611332, 16.225193],
      1: [17.5021267, 12.6649714],
      11: [5.4999995, 6.2247553],
      32: [33.1152611, 31.1476288],
      33: [42.3992996, 34.8049126],
    };
    const { nodeCount, edges } = karateEdges();
    const adjacency = buildAdjacency(nodeCount, edges, true);
    assert.equal(adjacency.rowPtr[nodeCount], 2 * 78);
    assert.equal(adjacency.rowPtr[1] - adjacency.rowPtr[0], 16);
    assert.equal(adjacency.rowPtr[34] - adjacency.rowPtr[33], 17);
    const normalized = symmetricNormalized(adjacency);
    const features = Float32Array.from({ length: nodeCount }, (_, i) => i);
    const once = spmm(normalized, features, 1);
    const twice = spmm(normalized, once, 1);
    for (const [node, [expectedOnce, expectedTwice]] of Object.entries(reference)) {
      assert.ok(Math.abs(once[Number(node)] - expectedOnce) < 2e-5, `ÂX[${node}] = ${once[Number(node)]}, PyTorch ${expectedOnce}`);
      assert.ok(Math.abs(twice[Number(node)] - expectedTwice) < 2e-5, `Â²X[${node}] = ${twice[Number(node)]}, PyTorch ${expectedTwice}`);
    }
  });

  it('rejects a non-square matrix', () => {
    const rectangular: CsrMatrix = {
      rowCount: 2,
      colCount: 3,
      rowPtr: new Int32Array(3),
      colIndex: new Int32Array(0),
      values: new Float32Array(0),
    };
    assert.throws(() => symmetricNormalized(rectangular), /must be square, got 2 × 3/);
  });
});

describe('meanNormalized (GraphSAGE mean)', () => {
  // Star K1,3 plus isolated node 4 (worked by hand):
  // without self-loops the centre averages its three leaves (1/3 each), each leaf copies the
  // centre (1), the isolated row stays empty; with self-loops the centre row is 1/4 × 4 and each
  // leaf row is 1/2 on the centre and 1/2 on itself, and the isolated node keeps itself (1).
  const star = () =>
    buildAdjacency(
      5,
      edgeList([
        [0, 1],
        [0, 2],
        [0, 3],
      ]),
      true,
    );

  it('averages neighbours without self-loops and leaves empty rows empty', () => {
    const mean = meanNormalized(star(), false);
    const third = 1 / 3;
    const expected = [
      [0, third, third, third, 0],
      [1, 0, 0, 0, 0],
      [1, 0, 0, 0, 0],
      [1, 0, 0, 0, 0],
      [0, 0, 0, 0, 0],
    ].flat();
    assert.ok(maxAbsDifference(toDense(mean), expected) < 1e-7);
    assert.equal(mean.rowPtr[5] - mean.rowPtr[4], 0, 'isolated row has no entries');
  });

  it('counts the node itself with self-loops', () => {
    const mean = meanNormalized(star(), true);
    const expected = [
      [0.25, 0.25, 0.25, 0.25, 0],
      [0.5, 0.5, 0, 0, 0],
      [0.5, 0, 0.5, 0, 0],
      [0.5, 0, 0, 0.5, 0],
      [0, 0, 0, 0, 1],
    ].flat();
    assert.ok(maxAbsDifference(toDense(mean), expected) < 1e-7);
    assertSortedRows(mean);
  });

  it('makes every non-empty row of a weighted random graph sum to 1 and keeps the input unchanged', () => {
    const random = new SeededRandom(5);
    const pairs: Array<[number, number]> = [];
    const weights: number[] = [];
    for (let e = 0; e < 60; e++) {
      pairs.push([random.int(30), random.int(30)]);
      weights.push(0.5 + random.next());
    }
    const adjacency = buildAdjacency(30, edgeList(pairs, weights), true);
    const before = adjacency.values.slice();
    const mean = meanNormalized(adjacency, false);
    const dense = toDense(mean);
    const denseInput = toDense(adjacency);
    for (let row = 0; row < 30; row++) {
      let sum = 0;
      let inputSum = 0;
      for (let col = 0; col < 30; col++) {
        sum += dense[row * 30 + col];
        inputSum += denseInput[row * 30 + col];
      }
      if (adjacency.rowPtr[row + 1] > adjacency.rowPtr[row]) {
        assert.ok(Math.abs(sum - 1) < 1e-6, `row ${row} sums to ${sum}`);
        for (let col = 0; col < 30; col++) {
          assert.ok(Math.abs(dense[row * 30 + col] - denseInput[row * 30 + col] / inputSum) < 1e-6);
        }
      } else {
        assert.equal(sum, 0);
      }
    }
    assert.deepEqual(adjacency.values, before);
  });
});

describe('addSelfLoops', () => {
  it('inserts a missing diagonal in column order and adds 1 to an existing one', () => {
    const looped = addSelfLoops(
      buildAdjacency(
        3,
        edgeList(
          [
            [0, 2],
            [1, 1],
            [2, 1],
          ],
          [2, 3, 4],
        ),
        false,
      ),
    );
    assert.deepEqual(Array.from(looped.rowPtr), [0, 2, 3, 5]);
    assert.deepEqual(Array.from(looped.colIndex), [0, 2, 1, 1, 2]);
    assert.deepEqual(Array.from(looped.values), [1, 2, 4, 4, 1]);
  });
});
