// The neighbourhood graph's starting placement: members in a disc at the centre, neighbours in a
// disc per class on a ring around it, no two discs overlapping, each disc a sunflower spiral.
import * as assert from 'node:assert/strict';
import type { NeighbourhoodGraph } from '../../src/protocol/webview';
import {
  discRadius,
  goldenAngle,
  initialPlacement,
  memberGroup,
  overlapping,
  spiralPoint,
  unclassifiedGroup,
} from '../../webview/initialPlacement';

function graphOf(memberCount: number, neighbourClasses: number[], links: [number, number][]): NeighbourhoodGraph {
  const count = memberCount + neighbourClasses.length;
  const column = (value: number) => Array.from({ length: count }, () => value);
  return {
    memberCount,
    nodes: {
      ids: Array.from({ length: count }, (_, i) => `n${i}`),
      texts: column(0).map(() => ''),
      label: column(-1),
      predicted: [...column(-1).slice(0, memberCount), ...neighbourClasses],
      pending: column(-1),
      novelty: column(0),
    },
    source: links.map(([s]) => s),
    target: links.map(([, t]) => t),
    totalEdges: links.length,
    truncated: false,
  };
}

describe('webview/initial placement of the neighbourhood graph', () => {
  it('turns by the golden angle between spiral points', () => {
    // 137.50776405° (Vogel 1979, "A better way to construct the sunflower head", Math. Biosci. 44:179).
    assert.ok(Math.abs((goldenAngle * 180) / Math.PI - 137.50776405) < 1e-7);
    const a = spiralPoint(10);
    const b = spiralPoint(11);
    const turn = Math.atan2(b.y, b.x) - Math.atan2(a.y, a.x);
    const normalised = ((turn % (2 * Math.PI)) + 2 * Math.PI) % (2 * Math.PI);
    assert.ok(Math.abs(normalised - goldenAngle) < 1e-9);
  });

  it('puts members in a central disc and each class of neighbours in its own disc, none overlapping', () => {
    const classes = [...Array<number>(300).fill(0), ...Array<number>(40).fill(1), ...Array<number>(25).fill(-1), 2];
    const memberCount = 500;
    const links: [number, number][] = [];
    for (let i = 0; i < memberCount; i++) links.push([i, (i * 7 + 3) % memberCount], [i, memberCount + (i % classes.length)]);
    const graph = graphOf(memberCount, classes, links);
    const { positions, discs } = initialPlacement(graph, (i) => graph.nodes.predicted[i]);
    assert.deepEqual(
      discs.map((d) => [d.group, d.nodes.length]),
      [
        [memberGroup, 500],
        [0, 300],
        [1, 40],
        [unclassifiedGroup, 25],
        [2, 1],
      ],
    );
    assert.equal(discs[0].x, 0);
    assert.equal(discs[0].y, 0);
    assert.equal(overlapping(discs), false);
    for (const disc of discs) {
      assert.equal(disc.radius, discRadius(disc.nodes.length));
      for (const node of disc.nodes) {
        const distance = Math.hypot(positions[2 * node] - disc.x, positions[2 * node + 1] - disc.y);
        assert.ok(distance <= disc.radius, `node ${node} lies inside the disc of group ${disc.group}`);
      }
    }
    // Best-linked first: the centre of the members' disc is the member with the most links.
    const degree = new Map<number, number>();
    for (const [s, t] of links) for (const n of [s, t]) degree.set(n, (degree.get(n) ?? 0) + 1);
    const first = discs[0].nodes[0];
    assert.equal(degree.get(first), Math.max(...discs[0].nodes.map((n) => degree.get(n) ?? 0)));
    // The same graph is always placed the same way.
    assert.deepEqual(initialPlacement(graph, (i) => graph.nodes.predicted[i]).positions, positions);
  });

  it('places a candidate without neighbours as one disc', () => {
    const graph = graphOf(3, [], []);
    const { positions, discs } = initialPlacement(graph, () => -1);
    assert.equal(discs.length, 1);
    assert.equal(positions.length, 6);
    assert.ok([...positions].every(Number.isFinite));
  });
});
