// Graphs and dense references shared by the graph kernel tests.
import Graph from 'graphology';
import { karateClub } from 'graphology-generators/social';
import { buildAdjacency, sortAndMergeRows, type CsrMatrix } from '../../src/engine/graph/csr';
import type { EdgeList } from '../../src/engine/dataset/types';
import { SeededRandom } from '../../src/engine/util/random';

export function edgeList(pairs: Array<[number, number]>, weights?: number[]): EdgeList {
  return {
    source: Int32Array.from(pairs.map((p) => p[0])),
    target: Int32Array.from(pairs.map((p) => p[1])),
    weight: weights ? Float32Array.from(weights) : null,
    count: pairs.length,
  };
}

/** Zachary's karate club as shipped by graphology-generators: 34 nodes, 78 undirected edges. */
export function karateEdges(): { nodeCount: number; edges: EdgeList } {
  const graph = karateClub(Graph);
  const pairs: Array<[number, number]> = [];
  graph.forEachEdge((_edge, _attributes, source, target) => pairs.push([Number(source), Number(target)]));
  return { nodeCount: graph.order, edges: edgeList(pairs) };
}

/** Row-major dense copy of a CSR matrix, summing any repeated entries. */
export function toDense(m: CsrMatrix): Float64Array {
  const dense = new Float64Array(m.rowCount * m.colCount);
  for (let row = 0; row < m.rowCount; row++) {
    for (let k = m.rowPtr[row]; k < m.rowPtr[row + 1]; k++) dense[row * m.colCount + m.colIndex[k]] += m.values[k];
  }
  return dense;
}

/** Dense adjacency of an undirected edge list (each edge counted in both directions, weights summed). */
export function denseAdjacency(nodeCount: number, edges: EdgeList): Float64Array {
  const dense = new Float64Array(nodeCount * nodeCount);
  for (let e = 0; e < edges.count; e++) {
    const u = edges.source[e];
    const v = edges.target[e];
    const w = edges.weight ? edges.weight[e] : 1;
    dense[u * nodeCount + v] += w;
    if (u !== v) dense[v * nodeCount + u] += w;
  }
  return dense;
}

/** Row-major product of an (n × inner) and an (inner × columns) matrix, in float64. */
export function denseMatMul(left: ArrayLike<number>, n: number, inner: number, right: ArrayLike<number>, columns: number): Float64Array {
  const out = new Float64Array(n * columns);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < inner; k++) {
      const a = left[i * inner + k];
      if (a === 0) continue;
      for (let j = 0; j < columns; j++) out[i * columns + j] += a * right[k * columns + j];
    }
  }
  return out;
}

export function denseTranspose(m: ArrayLike<number>, rows: number, columns: number): Float64Array {
  const out = new Float64Array(rows * columns);
  for (let i = 0; i < rows; i++) for (let j = 0; j < columns; j++) out[j * rows + i] = m[i * columns + j];
  return out;
}

export function randomDense(random: SeededRandom, length: number): Float32Array {
  const out = new Float32Array(length);
  for (let i = 0; i < length; i++) out[i] = random.normal();
  return out;
}

/**
 * Random rectangular CSR matrix with weighted entries, about a fifth of the rows empty and some
 * entries repeated. merged: sorted rows with repeats summed (sortAndMergeRows); otherwise the raw
 * rows, unsorted and with the repeats kept, which the products must also sum correctly.
 */
export function randomCsr(random: SeededRandom, rowCount: number, colCount: number, meanPerRow: number, merged = true): CsrMatrix {
  const rowPtr = new Int32Array(rowCount + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  for (let row = 0; row < rowCount; row++) {
    const length = random.next() < 0.2 ? 0 : random.int(2 * meanPerRow + 1);
    for (let i = 0; i < length; i++) {
      const col = random.int(colCount);
      cols.push(col);
      vals.push(random.normal());
      if (random.next() < 0.1) {
        cols.push(col);
        vals.push(random.normal());
      }
    }
    rowPtr[row + 1] = cols.length;
  }
  if (!merged) return { rowCount, colCount, rowPtr, colIndex: Int32Array.from(cols), values: Float32Array.from(vals) };
  return sortAndMergeRows(rowCount, colCount, rowPtr, Int32Array.from(cols), Float32Array.from(vals));
}

export function randomGraphAdjacency(random: SeededRandom, nodeCount: number, edgeCount: number): CsrMatrix {
  const pairs: Array<[number, number]> = [];
  for (let e = 0; e < edgeCount; e++) pairs.push([random.int(nodeCount), random.int(nodeCount)]);
  return buildAdjacency(nodeCount, edgeList(pairs), true);
}

export function maxAbsDifference(actual: ArrayLike<number>, expected: ArrayLike<number>): number {
  if (actual.length !== expected.length) throw new Error(`length ${actual.length} ≠ ${expected.length}`);
  let worst = 0;
  for (let i = 0; i < actual.length; i++) worst = Math.max(worst, Math.abs(actual[i] - expected[i]));
  return worst;
}
