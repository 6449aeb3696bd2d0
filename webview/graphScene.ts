// What the neighbourhood graph draws, as flat typed arrays the GPU takes in one upload: node
// positions in graph coordinates, sizes (radius in screen pixels at zoom 1), RGBA colours, and
// links as pairs of node indices. No DOM and no WebGL here, so picking is testable in Node.

export interface GraphScene {
  /** Nodes 0 … memberCount − 1 are the candidate's members, the rest its neighbours. */
  readonly memberCount: number;
  readonly positions: Float32Array;
  readonly sizes: Float32Array;
  readonly colours: Uint8Array;
  readonly links: Uint32Array;
}

export function nodeCount(scene: GraphScene): number {
  return scene.sizes.length;
}

export interface Extent {
  x: [number, number];
  y: [number, number];
}

/** The smallest box around every node centre (a unit box around the origin when there are none). */
export function sceneExtent(scene: GraphScene): Extent {
  const n = nodeCount(scene);
  if (n === 0) return { x: [-0.5, 0.5], y: [-0.5, 0.5] };
  let minX = Infinity;
  let maxX = -Infinity;
  let minY = Infinity;
  let maxY = -Infinity;
  for (let i = 0; i < n; i++) {
    const x = scene.positions[2 * i];
    const y = scene.positions[2 * i + 1];
    if (x < minX) minX = x;
    if (x > maxX) maxX = x;
    if (y < minY) minY = y;
    if (y > maxY) maxY = y;
  }
  return { x: [minX, maxX], y: [minY, maxY] };
}

export interface PickView {
  /** The pointer in graph coordinates. */
  x: number;
  y: number;
  /** Graph units per screen pixel at the current zoom. */
  graphUnitsPerPixel: number;
  /** Screen pixels of radius per unit of node size at the current zoom. */
  pixelsPerSize: number;
  /** Extra screen pixels around each disc that still count as on it. */
  slackPixels: number;
}

/**
 * The node under the pointer, or −1. The disc drawn on top wins where the point is inside discs
 * (neighbours are drawn first, then members, each in index order); otherwise, among the discs
 * whose slack ring holds the point, the one whose centre is nearest. Linear in the node count,
 * which is microseconds for the 10,000 nodes of the largest neighbourhood and needs no index to
 * keep up with the layout.
 */
export function pickNode(scene: GraphScene, view: PickView): number {
  const n = nodeCount(scene);
  let top = -1;
  let topRank = -1;
  let nearest = -1;
  let nearestDistance = Infinity;
  for (let i = 0; i < n; i++) {
    const dx = scene.positions[2 * i] - view.x;
    const dy = scene.positions[2 * i + 1] - view.y;
    const distance = dx * dx + dy * dy;
    const radius = scene.sizes[i] * view.pixelsPerSize * view.graphUnitsPerPixel;
    const rank = drawRank(scene, i);
    if (distance <= radius * radius && rank > topRank) {
      top = i;
      topRank = rank;
    }
    const reach = radius + view.slackPixels * view.graphUnitsPerPixel;
    if (distance <= reach * reach && distance < nearestDistance) {
      nearest = i;
      nearestDistance = distance;
    }
  }
  return top >= 0 ? top : nearest;
}

/** The order in which node i is drawn: neighbours first, then members, each by index. */
export function drawRank(scene: GraphScene, i: number): number {
  const neighbours = nodeCount(scene) - scene.memberCount;
  return i < scene.memberCount ? neighbours + i : i - scene.memberCount;
}
