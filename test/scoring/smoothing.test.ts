import { strict as assert } from 'node:assert';
import { buildAdjacency } from '../../src/engine/graph/csr';
import { smoothNovelty } from '../../src/engine/scoring/smoothing';
import { SeededRandom } from '../../src/engine/util/random';

function adjacencyOf(nodeCount: number, pairs: Array<[number, number]>) {
  const edges = {
    source: Int32Array.from(pairs.map((p) => p[0])),
    target: Int32Array.from(pairs.map((p) => p[1])),
    weight: null,
    count: pairs.length,
  };
  return buildAdjacency(nodeCount, edges, true);
}

const closeAll = (actual: Float32Array, expected: number[]) => {
  assert.equal(actual.length, expected.length);
  expected.forEach((e, i) => assert.ok(Math.abs(actual[i] - e) < 1e-6, `node ${i}: ${actual[i]} vs ${e}`));
};

describe('neighbour smoothing of novelty', () => {
  // Path 0 – 1 – 2, node 3 isolated.
  const path = adjacencyOf(4, [
    [0, 1],
    [1, 2],
  ]);
  const scores = new Float32Array([1, 0, 0, 0.7]);

  it('λ = 0 (or zero rounds) is the identity and returns a copy', () => {
    const out = smoothNovelty(scores, path, 0, 2);
    closeAll(out, [1, 0, 0, 0.7]);
    assert.notEqual(out, scores);
    closeAll(smoothNovelty(scores, path, 0.5, 0), [1, 0, 0, 0.7]);
  });

  it('a path graph by hand, one and two rounds; the isolated node keeps its score', () => {
    // λ = 0.5, round 1:  s0 = 0.5·1 + 0.5·0 = 0.5;  s1 = 0.5·0 + 0.5·(1 + 0)/2 = 0.25;
    //                    s2 = 0.5·0 + 0.5·0 = 0;    s3 isolated = 0.7.
    closeAll(smoothNovelty(scores, path, 0.5, 1), [0.5, 0.25, 0, 0.7]);
    // round 2 (from round 1's scores): s0 = 0.5·0.5 + 0.5·0.25 = 0.375;
    //   s1 = 0.5·0.25 + 0.5·(0.5 + 0)/2 = 0.25;  s2 = 0.5·0 + 0.5·0.25 = 0.125;  s3 = 0.7.
    closeAll(smoothNovelty(scores, path, 0.5, 2), [0.375, 0.25, 0.125, 0.7]);
    // λ = 1, one round: each node becomes its neighbours' mean: [0, 0.5, 0, 0.7].
    closeAll(smoothNovelty(scores, path, 1, 1), [0, 0.5, 0, 0.7]);
    // The input is not modified.
    closeAll(scores, [1, 0, 0, 0.7]);
  });

  it('K rounds equal K successive single rounds', () => {
    let stepwise: Float32Array = scores;
    for (let k = 0; k < 5; k++) stepwise = smoothNovelty(stepwise, path, 0.3, 1);
    closeAll(smoothNovelty(scores, path, 0.3, 5), Array.from(stepwise));
  });

  it('equals the reference update on a random simple graph', () => {
    // Reference (shared/reference/torch_pipeline.py): nb = (A @ s) / max(cnt, 1);
    // s = where(cnt > 0, 0.5·s + 0.5·nb, s), twice, A the symmetric 0/1 adjacency.
    const random = new SeededRandom(11);
    const n = 300;
    const seen = new Set<string>();
    const pairs: Array<[number, number]> = [];
    while (pairs.length < 700) {
      const a = random.int(n);
      const b = random.int(n);
      if (a === b || seen.has(`${Math.min(a, b)}-${Math.max(a, b)}`)) continue;
      seen.add(`${Math.min(a, b)}-${Math.max(a, b)}`);
      pairs.push([a, b]);
    }
    const s0 = Float32Array.from({ length: n }, () => random.next());
    let reference = Array.from(s0);
    for (let round = 0; round < 2; round++) {
      const sum = new Array<number>(n).fill(0);
      const count = new Array<number>(n).fill(0);
      for (const [a, b] of pairs) {
        sum[a] += reference[b];
        sum[b] += reference[a];
        count[a]++;
        count[b]++;
      }
      reference = reference.map((s, i) => (count[i] > 0 ? 0.5 * s + (0.5 * sum[i]) / count[i] : s));
    }
    closeAll(smoothNovelty(s0, adjacencyOf(n, pairs), 0.5, 2), reference);
  });

  it('rejects bad parameters', () => {
    assert.throws(() => smoothNovelty(new Float32Array(3), path, 0.5, 1), /4 × 4 but there are 3 scores/);
    assert.throws(() => smoothNovelty(scores, path, 1.5, 1), /lambda/);
    assert.throws(() => smoothNovelty(scores, path, 0.5, 1.5), /rounds/);
  });
});
