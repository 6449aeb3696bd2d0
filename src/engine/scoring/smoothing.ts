// Neighbour smoothing of novelty scores: a node inside a region of novel nodes is more likely
// novel itself, and an isolated spike among confident neighbours is damped. Same update as the
// reference pipeline: synchronous rounds, unweighted neighbour mean, isolated nodes unchanged.
import type { CsrMatrix } from '../graph/csr';

/**
 * rounds times: s′_i = (1 − λ)·s_i + λ·mean_{j ∈ row i} s_j, every node from the previous round's
 * scores; a node with an empty row keeps its score. λ = 0 or rounds = 0 returns a copy.
 * Neighbours are the column indices of CSR row i, each counted once and unweighted (edge values
 * are ignored, as in the reference). Pass a symmetric adjacency for an undirected graph.
 * Difference from the reference only on multigraphs: the CSR merges duplicate edges into one
 * entry, while the reference counts a duplicated edge twice; a self-loop is one entry here
 * (the node's own score joins the mean once).
 */
export function smoothNovelty(scores: Float32Array, adjacency: CsrMatrix, lambda: number, rounds: number): Float32Array {
  const n = scores.length;
  if (adjacency.rowCount !== n || adjacency.colCount !== n) {
    throw new RangeError(`smoothNovelty: adjacency is ${adjacency.rowCount} × ${adjacency.colCount} but there are ${n} scores`);
  }
  if (!(lambda >= 0 && lambda <= 1)) throw new RangeError(`smoothNovelty: lambda must be in [0, 1], got ${lambda}`);
  if (!Number.isInteger(rounds) || rounds < 0) throw new RangeError(`smoothNovelty: rounds must be a non-negative integer, got ${rounds}`);
  let current = Float32Array.from(scores);
  if (lambda === 0 || rounds === 0) return current;
  let next = new Float32Array(n);
  const { rowPtr, colIndex } = adjacency;
  const keep = 1 - lambda;
  // λ / degree once per node rather than a division per node per round.
  const neighbourWeight = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const degree = rowPtr[i + 1] - rowPtr[i];
    neighbourWeight[i] = degree === 0 ? 0 : lambda / degree;
  }
  for (let round = 0; round < rounds; round++) {
    let start = rowPtr[0];
    for (let i = 0; i < n; i++) {
      const end = rowPtr[i + 1];
      if (end === start) {
        next[i] = current[i];
        continue;
      }
      let total = 0;
      for (let k = start; k < end; k++) total += current[colIndex[k]];
      next[i] = keep * current[i] + neighbourWeight[i] * total;
      start = end;
    }
    const swap = current;
    current = next;
    next = swap;
  }
  return current;
}
