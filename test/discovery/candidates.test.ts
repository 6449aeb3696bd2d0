import { strict as assert } from 'node:assert';
import { adjustedRandIndex } from '../../src/engine/discovery/ari';
import { discoverCandidates, type CandidateInput, type DiscoveryResult } from '../../src/engine/discovery/candidates';
import { nodesOfGroups, plantedPartition, type PlantedGraph, type PlantedGroup } from './plantedPartition';

const knownGroups: PlantedGroup[] = [0, 1, 2, 3].map(() => ({ size: 60, known: true }));

/** 4 known classes; novel group 4 is one densely linked community split into two feature blobs; novel group 5 is one blob. */
function plantedGraph(extra: PlantedGroup[] = []): PlantedGraph {
  return plantedPartition({
    seed: 1,
    dim: 16,
    meanScale: 1.5,
    noise: 1,
    insideLinkProbability: 0.15,
    acrossLinkProbability: 0.005,
    sliceCount: 4,
    groups: [
      ...knownGroups,
      { size: 60, known: false, blobs: 2, blobOffset: 8, firstSlice: 2 },
      { size: 50, known: false, firstSlice: 1 },
      ...extra,
    ],
  });
}

function inputFor(graph: PlantedGraph, rejectedNodes: Int32Array, overrides: Partial<CandidateInput> = {}): CandidateInput {
  return {
    rejectedNodes,
    embeddings: graph.embeddings,
    embeddingDim: graph.dim,
    adjacency: graph.adjacency,
    nodeText: graph.nodeText,
    nodeSlice: graph.nodeSlice,
    sliceKeys: graph.sliceKeys,
    labels: graph.labels,
    predictedClass: graph.predictedClass,
    classNames: graph.classNames,
    noveltyScore: graph.noveltyScore,
    seed: 7,
    ...overrides,
  };
}

/** ARI of the found grouping against the planted groups; each scattered node counts as a group of its own. */
function recoveryAri(graph: PlantedGraph, rejected: Int32Array, result: DiscoveryResult): number {
  const found = new Map<number, number>();
  result.candidates.forEach((candidate, c) => candidate.members.forEach((node) => found.set(node, c)));
  let alone = result.candidates.length;
  const truth = Array.from(rejected, (node) => graph.group[node]);
  const predicted = Array.from(rejected, (node) => found.get(node) ?? alone++);
  return adjustedRandIndex(truth, predicted);
}

describe('discovery/discoverCandidates', () => {
  const graph = plantedGraph();
  const rejected = nodesOfGroups(graph, [4, 5]);
  const result = discoverCandidates(inputFor(graph, rejected));

  it('recovers the two planted novel groups (ARI ≥ 0.8), merging the feature-split one through its links', () => {
    assert.ok(recoveryAri(graph, rejected, result) >= 0.8, `ARI ${recoveryAri(graph, rejected, result)}`);
    // The silhouette prefers three feature blobs; the graph step joins the two halves of group 4.
    assert.equal(result.chosenK, 3);
    assert.equal(result.groupCountAfterMerge, 2);
    assert.equal(result.candidates.length, 2);
    assert.ok(result.candidates[0].size >= result.candidates[1].size, 'largest first');
    assert.deepEqual(
      result.silhouetteByK.map((s) => s.k),
      [2, 3, 4, 5, 6, 7, 8, 9, 10],
    );
  });

  it('describes each candidate: terms, emergence curve, nearest members, neighbour classes, drift', () => {
    for (const candidate of result.candidates) {
      const plantedGroup = graph.group[candidate.members[0]];
      assert.ok(graph.vocabularyOf[plantedGroup].includes(candidate.topTerms[0].term), `top term ${candidate.topTerms[0].term}`);
      assert.ok(!candidate.topTerms.some((t) => t.term === 'the'), 'stop words dropped');
      assert.equal(candidate.sliceCounts.map((s) => s.slice).join(), graph.sliceKeys.join());
      assert.equal(
        candidate.sliceCounts.reduce((sum, s) => sum + s.count, 0),
        candidate.size,
      );
      const firstSlice = plantedGroup === 4 ? 2 : 1;
      for (let s = 0; s < firstSlice; s++) assert.equal(candidate.sliceCounts[s].count, 0, 'nothing before the group emerged');
      // Nearest members: distances to the mean embedding, recomputed here.
      const dim = graph.dim;
      const centre = new Float64Array(dim);
      for (const node of candidate.members) for (let d = 0; d < dim; d++) centre[d] += graph.embeddings[node * dim + d] / candidate.size;
      const distances = Array.from(candidate.members, (node) =>
        Math.hypot(...Array.from(centre, (x, d) => graph.embeddings[node * dim + d] - x)),
      ).sort((a, b) => a - b);
      assert.equal(candidate.nearestMembers.length, 5);
      candidate.nearestMembers.forEach((m, i) => {
        assert.ok(Math.abs(m.distance - distances[i]) < 1e-4);
        assert.equal(m.text, graph.nodeText[m.node]);
      });
      // Every non-rejected node has a predicted known class and no rejected node is labelled, so
      // the links to classes add up to all links from members to non-rejected nodes.
      let linksOut = 0;
      const labelledNeighbours = new Set<number>();
      for (const node of candidate.members) {
        for (let e = graph.adjacency.rowPtr[node]; e < graph.adjacency.rowPtr[node + 1]; e++) {
          const other = graph.adjacency.colIndex[e];
          if (graph.group[other] < 4) linksOut++;
          if (graph.labels[other] >= 0) labelledNeighbours.add(other);
        }
      }
      assert.equal(
        candidate.edgesToClasses.reduce((sum, c) => sum + c.edges, 0),
        linksOut,
      );
      assert.equal(
        candidate.neighbourClasses.reduce((sum, c) => sum + c.count, 0),
        labelledNeighbours.size,
      );
      assert.equal(candidate.looksLikeDrift, false);
      assert.ok(candidate.nearestKnownClass && graph.classNames.includes(candidate.nearestKnownClass.className));
      assert.ok(candidate.cohesion > 0 && candidate.cohesion <= 1);
      assert.ok(candidate.internalEdgeDensity > 0.1, `density ${candidate.internalEdgeDensity}`);
      assert.ok(candidate.meanNovelty >= 0.7);
      assert.match(candidate.id, /^cand-[0-9a-f]{12}$/);
    }
  });

  it('is reproducible for a seed', () => {
    const again = discoverCandidates(inputFor(graph, rejected));
    assert.deepEqual(
      again.candidates.map((c) => [c.id, Array.from(c.members)]),
      result.candidates.map((c) => [c.id, Array.from(c.members)]),
    );
  });

  it('recovers the groups too when k is chosen on a sample and silhouettes are estimated', () => {
    const sampled = discoverCandidates(
      inputFor(graph, rejected, { sampleThreshold: 60, silhouetteSampleSize: 70, exactSilhouetteLimit: 50 }),
    );
    assert.ok(recoveryAri(graph, rejected, sampled) >= 0.8, `ARI ${recoveryAri(graph, rejected, sampled)}`);
    assert.equal(sampled.silhouettes.length, rejected.length);
  });

  it('flags rejected nodes of a known class as drift towards that class', () => {
    const unlabelledOfClass2 = Int32Array.from(Array.from(graph.membersOf[2]).filter((node) => graph.labels[node] < 0));
    const drift = discoverCandidates(inputFor(graph, unlabelledOfClass2));
    assert.ok(drift.candidates.length >= 1);
    for (const candidate of drift.candidates) {
      assert.equal(candidate.looksLikeDrift, true);
      assert.equal(candidate.driftTowards, 'known2');
      assert.equal(candidate.nearestKnownClass?.className, 'known2');
    }
  });

  it('flags drift by neighbourhood alone when the embeddings moved away from every known class', () => {
    // The same nodes, their embeddings shifted far from all centroids: only the rule "most members'
    // labelled neighbours carry one class" can still fire.
    const unlabelledOfClass2 = Int32Array.from(Array.from(graph.membersOf[2]).filter((node) => graph.labels[node] < 0));
    const moved = Float32Array.from(graph.embeddings);
    for (const node of unlabelledOfClass2) for (let d = 0; d < graph.dim; d++) moved[node * graph.dim + d] += 30;
    const drift = discoverCandidates(inputFor(graph, unlabelledOfClass2, { embeddings: moved }));
    assert.ok(drift.candidates.length >= 1);
    for (const candidate of drift.candidates) {
      assert.ok((candidate.nearestKnownClass?.distance ?? 0) > 100);
      assert.equal(candidate.looksLikeDrift, true);
      assert.equal(candidate.driftTowards, 'known2');
      assert.equal(candidate.neighbourClasses[0].className, 'known2');
    }
  });

  it('sets aside exactly the nodes with negative silhouette and no rejected neighbour', () => {
    // Eight loose nodes with wide noise and no links among themselves.
    const withLoners = plantedGraph([{ size: 8, known: false, noise: 4, insideLinkProbability: 0, firstSlice: 3 }]);
    const rejectedWithLoners = nodesOfGroups(withLoners, [4, 5, 6]);
    const found = discoverCandidates(inputFor(withLoners, rejectedWithLoners));
    const isRejected = new Set(rejectedWithLoners);
    const expected: number[] = [];
    rejectedWithLoners.forEach((node, i) => {
      let linked = false;
      for (let e = withLoners.adjacency.rowPtr[node]; e < withLoners.adjacency.rowPtr[node + 1]; e++) {
        const other = withLoners.adjacency.colIndex[e];
        if (other !== node && isRejected.has(other)) linked = true;
      }
      if (found.silhouettes[i] < 0 && !linked) expected.push(node);
    });
    const inCandidates = new Set(found.candidates.flatMap((c) => Array.from(c.members)));
    const smallGroupLeftovers = Array.from(found.scattered).filter((node) => !expected.includes(node));
    assert.ok(expected.length > 0, 'some loner has a negative silhouette and no rejected neighbour');
    assert.deepEqual(
      Array.from(found.scattered).filter((node) => expected.includes(node)),
      expected,
    );
    for (const node of expected) assert.ok(!inCandidates.has(node));
    // Anything else scattered came from a group smaller than minCandidateSize.
    assert.ok(smallGroupLeftovers.length < 3 * found.groupCountAfterMerge);
    assert.equal(inCandidates.size + found.scattered.length, rejectedWithLoners.length);
    assert.ok(recoveryAri(withLoners, nodesOfGroups(withLoners, [4, 5]), { ...found, scattered: new Int32Array() }) >= 0.8);
  });

  it('handles too few rejected nodes: one candidate, or none', () => {
    const none = discoverCandidates(inputFor(graph, new Int32Array()));
    assert.equal(none.candidates.length, 0);
    assert.equal(none.chosenK, 0);
    const two = discoverCandidates(inputFor(graph, graph.membersOf[5].slice(0, 2)));
    assert.equal(two.candidates.length, 0);
    assert.deepEqual(Array.from(two.scattered), Array.from(graph.membersOf[5].slice(0, 2)));
    const three = discoverCandidates(inputFor(graph, graph.membersOf[5].slice(0, 3)));
    assert.equal(three.candidates.length, 1);
    assert.equal(three.candidates[0].size, 3);
    assert.equal(three.chosenK, 1);
    assert.deepEqual(three.silhouetteByK, []);
  });

  it('rejects inconsistent input with a message naming the field', () => {
    assert.throws(
      () => discoverCandidates(inputFor(graph, rejected, { embeddings: new Float32Array(10) })),
      /embeddings .* has 10 entries/,
    );
    assert.throws(() => discoverCandidates(inputFor(graph, Int32Array.from([1, 1]))), /listed twice/);
    assert.throws(() => discoverCandidates(inputFor(graph, Int32Array.from([graph.nodeCount]))), /not a node index/);
    assert.throws(() => discoverCandidates(inputFor(graph, rejected, { kRange: [1, 4] })), /kRange/);
  });
});

describe('discovery/stable candidate ids', () => {
  it('keeps ids and decisions of overlapping candidates and gives a new group a new id', () => {
    // Group 6 is a third novel community, not yet rejected in the first run.
    const graph = plantedGraph([{ size: 40, known: false, firstSlice: 3 }]);
    const firstRejected = nodesOfGroups(graph, [4, 5]);
    const first = discoverCandidates(inputFor(graph, firstRejected));
    assert.equal(first.candidates.length, 2);
    const previous = first.candidates.map((c, i) => ({ ...c, decision: { action: 'accept', name: `new class ${i}` } }));
    // Second run: five nodes of group 5 are no longer rejected, and group 6 is.
    const dropped = new Set(Array.from(graph.membersOf[5].slice(0, 5)));
    const secondRejected = Int32Array.from([...Array.from(firstRejected).filter((n) => !dropped.has(n)), ...graph.membersOf[6]]).sort();
    const second = discoverCandidates(inputFor(graph, secondRejected, { previous }));
    assert.equal(second.candidates.length, 3);
    const previousIds = new Set(previous.map((c) => c.id));
    for (const candidate of second.candidates) {
      const plantedGroup = graph.group[candidate.members[0]];
      if (plantedGroup === 6) {
        assert.ok(!previousIds.has(candidate.id), 'a new group gets a fresh id');
        assert.equal(candidate.decision, undefined);
      } else {
        const earlier = previous.find((c) => graph.group[c.members[0]] === plantedGroup);
        assert.ok(earlier);
        assert.equal(candidate.id, earlier.id);
        assert.deepEqual(candidate.decision, earlier.decision);
      }
    }
    assert.equal(new Set(second.candidates.map((c) => c.id)).size, 3);
  });
});
