// The candidate's neighbourhood: a GraphScene (typed arrays) drawn by our scene layer inside a sigma
// renderer, which gives the camera, pan and zoom; laid out by ForceAtlas2, in a web worker for large
// neighbourhoods (a blob: URL, allowed by the panel's worker-src). Hover and click are resolved on
// the CPU. Colours: classes from our palette; unclassified nodes and links in the theme's foreground.
import Graph from 'graphology';
import Sigma from 'sigma';
import type { ClassView, NeighbourhoodGraph } from '../src/protocol/webview';
import { classColour } from './classPalette';
import { cssColourBytes } from './cssColour';
import { nodeCount, pickNode, sceneExtent, type GraphScene } from './graphScene';
import { SceneLayer, viewScales, type SceneSource } from './sceneLayer';
import { initialPlacement } from './initialPlacement';
import { layOutAtOnce, layoutSettledMark, ProgressiveLayout, type LayoutBudget } from './progressiveLayout';
import { el, replaceChildren } from './dom';

/** Up to this many nodes ForceAtlas2 runs before the first frame (about 0.2 s here); above, in its worker after it. */
const synchronousLayoutLimit = 300;
export const graphRenderedMark = 'review:graph-rendered';
const synchronousIterations = 150;
/** "Lay out": long enough for a large graph to settle. */
const relayoutBudget: LayoutBudget = { rounds: 150, maxMilliseconds: 30_000, applyEveryMilliseconds: 400 };
/** The automatic refinement of a large graph: short, so that the panel is quiet again soon. */
const refineBudget: LayoutBudget = { rounds: 150, maxMilliseconds: 4000, applyEveryMilliseconds: 1000 };

/** WebGL is what sigma draws with; some VS Code installs (remote desktops, old drivers) lack it. */
export function webglAvailable(): boolean {
  try {
    // WebGL 2, which sigma and the scene layer need; the probe context is given back at once.
    const context = document.createElement('canvas').getContext('webgl2');
    context?.getExtension('WEBGL_lose_context')?.loseContext();
    return Boolean(context);
  } catch {
    return false;
  }
}

function themeColour(variable: string, fallbackVariable: string): string {
  const style = getComputedStyle(document.body);
  return (style.getPropertyValue(variable) || style.getPropertyValue(fallbackVariable)).trim() || 'gray';
}

/** FNV-1a over the node ids: the same candidate with other nodes (but the same counts) is drawn anew. */
function idsHash(ids: string[]): number {
  let hash = 0x811c9dc5;
  for (const id of ids) {
    for (let c = 0; c < id.length; c++) hash = Math.imul(hash ^ id.charCodeAt(c), 0x01000193);
    hash = Math.imul(hash ^ 10, 0x01000193);
  }
  return hash >>> 0;
}

export interface GraphViewEvents {
  openNode(nodeId: string): void;
}

export class GraphView {
  readonly element: HTMLElement;
  private readonly stage: HTMLElement;
  private readonly tooltip: HTMLElement;
  private readonly caption: HTMLElement;
  private readonly legend: HTMLElement;
  private renderer: Sigma | null = null;
  /** What the scene layer draws. */
  private readonly source: SceneSource = { scene: null, positionsVersion: 0, coloursVersion: 0, linkColour: [0, 0, 0, 0] };
  /** The tooltip stays (a click showed it) until the next click elsewhere. */
  private pinned = false;
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
    this.legend = el('ul', { class: 'graph-legend', id: 'graph-legend', 'aria-label': 'Colours of the graph' });
    const fit = el('vscode-button', { id: 'zoom-fit', secondary: true, title: 'Zoom to fit (F)' }, 'Zoom to fit');
    fit.addEventListener('click', () => this.zoomToFit());
    const relayout = el(
      'vscode-button',
      { id: 'run-layout', secondary: true, title: 'Run the force layout again (in a worker)' },
      'Lay out',
    );
    relayout.addEventListener('click', () => {
      if (this.source.scene) this.runWorkerLayout(this.source.scene);
    });
    this.element = el(
      'section',
      { class: 'graph', 'aria-label': 'Neighbourhood graph' },
      el('div', { class: 'graph-toolbar' }, this.caption, relayout, fit),
      this.legend,
      this.stage,
      this.tooltip,
    );
    // The stage changes size without a window resize (a form opens above it): sigma measures anew.
    new ResizeObserver(() => this.renderer?.scheduleRefresh()).observe(this.stage);
    // VS Code changes theme in place (the variables on <html>, the kind on <body>): recolour then.
    const themeWatch = new MutationObserver(() => this.recolour());
    themeWatch.observe(document.documentElement, { attributes: true, attributeFilter: ['style'] });
    themeWatch.observe(document.body, { attributes: true, attributeFilter: ['class'] });
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
      this.showLegend();
      // The renderer stays for the next candidate (a new one compiles its programs again).
      this.blank();
      this.renderer?.refresh();
      return;
    }
    const edgeNote = graph.truncated
      ? ` (${graph.source.length.toLocaleString()} of ${graph.totalEdges.toLocaleString()} links shown)`
      : '';
    this.caption.textContent = `${graph.memberCount} members, ${graph.nodes.ids.length - graph.memberCount} neighbours, ${graph.source.length} links${edgeNote}`;
    if (this.unavailable) return;
    // Same candidate and same nodes: recolour in place and keep the layout.
    const key = `${candidateId}|${graph.nodes.ids.length}|${graph.source.length}|${idsHash(graph.nodes.ids)}`;
    if (key === this.shownKey && this.renderer) {
      this.recolour();
      return;
    }
    this.shownKey = key;
    this.showLegend();
    this.draw(graph);
  }

  /** Call when the graph's container shows again after being hidden: sigma measures it anew. */
  becameVisible(): void {
    this.renderer?.resize(true).refresh();
  }

  zoomToFit(): void {
    const renderer = this.renderer;
    if (!renderer) return;
    // The frame stops following the layout once the view was moved: fit the graph as it is now.
    if (this.source.scene) renderer.setCustomBBox(sceneExtent(this.source.scene)).refresh();
    void renderer.getCamera().reset({ duration: 200 });
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
    this.blank();
    this.renderer?.kill();
    this.renderer = null;
  }

  /** Nothing to draw: no layout running, no scene, no box. */
  private blank(): void {
    this.stopLayout();
    this.source.scene = null;
    this.shownKey = '';
    this.tooltip.hidden = true;
    this.pinned = false;
  }

  /** The class node i is coloured with: pending, else label, else predicted (negative for none). */
  private colourClass(i: number): number {
    const data = this.data as NeighbourhoodGraph;
    return data.nodes.pending[i] >= 0 ? data.nodes.pending[i] : data.nodes.label[i] >= 0 ? data.nodes.label[i] : data.nodes.predicted[i];
  }

  /** Node colours (class, else the theme's foreground) and the link colour (the theme's, faint). */
  private writeColours(scene: GraphScene): void {
    const neutral = cssColourBytes(themeColour('--vscode-foreground', '--vscode-editor-foreground'));
    for (let i = 0; i < nodeCount(scene); i++) {
      const cls = this.colourClass(i);
      scene.colours.set(cls >= 0 ? cssColourBytes(classColour(this.classes[cls]?.colour ?? cls)) : neutral, 4 * i);
    }
    this.source.coloursVersion++;
    // Links faint: 35% of the theme colour's own opacity (themes give some colours as rgba()).
    const link = cssColourBytes(themeColour('--vscode-descriptionForeground', '--vscode-foreground'));
    const alpha = (link[3] / 255) * 0.35;
    this.source.linkColour = [(link[0] / 255) * alpha, (link[1] / 255) * alpha, (link[2] / 255) * alpha, alpha];
  }

  private recolour(): void {
    this.showLegend();
    if (!this.renderer || !this.source.scene) return;
    this.writeColours(this.source.scene);
    this.renderer.refresh();
  }

  /** The key to the colours: each class drawn, most nodes first, and the nodes without one. */
  private showLegend(): void {
    const data = this.data;
    if (!data) {
      replaceChildren(this.legend);
      return;
    }
    const counts = new Map<number, number>();
    for (let i = 0; i < data.nodes.ids.length; i++) {
      const cls = this.colourClass(i);
      counts.set(cls, (counts.get(cls) ?? 0) + 1);
    }
    const shown = 8;
    const entries = [...counts].filter(([cls]) => cls >= 0).sort((a, b) => b[1] - a[1] || a[0] - b[0]);
    const entry = (colour: string, name: string, count: number, classIndex: number | null) => {
      const swatch = el('span', { class: 'legend-swatch', 'aria-hidden': 'true' });
      swatch.style.background = colour;
      return el('li', classIndex === null ? { class: 'legend-none' } : { 'data-class': String(classIndex) }, swatch, `${name} ${count}`);
    };
    const more = entries.length - shown;
    replaceChildren(
      this.legend,
      ...entries
        .slice(0, shown)
        .map(([cls, count]) => entry(classColour(this.classes[cls]?.colour ?? cls), this.classes[cls]?.name ?? '?', count, cls)),
      more > 0
        ? el(
            'li',
            {
              class: 'muted',
              title: entries
                .slice(shown)
                .map(([cls]) => this.classes[cls]?.name ?? '?')
                .join(', '),
            },
            `+${more} more`,
          )
        : null,
      counts.has(-1) ? entry('var(--vscode-foreground)', 'no class', counts.get(-1) as number, null) : null,
    );
  }

  private draw(data: NeighbourhoodGraph): void {
    this.stopLayout();
    this.tooltip.hidden = true;
    this.pinned = false;
    const count = data.nodes.ids.length;
    // Duplicate links dropped on a numeric key.
    const seen = new Set<number>();
    const links: number[] = [];
    for (let e = 0; e < data.source.length; e++) {
      const [low, high] = data.source[e] < data.target[e] ? [data.source[e], data.target[e]] : [data.target[e], data.source[e]];
      const key = low * count + high;
      if (low === high || seen.has(key)) continue;
      seen.add(key);
      links.push(low, high);
    }
    // Members in a disc at the centre, neighbours in a disc per class around them: readable at
    // once, and a start from which the force layout settles quickly.
    const scene: GraphScene = {
      memberCount: data.memberCount,
      positions: Float32Array.from(initialPlacement(data, (i) => this.colourClass(i)).positions),
      sizes: Float32Array.from({ length: count }, (_, i) => (i < data.memberCount ? 5 : 3)),
      colours: new Uint8Array(4 * count),
      links: Uint32Array.from(links),
    };
    const laidOutAtOnce = count <= synchronousLayoutLimit;
    if (laidOutAtOnce) layOutAtOnce(scene, synchronousIterations);
    this.source.scene = scene;
    this.source.positionsVersion++;
    this.writeColours(scene);
    if (!this.renderer && !this.createRenderer()) return;
    const renderer = this.renderer as Sigma;
    const hideLinksOnMove = links.length / 2 > 5000;
    if (renderer.getSetting('hideEdgesOnMove') !== hideLinksOnMove) renderer.setSetting('hideEdgesOnMove', hideLinksOnMove);
    renderer.setCustomBBox(sceneExtent(scene));
    renderer.getCamera().setState({ x: 0.5, y: 0.5, ratio: 1, angle: 0 });
    renderer.refresh();
    // bench/reviewPanelScale.ts reads this mark.
    performance.mark(graphRenderedMark);
    if (laidOutAtOnce || scene.links.length === 0)
      performance.mark(layoutSettledMark, { detail: { rounds: laidOutAtOnce ? synchronousIterations : 0 } });
    else this.refineLater(scene);
  }

  private positionsMoved(): void {
    this.source.positionsVersion++;
    if (!this.renderer || !this.source.scene) return;
    // The frame follows the layout while the curator has not moved the view; once they have, it
    // stays, so that what they zoomed into does not jump away.
    const camera = this.renderer.getCamera().getState();
    if (camera.x === 0.5 && camera.y === 0.5 && camera.ratio === 1 && camera.angle === 0)
      this.renderer.setCustomBBox(sceneExtent(this.source.scene));
    this.renderer.refresh();
  }

  private createRenderer(): boolean {
    this.stage.replaceChildren();
    let renderer: Sigma;
    // sigma draws nothing of its own here (its frame graph holds one invisible node, because it
    // skips rendering an empty graph); it gives the camera, pan and zoom, and the frame in which
    // the scene layer draws every node and link. One renderer serves the panel's life: a new one
    // per candidate would compile its WebGL programs again, which takes seconds in software WebGL.
    const frame = new Graph();
    frame.addNode('frame', { x: 0, y: 0, size: 0, color: 'rgba(0, 0, 0, 0)' });
    try {
      renderer = new Sigma(frame, this.stage, {
        // allowInvalidContainer: the graph may be (re)drawn while another queue's tab hides it;
        // becameVisible() sizes it once it shows again.
        // Zoom bounded at 50× in (discs stay well under the point sizes GPUs draw) and 20× out.
        settings: {
          renderLabels: false,
          stagePadding: 16,
          itemSizesReference: 'screen',
          allowInvalidContainer: true,
          minCameraRatio: 0.02,
          maxCameraRatio: 20,
        },
      });
      renderer.addCustomLayerProgram('neighbourhood', 'edges', (gl) => new SceneLayer(gl, renderer, this.source));
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
    renderer.on('moveBody', ({ event }) => {
      // sigma reports pointer moves over the whole page; only those over the graph hover.
      const outside = event.x < 0 || event.y < 0 || event.x > this.stage.clientWidth || event.y > this.stage.clientHeight;
      if (this.pinned || outside) return;
      const node = this.nodeAt(event.x, event.y);
      if (node >= 0) this.showTooltip(node, false, event.y);
      else this.tooltip.hidden = true;
      this.stage.style.cursor = node >= 0 ? 'pointer' : '';
    });
    renderer.on('leaveStage', () => {
      if (!this.pinned) this.tooltip.hidden = true;
    });
    renderer.on('clickStage', ({ event }) => {
      const node = this.nodeAt(event.x, event.y);
      if (node >= 0) this.showTooltip(node, true, event.y);
      else {
        this.pinned = false;
        this.tooltip.hidden = true;
      }
    });
    renderer.on('doubleClickStage', (payload) => {
      const node = this.nodeAt(payload.event.x, payload.event.y);
      if (node < 0) return;
      // A double click on a node opens it instead of zooming.
      payload.preventSigmaDefault();
      const id = this.data?.nodes.ids[node];
      if (id !== undefined) this.events.openNode(id);
    });
    return true;
  }

  /** The node drawn under a point of the graph area (CSS pixels from its top left), or −1. */
  nodeAt(x: number, y: number): number {
    const renderer = this.renderer;
    const scene = this.source.scene;
    if (!renderer || !scene) return -1;
    const at = renderer.viewportToGraph({ x, y });
    const beside = renderer.viewportToGraph({ x: x + 1, y });
    const scales = viewScales(renderer, renderer.getRenderParams());
    return pickNode(scene, {
      x: at.x,
      y: at.y,
      graphUnitsPerPixel: Math.hypot(beside.x - at.x, beside.y - at.y),
      pixelsPerSize: scales.pixelsPerSize,
      slackPixels: 2,
    });
  }

  /**
   * A graph too large to lay out at once is drawn from its placement, then refined by
   * ForceAtlas2 in its worker for a bounded time, starting once the first frame is on screen;
   * "Lay out" runs it longer.
   */
  private refineLater(scene: GraphScene): void {
    this.layoutFrame = requestAnimationFrame(() => {
      this.layoutTimer = window.setTimeout(() => this.runWorkerLayout(scene, refineBudget, false), 0);
    });
  }

  private runWorkerLayout(scene: GraphScene, budget: LayoutBudget = relayoutBudget, fitAfter = true): void {
    // Also cancels a refinement still waiting to start, which would replace this run.
    this.stopLayout();
    const layout = new ProgressiveLayout(scene, budget, {
      isInteracting: () => this.interacting(),
      moved: () => this.positionsMoved(),
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

  /**
   * Details of node i; with `pinned`, the box stays until the next click elsewhere. The box sits at
   * the bottom of the graph, or at the top when the pointer (`pointerY`, pixels from the graph's
   * top) is in the lower half, so that it does not cover the node it describes.
   */
  showTooltip(i: number, pinned = false, pointerY?: number): void {
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
    this.tooltip.classList.toggle('pinned', pinned);
    const atTop = pointerY !== undefined && pointerY > this.stage.clientHeight / 2;
    this.tooltip.classList.toggle('at-top', atTop);
    this.tooltip.style.top = atTop ? `${this.stage.offsetTop + 8}px` : '';
    this.pinned = pinned;
  }
}
