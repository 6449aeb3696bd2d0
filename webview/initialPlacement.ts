// Where the neighbourhood graph's nodes start before the force layout refines them: a cheap,
// deterministic placement that already says something, so a large candidate is readable in its
// first frame. The members fill a disc at the centre; the neighbours are grouped by class, each
// class in a disc of its own on a ring around the members. Inside a disc nodes follow a
// sunflower spiral, best connected first, so the centre of each disc is its best-linked part.
import type { NeighbourhoodGraph } from '../src/protocol/webview';

/** The golden angle π(3 − √5) in radians: successive spiral points never line up. */
export const goldenAngle = Math.PI * (3 - Math.sqrt(5));
/** Distance between neighbouring spiral points, in layout units. */
const spacing = 1;
/** Empty space between two discs, in layout units. */
const discGap = 4;

/** Point n of a sunflower spiral holding `spacing²·π` area per point: r = spacing·√n, θ = n·goldenAngle. */
export function spiralPoint(n: number): { x: number; y: number } {
  const radius = spacing * Math.sqrt(n + 0.5);
  const angle = n * goldenAngle;
  return { x: radius * Math.cos(angle), y: radius * Math.sin(angle) };
}

/** Radius of the disc a spiral of `count` points fills. */
export function discRadius(count: number): number {
  return spacing * Math.sqrt(Math.max(count, 1));
}

export interface Disc {
  /** Class index of the group; -1 for the members, -2 for neighbours of no class. */
  group: number;
  x: number;
  y: number;
  radius: number;
  nodes: number[];
}

export interface Placement {
  /** x and y of node i at [2i] and [2i + 1]. */
  positions: Float64Array;
  discs: Disc[];
}

export const memberGroup = -1;
export const unclassifiedGroup = -2;

/**
 * `classOf(i)` is the class a neighbour is coloured with (negative when it has none). Links are
 * counted once per end; nodes of a disc are ordered by links (descending), then by position.
 */
export function initialPlacement(graph: NeighbourhoodGraph, classOf: (i: number) => number): Placement {
  const count = graph.nodes.ids.length;
  const degree = new Int32Array(count);
  for (let e = 0; e < graph.source.length; e++) {
    degree[graph.source[e]]++;
    degree[graph.target[e]]++;
  }
  const byGroup = new Map<number, number[]>();
  const add = (group: number, i: number) => {
    const nodes = byGroup.get(group);
    if (nodes) nodes.push(i);
    else byGroup.set(group, [i]);
  };
  for (let i = 0; i < count; i++) {
    if (i < graph.memberCount) add(memberGroup, i);
    else {
      const cls = classOf(i);
      add(cls >= 0 ? cls : unclassifiedGroup, i);
    }
  }
  const members = byGroup.get(memberGroup) ?? [];
  byGroup.delete(memberGroup);
  const discs: Disc[] = [{ group: memberGroup, x: 0, y: 0, radius: discRadius(members.length), nodes: members }];
  // Largest class first around the ring, then by class index: the same graph always looks the same.
  const outer = [...byGroup.entries()]
    .map(([group, nodes]) => ({ group, nodes, radius: discRadius(nodes.length) }))
    .sort((a, b) => b.nodes.length - a.nodes.length || a.group - b.group);
  if (outer.length > 0) {
    const widest = Math.max(...outer.map((d) => d.radius));
    // Each disc gets an arc of the ring in proportion to its diameter plus a gap; the ring grows
    // until no two discs overlap (a chord is shorter than its arc, so the arcs alone do not ensure it).
    const arcs = outer.map((d) => 2 * d.radius + discGap);
    const totalArc = arcs.reduce((sum, arc) => sum + arc, 0);
    let ringRadius = Math.max(discs[0].radius + discGap + widest, totalArc / (2 * Math.PI));
    let ring: Disc[] = [];
    for (;;) {
      let at = 0;
      ring = outer.map((disc, k) => {
        const angle = ((at + arcs[k] / 2) / totalArc) * 2 * Math.PI;
        at += arcs[k];
        return {
          group: disc.group,
          x: ringRadius * Math.cos(angle),
          y: ringRadius * Math.sin(angle),
          radius: disc.radius,
          nodes: disc.nodes,
        };
      });
      if (!overlapping(ring)) break;
      ringRadius *= 1.25;
    }
    discs.push(...ring);
  }
  const positions = new Float64Array(2 * count);
  for (const disc of discs) {
    disc.nodes.sort((a, b) => degree[b] - degree[a] || a - b);
    disc.nodes.forEach((node, n) => {
      const point = spiralPoint(n);
      positions[2 * node] = disc.x + point.x;
      positions[2 * node + 1] = disc.y + point.y;
    });
  }
  return { positions, discs };
}

/** Whether two discs come closer than `discGap / 2`. */
export function overlapping(discs: Disc[]): boolean {
  for (let a = 0; a < discs.length; a++) {
    for (let b = a + 1; b < discs.length; b++) {
      const distance = Math.hypot(discs[a].x - discs[b].x, discs[a].y - discs[b].y);
      if (distance < discs[a].radius + discs[b].radius + discGap / 2) return true;
    }
  }
  return false;
}
