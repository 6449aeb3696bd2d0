// ForceAtlas2 in its web worker, refining the drawn graph a few times a second rather than after
// every round. The worker's supervisor writes each round into a shadow graph that nothing draws;
// positions are copied to the drawn graph on a timer, and not while the curator moves the view,
// because each copy costs a full redraw (about 1.6 s for 10,000 nodes and 20,000 links where
// WebGL is drawn in software), which would make panning stutter.
import Graph from 'graphology';
import FA2Layout from 'graphology-layout-forceatlas2/worker';
import forceAtlas2 from 'graphology-layout-forceatlas2';

export const layoutSettledMark = 'review:layout-settled';

export const layoutSettings = (graph: Graph) => ({ ...forceAtlas2.inferSettings(graph), barnesHutOptimize: graph.order > 500 });

export interface LayoutBudget {
  /** Stop after this many worker rounds (a busy machine still gets its layout)… */
  rounds: number;
  /** …or after this long, whichever comes first. */
  maxMilliseconds: number;
  /** How often the drawn graph takes the worker's positions. */
  applyEveryMilliseconds: number;
}

export interface LayoutHooks {
  /** True while the view is being moved: copying positions then would make the motion stutter. */
  isInteracting(): boolean;
  /** Called once, after the last positions were copied. */
  settled(rounds: number): void;
}

export class ProgressiveLayout {
  private layout: FA2Layout | null = null;
  private shadow: Graph | null = null;
  private timer = 0;
  private deadline = 0;
  private rounds = 0;
  private copiedRound = 0;
  private finished = false;

  constructor(
    private readonly drawn: Graph,
    private readonly budget: LayoutBudget,
    private readonly hooks: LayoutHooks,
  ) {}

  /** Throws when no worker can be made (e.g. a policy without worker-src). */
  start(): void {
    const shadow = new Graph({ type: 'undirected', multi: false, allowSelfLoops: false });
    this.drawn.forEachNode((node, attributes) => shadow.addNode(node, { x: attributes.x as number, y: attributes.y as number }));
    this.drawn.forEachEdge((_edge, _attributes, source, target) => shadow.addEdge(source, target));
    this.shadow = shadow;
    const layout = new FA2Layout(shadow, { settings: layoutSettings(shadow) });
    this.layout = layout;
    shadow.on('eachNodeAttributesUpdated', () => {
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
    this.shadow = null;
  }

  private tick(): void {
    const layout = this.layout;
    if (!layout || this.finished) return;
    const done = !layout.isRunning() || performance.now() >= this.deadline;
    if (done) layout.stop();
    if (this.hooks.isInteracting()) return;
    if (this.rounds > this.copiedRound) this.copyPositions();
    if (!done) return;
    this.finished = true;
    this.kill();
    this.hooks.settled(this.rounds);
  }

  private copyPositions(): void {
    const shadow = this.shadow;
    if (!shadow) return;
    this.copiedRound = this.rounds;
    this.drawn.updateEachNodeAttributes(
      (node, attributes) => {
        attributes.x = shadow.getNodeAttribute(node, 'x') as number;
        attributes.y = shadow.getNodeAttribute(node, 'y') as number;
        return attributes;
      },
      { attributes: ['x', 'y'] },
    );
  }
}
