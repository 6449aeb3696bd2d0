// What a node's neighbours say: how many of its distinct neighbours carry each curated label and
// how many carry none. Counted on the graph as it stood at the end of the scored slice, never
// counting the node itself (self-loops are skipped), so a node's own label never votes for itself.
import type { CsrMatrix } from '../graph/csr';

export interface NeighbourLabels {
  /** Labelled neighbours per global class index. */
  byClass: Map<number, number>;
  labelled: number;
  unlabelled: number;
}

/**
 * adjacency is over local indices; globalIndex maps them to dataset nodes and labels holds each
 * dataset node's global class (-1 = unlabelled).
 */
export function neighbourLabelsOf(local: number, adjacency: CsrMatrix, globalIndex: Int32Array, labels: Int32Array): NeighbourLabels {
  const byClass = new Map<number, number>();
  let labelled = 0;
  let unlabelled = 0;
  let previous = -1;
  // Columns are sorted within a row, so a repeated neighbour is adjacent to its first entry.
  for (let k = adjacency.rowPtr[local]; k < adjacency.rowPtr[local + 1]; k++) {
    const neighbour = adjacency.colIndex[k];
    if (neighbour === local || neighbour === previous) continue;
    previous = neighbour;
    const label = labels[globalIndex[neighbour]];
    if (label < 0) {
      unlabelled++;
      continue;
    }
    labelled++;
    byClass.set(label, (byClass.get(label) ?? 0) + 1);
  }
  return { byClass, labelled, unlabelled };
}

/** { className: count } sorted by count, most first (then by name), for reports. */
export function namedCounts(byClass: Map<number, number>, classNames: readonly string[]): Record<string, number> {
  const entries = Array.from(byClass.entries())
    .map(([c, n]) => [classNames[c], n] as const)
    .sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
  return Object.fromEntries(entries);
}
