// Picking and extent of the neighbourhood graph's scene (webview/graphScene.ts), by hand-worked
// geometry: no browser needed.
import * as assert from 'node:assert/strict';
import { pickNode, sceneExtent, type GraphScene, type PickView } from '../../webview/graphScene';

function scene(points: [number, number, number][]): GraphScene {
  return {
    memberCount: 1,
    positions: Float32Array.from(points.flatMap(([x, y]) => [x, y])),
    sizes: Float32Array.from(points.map(([, , size]) => size)),
    colours: new Uint8Array(4 * points.length),
    links: new Uint32Array(0),
  };
}

describe('webview/graph scene', () => {
  // Three nodes: radius 5 px at (0, 0), radius 3 px at (10, 0), radius 3 px at (100, 50).
  const three = scene([
    [0, 0, 5],
    [10, 0, 3],
    [100, 50, 3],
  ]);
  // One graph unit per pixel, sizes are pixels, no slack.
  const view = (x: number, y: number, over: Partial<PickView> = {}): PickView => ({
    x,
    y,
    graphUnitsPerPixel: 1,
    pixelsPerSize: 1,
    slackPixels: 0,
    ...over,
  });

  it('spans the node centres', () => {
    assert.deepEqual(sceneExtent(three), { x: [0, 100], y: [0, 50] });
    assert.deepEqual(sceneExtent(scene([])), { x: [-0.5, 0.5], y: [-0.5, 0.5] });
  });

  it('finds the node whose disc holds the pointer', () => {
    assert.equal(pickNode(three, view(0, 4.9)), 0);
    assert.equal(pickNode(three, view(100, 52)), 2);
    assert.equal(pickNode(three, view(0, 5.1)), -1, 'just outside the 5 px disc');
    assert.equal(pickNode(three, view(50, 25)), -1, 'empty space');
  });

  it('takes the nearest centre where discs overlap', () => {
    // x = 6 without slack: node 0's disc ends at 5, node 1's starts at 7.
    assert.equal(pickNode(three, view(6, 0)), -1);
    assert.equal(pickNode(three, view(8, 0)), 1);
    // With 2 px of slack node 0 reaches 7 and node 1 covers 5 … 15.
    assert.equal(pickNode(three, view(6, 0, { slackPixels: 2 })), 1, 'both hold x = 6; node 1 is 4 away, node 0 is 6');
    assert.equal(pickNode(three, view(4.8, 0, { slackPixels: 2 })), 0, 'node 1 is 5.2 away, beyond its 5');
    assert.equal(pickNode(three, view(5, 0, { slackPixels: 2 })), 0, 'a tie at 5 keeps the first');
  });

  it('takes the disc drawn on top where the point is inside several', () => {
    // A member (size 5 at the origin) drawn over a neighbour (size 3 at x = 3): at x = 4.5 the
    // neighbour's centre is nearer (1.5 against 4.5) but the member's disc covers the point.
    const stacked = scene([
      [0, 0, 5],
      [3, 0, 3],
    ]);
    assert.equal(pickNode(stacked, view(4.5, 0)), 0);
    // Past the member's edge only the neighbour's disc holds the point.
    assert.equal(pickNode(stacked, view(5.5, 0)), 1);
    // Two neighbours: the later one is drawn over the earlier.
    const neighbours = { ...stacked, memberCount: 0 };
    assert.equal(pickNode(neighbours, view(2, 0)), 1);
  });

  it('scales discs with the zoom: radius in pixels × graph units per pixel', () => {
    // Zoomed out four times (4 graph units per pixel): node 2's 3 px disc spans 12 graph units.
    assert.equal(pickNode(three, view(111, 50, { graphUnitsPerPixel: 4 })), 2);
    assert.equal(pickNode(three, view(113, 50, { graphUnitsPerPixel: 4 })), -1);
    // Sizes drawn twice as large (pixelsPerSize 2): node 2 reaches 6 px.
    assert.equal(pickNode(three, view(105.5, 50, { pixelsPerSize: 2 })), 2);
  });
});
