// The candidate's neighbourhood drawn with sigma over a graphology graph, laid out by
// ForceAtlas2 in a web worker (a blob: URL, allowed by the panel's worker-src). Colours: classes
// from our palette; unclassified nodes and edges in the theme's foreground.
import Graph from 'graphology';
import FA2Layout from 'graphology-layout-forceatlas2/worker';
import forceAtlas2 from 'graphology-layout-forceatlas2';
import Sigma from 'sigma';
import type { ClassView, NeighbourhoodGraph } from '../src/protocol/webview';
import { classColour } from './classPalette';
import { el, replaceChildren } from './dom';

const synchronousLayoutLimit = 3000;
const layoutSettings = (graph: Graph) => ({ ...forceAtlas2.inferSettings(graph), barnesHutOptimize: graph.order > 500 });
const synchronousIterations = 150;
const workerRounds = 150;
const workerMaxMilliseconds = 30_000;

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
  private layout: FA2Layout | null = null;
  private layoutTimer = 0;
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
      if (graph && !this.layout?.isRunning()) this.runWorkerLayout(graph);
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

  private clear(): void {
    window.clearTimeout(this.layoutTimer);
    this.layout?.kill();
    this.layout = null;
    this.renderer?.kill();
    this.renderer = null;
    this.shownKey = '';
    this.tooltip.hidden = true;
  }

  private nodeColour(i: number, neutral: string): string {
    const data = this.data as NeighbourhoodGraph;
    const cls =
      data.nodes.pending[i] >= 0 ? data.nodes.pending[i] : data.nodes.label[i] >= 0 ? data.nodes.label[i] : data.nodes.predicted[i];
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
    this.clear();
    this.stage.replaceChildren();
    const neutral = themeColour('--vscode-foreground', '--vscode-editor-foreground');
    const edgeColour = withAlpha(themeColour('--vscode-descriptionForeground', '--vscode-foreground'), 0.35);
    const graph = new Graph({ type: 'undirected', multi: false, allowSelfLoops: false });
    const count = data.nodes.ids.length;
    // Members on an inner circle, neighbours on an outer one: a deterministic start for the layout.
    for (let i = 0; i < count; i++) {
      const isMember = i < data.memberCount;
      const ring = isMember ? 1 : 2;
      const slots = isMember ? data.memberCount : Math.max(1, count - data.memberCount);
      const slot = isMember ? i : i - data.memberCount;
      const angle = (2 * Math.PI * slot) / slots;
      graph.addNode(String(i), { x: ring * Math.cos(angle), y: ring * Math.sin(angle), size: isMember ? 5 : 3, color: '' });
    }
    for (let e = 0; e < data.source.length; e++) {
      const s = String(data.source[e]);
      const t = String(data.target[e]);
      if (s !== t && !graph.hasEdge(s, t)) graph.addEdge(s, t, { size: 1, color: edgeColour });
    }
    graph.forEachNode((node) => graph.setNodeAttribute(node, 'color', this.nodeColour(Number(node), neutral)));
    try {
      this.renderer = new Sigma(graph, this.stage, {
        settings: { renderLabels: false, hideEdgesOnMove: graph.size > 5000, stagePadding: 16, itemSizesReference: 'screen' },
      });
    } catch (error) {
      this.showUnavailable(
        `The neighbourhood graph cannot be drawn here (${(error as Error).message}). Everything else works: the members are listed in the table.`,
      );
      return;
    }
    this.renderer.on('enterNode', ({ node }) => this.showTooltip(Number(node)));
    this.renderer.on('leaveNode', () => {
      this.tooltip.hidden = true;
    });
    this.renderer.on('clickNode', ({ node }) => this.showTooltip(Number(node), true));
    this.renderer.on('doubleClickNode', ({ node, event }) => {
      event.preventSigmaDefault();
      this.events.openNode(data.nodes.ids[Number(node)]);
    });
    this.renderer.on('clickStage', () => {
      this.tooltip.hidden = true;
    });
    if (graph.size > 0) this.runLayout(graph);
  }

  /**
   * Small graphs are laid out at once on this thread (deterministic, a few tens of milliseconds).
   * Large ones keep their ring start until the curator asks ("Lay out"): redrawing thousands of
   * nodes after every worker round would keep the panel busy for seconds.
   */
  private runLayout(graph: Graph): void {
    if (graph.order <= synchronousLayoutLimit)
      forceAtlas2.assign(graph, { iterations: synchronousIterations, settings: layoutSettings(graph) });
  }

  /** ForceAtlas2 in its worker, stopped after a fixed number of rounds (counted by the position updates it makes) rather than after a time, so a busy machine still gets a layout. */
  private runWorkerLayout(graph: Graph): void {
    this.layout?.kill();
    window.clearTimeout(this.layoutTimer);
    const settings = layoutSettings(graph);
    try {
      const layout = new FA2Layout(graph, { settings });
      this.layout = layout;
      let rounds = 0;
      const onRound = () => {
        if (++rounds < workerRounds) return;
        graph.off('eachNodeAttributesUpdated', onRound);
        layout.stop();
        this.zoomToFit();
      };
      graph.on('eachNodeAttributesUpdated', onRound);
      layout.start();
      this.layoutTimer = window.setTimeout(() => layout.stop(), workerMaxMilliseconds);
    } catch (error) {
      // No worker (e.g. a policy without worker-src): the circular start stays.
      console.warn(`graph layout unavailable: ${(error as Error).message}`);
      this.layout = null;
    }
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
