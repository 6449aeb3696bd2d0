// The graph the panel draws for one candidate: its members and their one-hop neighbours, with
// the links among them. Capped so that a large candidate in a dense graph stays a payload the
// webview can take: links among members first (they show the candidate's own shape), then links
// to outside nodes taken in turns, one per member per turn, until `edgeCap` links are kept, so
// that every member shows some of its outside neighbours rather than the first members all.
import type { CsrMatrix } from '../engine/graph/csr';
import { neighbourhoodEdgeCap } from '../protocol/webview';

export interface NeighbourhoodIndices {
  /** Members first (all of them), then neighbours in the order their first kept link reaches them. */
  nodes: number[];
  memberCount: number;
  /** Positions into `nodes`. */
  source: number[];
  target: number[];
  totalEdges: number;
}

function hasEntry(adjacency: CsrMatrix, row: number, column: number): boolean {
  let low = adjacency.rowPtr[row];
  let high = adjacency.rowPtr[row + 1] - 1;
  while (low <= high) {
    const middle = (low + high) >> 1;
    const value = adjacency.colIndex[middle];
    if (value === column) return true;
    if (value < column) low = middle + 1;
    else high = middle - 1;
  }
  return false;
}

export function neighbourhoodOf(adjacency: CsrMatrix, members: ArrayLike<number>, edgeCap = neighbourhoodEdgeCap): NeighbourhoodIndices {
  const position = new Map<number, number>();
  const nodes: number[] = [];
  for (let i = 0; i < members.length; i++) {
    position.set(members[i], nodes.length);
    nodes.push(members[i]);
  }
  const memberCount = nodes.length;
  const source: number[] = [];
  const target: number[] = [];
  const { rowPtr, colIndex } = adjacency;
  let totalEdges = 0;
  // A link between two members is listed in both rows of a symmetric adjacency: keep it once.
  for (let i = 0; i < memberCount; i++) {
    const node = nodes[i];
    for (let e = rowPtr[node]; e < rowPtr[node + 1]; e++) {
      const other = colIndex[e];
      const j = position.get(other);
      if (j === undefined || j >= memberCount || other === node) continue;
      if (other < node && hasEntry(adjacency, other, node)) continue;
      totalEdges++;
      if (source.length < edgeCap) {
        source.push(i);
        target.push(j);
      }
    }
  }
  // Outside links: counted all, then taken in turns (each member's next one per turn).
  const isOutside = (e: number) => {
    const j = position.get(colIndex[e]);
    return j === undefined || j >= memberCount;
  };
  const cursor = new Int32Array(memberCount);
  for (let i = 0; i < memberCount; i++) {
    const node = nodes[i];
    cursor[i] = rowPtr[node];
    for (let e = rowPtr[node]; e < rowPtr[node + 1]; e++) if (isOutside(e)) totalEdges++;
  }
  // Members with outside links left; each turn drops the ones it finds exhausted, so a member of
  // very high degree costs its own links, not its links times the member count.
  let waiting = Array.from({ length: memberCount }, (_, i) => i);
  while (waiting.length > 0 && source.length < edgeCap) {
    const still: number[] = [];
    for (const i of waiting) {
      if (source.length >= edgeCap) break;
      const end = rowPtr[nodes[i] + 1];
      while (cursor[i] < end && !isOutside(cursor[i])) cursor[i]++;
      if (cursor[i] >= end) continue;
      const other = colIndex[cursor[i]++];
      let at = position.get(other);
      if (at === undefined) {
        at = nodes.length;
        position.set(other, at);
        nodes.push(other);
      }
      source.push(i);
      target.push(at);
      still.push(i);
    }
    waiting = still;
  }
  return { nodes, memberCount, source, target, totalEdges };
}
