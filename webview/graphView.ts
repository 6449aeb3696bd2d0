// The candidate's neighbourhood drawn with sigma over a graphology graph, laid out by
// ForceAtlas2 in a web worker (a blob: URL, allowed by the panel's worker-src). Colours: classes
// from our palette; unclassified nodes and edges in the theme's foreground.
import Graph from 'graphology';
import forceAtlas2 from 'graphology-layout-forceatlas2';
import Sigma from 'sigma';
import { pathLine } from 'sigma/rendering';
import type { ClassView, NeighbourhoodGraph } from '../src/protocol/webview';
import { classColour } from './classPalette';
import { initialPlacement } from './initialPlacement';
import { layoutSettings, layoutSettledMark, ProgressiveLayout, type LayoutBudget } from './progressiveLayout';
import { el, replaceChildren } from './dom';

const synchronousLayoutLimit = 3000;
export const graphRenderedMark = 'review:graph-rendered';
const synchronousIterations = 150;
/** "Lay out": long enough for a large graph to settle. */
const relayoutBudget: LayoutBudget = { rounds: 150, maxMilliseconds: 30_000, applyEveryMilliseconds: 400 };
/** The automatic refinement of a large graph: short, so that the panel is quiet again soon. */
const refineBudget: LayoutBudget = { rounds: 150, maxMilliseconds: 4000, applyEveryMilliseconds: 1000 };

/** WebGL is what sigma draws with; some VS Code installs (remote desktops, old drivers) lack it. */
export function webglAvailable(): boolean {
  try {
    const canvas = document.createElement('canvas');
    return Boolean(canvas.getContext('webgl2') ?? canvas.getContext('webgl'));
  } catch {
    return false;
  }
}

function themeColour(variable: string, fallbackVariable: string): string {
  const style = getComputedStyle(document.body);
  return (style.getPropertyValue(variable) || style.getPropertyValue(fallbackVariable)).trim() || 'gray';
}

/** rgba() of a theme colour given as #rgb/#rrggbb (or left as it is). */
function withAlpha(colour: string, alpha: number): string {
  const match = /^#([0-9a-f]{3}|[0-9a-f]{6})$/i.exec(colour);
  if (!match) return colour;
  const hex = match[1].length === 3 ? [...match[1]].map((c) => c + c).join('') : match[1];
  const value = parseInt(hex, 16);
  return `rgba(${(value >> 16) & 255}, ${(value >> 8) & 255}, ${value & 255}, ${alpha})`;
}

export interface GraphViewEvents {
  openNode(nodeId: string): void;
}

export class GraphView {
  readonly element: HTMLElement;
  private readonly stage: HTMLElement;
  private readonly tooltip: HTMLElement;
  private readonly caption: HTMLElement;
  private renderer: Sigma | null = null;
  private layout: ProgressiveLayout | null = null;
  private layoutFrame = 0;
  private layoutTimer = 0;
  private cameraMovedAt = -Infinity;
  private data: NeighbourhoodGraph | null = null;
  private classes: ClassView[] = [];
  private unavailable: string | null = null;
  private shownKey = '';

  constructor(private readonly events: GraphViewEvents) {
    this.stage = el('div', { class: 'graph-stage', id: 'graph-stage' });
    this.tooltip = el('div', { class: 'graph-tooltip', id: 'graph-tooltip', role: 'status', hidden: true });
    this.caption = el('div', { class: 'graph-caption', id: 'graph-caption' });
    const fit = el('vscode-button', { id: 'zoom-fit', secondary: true, title: 'Zoom to fit (F)' }, 'Zoom to fit');
    fit.addEventListener('click', () => this.zoomToFit());
    const relayout = el(
      'vscode-button',
      { id: 'run-layout', secondary: true, title: 'Run the force layout again (in a worker)' },
      'Lay out',
    );
    relayout.addEventListener('click', () => {
      const graph = this.renderer?.getGraph();
      if (graph) this.runWorkerLayout(graph);
    });
    this.element = el(
      'section',
      { class: 'graph', 'aria-label': 'Neighbourhood graph' },
      el('div', { class: 'graph-toolbar' }, this.caption, relayout, fit),
      this.stage,
      this.tooltip,
    );
    if (!webglAvailable())
      this.showUnavailable(
        'WebGL is not available in this window, so the neighbourhood graph cannot be drawn. Everything else works: the members are listed in the table.',
      );
  }

  get isAvailable(): boolean {
    return this.unavailable === null;
  }

  show(graph: NeighbourhoodGraph | null, classes: ClassView[], candidateId: string | null): void {
    this.data = graph;
    this.classes = classes;
    if (!graph) {
      this.caption.textContent = 'No candidate selected';
      this.clear();
      return;
    }
    const edgeNote = graph.truncated
      ? ` (first ${graph.source.length.toLocaleString()} of ${graph.totalEdges.toLocaleString()} links shown)`
      : '';
    this.caption.textContent = `${graph.memberCount} members, ${graph.nodes.ids.length - graph.memberCount} neighbours, ${graph.source.length} links${edgeNote}`;
    if (this.unavailable) return;
    // Same candidate and same nodes: recolour in place and keep the layout.
    const key = `${candidateId}|${graph.nodes.ids.length}|${graph.source.length}`;
    if (key === this.shownKey && this.renderer) {
      this.recolour();
      return;
    }
    this.shownKey = key;
    this.draw(graph);
  }

  /** Call when the graph's container shows again after being hidden: sigma measures it anew. */
  becameVisible(): void {
    this.renderer?.resize(true).refresh();
  }

  zoomToFit(): void {
    void this.renderer?.getCamera().reset({ duration: 200 });
  }

  dispose(): void {
    this.clear();
  }

  private showUnavailable(message: string): void {
    this.unavailable = message;
    this.clear();
    replaceChildren(this.stage, el('div', { class: 'graph-unavailable', id: 'graph-unavailable', role: 'alert' }, message));
  }

  private stopLayout(): void {
    cancelAnimationFrame(this.layoutFrame);
    window.clearTimeout(this.layoutTimer);
    this.layout?.kill();
    this.layout = null;
  }

  private clear(): void {
    this.stopLayout();
    this.renderer?.kill();
    this.renderer = null;
    this.shownKey = '';
    this.tooltip.hidden = true;
  }

  /** The class node i is coloured with: pending, else label, else predicted (negative for none). */
  private colourClass(i: number): number {
    const data = this.data as NeighbourhoodGraph;
    return data.nodes.pending[i] >= 0 ? data.nodes.pending[i] : data.nodes.label[i] >= 0 ? data.nodes.label[i] : data.nodes.predicted[i];
  }

  private nodeColour(i: number, neutral: string): string {
    const cls = this.colourClass(i);
    return cls >= 0 ? classColour(this.classes[cls]?.colour ?? cls) : neutral;
  }

  private recolour(): void {
    const renderer = this.renderer;
    if (!renderer) return;
    const graph = renderer.getGraph();
    const neutral = themeColour('--vscode-foreground', '--vscode-editor-foreground');
    graph.forEachNode((node) => graph.setNodeAttribute(node, 'color', this.nodeColour(Number(node), neutral)));
  }

  private draw(data: NeighbourhoodGraph): void {
    this.stopLayout();
    this.tooltip.hidden = true;
    const neutral = themeColour('--vscode-foreground', '--vscode-editor-foreground');
    const edgeColour = withAlpha(themeColour('--vscode-descriptionForeground', '--vscode-foreground'), 0.35);
    const graph = new Graph({ type: 'undirected', multi: false, allowSelfLoops: false });
    const count = data.nodes.ids.length;
    // Members in a disc at the centre, neighbours in a disc per class around them: readable at
    // once, and a start from which the force layout settles quickly.
    const { positions } = initialPlacement(data, (i) => this.colourClass(i));
    for (let i = 0; i < count; i++) {
      graph.addNode(String(i), {
        x: positions[2 * i],
        y: positions[2 * i + 1],
        size: i < data.memberCount ? 5 : 3,
        color: this.nodeColour(i, neutral),
      });
    }
    // Duplicate links checked on a numeric key: graphology's hasEdge on string keys is the slow part for 20,000 links.
    const seen = new Set<number>();
    for (let e = 0; e < data.source.length; e++) {
      const [low, high] = data.source[e] < data.target[e] ? [data.source[e], data.target[e]] : [data.target[e], data.source[e]];
      const key = low * count + high;
      if (low === high || seen.has(key)) continue;
      seen.add(key);
      graph.addEdge(String(low), String(high), { size: 1, color: edgeColour });
    }
    const laidOutAtOnce = graph.order <= synchronousLayoutLimit;
    // Before the first render, so that sigma processes the graph once.
    if (laidOutAtOnce && graph.size > 0) forceAtlas2.assign(graph, { iterations: synchronousIterations, settings: layoutSettings(graph) });
    const hideEdgesOnMove = graph.size > 5000;
    if (this.renderer) {
      // One renderer for the panel's life: a new one per candidate would compile its WebGL
      // programs again, which takes seconds where WebGL is drawn in software.
      if (this.renderer.getSetting('hideEdgesOnMove') !== hideEdgesOnMove) this.renderer.setSetting('hideEdgesOnMove', hideEdgesOnMove);
      this.renderer.getCamera().setState({ x: 0.5, y: 0.5, ratio: 1, angle: 0 });
      this.renderer.setGraph(graph);
    } else if (!this.createRenderer(graph, hideEdgesOnMove)) return;
    // Sigma renders once in its constructor and in setGraph; bench/reviewPanelScale.ts reads this mark.
    performance.mark(graphRenderedMark);
    if (laidOutAtOnce || graph.size === 0)
      performance.mark(layoutSettledMark, { detail: { rounds: laidOutAtOnce ? synchronousIterations : 0 } });
    else this.refineLater(graph);
  }

  private createRenderer(graph: Graph, hideEdgesOnMove: boolean): boolean {
    this.stage.replaceChildren();
    let renderer: Sigma;
    try {
      renderer = new Sigma(graph, this.stage, {
        // Straight links only (the graph has no self-loops): sigma's default path set includes
        // the loop path, and every link then draws with the loop's 66 vertices instead of 4;
        // where WebGL is drawn in software that made each full redraw take seconds.
        primitives: { edges: { paths: [pathLine()] } },
        // allowInvalidContainer: the graph may be (re)drawn while another queue's tab hides it;
        // becameVisible() sizes it once it shows again.
        settings: { renderLabels: false, hideEdgesOnMove, stagePadding: 16, itemSizesReference: 'screen', allowInvalidContainer: true },
      });
    } catch (error) {
      this.showUnavailable(
        `The neighbourhood graph cannot be drawn here (${(error as Error).message}). Everything else works: the members are listed in the table.`,
      );
      return false;
    }
    this.renderer = renderer;
    renderer.getCamera().on('updated', () => {
      this.cameraMovedAt = performance.now();
    });
    renderer.on('enterNode', ({ node }) => this.showTooltip(Number(node)));
    renderer.on('leaveNode', () => {
      this.tooltip.hidden = true;
    });
    renderer.on('clickNode', ({ node }) => this.showTooltip(Number(node), true));
    renderer.on('doubleClickNode', ({ node, event }) => {
      event.preventSigmaDefault();
      const id = this.data?.nodes.ids[Number(node)];
      if (id !== undefined) this.events.openNode(id);
    });
    renderer.on('clickStage', () => {
      this.tooltip.hidden = true;
    });
    return true;
  }

  /**
   * A graph too large to lay out at once is drawn from its placement, then refined by
   * ForceAtlas2 in its worker for a bounded time, starting once the first frame is on screen;
   * "Lay out" runs it longer.
   */
  private refineLater(graph: Graph): void {
    this.layoutFrame = requestAnimationFrame(() => {
      this.layoutTimer = window.setTimeout(() => this.runWorkerLayout(graph, refineBudget, false), 0);
    });
  }

  private runWorkerLayout(graph: Graph, budget: LayoutBudget = relayoutBudget, fitAfter = true): void {
    this.layout?.kill();
    const layout = new ProgressiveLayout(graph, budget, {
      isInteracting: () => this.interacting(),
      settled: (rounds) => {
        performance.mark(layoutSettledMark, { detail: { rounds } });
        if (fitAfter) this.zoomToFit();
      },
    });
    this.layout = layout;
    try {
      layout.start();
    } catch (error) {
      // No worker (e.g. a policy without worker-src): the placement stays.
      console.warn(`graph layout unavailable: ${(error as Error).message}`);
      layout.kill();
      this.layout = null;
      performance.mark(layoutSettledMark, { detail: { rounds: 0 } });
    }
  }

  /** The view moved in the last quarter second, or a button is held on it. */
  private interacting(): boolean {
    return performance.now() - this.cameraMovedAt < 250 || Boolean(this.renderer?.getMouseCaptor().isMouseDown);
  }

  /** Details of node i; with `pinned`, the box stays until the next click elsewhere. */
  showTooltip(i: number, pinned = false): void {
    const data = this.data;
    if (!data) return;
    const className = (index: number) => (index >= 0 ? (this.classes[index]?.name ?? '?') : '—');
    const open = el('button', { class: 'link-button', id: 'tooltip-open' }, 'Open');
    open.addEventListener('click', () => this.events.openNode(data.nodes.ids[i]));
    replaceChildren(
      this.tooltip,
      el('div', { class: 'tooltip-title' }, data.nodes.ids[i], i < data.memberCount ? ' · member' : ' · neighbour'),
      el('div', { class: 'tooltip-text' }, data.nodes.texts[i]),
      el(
        'div',
        { class: 'tooltip-meta' },
        `label ${className(data.nodes.label[i])} · predicted ${data.nodes.predicted[i] >= 0 ? className(data.nodes.predicted[i]) : 'rejected'}${data.nodes.pending[i] >= 0 ? ` · pending ${className(data.nodes.pending[i])}` : ''}`,
      ),
      pinned ? open : null,
    );
    this.tooltip.hidden = false;
  }
}
