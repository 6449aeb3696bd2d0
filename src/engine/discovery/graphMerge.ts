// Graph-aware merging of feature-space groups.
// k-means can cut one tightly linked community in two when its features spread out; the edges
// show that the halves belong together. Densities are counted in adjacency entries ("links"):
// a symmetric adjacency stores each undirected edge as two links, so the ratios below mean the
// same thing for directed and undirected graphs.
//   within(a)     = links inside a / (|a| · (|a| − 1))
//   between(a, b) = (links a→b + links b→a) / (2 · |a| · |b|)
// Two groups merge when between(a, b) ≥ mergeDensityRatio · max(within(a), within(b)) and at
// least minMergeLinks links join them: they are about as linked to each other as the more
// tightly linked of the two is inside itself. The pair with the highest ratio merges first, and
// the test is repeated on the merged groups until no pair passes.
import type { CsrMatrix } from '../graph/csr';

export interface GraphMergeOptions {
  /** Default 0.5. */
  mergeDensityRatio?: number;
  /** Default 4 (two undirected edges). */
  minMergeLinks?: number;
}

export interface GraphMergeResult {
  /** New group of each item, 0..groupCount−1, numbered in order of first appearance. */
  assignment: Int32Array;
  groupCount: number;
  /** Which groups were merged, as lists of the original group numbers (only merged ones). */
  merges: number[][];
}

/**
 * Links between and within groups. items[i] is the node of item i; assignment[i] its group
 * (negative = in no group). Only links whose both ends are items count.
 */
export function linkCountsBetweenGroups(adjacency: CsrMatrix, items: Int32Array, assignment: Int32Array, groupCount: number): Float64Array {
  const itemOfNode = new Int32Array(adjacency.rowCount).fill(-1);
  for (let i = 0; i < items.length; i++) itemOfNode[items[i]] = i;
  const links = new Float64Array(groupCount * groupCount);
  for (let i = 0; i < items.length; i++) {
    const gi = assignment[i];
    if (gi < 0) continue;
    const node = items[i];
    for (let e = adjacency.rowPtr[node]; e < adjacency.rowPtr[node + 1]; e++) {
      const j = itemOfNode[adjacency.colIndex[e]];
      if (j < 0 || j === i) continue;
      const gj = assignment[j];
      if (gj >= 0) links[gi * groupCount + gj]++;
    }
  }
  return links;
}

export function mergeLinkedGroups(
  adjacency: CsrMatrix,
  items: Int32Array,
  assignment: Int32Array,
  groupCount: number,
  options: GraphMergeOptions = {},
): GraphMergeResult {
  const ratioThreshold = options.mergeDensityRatio ?? 0.5;
  const minLinks = options.minMergeLinks ?? 4;
  const links = linkCountsBetweenGroups(adjacency, items, assignment, groupCount);
  const sizes = new Float64Array(groupCount);
  for (let i = 0; i < assignment.length; i++) if (assignment[i] >= 0) sizes[assignment[i]]++;
  // root[g]: the group g has been merged into (union by keeping the lower number).
  const root = Array.from({ length: groupCount }, (_, g) => g);
  const alive = new Uint8Array(groupCount).fill(1);
  for (let g = 0; g < groupCount; g++) if (sizes[g] === 0) alive[g] = 0;
  const within = (a: number): number => (sizes[a] > 1 ? links[a * groupCount + a] / (sizes[a] * (sizes[a] - 1)) : 0);
  for (;;) {
    let bestA = -1;
    let bestB = -1;
    let bestRatio = -Infinity;
    for (let a = 0; a < groupCount; a++) {
      if (!alive[a]) continue;
      for (let b = a + 1; b < groupCount; b++) {
        if (!alive[b]) continue;
        const crossLinks = links[a * groupCount + b] + links[b * groupCount + a];
        const tighter = Math.max(within(a), within(b));
        if (crossLinks < minLinks || tighter <= 0) continue;
        const ratio = crossLinks / (2 * sizes[a] * sizes[b]) / tighter;
        if (ratio >= ratioThreshold && ratio > bestRatio) {
          bestRatio = ratio;
          bestA = a;
          bestB = b;
        }
      }
    }
    if (bestA < 0) break;
    // Fold b into a: its rows and columns of the link table, and its size.
    for (let c = 0; c < groupCount; c++) {
      links[bestA * groupCount + c] += links[bestB * groupCount + c];
      links[bestB * groupCount + c] = 0;
    }
    for (let c = 0; c < groupCount; c++) {
      links[c * groupCount + bestA] += links[c * groupCount + bestB];
      links[c * groupCount + bestB] = 0;
    }
    sizes[bestA] += sizes[bestB];
    sizes[bestB] = 0;
    alive[bestB] = 0;
    for (let g = 0; g < groupCount; g++) if (root[g] === bestB) root[g] = bestA;
  }
  const renumber = new Int32Array(groupCount).fill(-1);
  const out = new Int32Array(assignment.length);
  let next = 0;
  for (let i = 0; i < assignment.length; i++) {
    if (assignment[i] < 0) {
      out[i] = -1;
      continue;
    }
    const r = root[assignment[i]];
    if (renumber[r] < 0) renumber[r] = next++;
    out[i] = renumber[r];
  }
  const members = new Map<number, number[]>();
  for (let g = 0; g < groupCount; g++) {
    const list = members.get(root[g]) ?? [];
    list.push(g);
    members.set(root[g], list);
  }
  const merges = [...members.values()].filter((list) => list.length > 1);
  return { assignment: out, groupCount: next, merges };
}
