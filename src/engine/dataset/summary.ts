// A plain, serialisable overview of a loaded dataset: what the CLI's `summary` prints and what
// the extension shows. Edges are counted in the slice of their time column when the edges file
// has one, otherwise in the slice of their later endpoint (the edge cannot exist before both ends).
import type { Dataset } from './types';

export interface SliceSummary {
  key: string;
  nodes: number;
  edges: number;
  labelled: number;
}

export interface ClassSummary {
  name: string;
  /** "active" | "merged" | "retired", or "unregistered" for a label missing from classes.json. */
  status: string;
  labelled: number;
}

export interface DatasetSummary {
  name: string;
  folder: string;
  directed: boolean;
  granularity: string;
  nodeCount: number;
  edgeCount: number;
  featureSource: string;
  featureDim: number;
  slices: SliceSummary[];
  classes: ClassSummary[];
  labelledCount: number;
  unlabelledCount: number;
  /** Unlabelled nodes / all nodes (0 for an empty graph). */
  unlabelledShare: number;
}

/** Slice index of edge e. */
export function edgeSliceOf(dataset: Dataset, e: number): number {
  const { edges, nodeSlice } = dataset;
  if (edges.edgeSlice) return edges.edgeSlice[e];
  return Math.max(nodeSlice[edges.source[e]], nodeSlice[edges.target[e]]);
}

export function summarizeDataset(dataset: Dataset): DatasetSummary {
  const slices: SliceSummary[] = dataset.slices.map((s) => ({ key: s.key, nodes: s.nodeCount, edges: 0, labelled: 0 }));
  for (let e = 0; e < dataset.edges.count; e++) slices[edgeSliceOf(dataset, e)].edges++;
  const perClass = new Array<number>(dataset.classNames.length).fill(0);
  let labelledCount = 0;
  for (let i = 0; i < dataset.labels.length; i++) {
    const k = dataset.labels[i];
    if (k < 0) continue;
    perClass[k]++;
    labelledCount++;
    slices[dataset.nodeSlice[i]].labelled++;
  }
  const statusOf = new Map(dataset.classes.map((c) => [c.name, c.status as string]));
  const nodeCount = dataset.nodeIds.length;
  return {
    name: dataset.manifest.name,
    folder: dataset.folder,
    directed: dataset.manifest.directed,
    granularity: dataset.manifest.time.granularity,
    nodeCount,
    edgeCount: dataset.edges.count,
    featureSource: dataset.manifest.features.source,
    featureDim: dataset.featureDim,
    slices,
    classes: dataset.classNames.map((name, k) => ({ name, status: statusOf.get(name) ?? 'unregistered', labelled: perClass[k] })),
    labelledCount,
    unlabelledCount: nodeCount - labelledCount,
    unlabelledShare: nodeCount === 0 ? 0 : (nodeCount - labelledCount) / nodeCount,
  };
}

/** Plain-text rendering: a header, a per-slice table and a per-class table. */
export function formatSummaryText(summary: DatasetSummary): string {
  const lines: string[] = [];
  const percent = (x: number): string => `${(100 * x).toFixed(1)}%`;
  lines.push(`${summary.name}  (${summary.folder})`);
  lines.push(
    `${summary.nodeCount} nodes, ${summary.edgeCount} ${summary.directed ? 'directed' : 'undirected'} edges, ${summary.slices.length} slices by ${summary.granularity}`,
  );
  lines.push(`features: ${summary.featureDim} from ${summary.featureSource}`);
  lines.push(
    `labelled: ${summary.labelledCount} (${percent(1 - summary.unlabelledShare)}), unlabelled: ${summary.unlabelledCount} (${percent(summary.unlabelledShare)})`,
  );
  lines.push('');
  lines.push(
    ...table(
      ['slice', 'nodes', 'edges', 'labelled'],
      summary.slices.map((s) => [s.key, String(s.nodes), String(s.edges), String(s.labelled)]),
    ),
  );
  lines.push('');
  if (summary.classes.length === 0) lines.push('no classes yet');
  else
    lines.push(
      ...table(
        ['class', 'status', 'labelled'],
        summary.classes.map((c) => [c.name, c.status, String(c.labelled)]),
      ),
    );
  return lines.join('\n') + '\n';
}

function table(header: string[], rows: string[][]): string[] {
  const widths = header.map((h, k) => Math.max(h.length, ...rows.map((r) => r[k].length)));
  // First column left-aligned (names), the rest right-aligned (counts).
  const render = (cells: string[]): string =>
    cells
      .map((c, k) => (k === 0 ? c.padEnd(widths[k]) : c.padStart(widths[k])))
      .join('  ')
      .trimEnd();
  return [render(header), ...rows.map(render)];
}
