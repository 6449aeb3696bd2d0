// ForceAtlas2 over a GraphScene: at once for a small neighbourhood, or in its web worker for a large
// one, refining the drawn scene a few times a second rather than after every round. The worker's
// supervisor writes each round into a graphology graph that nothing draws; positions are copied
// into the scene on a timer, and not while the curator moves the view.
import Graph from 'graphology';
import FA2Layout from 'graphology-layout-forceatlas2/worker';
import forceAtlas2 from 'graphology-layout-forceatlas2';
import { nodeCount, type GraphScene } from './graphScene';

export const layoutSettledMark = 'review:layout-settled';

export const layoutSettings = (graph: Graph) => ({ ...forceAtlas2.inferSettings(graph), barnesHutOptimize: graph.order > 500 });

/** The scene's nodes (keyed by index) and links as a graphology graph, at the scene's positions. */
export function layoutGraph(scene: GraphScene): Graph {
  const graph = new Graph({ type: 'undirected', multi: false, allowSelfLoops: false });
  for (let i = 0; i < nodeCount(scene); i++) graph.addNode(String(i), { x: scene.positions[2 * i], y: scene.positions[2 * i + 1] });
  for (let e = 0; e < scene.links.length; e += 2) graph.addEdge(String(scene.links[e]), String(scene.links[e + 1]));
  return graph;
}

/** The graph's positions into the scene. */
export function copyLayout(graph: Graph, scene: GraphScene): void {
  graph.forEachNode((node, attributes) => {
    const i = Number(node);
    scene.positions[2 * i] = attributes.x as number;
    scene.positions[2 * i + 1] = attributes.y as number;
  });
}

/** ForceAtlas2 on the main thread, for neighbourhoods small enough to lay out before the first frame. */
export function layOutAtOnce(scene: GraphScene, iterations: number): void {
  if (scene.links.length === 0) return;
  const graph = layoutGraph(scene);
  forceAtlas2.assign(graph, { iterations, settings: layoutSettings(graph) });
  copyLayout(graph, scene);
}

export interface LayoutBudget {
  /** Stop after this many worker rounds (a busy machine still gets its layout)… */
  rounds: number;
  /** …or after this long, whichever comes first. */
  maxMilliseconds: number;
  /** How often the scene takes the worker's positions. */
  applyEveryMilliseconds: number;
}

export interface LayoutHooks {
  /** True while the view is being moved: positions are not copied then. */
  isInteracting(): boolean;
  /** The scene took new positions. */
  moved(): void;
  /** Called once, after the last positions were copied. */
  settled(rounds: number): void;
}

export class ProgressiveLayout {
  private layout: FA2Layout | null = null;
  private graph: Graph | null = null;
  private timer = 0;
  private deadline = 0;
  private rounds = 0;
  private copiedRound = 0;
  private finished = false;

  constructor(
    private readonly scene: GraphScene,
    private readonly budget: LayoutBudget,
    private readonly hooks: LayoutHooks,
  ) {}

  /** Throws when no worker can be made (e.g. a policy without worker-src). */
  start(): void {
    const graph = layoutGraph(this.scene);
    this.graph = graph;
    const layout = new FA2Layout(graph, { settings: layoutSettings(graph) });
    this.layout = layout;
    graph.on('eachNodeAttributesUpdated', () => {
      if (++this.rounds >= this.budget.rounds) layout.stop();
    });
    layout.start();
    this.deadline = performance.now() + this.budget.maxMilliseconds;
    this.timer = window.setInterval(() => this.tick(), this.budget.applyEveryMilliseconds);
  }

  get running(): boolean {
    return this.layout !== null && !this.finished;
  }

  kill(): void {
    window.clearInterval(this.timer);
    this.layout?.kill();
    this.layout = null;
    this.graph = null;
  }

  private tick(): void {
    const layout = this.layout;
    if (!layout || this.finished) return;
    const done = !layout.isRunning() || performance.now() >= this.deadline;
    if (done) layout.stop();
    if (this.hooks.isInteracting()) return;
    if (this.rounds > this.copiedRound && this.graph) {
      this.copiedRound = this.rounds;
      copyLayout(this.graph, this.scene);
      this.hooks.moved();
    }
    if (!done) return;
    this.finished = true;
    this.kill();
    this.hooks.settled(this.rounds);
  }
}
