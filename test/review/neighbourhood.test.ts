// The neighbourhood the review panel draws for a candidate (src/review/neighbourhood.ts), on
// Zachary's karate club (34 members, 78 ties; Zachary 1977, as shipped by graphology-generators),
// checked against graphology's own neighbour lists.
import * as assert from 'node:assert/strict';
import Graph from 'graphology';
import { karateClub } from 'graphology-generators/social';
import { buildAdjacency } from '../../src/engine/graph/csr';
import { neighbourhoodOf } from '../../src/review/neighbourhood';

function karate() {
  const graph = karateClub(Graph);
  const keys = graph.nodes();
  const index = new Map(keys.map((node, i) => [node, i]));
  const source: number[] = [];
  const target: number[] = [];
  graph.forEachEdge((_e, _a, s, t) => {
    source.push(index.get(s)!);
    target.push(index.get(t)!);
  });
  const adjacency = buildAdjacency(
    34,
    { source: Int32Array.from(source), target: Int32Array.from(target), weight: null, count: source.length },
    true,
  );
  const neighbours = (i: number) => graph.neighbors(keys[i]).map((k) => index.get(k)!);
  return { graph, adjacency, neighbours };
}

const linkKey = (a: number, b: number) => (a < b ? `${a}-${b}` : `${b}-${a}`);

describe('review/neighbourhood', () => {
  const { graph, adjacency, neighbours } = karate();
  // The two club leaders (nodes 0 and 33) and three members between them.
  const members = [0, 33, 2, 8, 31];

  it('holds the members, their one-hop neighbours and every link touching a member, each once', () => {
    assert.equal(graph.size, 78, 'karate club has 78 ties (Zachary 1977)');
    const hood = neighbourhoodOf(adjacency, members);
    assert.deepEqual(hood.nodes.slice(0, 5), members);
    assert.equal(hood.memberCount, 5);
    const expectedNodes = new Set(members.flatMap((m) => [m, ...neighbours(m)]));
    assert.deepEqual(new Set(hood.nodes), expectedNodes);
    assert.equal(hood.nodes.length, expectedNodes.size, 'no node twice');
    const expectedLinks = new Set(members.flatMap((m) => neighbours(m).map((n) => linkKey(m, n))));
    const links = hood.source.map((s, e) => linkKey(hood.nodes[s], hood.nodes[hood.target[e]]));
    assert.deepEqual(new Set(links), expectedLinks);
    assert.equal(links.length, expectedLinks.size, 'no link twice');
    assert.equal(hood.totalEdges, expectedLinks.size);
  });

  it('under a cap keeps the links among members first, then gives every member its outside links in turns', () => {
    const full = neighbourhoodOf(adjacency, members);
    const among = full.source.filter((s, e) => s < 5 && full.target[e] < 5).length;
    const cap = among + 5;
    const capped = neighbourhoodOf(adjacency, members, cap);
    assert.equal(capped.source.length, cap);
    assert.equal(capped.totalEdges, full.totalEdges, 'the total still counts every link');
    const inside = capped.source.slice(0, among).every((s, e) => s < 5 && capped.target[e] < 5);
    assert.ok(inside, 'the links among members come first');
    // Five outside links for five members that all have outside neighbours: one each.
    assert.deepEqual(
      capped.source.slice(among).sort((a, b) => a - b),
      [0, 1, 2, 3, 4],
    );
    for (let e = among; e < cap; e++) assert.ok(capped.target[e] >= 5, 'an outside link ends at a neighbour');
  });
});
